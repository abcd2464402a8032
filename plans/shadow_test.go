package plans

import (
	"context"
	"testing"

	"netstage/lp"
)

// TestShadowValueIsSupergradient checks the value of one more Gbps against
// re-solves (standard LP sensitivity: the optimal value of a maximisation
// LP is concave in a right-hand side, and the dual price is a supergradient
// of it). With the plan's decisions fixed, raising link l's capacity in
// year t by δ both ways may gain at most value·δ, and lowering it by δ
// must lose at least value·δ. A dual taken from a redundant row (the
// cut-set rows, if they stayed in the fixed LP) breaks these bounds.
func TestShadowValueIsSupergradient(t *testing.T) {
	const delta = 0.01 // Gbps
	forSyntheticAndDemo(t, 5, 4, []int64{4}, func(t *testing.T, c *Case) {
		res := solveExact(t, c)
		// Re-solves use the model without cut-set rows (same columns:
		// the cut rows come last), so that the reference does not share
		// what it checks.
		m, err := BuildModel(c, BuildOptions{NoCutSets: true})
		if err != nil {
			t.Fatal(err)
		}
		if m.LP.NumCols() != res.model.LP.NumCols() {
			t.Fatal("test input: the model without cut-sets has other columns")
		}
		npvWith := func(l, y int, d float64) float64 {
			t.Helper()
			fixed := m.fixIntegers(res.x)
			for dir := 0; dir < 2; dir++ {
				fixed.RowUpper[m.capRow[2*l+dir][y]] += c.Links[l].Ceiling * d
			}
			r, err := lp.Solve(context.Background(), fixed, lp.Settings{})
			if err != nil || r.Status != lp.Optimal {
				t.Fatalf("re-solve: %v %v", r.Status, err)
			}
			return -r.Objective
		}
		checked := 0
		for _, ly := range res.Links {
			if ly.ShadowValue == nil || ly.CapacityAfter < 2*delta {
				continue
			}
			l, y := c.LinkIndex(ly.Link), ly.Year-c.FirstYear
			v := *ly.ShadowValue
			base := npvWith(l, y, 0)
			up, down := npvWith(l, y, delta), npvWith(l, y, -delta)
			tol := 1e-6 * max(1, abs(base))
			if gain := up - base; gain > v*delta+tol {
				t.Errorf("%s %d: +%g Gbps gains %.6f, above value %.4f × δ", ly.Link, ly.Year, delta, gain, v)
			}
			if loss := base - down; loss < v*delta-tol {
				t.Errorf("%s %d: −%g Gbps loses %.6f, below value %.4f × δ", ly.Link, ly.Year, delta, loss, v)
			}
			checked++
		}
		if checked == 0 {
			t.Fatal("test input: no link with a value of one more Gbps")
		}
		t.Logf("%d link-years checked", checked)
	})
}
