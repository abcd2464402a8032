package plans

import (
	"math"
	"testing"
)

// invariantTol is the absolute slack (Gbps, or currency per unit of size)
// allowed in the invariant checks: the LP's feasibility tolerance is 1e-7
// on scaled rows.
const invariantTol = 1e-5

// checkInvariants checks a solved plan against the case, independently of
// the model's rows: flow conservation, arc loads within ceiling × capacity,
// committed demand met, budgets, unit limits and slots, the cash flow's own
// arithmetic, and the NPV recomputed from the decisions alone against the
// MIP's objective and the exported objective (mps_objective = −objective).
func checkInvariants(t *testing.T, c *Case, res *Result) {
	t.Helper()
	if res.Objective == nil {
		return
	}
	m, x := res.model, res.x
	// Flow conservation per commodity, site and year.
	for si, s := range m.sources {
		for v := range c.Sites {
			if v == s {
				continue
			}
			for y := 0; y < c.Horizon; y++ {
				bal := 0.0
				for a := range m.flow[si] {
					j := m.flow[si][a][y]
					if j < 0 {
						continue
					}
					from, to := m.arcEnds(a)
					if to == v {
						bal += x[j]
					}
					if from == v {
						bal -= x[j]
					}
				}
				want := 0.0
				for k, d := range c.Demands {
					if (d.A == s && d.B == v) || (d.B == s && d.A == v) {
						want += x[m.served[k][y]]
					}
				}
				if math.Abs(bal-want) > invariantTol {
					t.Errorf("conservation of %s at %s in %d: net inflow %g, want %g", c.Sites[s].ID, c.Sites[v].ID, c.Year(y), bal, want)
				}
			}
		}
	}
	checkRoutes(t, c, res)
	// Arc loads within ceiling × capacity after the plan.
	load := arcLoads(m, x)
	for _, r := range res.Links {
		l := c.LinkIndex(r.Link)
		y := r.Year - c.FirstYear
		for dir := 0; dir < 2; dir++ {
			if load[2*l+dir][y] > c.Links[l].Ceiling*r.CapacityAfter+invariantTol {
				t.Errorf("link %s in %d carries %g Gbps > %g × %g", r.Link, r.Year, load[2*l+dir][y], c.Links[l].Ceiling, r.CapacityAfter)
			}
		}
	}
	// Committed (cost mode: all) demand met.
	for _, d := range res.Demands {
		need := d.Committed
		if res.CostMode {
			need = d.Forecast
		}
		if d.Served < need-invariantTol || d.Served > d.Forecast+invariantTol {
			t.Errorf("demand %s in %d: served %g outside [%g, %g]", d.Demand, d.Year, d.Served, need, d.Forecast)
		}
	}
	// Budgets.
	total := 0.0
	for _, r := range res.Cashflow {
		total += r.Capex
		if r.Budget != nil && r.Capex > *r.Budget*(1+1e-9)+invariantTol {
			t.Errorf("capex %g in %d over its budget %g", r.Capex, r.Year, *r.Budget)
		}
	}
	if total > c.Budget.Cumulative*(1+1e-9)+invariantTol {
		t.Errorf("total capex %g over the cumulative cap %g", total, c.Budget.Cumulative)
	}
	// Unit limits and slots.
	units := map[[2]string]int{}
	slots := map[string]int{}
	for _, p := range res.Plan {
		if p.Kind == KindBuild {
			continue
		}
		units[[2]string{p.Link, p.Item}] += p.Units
		for _, it := range c.Items {
			if it.ID == p.Item {
				slots[p.Link] += p.Units * it.SlotsPerUnit
				if units[[2]string{p.Link, p.Item}] > it.MaxUnits {
					t.Errorf("%d units of %s on %s, limit %d", units[[2]string{p.Link, p.Item}], p.Item, p.Link, it.MaxUnits)
				}
			}
		}
	}
	for _, l := range c.Links {
		if l.Slots != UnlimitedSlots && slots[l.ID] > l.Slots {
			t.Errorf("link %s uses %d slots of %d", l.ID, slots[l.ID], l.Slots)
		}
	}
	// The cash flow's arithmetic, row by row (DESIGN.md §2).
	sum := 0.0
	for i, r := range res.Cashflow {
		net := r.Revenue - r.Opex - r.Capex - r.Tax - r.Penalty + r.Salvage
		if !near(net, r.Net, 1e-9) {
			t.Errorf("%d: net %g, want %g", r.Year, r.Net, net)
		}
		tax := c.Finance.TaxRate * (r.Revenue - r.Opex - r.Depreciation)
		if !near(tax, r.Tax, 1e-9) {
			t.Errorf("%d: tax %g, want %g", r.Year, r.Tax, tax)
		}
		pv := r.DiscountFactor*(r.Net-r.Salvage) + math.Pow(1+c.DiscountRate, -float64(c.Horizon))*r.Salvage
		if !near(pv, r.PV, 1e-9) {
			t.Errorf("%d: pv %g, want %g", r.Year, r.PV, pv)
		}
		if i < len(res.Cashflow)-1 && r.Salvage != 0 {
			t.Errorf("%d: salvage before the last year", r.Year)
		}
		sum += r.PV
	}
	if !near(sum, *res.Objective, 1e-9) {
		t.Errorf("Σ pv = %g, objective %g", sum, *res.Objective)
	}
	// NPV from the decisions alone = the MIP's objective = −mps_objective.
	if !near(*res.Objective, -res.mipObjective, 1e-6) {
		t.Errorf("NPV from decisions %.6f, MIP objective %.6f", *res.Objective, -res.mipObjective)
	}
	if res.MPSObjective == nil || !near(*res.Objective, -*res.MPSObjective, 1e-6) {
		t.Errorf("mps_objective %v, want −%.6f", deref(res.MPSObjective), *res.Objective)
	}
}

func deref(p *float64) any {
	if p == nil {
		return nil
	}
	return *p
}

// checkRoutes checks Result.Routes against the case alone: each route is a
// walk over the case's links from its demand's From to its To; a demand's
// routes in a year add up to what it served; and the routes over a link in
// one direction fit within ceiling × the capacity after the plan.
func checkRoutes(t *testing.T, c *Case, res *Result) {
	t.Helper()
	type dirYear struct {
		link, dir, year int
	}
	served := map[[2]any]float64{}
	used := map[dirYear]float64{}
	for _, r := range res.Routes {
		at := c.SiteIndex(r.From)
		for _, id := range r.Links {
			l := c.LinkIndex(id)
			if l < 0 {
				t.Fatalf("route %+v: unknown link %s", r, id)
			}
			switch at {
			case c.Links[l].A:
				used[dirYear{l, 0, r.Year}] += r.Gbps
				at = c.Links[l].B
			case c.Links[l].B:
				used[dirYear{l, 1, r.Year}] += r.Gbps
				at = c.Links[l].A
			default:
				t.Fatalf("route %+v: link %s does not start where the route is", r, id)
			}
		}
		if at != c.SiteIndex(r.To) {
			t.Errorf("route %+v ends at %s", r, c.Sites[at].ID)
		}
		if r.Gbps <= 0 {
			t.Errorf("route %+v carries nothing", r)
		}
		served[[2]any{r.Demand, r.Year}] += r.Gbps
	}
	for _, d := range res.Demands {
		if got := served[[2]any{d.Demand, d.Year}]; math.Abs(got-d.Served) > invariantTol*math.Max(1, d.Served) {
			t.Errorf("demand %s in %d: routes carry %g Gbps, served %g", d.Demand, d.Year, got, d.Served)
		}
	}
	for _, r := range res.Links {
		l := c.LinkIndex(r.Link)
		for dir := 0; dir < 2; dir++ {
			if g := used[dirYear{l, dir, r.Year}]; g > c.Links[l].Ceiling*r.CapacityAfter+invariantTol {
				t.Errorf("link %s in %d: routes put %g Gbps on it, above %g × %g", r.Link, r.Year, g, c.Links[l].Ceiling, r.CapacityAfter)
			}
		}
	}
}
