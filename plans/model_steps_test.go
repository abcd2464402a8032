package plans

import (
	"context"
	"math"
	"testing"

	"netstage/mip"
)

// TestStepRows checks the capacity step rows against the case alone: one
// for each link and year with two or more unit columns in service; on
// the synthetic cases every item is a 100G or 400G module or a 100G lease,
// so each link's step is 100 Gbps and a step column counts its link's
// units in service in 100G steps: weight 1 for a 100G unit, 4 for a 400G
// one. At the optimum of the full search each step column equals the
// capacity its link gained by that year, over 100, read from the plan's
// own rows (Result.Plan), which never look at the step columns.
func TestStepRows(t *testing.T) {
	checked, nonzero := 0, 0
	for _, sc := range []synthCase{{8, 4, 1}, {10, 5, 2}} {
		c, err := loadSynthetic(t, sc.sites, sc.years, sc.seed)
		if err != nil {
			t.Fatal(err)
		}
		m, err := BuildModel(c, BuildOptions{})
		if err != nil {
			t.Fatal(err)
		}
		// One step column for each link and year with two or more unit
		// columns in service.
		want := 0
		for l := range c.Links {
			for yr := 0; yr < c.Horizon; yr++ {
				n := 0
				for oi := range m.options {
					if m.options[oi].link == l && m.options[oi].unitsInService(yr) >= 0 {
						n++
					}
				}
				if n >= 2 {
					want++
				}
			}
		}
		if len(m.steps) != want || want == 0 {
			t.Fatalf("%v: %d step columns, want %d", sc, len(m.steps), want)
		}
		for _, st := range m.steps {
			for i, j := range st.units {
				o := optionOfCol(m, j)
				if o.link != st.link || o.unitsInService(st.year) != j {
					t.Errorf("%s: %s is not a unit column of its link in service that year", m.LP.ColName[st.col], m.LP.ColName[j])
				}
				if want := c.Items[o.item].Gbps / 100; st.weights[i] != want {
					t.Errorf("%s: weight %g on %s, want %g", m.LP.ColName[st.col], st.weights[i], m.LP.ColName[j], want)
				}
			}
		}
		res, err := Solve(context.Background(), c, SolveOptions{Gap: 1e-9})
		if err != nil || res.Status != StatusOptimal {
			t.Fatalf("%v: solve %v %v", sc, res.Status, err)
		}
		gained := map[string][]float64{} // link → Gbps gained by year
		for _, p := range res.Plan {
			if gained[p.Link] == nil {
				gained[p.Link] = make([]float64, c.Horizon)
			}
			for t := p.InService - c.FirstYear; t < c.Horizon; t++ {
				gained[p.Link][t] += p.Gbps
			}
		}
		for _, st := range m.steps {
			link, year := c.Links[st.link].ID, st.year
			want := 0.0
			if g := gained[link]; g != nil {
				want = g[year] / 100
			}
			if got := res.x[st.col]; math.Abs(got-want) > 1e-6 {
				t.Errorf("%v: %s = %g, want %g (plan's Gbps on %s by %d, over 100)", sc, m.LP.ColName[st.col], got, want, link, c.Year(year))
			}
			checked++
			if want > 0 {
				nonzero++
			}
		}
	}
	if nonzero == 0 {
		t.Fatal("no plan bought anything: the values were never checked against purchases")
	}
	t.Logf("%d step columns checked, %d of them with purchases behind them", checked, nonzero)
}

// TestStepsKeepTheOptimum: the step columns reformulate the model exactly,
// so the model with and without them (BuildOptions.NoSteps) has the same
// optimum, solved by mip alone to a gap of 1e-9, each with its own
// branching priorities.
func TestStepsKeepTheOptimum(t *testing.T) {
	for _, sc := range []synthCase{{8, 4, 1}, {9, 5, 3}, {10, 4, 2}} {
		c, err := loadSynthetic(t, sc.sites, sc.years, sc.seed)
		if err != nil {
			t.Fatal(err)
		}
		var obj [2]float64
		var nodes [2]int
		for k, no := range []bool{false, true} {
			m, err := BuildModel(c, BuildOptions{NoSteps: no})
			if err != nil {
				t.Fatal(err)
			}
			if no != (len(m.steps) == 0) {
				t.Fatalf("%v: NoSteps %v, %d step columns", sc, no, len(m.steps))
			}
			r, err := mip.Solve(context.Background(), m.LP, mip.Settings{RelGap: 1e-9, Priority: m.branchPriority()})
			if err != nil || r.Status != mip.Optimal {
				t.Fatalf("%v: solve %v %v", sc, r.Status, err)
			}
			obj[k], nodes[k] = r.Objective, r.Nodes
		}
		if math.Abs(obj[0]-obj[1]) > 1e-6*math.Max(1, math.Abs(obj[1])) {
			t.Errorf("%v: optimum %.6f with the steps, %.6f without", sc, obj[0], obj[1])
		}
		t.Logf("%v: %d nodes with the steps, %d without", sc, nodes[0], nodes[1])
	}
}

// optionOfCol returns the option whose unit columns include j.
func optionOfCol(m *Model, j int) *option {
	for oi := range m.options {
		for _, k := range m.options[oi].col {
			if k == j {
				return &m.options[oi]
			}
		}
	}
	panic("no option has that column")
}
