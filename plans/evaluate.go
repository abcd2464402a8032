package plans

import (
	"context"
	"fmt"
	"time"

	"netstage/mip"
)

// Evaluate values a fixed plan in case c with the model Solve solves: the
// purchases of plan (units of an item of a vendor on a link in an order
// year, and builds of candidate links; the PlanRow fields Year, Link, Kind,
// Item, Vendor and Units are read, the money fields ignored) are fixed,
// and what is left is chosen for the best NPV under c's rules: the routing
// and the traffic served, each vendor's volume tier, the vendor choice of
// [case] one_vendor. The budget is NOT enforced (a plan made for other
// assumptions may not fit this case's caps; Result.Cashflow shows the
// budget used against each cap). Everything is priced, depreciated, taxed
// and discounted by the code that prices Solve's plans, so a plan valued in
// its own case gives back its NPV. Baseline and incremental figures are
// those of c.
//
// A plan whose capacity cannot carry c's committed demand gets status
// infeasible (no explanation is computed). A plan row that c does not
// offer (unknown link or item, an order year the item cannot be ordered
// in, more units than the link allows) is an error.
func Evaluate(ctx context.Context, c *Case, plan []PlanRow) (*Result, error) {
	start := time.Now()
	m, err := BuildModel(c, BuildOptions{NoCutSets: true, freeBudgets: true})
	if err != nil {
		return nil, err
	}
	if err := m.fixPlan(plan); err != nil {
		return nil, err
	}
	res := &Result{
		Case: c.Name, Currency: c.Currency, CostMode: c.CostMode(),
		Stats: SolverStats{Rows: m.LP.NumRows(), Columns: m.LP.NumCols(), Integers: countTrue(m.LP.Integer)},
	}
	base, err := solveBaseline(ctx, c)
	if err != nil {
		return nil, err
	}
	res.setBaseline(base)
	// Left integer: tier and vendor-choice binaries, a handful per vendor
	// and year, fully determined by the fixed purchases.
	mr, err := mipSolve(ctx, m.LP, mip.Settings{RelGap: 1e-9})
	if err != nil {
		return nil, fmt.Errorf("plans: %w", err)
	}
	res.Stats.Nodes, res.Stats.Iterations = mr.Nodes, mr.LPIterations
	switch mr.Status {
	case mip.Optimal:
	case mip.Infeasible:
		res.Status = StatusInfeasible
		res.Stats.Seconds = time.Since(start).Seconds()
		return res, nil
	default:
		return nil, fmt.Errorf("plans: valuing a fixed plan: solver stopped with status %v", mr.Status)
	}
	res.Status = StatusOptimal
	res.model = m
	res.mipObjective = mr.Objective
	if err := m.decode(context.WithoutCancel(ctx), res, mr.X, base, time.Time{}); err != nil {
		return nil, err
	}
	res.Stats.Seconds = time.Since(start).Seconds()
	return res, nil
}

// startFromPlan returns the point of m's model that has the purchases of
// plan (fixPlan on a copy of the model) and, for what they leave open (the
// routing and the traffic served, each vendor's tier, the vendor choice),
// the best values within the case's budgets: a start for the search. It
// returns nil when the plan does not fit the case (an item, link or order
// year the case does not offer, a budget it breaks, committed demand it
// cannot carry) or ctx ends first. A positive limit bounds its time; a
// solve stopped by it still gives its best point.
func (m *Model) startFromPlan(ctx context.Context, plan []PlanRow, limit time.Duration) []float64 {
	fixed := *m
	fixed.LP = m.LP.Clone()
	if fixed.fixPlan(plan) != nil {
		return nil
	}
	mr, err := mipSolve(ctx, fixed.LP, mip.Settings{RelGap: 1e-9, TimeLimit: limit})
	if err != nil || (mr.Status != mip.Optimal && mr.Status != mip.Feasible) {
		return nil
	}
	return mr.X
}

// setBaseline records the do-nothing plan's cash flow, shortfall and NPV
// (a warning when its LP could not be solved).
func (res *Result) setBaseline(base *baselineSolution) {
	if base == nil {
		res.Warnings = append(res.Warnings, "the do-nothing baseline LP could not be solved: baseline and incremental figures are missing")
		return
	}
	res.BaselineCashflow = base.cashflow
	res.Shortfall = base.shortfall
	npv := sumPV(base.cashflow)
	res.BaselineNPV = &npv
}

// fixPlan fixes the unit and build columns of m to the purchases of plan:
// each cumulative count to the units ordered up to its year, each build
// column to whether the link is built by then.
func (m *Model) fixPlan(plan []PlanRow) error {
	c := m.Case
	T := c.Horizon
	ordered := make([][]float64, len(m.options))
	builtIn := map[int]int{} // link → order year index of its build
	for _, p := range plan {
		tau := p.Year - c.FirstYear
		if tau < 0 || tau >= T {
			return fmt.Errorf("plans: plan orders on link %s in %d, outside the case's years %d–%d", p.Link, p.Year, c.FirstYear, c.Year(T-1))
		}
		l := c.LinkIndex(p.Link)
		if l < 0 {
			return fmt.Errorf("plans: plan orders on link %s, which the case does not have", p.Link)
		}
		if p.Kind == KindBuild {
			if m.buildIndex(l) < 0 {
				return fmt.Errorf("plans: plan builds link %s, which is no candidate link in the case", p.Link)
			}
			if prev, ok := builtIn[l]; !ok || tau < prev {
				builtIn[l] = tau
			}
			continue
		}
		oi := m.optionOf(l, p.Item, p.Vendor)
		if oi < 0 {
			return fmt.Errorf("plans: plan buys item %s of vendor %s on link %s, which the case does not offer there", p.Item, p.Vendor, p.Link)
		}
		if m.options[oi].col[tau] < 0 {
			return fmt.Errorf("plans: plan orders item %s of vendor %s on link %s in %d, when the case cannot order it (quote validity, lead time or link build)", p.Item, p.Vendor, p.Link, p.Year)
		}
		if ordered[oi] == nil {
			ordered[oi] = make([]float64, T)
		}
		ordered[oi][tau] += float64(p.Units)
	}
	fix := func(j int, v float64, what string) error {
		if v < m.LP.ColLower[j]-0.5 || v > m.LP.ColUpper[j]+0.5 {
			return fmt.Errorf("plans: plan has %g %s, more than the case allows (%g)", v, what, m.LP.ColUpper[j])
		}
		m.LP.ColLower[j], m.LP.ColUpper[j] = v, v
		return nil
	}
	for oi := range m.options {
		o := &m.options[oi]
		cum := 0.0
		for tau, j := range o.col {
			if ordered[oi] != nil {
				cum += ordered[oi][tau]
			}
			if j < 0 {
				continue
			}
			what := fmt.Sprintf("units of %s on link %s by %d", c.Items[o.item].ID, c.Links[o.link].ID, c.Year(tau))
			if err := fix(j, cum, what); err != nil {
				return err
			}
		}
	}
	for _, b := range m.builds {
		first, ok := builtIn[b.link]
		for tau, j := range b.col {
			if j < 0 {
				if ok && tau == first {
					return fmt.Errorf("plans: plan builds link %s in %d, when the case cannot order its build", c.Links[b.link].ID, c.Year(tau))
				}
				continue
			}
			v := 0.0
			if ok && tau >= first {
				v = 1
			}
			m.LP.ColLower[j], m.LP.ColUpper[j] = v, v
		}
	}
	return nil
}

// optionOf returns the index of the option of item (of vendor) on link l,
// or −1.
func (m *Model) optionOf(l int, item, vendor string) int {
	c := m.Case
	for oi := range m.options {
		o := &m.options[oi]
		it := &c.Items[o.item]
		if o.link == l && it.ID == item && c.Vendors[it.Vendor].ID == vendor {
			return oi
		}
	}
	return -1
}
