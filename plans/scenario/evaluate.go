package scenario

import (
	"context"
	"fmt"
	"math"

	"netstage/plans"
)

// FixedPlanEvaluator returns an EvaluateFunc that values fixed purchases
// with solve, from the exported Case alone:
//
//   - the purchases become capacity the network already has from their
//     in-service years (candidate links built by the plan become existing
//     links; the others are dropped), no item can be bought and the budget
//     is lifted, so solve is left with the routing LP: the traffic served
//     and its revenue (and tax) given that capacity, or infeasible when the
//     committed demand does not fit;
//   - the purchases' own money is then added year by year under the rules
//     of DESIGN.md §2: capex at the case's prices after the vendor's volume
//     tier of the order year, opex and lease fees from the in-service year,
//     straight-line depreciation from the in-service year (its tax shield)
//     and salvage at the horizon.
//
// Valuing the base plan in the base case this way gives the base optimum
// back (a test checks it), which ties these rules to the model's. The
// Result has no baseline or incremental figures (its solve's "baseline"
// already had the purchases).
//
// The sweep command values plans with plans.Evaluate, which reuses the
// model and its pricing code. This evaluator keeps its own rules on
// purpose: it is the independent check of plans.Evaluate (a test requires
// both to agree in every scenario), and it works with any SolveFunc,
// such as the closed-form stand-ins of the command's golden tests.
func FixedPlanEvaluator(solve SolveFunc) EvaluateFunc {
	return func(ctx context.Context, c *plans.Case, purchases []plans.PlanRow) (*plans.Result, error) {
		return evaluateFixed(ctx, c, purchases, solve)
	}
}

// fixedPurchase is one purchase valued in a case.
type fixedPurchase struct {
	row       plans.PlanRow
	tau, life int // order year index, book life (0: nothing to depreciate)
	inService int // year index
	vendor    int // −1 for a build
	module    bool
	list      float64
	capex     float64
	opex      float64 // yearly
}

func evaluateFixed(ctx context.Context, c *plans.Case, rows []plans.PlanRow, solve SolveFunc) (*plans.Result, error) {
	T := c.Horizon
	ps, err := pricePurchases(c, rows)
	if err != nil {
		return nil, err
	}
	fixed := shallowCopy(c)
	fixed.Items = nil
	fixed.Budget = plans.Budget{Yearly: make([]float64, T), Cumulative: math.Inf(1)}
	for i := range fixed.Budget.Yearly {
		fixed.Budget.Yearly[i] = math.Inf(1)
	}
	built := map[string]bool{}
	for _, p := range ps {
		if p.row.Kind == plans.KindBuild {
			built[p.row.Link] = true
		}
	}
	fixed.Links = nil
	index := map[string]int{}
	for _, l := range c.Links {
		if l.Candidate != nil && !built[l.ID] {
			continue
		}
		l.Candidate = nil
		l.Items = nil
		l.BaseCapacity = append([]float64(nil), l.BaseCapacity...)
		l.OnOrder = append([]plans.Delivery(nil), l.OnOrder...)
		index[l.ID] = len(fixed.Links)
		fixed.Links = append(fixed.Links, l)
	}
	for _, p := range ps {
		if p.row.Kind == plans.KindBuild || p.inService >= T {
			continue
		}
		k, ok := index[p.row.Link]
		if !ok {
			return nil, fmt.Errorf("scenario: plan row on link %s, which the plan does not build", p.row.Link)
		}
		l := &fixed.Links[k]
		for t := p.inService; t < T; t++ {
			l.BaseCapacity[t] += p.row.Gbps
		}
		l.OnOrder = append(l.OnOrder, plans.Delivery{Gbps: p.row.Gbps, Year: c.Year(p.inService)})
	}
	res, err := solve(ctx, fixed)
	if err != nil {
		return nil, err
	}
	if res.Objective == nil {
		return res, nil
	}
	out := *res
	out.Plan = make([]plans.PlanRow, len(ps))
	add := make([]plans.CashflowRow, T)
	for i, p := range ps {
		out.Plan[i] = p.row
		out.Plan[i].ListCapex, out.Plan[i].Capex, out.Plan[i].Opex = p.list, p.capex, p.opex
		if p.tau < T {
			add[p.tau].Capex += p.capex
		}
		for t := p.inService; t < T; t++ {
			add[t].Opex += p.opex
		}
		if p.capex == 0 || p.life == 0 {
			continue
		}
		for t := p.inService; t < min(p.inService+p.life, T); t++ {
			add[t].Depreciation += p.capex / float64(p.life)
		}
		if c.Finance.Salvage == plans.SalvageStraightLine {
			if used := T - p.inService; used < p.life {
				add[T-1].Salvage += p.capex * (1 - float64(used)/float64(p.life))
			}
		}
	}
	out.Cashflow = make([]plans.CashflowRow, T)
	copy(out.Cashflow, res.Cashflow)
	npv, cum := 0.0, 0.0
	for t := 0; t < T; t++ {
		r := &out.Cashflow[t]
		r.Year = c.Year(t)
		r.DiscountFactor = c.DiscountFactor(t)
		r.Capex += add[t].Capex
		r.Opex += add[t].Opex
		r.Depreciation += add[t].Depreciation
		r.Salvage += add[t].Salvage
		r.BudgetUsed = r.Capex
		if v, ok := c.Budget.YearCap(t); ok {
			r.Budget = &v
		} else {
			r.Budget = nil
		}
		r.Tax = c.Finance.TaxRate * (r.Revenue - r.Opex - r.Depreciation)
		r.Net = r.Revenue - r.Opex - r.Capex - r.Tax - r.Penalty + r.Salvage
		r.PV = r.DiscountFactor*(r.Net-r.Salvage) + c.SalvageDiscountFactor()*r.Salvage
		cum += r.PV
		r.CumulativePV = cum
		npv += r.PV
	}
	out.Objective = &npv
	out.Bound, out.Gap, out.MPSObjective = nil, nil, nil
	out.TotalCapex = 0
	for _, p := range ps {
		out.TotalCapex += p.capex
	}
	// The solve's baseline had the purchases as existing capacity: it is
	// no baseline of c, so nothing incremental is reported.
	out.BaselineNPV, out.IncrementalNPV, out.BaselineCashflow, out.Shortfall = nil, nil, nil, nil
	out.IRR, out.PaybackYear, out.ProfitabilityIndex = nil, nil, nil
	out.Status = plans.StatusOptimal
	return &out, nil
}

// pricePurchases values plan rows at c's prices, with each vendor's volume
// tier of each order year (all-units: the largest discount whose threshold
// the year's module list spend or units reach).
func pricePurchases(c *plans.Case, rows []plans.PlanRow) ([]fixedPurchase, error) {
	ps := make([]fixedPurchase, 0, len(rows))
	type key struct{ vendor, tau int }
	spend := map[key]float64{}
	units := map[key]float64{}
	for _, row := range rows {
		p := fixedPurchase{row: row, tau: row.Year - c.FirstYear, inService: row.InService - c.FirstYear, vendor: -1}
		if p.tau < 0 || p.tau >= c.Horizon {
			return nil, fmt.Errorf("scenario: plan row ordered in %d, outside the case's years", row.Year)
		}
		li := c.LinkIndex(row.Link)
		if li < 0 {
			return nil, fmt.Errorf("scenario: plan row on unknown link %s", row.Link)
		}
		l := &c.Links[li]
		switch row.Kind {
		case plans.KindBuild:
			if l.Candidate == nil {
				return nil, fmt.Errorf("scenario: plan builds link %s, which is no candidate", row.Link)
			}
			p.list, p.capex, p.opex, p.life = l.Candidate.BuildCost, l.Candidate.BuildCost, l.Candidate.Opex, max(l.Candidate.BookLife, 1)
		default:
			k := findItem(c, row.Item, row.Vendor)
			if k < 0 {
				return nil, fmt.Errorf("scenario: plan row buys unknown item %s of vendor %s", row.Item, row.Vendor)
			}
			it := &c.Items[k]
			p.vendor = it.Vendor
			p.opex = float64(row.Units) * it.OrderOpex[p.tau]
			if it.Kind == plans.Module {
				p.module = true
				p.list = float64(row.Units) * it.Capex(p.tau, l.KM)
				p.capex = p.list
				p.life = max(it.BookLife, 1)
				spend[key{p.vendor, p.tau}] += p.list
				units[key{p.vendor, p.tau}] += float64(row.Units)
			}
		}
		ps = append(ps, p)
	}
	for i := range ps {
		p := &ps[i]
		if !p.module {
			continue
		}
		k := key{p.vendor, p.tau}
		d := 0.0
		for _, t := range c.Vendors[p.vendor].Tiers {
			v := spend[k]
			if t.Basis == plans.TierByUnits {
				v = units[k]
			}
			if v >= t.Threshold*(1-tierTolerance)-tierAbsTolerance {
				d = math.Max(d, t.Discount)
			}
		}
		p.capex = p.list * (1 - d)
	}
	return ps, nil
}

// Tier thresholds count as reached within these tolerances (the model's
// own, so that a plan at a threshold keeps its discount when re-priced).
const (
	tierTolerance    = 1e-7
	tierAbsTolerance = 1e-3
)

func findItem(c *plans.Case, item, vendor string) int {
	for k := range c.Items {
		if c.Items[k].ID == item && c.Vendors[c.Items[k].Vendor].ID == vendor {
			return k
		}
	}
	return -1
}
