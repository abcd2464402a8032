package plans

import (
	"context"
	"fmt"
	"math"
	"testing"
	"time"

	"netstage/lp"
)

// fixedLP solves m's LP with the integer columns fixed at x's values
// (Model.fixIntegers) and returns the result: the best completion of x's
// decisions.
func fixedLP(t *testing.T, m *Model, x []float64) lp.Result {
	t.Helper()
	r, err := lp.Solve(context.Background(), m.fixIntegers(x), lp.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// roundedUpStart returns the rounding heuristic's plan that rounds every
// unit count of the LP relaxation up (more capacity than the LP used, so
// a local search has something to gain) and its best completion, or nil
// and the reason when there is none.
func roundedUpStart(t *testing.T, m *Model, relax lp.Result) ([]float64, lp.Result, string) {
	t.Helper()
	start := m.roundUpHeuristic(relax.X)
	if len(start) == 0 {
		return nil, lp.Result{}, "the heuristic found no candidate plan within the budget"
	}
	from := fixedLP(t, m, start[0])
	if from.Status != lp.Optimal {
		return nil, from, fmt.Sprintf("the rounded-up plan has no feasible routing (%v)", from.Status)
	}
	return start[0], from, ""
}

// TestImprovePlan starts the local search from the heuristic's plan that
// rounds every unit count of the LP relaxation up (more capacity than the
// LP used, so there is something to gain) and checks what comes back: a
// point of the MIP (rows, bounds, integrality), better than the start's
// own best completion, and no better than the optimum found by the full
// search (which would mean an invalid point). Offered that point again, the
// search answers nil at once.
func TestImprovePlan(t *testing.T) {
	improved := 0
	eachRelaxed(t, []synthCase{{8, 4, 1}, {10, 4, 2}, {9, 5, 3}, {12, 5, 4}}, func(t *testing.T, c *Case, m *Model, relax lp.Result) {
		start, from, why := roundedUpStart(t, m, relax)
		if start == nil {
			t.Skip(why)
		}
		im := m.newImprover(time.Time{})
		z := im.improve(context.Background(), start, nil)
		if z == nil {
			t.Logf("no improving move from −NPV %.2f", from.Objective)
			return
		}
		improved++
		// Without limits the search ends with a pass that kept no move, so
		// it knows z as settled and, offered z again (as mip does), answers
		// nil at once.
		if !im.isSettled(z) {
			t.Error("the returned point is not marked settled")
		}
		if again := im.improve(context.Background(), z, nil); again != nil {
			t.Error("offered its own result again, the search improved it")
		}
		obj, optimum := checkImproved(t, c, m, z, from)
		t.Logf("NPV %.2f → %.2f (optimum %.2f)", -from.Objective, -obj, optimum)
	})
	if improved == 0 {
		t.Fatal("the local search improved no start plan")
	}
}

// TestImproveShifts checks the shift moves on the points where the single
// moves settle: from the rounded-up plan the local search runs with shifts
// off until no single move pays, then on from there. Where it keeps a
// shift, its answer must be a point of the MIP, better than the settled one
// and no better than the proven optimum; and on some case it must keep one,
// or the shifts would be dead weight.
func TestImproveShifts(t *testing.T) {
	shifted := 0
	eachRelaxed(t, []synthCase{{8, 4, 1}, {10, 4, 2}, {9, 5, 3}, {12, 5, 4}, {10, 5, 5}, {12, 4, 6}}, func(t *testing.T, c *Case, m *Model, relax lp.Result) {
		start := m.roundUpHeuristic(relax.X)
		if len(start) == 0 {
			t.Skip("the heuristic found no candidate plan within the budget")
		}
		singles := m.newImprover(time.Time{})
		singles.noShifts = true
		settled := start[0]
		if z := singles.improve(context.Background(), settled, nil); z != nil {
			settled = z
		}
		if singles.settled == nil {
			t.Skip("the single moves did not settle within the trial cap")
		}
		from := fixedLP(t, m, settled)
		if from.Status != lp.Optimal {
			t.Skipf("the settled plan has no feasible routing (%v)", from.Status)
		}
		// The same search, shifts on, from where it settled (so that its
		// single moves are those that failed there).
		singles.noShifts, singles.settled = false, nil
		z := singles.improve(context.Background(), settled, nil)
		if singles.shiftsKept == 0 {
			t.Logf("no shift pays at −NPV %.2f", from.Objective)
			return
		}
		shifted++
		obj, optimum := checkImproved(t, c, m, z, from)
		t.Logf("NPV %.2f → %.2f with shifts (optimum %.2f)", -from.Objective, -obj, optimum)
	})
	if shifted == 0 {
		t.Fatal("no shift improved a settled plan")
	}
}

// checkImproved checks a point z the local search returned from a start
// whose best completion is from: a point of the MIP (rows, bounds,
// integrality), better than from, and no better than the optimum of c
// proven by the full search (which would mean an invalid point). It
// returns z's −NPV and the optimal NPV.
func checkImproved(t *testing.T, c *Case, m *Model, z []float64, from lp.Result) (obj, optimum float64) {
	t.Helper()
	if v, integral := m.LP.MaxViolation(z, 1e-9); v > 1e-6 || !integral {
		t.Fatalf("improved point violates the model by %g (integral %v)", v, integral)
	}
	obj, _ = m.LP.Evaluate(z)
	if obj >= from.Objective-1e-6*math.Abs(from.Objective) {
		t.Errorf("improved −NPV %.2f, not below the start's %.2f", obj, from.Objective)
	}
	res, err := Solve(context.Background(), c, SolveOptions{Gap: 1e-9})
	if err != nil || res.Status != StatusOptimal {
		t.Fatalf("solve: %v %v", res.Status, err)
	}
	if -obj > *res.Objective*(1+1e-9)+1e-6 {
		t.Errorf("improved NPV %.2f above the proven optimum %.2f", -obj, *res.Objective)
	}
	return obj, *res.Objective
}

// TestRegionNeighbourhoods checks the regions that the improver re-plans
// (replan) on two synthetic cases: the region of site v holds the
// unit and build columns of exactly the links with an end at v or at a
// site linked to v, and every integer column of no link (vendor tiers);
// every integer column of the model is in some region.
func TestRegionNeighbourhoods(t *testing.T) {
	for _, tc := range []synthCase{{8, 4, 1}, {12, 5, 4}} {
		c, err := loadSynthetic(t, tc.sites, tc.years, tc.seed)
		if err != nil {
			t.Fatal(err)
		}
		m, err := BuildModel(c, BuildOptions{})
		if err != nil {
			t.Fatal(err)
		}
		linkOf := map[int]int{} // integer column → its link
		for _, o := range m.options {
			for _, j := range o.col {
				if j >= 0 {
					linkOf[j] = o.link
				}
			}
		}
		for _, b := range m.builds {
			for _, j := range b.col {
				if j >= 0 {
					linkOf[j] = b.link
				}
			}
		}
		hoods := m.regionNeighbourhoods()
		if len(hoods) != len(c.Sites) {
			t.Fatalf("%v: %d regions for %d sites", tc, len(hoods), len(c.Sites))
		}
		covered := map[int]bool{}
		for v, hood := range hoods {
			near := map[int]bool{v: true}
			for _, l := range c.Links {
				if l.A == v || l.B == v {
					near[l.A], near[l.B] = true, true
				}
			}
			in := map[int]bool{}
			for _, j := range hood {
				in[j] = true
				covered[j] = true
			}
			for j, isInt := range m.LP.Integer {
				if !isInt {
					if in[j] {
						t.Errorf("%v: region of site %d holds continuous column %s", tc, v, m.LP.ColName[j])
					}
					continue
				}
				l, onLink := linkOf[j]
				want := !onLink || near[c.Links[l].A] || near[c.Links[l].B]
				if in[j] != want {
					t.Errorf("%v: region of site %d: column %s in it %v, want %v", tc, v, m.LP.ColName[j], in[j], want)
				}
			}
		}
		for j, isInt := range m.LP.Integer {
			if isInt && !covered[j] {
				t.Errorf("%v: integer column %s is in no region", tc, m.LP.ColName[j])
			}
		}
	}
}

// TestReplanRegions starts the regional re-plans from the plan that rounds
// every unit count of the LP relaxation up, on cases where the local
// search has room: a region's sub-MIP must return a point of the MIP
// better than the start's own best completion and no better than the
// proven optimum (checkImproved), on some case. Without a deadline the
// improver does not re-plan at all.
func TestReplanRegions(t *testing.T) {
	improved := 0
	eachRelaxed(t, []synthCase{{8, 4, 1}, {10, 4, 2}}, func(t *testing.T, c *Case, m *Model, relax lp.Result) {
		start, from, why := roundedUpStart(t, m, relax)
		if start == nil {
			t.Fatal("test input: " + why)
		}
		x := from.X
		if m.newImprover(time.Time{}).replan(context.Background(), x) != nil {
			t.Error("re-planned without a deadline")
		}
		im := m.newImprover(time.Now().Add(time.Minute))
		var told []int
		im.onRegion = func(site int) { told = append(told, site) }
		z := im.replan(context.Background(), x)
		// Each region tried is announced by its site, in turn from the
		// first, and its end by −1: the progress reports rely on it.
		if len(told) == 0 || len(told)%2 != 0 {
			t.Errorf("sites told: %v; want each region's site then −1", told)
		}
		for k := 0; k+1 < len(told); k += 2 {
			if told[k] != k/2 || told[k+1] != -1 {
				t.Errorf("sites told: %v; want 0, −1, 1, −1, …", told)
				break
			}
		}
		if z == nil {
			t.Logf("no region improves −NPV %.2f", from.Objective)
			return
		}
		improved++
		obj, optimum := checkImproved(t, c, m, z, from)
		t.Logf("NPV %.2f → %.2f after %d regions (optimum %.2f)", -from.Objective, -obj, im.nextRegion, optimum)
	})
	if improved == 0 {
		t.Fatal("no regional re-plan improved a start plan")
	}
}
