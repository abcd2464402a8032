package plans

import (
	"context"
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
		start := m.roundUpHeuristic(relax.X)
		if len(start) == 0 {
			t.Skip("the heuristic found no candidate plan within the budget")
		}
		from := fixedLP(t, m, start[0])
		if from.Status != lp.Optimal {
			t.Skipf("the rounded-up plan has no feasible routing (%v)", from.Status)
		}
		im := m.newImprover(time.Time{})
		z := im.improve(context.Background(), start[0], nil)
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
