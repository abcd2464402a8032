package plans

import (
	"context"
	"math"
	"time"

	"netstage/plans/finance"
)

// decode fills res from the MIP's point xi: it fixes the integer decisions,
// re-solves the continuous part (NPV, then Gbps·km), and reports plan, cash
// flow, links, demands and the incremental figures against base (nil when
// the baseline LP failed). The Gbps·km stage stops at tieBreakBy (zero: no
// limit), keeping the NPV stage's routing.
func (m *Model) decode(ctx context.Context, res *Result, xi []float64, base *baselineSolution, tieBreakBy time.Time) error {
	c := m.Case
	// The plan is xi's decisions, which the LPs below keep fixed.
	ps := m.purchases(xi)
	lr := m.lexFromBaseline(ps, base)
	if lr == nil {
		var err error
		if lr, err = solveLex(ctx, m.fixIntegers(xi), tieBreakBy, m.kmObjective()); err != nil {
			return err
		}
		if lr == nil {
			return errNoFixedLP
		}
	}
	if lr.tieBreakCut {
		res.Warnings = append(res.Warnings, "the time limit stopped the choice of the shortest routing: the routes and utilisations shown carry the plan's traffic at the same NPV, but some may take a longer path than needed")
	}
	x := lr.x
	res.x = x
	served := m.servedValues(x)

	res.Plan = m.planRows(ps)
	res.VendorChoice = m.chosenVendors(res.Plan)
	res.Routes = m.routes(x)
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
		// A plan that buys nothing is the baseline: its incremental flows are
		// rounding noise, and an IRR or payback of noise would mislead.
		if !res.CostMode && len(res.Plan) > 0 {
			res.IRR, res.PaybackYear = returns(incr, c.FirstYear)
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
	res.Demands = m.demandRows(x, served, res.Cashflow)
	return nil
}

// lexFromBaseline answers the decode LPs for a point whose purchases ps
// are none, when the baseline carried every committed Gbps (nil
// otherwise). The LP with that point's decisions fixed is then the
// baseline LP less its shortfall columns, which are zero at the
// baseline's optimum: the baseline's point and first-stage duals are
// optimal for it, and its last stage already chose the fewest Gbps·km at
// that NPV (the shortfall stage in between held it at zero). So the
// do-nothing plan — the answer of a large case whose time limit stops the
// search before it finds better — is decoded without two LPs from
// scratch, which on a 100-site case took 35 s, more than the reserve the
// search leaves for decoding. Only the capacity rows' duals are filled
// in: they are all that decoding reads.
func (m *Model) lexFromBaseline(ps []purchase, base *baselineSolution) *lexResult {
	if base == nil || len(base.shortfall) > 0 || base.dual == nil || len(ps) > 0 {
		return nil
	}
	x := m.startFromBaseline(base)
	dual := make([]float64, m.LP.NumRows())
	for a := range m.capRow {
		for t, i := range m.capRow[a] {
			dual[i] = base.dual[base.m.capRow[a][t]]
		}
	}
	obj, _ := m.LP.Evaluate(x) // within holdObjectiveTol of the optimum
	return &lexResult{x: x, firstDual: dual, firstObj: obj}
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
	ps := m.purchases(x)
	after := m.capacityAfter(ps)
	// builtFrom[l] is the year index from which candidate link l is in
	// service (Horizon when the plan does not build it).
	builtFrom := make([]int, len(c.Links))
	for l := range builtFrom {
		builtFrom[l] = c.Horizon
	}
	for _, p := range ps {
		if p.item < 0 {
			builtFrom[p.link] = min(builtFrom[p.link], p.inService)
		}
	}
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
				Candidate: link.Candidate != nil, Built: link.Candidate == nil || t >= builtFrom[l],
			}
			peak := math.Max(load[2*l][t], load[2*l+1][t])
			r.UtilisationAfter = utilisation(peak, r.CapacityAfter)
			if baseLoad != nil {
				r.UtilisationBefore = utilisation(math.Max(baseLoad[2*l][t], baseLoad[2*l+1][t]), r.CapacityBefore)
			}
			r.AtCeiling = r.CapacityAfter > 0 && AtCeiling(r.UtilisationAfter, link.Ceiling)
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
// put down to no profit when the plan could have carried more — its two
// sites are joined by links each of which has spare capacity under its
// ceiling or can still take another unit in service by that year (a unit
// limit not reached, orders that serve in time, a candidate that can be
// built in time, and a budget with room for one more unit in some order
// year that serves in time) — and to capacity otherwise. It is a
// per-demand test: where demands compete for spare room, it can call
// traffic "no profit" that could only be carried at another demand's cost.
// Cost O(demands·T·(links + options)).
func (m *Model) demandRows(x []float64, served [][]float64, cash []CashflowRow) []DemandYear {
	c := m.Case
	var rows []DemandYear
	var room [][]bool // room[t][l]: link l could carry more in year t
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
				if room == nil {
					room = m.linkRoom(x, cash)
				}
				r.Reason = ReasonCapacity
				if connected(c, room[t], d.A, d.B) {
					r.Reason = ReasonNoProfit
				}
			}
			rows = append(rows, r)
		}
	}
	return rows
}

// linkRoom returns room[t][l]: whether link l could carry more traffic in
// year t, with spare capacity under its ceiling in both directions or
// another unit that could be in service by t (see demandRows).
func (m *Model) linkRoom(x []float64, cash []CashflowRow) [][]bool {
	c := m.Case
	load := arcLoads(m, x)
	ps := m.purchases(x)
	capy := m.capacityAfter(ps)
	built := make([]bool, len(c.Links))
	for _, p := range ps {
		if p.item < 0 {
			built[p.link] = true
		}
	}
	budgetRoom := func(tau int, amount float64) bool {
		if v, ok := c.Budget.YearCap(tau); ok && cash[tau].Capex+amount > v*(1+budgetTolerance) {
			return false
		}
		total := 0.0
		for _, r := range cash {
			total += r.Capex
		}
		return total+amount <= c.Budget.Cumulative*(1+budgetTolerance)
	}
	room := make([][]bool, c.Horizon)
	for t := range room {
		room[t] = make([]bool, len(c.Links))
		for l, link := range c.Links {
			spare := link.Ceiling*capy[l][t] - math.Max(load[2*l][t], load[2*l+1][t])
			if spare > valueTol {
				room[t][l] = true
			}
		}
		for oi := range m.options {
			o := &m.options[oi]
			l := o.link
			if room[t][l] {
				continue
			}
			j := o.unitsInService(t)
			if j < 0 || x[j] > m.LP.ColUpper[j]-0.5 {
				continue
			}
			if c.Links[l].Candidate != nil && !built[l] {
				// It would need a build too; count the build's cost.
				b := m.builds[m.buildIndex(l)]
				if b.builtBy(t) < 0 {
					continue
				}
			}
			it := &c.Items[o.item]
			for tau, col := range o.col {
				if col >= 0 && o.inService[tau] <= t && budgetRoom(tau, it.Capex(tau, c.Links[l].KM)) {
					room[t][l] = true
					break
				}
			}
		}
	}
	return room
}

// buildIndex returns the index into m.builds of candidate link l.
func (m *Model) buildIndex(l int) int {
	for i, b := range m.builds {
		if b.link == l {
			return i
		}
	}
	return -1
}

// connected reports whether sites a and b are joined by links with room.
func connected(c *Case, room []bool, a, b int) bool {
	seen := make([]bool, len(c.Sites))
	stack := []int{a}
	seen[a] = true
	for len(stack) > 0 {
		v := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		if v == b {
			return true
		}
		for l, link := range c.Links {
			if !room[l] {
				continue
			}
			w := -1
			if link.A == v {
				w = link.B
			} else if link.B == v {
				w = link.A
			}
			if w >= 0 && !seen[w] {
				seen[w] = true
				stack = append(stack, w)
			}
		}
	}
	return false
}

// returns gives the IRR and the payback year of the incremental flows
// (nil where undefined), read to the cent, as the flows are reported: a
// difference below that is the LPs' rounding noise, and a noise-sized
// outflow before a gain makes an absurd IRR (the 25-site synthetic case
// with gamma's catalog alone, one lease bought in its last year: −0.0046
// in the year before, 80,062,056 %).
func returns(incr []float64, firstYear int) (irr *float64, payback *int) {
	cents := make([]float64, len(incr))
	for t, v := range incr {
		cents[t] = math.Round(100*v) / 100
	}
	if r, ok := finance.IRR(cents); ok {
		irr = &r
	}
	if y, ok := finance.PaybackYear(cents, firstYear); ok {
		payback = &y
	}
	return irr, payback
}
