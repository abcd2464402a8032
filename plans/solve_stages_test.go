package plans

import (
	"context"
	"testing"

	"netstage/lp"
)

// TestShadowValue: with no items to buy and more forecast than capacity,
// one more Gbps on the link carries one more Gbps of traffic: its value is
// ceiling × 12 × tariff × DF_t (present value of a year's revenue on it;
// source: the LP duality interpretation of a binding capacity row).
func TestShadowValue(t *testing.T) {
	const T, tariff, ceiling = 2, 50.0, 0.8
	c := newCase(T, fpRate, "A", "B")
	c.testLink("L", "A", "B", 100, 10, ceiling)
	c.testDemand("A", "B", 20, 0, tariff)
	res, err := Solve(context.Background(), c, SolveOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range res.Links {
		y := r.Year - c.FirstYear + 1
		want := ceiling * 12 * tariff * df(fpRate, y)
		if r.ShadowValue == nil || !near(*r.ShadowValue, want, 1e-7) {
			t.Errorf("%d: value of one more Gbps %v, want %.4f", r.Year, deref(r.ShadowValue), want)
		}
		if !r.AtCeiling || !near(r.UtilisationAfter, ceiling, 1e-7) {
			t.Errorf("%d: utilisation %.4f at ceiling %v, want %.2f and flagged", r.Year, r.UtilisationAfter, r.AtCeiling, ceiling)
		}
	}
	for _, d := range res.Demands {
		if d.Reason != ReasonCapacity || !near(d.Unserved, 20-ceiling*10, 1e-7) {
			t.Errorf("demand %+v: want %.1f Gbps unserved for capacity", d, 20-ceiling*10)
		}
	}
}

// TestShortestRouting: among routings of equal NPV the one with the fewest
// Gbps·km is reported: A→B→C (200 km) rather than the direct 300 km link.
func TestShortestRouting(t *testing.T) {
	c := newCase(1, fpRate, "A", "B", "C")
	c.testLink("AB", "A", "B", 100, 100, 1)
	c.testLink("BC", "B", "C", 100, 100, 1)
	c.testLink("AC", "A", "C", 300, 100, 1)
	c.testDemand("A", "C", 5, 0, 10)
	res, err := Solve(context.Background(), c, SolveOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]float64{"AB": 0.05, "BC": 0.05, "AC": 0}
	for _, r := range res.Links {
		if !near(r.UtilisationAfter, want[r.Link], 1e-7) || !near(r.UtilisationBefore, want[r.Link], 1e-7) {
			t.Errorf("link %s: utilisation before %.4f after %.4f, want %.4f", r.Link, r.UtilisationBefore, r.UtilisationAfter, want[r.Link])
		}
	}
	checkInvariants(t, c, res)
}

// TestRoundUpHeuristic: the rounded-up LP points (plain and per link),
// with their integer decisions fixed, leave a feasible LP whose NPV is at
// most the relaxation's; the other roundings, when feasible, too.
func TestRoundUpHeuristic(t *testing.T) {
	n := 6
	if testing.Short() {
		n = 3
	}
	for seed := 1; seed <= n; seed++ {
		_, m, relax := relaxSynthetic(t, 4+seed%3, 4+seed%2, int64(seed))
		cands := m.roundUpHeuristic(relax.X)
		if len(cands) != len(roundingThresholds)+1 {
			t.Fatalf("seed %d: %d candidates, want %d (no budget trouble here)", seed, len(cands), len(roundingThresholds)+1)
		}
		for i, cand := range cands {
			fixed := m.fixIntegers(cand)
			r, err := lp.Solve(context.Background(), fixed, lp.Settings{})
			if i > 0 && i < len(roundingThresholds) {
				// Rounding slivers down may leave committed traffic
				// without room: then the candidate is simply dropped.
				if err == nil && r.Status == lp.Infeasible {
					continue
				}
			}
			if err != nil || r.Status != lp.Optimal {
				t.Fatalf("seed %d, candidate %d: rounded point leaves an LP that is %v (%v)", seed, i, r.Status, err)
			}
			if r.Objective < relax.Objective-1e-6*abs(relax.Objective) {
				t.Errorf("seed %d, candidate %d: rounded NPV %.2f above the relaxation's %.2f", seed, i, -r.Objective, -relax.Objective)
			}
			t.Logf("seed %d, candidate %d: NPV %.0f, relaxation %.0f", seed, i, -r.Objective, -relax.Objective)
		}
	}
}

func abs(v float64) float64 {
	if v < 0 {
		return -v
	}
	return v
}

// TestUnservedReasons: traffic a module could carry but that does not pay
// is "no-profit"; the same traffic with no budget for the module, or with
// the unit limit reached, is "capacity" (DESIGN.md §2 meanings).
func TestUnservedReasons(t *testing.T) {
	for _, tc := range []struct {
		name     string
		budget   float64
		maxUnits int
		forecast float64
		want     string
	}{
		{"module does not pay", 1e9, 1, 20, ReasonNoProfit},
		{"no budget for it", 0, 1, 20, ReasonCapacity},
		{"unit limit reached", 1e9, 1, 40, ReasonCapacity},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c := twoSite(2, tc.forecast, 10) // a module's gain 1200 a year against 10000
			for i := range c.Budget.Yearly {
				c.Budget.Yearly[i] = tc.budget
			}
			c.testItem(testItem{id: "M", vendor: "V", gbps: fpGbps, capex: fpCapex, life: fpLife, maxUnits: tc.maxUnits})
			if tc.forecast > 20 {
				c.Demands[0].Tariff = []float64{1000, 1000} // pays: the one unit is bought
			}
			res, err := Solve(context.Background(), c, SolveOptions{})
			if err != nil {
				t.Fatal(err)
			}
			checkInvariants(t, c, res)
			for _, d := range res.Demands {
				if d.Unserved <= 0 || d.Reason != tc.want {
					t.Errorf("%d: unserved %.3f for %q, want some for %q", d.Year, d.Unserved, d.Reason, tc.want)
				}
			}
		})
	}
}
