package plans

import (
	"context"
	"math"

	"netstage/lp"
	"netstage/plans/finance"
)

// decode fills res from the MIP's point xi: it fixes the integer decisions,
// re-solves the continuous part (NPV, then Gbps·km), and reports plan, cash
// flow, links, demands and the incremental figures against base (nil when
// the baseline LP failed).
func (m *Model) decode(ctx context.Context, res *Result, xi []float64, base *baselineSolution) error {
	c := m.Case
	fixed := m.fixIntegers(xi)
	lr, err := solveLex(ctx, fixed, m.kmObjective())
	if err != nil {
		return err
	}
	if lr == nil {
		return errNoFixedLP
	}
	x := lr.x
	res.x = x
	ps := m.purchases(x)
	served := m.servedValues(x)

	res.Plan = m.planRows(ps)
	res.Cashflow = cashflowOf(c, ps, served, nil)
	npv := sumPV(res.Cashflow)
	res.Objective = &npv
	mpsObj, _ := m.LP.Evaluate(x)
	res.MPSObjective = &mpsObj
	for _, r := range res.Cashflow {
		res.TotalCapex += r.Capex
	}

	// Incremental figures against the baseline.
	if base != nil {
		incr := make([]float64, c.Horizon)
		for t := range incr {
			incr[t] = res.Cashflow[t].Net - base.cashflow[t].Net
			res.Cashflow[t].Incremental = incr[t]
		}
		inc := npv - *res.BaselineNPV
		res.IncrementalNPV = &inc
		if !res.CostMode {
			if r, ok := finance.IRR(incr); ok {
				res.IRR = &r
			}
			if y, ok := finance.PaybackYear(incr, c.FirstYear); ok {
				res.PaybackYear = &y
			}
			pvCapex := 0.0
			for _, r := range res.Cashflow {
				pvCapex += r.DiscountFactor * r.Capex
			}
			if pi, ok := finance.ProfitabilityIndex(inc, pvCapex); ok {
				res.ProfitabilityIndex = &pi
			}
		}
	}

	res.Links = m.linkRows(x, lr.firstDual, base)
	res.Demands = m.demandRows(ctx, served)
	return nil
}

// planRows turns purchases into sorted plan rows.
func (m *Model) planRows(ps []purchase) []PlanRow {
	c := m.Case
	rows := make([]PlanRow, 0, len(ps))
	for _, p := range ps {
		r := PlanRow{
			Year: c.Year(p.tau), InService: c.Year(p.inService), Link: c.Links[p.link].ID,
			Units: p.units, Gbps: p.gbps, ListCapex: p.list, Capex: p.capex, Opex: p.opex,
		}
		if p.item < 0 {
			r.Kind = KindBuild
		} else {
			it := &c.Items[p.item]
			r.Item, r.Vendor = it.ID, c.Vendors[it.Vendor].ID
			r.Kind = KindModule
			if it.Kind == Lease {
				r.Kind = KindLease
			}
		}
		rows = append(rows, r)
	}
	return rows
}

// arcLoads returns load[a][t], the Gbps on arc a in year t of model mm at x.
func arcLoads(mm *Model, x []float64) [][]float64 {
	nArcs := 2 * len(mm.Case.Links)
	load := make([][]float64, nArcs)
	for a := range load {
		load[a] = make([]float64, mm.Case.Horizon)
		for si := range mm.flow {
			for t, j := range mm.flow[si][a] {
				if j >= 0 {
					load[a][t] += x[j]
				}
			}
		}
	}
	return load
}

// capacityAfter returns each link's capacity per year under the purchases.
func (m *Model) capacityAfter(ps []purchase) [][]float64 {
	c := m.Case
	capy := make([][]float64, len(c.Links))
	for l := range c.Links {
		capy[l] = append([]float64(nil), c.Links[l].BaseCapacity...)
	}
	for _, p := range ps {
		for t := p.inService; t < c.Horizon; t++ {
			capy[p.link][t] += p.gbps
		}
	}
	return capy
}

// linkRows reports every link in every year before and after the plan.
func (m *Model) linkRows(x, dual []float64, base *baselineSolution) []LinkYear {
	c := m.Case
	after := m.capacityAfter(m.purchases(x))
	load := arcLoads(m, x)
	var baseLoad [][]float64
	if base != nil {
		baseLoad = arcLoads(base.m, base.x)
	}
	var rows []LinkYear
	for l := range c.Links {
		link := &c.Links[l]
		for t := 0; t < c.Horizon; t++ {
			r := LinkYear{
				Link: link.ID, Year: c.Year(t), Ceiling: link.Ceiling,
				CapacityBefore: link.BaseCapacity[t], CapacityAfter: after[l][t],
			}
			peak := math.Max(load[2*l][t], load[2*l+1][t])
			r.UtilisationAfter = utilisation(peak, r.CapacityAfter)
			if baseLoad != nil {
				r.UtilisationBefore = utilisation(math.Max(baseLoad[2*l][t], baseLoad[2*l+1][t]), r.CapacityBefore)
			}
			r.AtCeiling = r.CapacityAfter > 0 && peak >= link.Ceiling*r.CapacityAfter-valueTol
			// One more Gbps raises both arcs' rows by the ceiling; for the
			// minimisation of −NPV, NPV changes by −ceiling·Σ dual.
			if dual != nil {
				v := -link.Ceiling * (dual[m.capRow[2*l][t]] + dual[m.capRow[2*l+1][t]])
				if math.Abs(v) > shadowTol {
					r.ShadowValue = &v
				}
			}
			rows = append(rows, r)
		}
	}
	return rows
}

func utilisation(load, capacity float64) float64 {
	if capacity <= 0 || load <= valueTol {
		return 0
	}
	return load / capacity
}

// demandRows reports every demand in every year. Traffic left unserved is
// put down to capacity when even the LP relaxation of the model maximising
// served traffic (within unit limits, slots and budgets) cannot carry it,
// and to no profit otherwise. Where demands compete for one link the split
// of that maximum between them is one of several; the reason is then a
// fair indication, not a proof.
func (m *Model) demandRows(ctx context.Context, served [][]float64) []DemandYear {
	c := m.Case
	var maxServed [][]float64
	var rows []DemandYear
	for k, d := range c.Demands {
		for t := 0; t < c.Horizon; t++ {
			r := DemandYear{
				Demand: d.ID, From: c.Sites[d.A].ID, To: c.Sites[d.B].ID, Year: c.Year(t),
				Forecast: d.Forecast[t], Served: served[k][t], Committed: d.Committed[t],
				Revenue: 12 * d.Tariff[t] * served[k][t],
			}
			r.Unserved = r.Forecast - r.Served
			if r.Unserved <= valueTol {
				r.Unserved = 0
			} else {
				if maxServed == nil {
					maxServed = m.maxServed(ctx)
				}
				r.Reason = ReasonNoProfit
				if maxServed == nil || maxServed[k][t] < r.Forecast-valueTol {
					r.Reason = ReasonCapacity
				}
			}
			rows = append(rows, r)
		}
	}
	return rows
}

// maxServed solves the LP relaxation with the objective "carry as much
// traffic as possible" and returns served[k][t], or nil if it fails.
func (m *Model) maxServed(ctx context.Context) [][]float64 {
	relax := m.LP.Clone()
	for j := range relax.Obj {
		relax.Obj[j] = 0
		relax.Integer[j] = false
	}
	relax.Constant = 0
	for _, cols := range m.served {
		for _, j := range cols {
			relax.Obj[j] = -1
		}
	}
	r, err := lp.Solve(ctx, relax, lp.Settings{})
	if err != nil || r.Status != lp.Optimal {
		return nil
	}
	return m.servedValues(r.X)
}
