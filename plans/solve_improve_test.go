package plans

import (
	"context"
	"math"
	"slices"
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
		im := m.newImprover(context.Background(), time.Time{})
		z := im.improve(start[0], nil)
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
		if again := im.improve(z, nil); again != nil {
			t.Error("offered its own result again, the search improved it")
		}
		if v, integral := m.LP.MaxViolation(z, 1e-9); v > 1e-6 || !integral {
			t.Fatalf("improved point violates the model by %g (integral %v)", v, integral)
		}
		obj, _ := m.LP.Evaluate(z)
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
		t.Logf("NPV %.2f → %.2f (optimum %.2f)", -from.Objective, -obj, *res.Objective)
	})
	if improved == 0 {
		t.Fatal("the local search improved no start plan")
	}
}

// TestEarlyPlan: the plan the local search makes from the do-nothing plan
// while the root LP runs is a feasible integral point of the model, never
// worse than the do-nothing plan and better where purchases pay (source:
// the model's own rows and objective; the do-nothing plan is the
// reference). With its context already ended it is the do-nothing plan.
func TestEarlyPlan(t *testing.T) {
	better := 0
	for _, sc := range []synthCase{{8, 4, 1}, {10, 4, 2}, {9, 5, 3}} {
		c, err := loadSynthetic(t, sc.sites, sc.years, sc.seed)
		if err != nil {
			t.Fatal(err)
		}
		m, err := BuildModel(c, BuildOptions{})
		if err != nil {
			t.Fatal(err)
		}
		base, err := solveBaseline(context.Background(), c)
		if err != nil || base == nil {
			t.Fatalf("baseline: %v", err)
		}
		start := m.startFromBaseline(base)
		from, _ := m.LP.Evaluate(start)

		x := m.earlyPlan(context.Background(), base)
		if v, integral := m.LP.MaxViolation(x, 1e-9); v > 1e-6 || !integral {
			t.Fatalf("%v: early plan violates the model by %g (integral %v)", sc, v, integral)
		}
		obj, _ := m.LP.Evaluate(x)
		if obj > from+1e-9*math.Abs(from) {
			t.Errorf("%v: early plan −NPV %.2f above the do-nothing plan's %.2f", sc, obj, from)
		}
		if obj < from-1e-6*math.Abs(from) {
			better++
		}
		t.Logf("%v: NPV %.2f → %.2f", sc, -from, -obj)

		ctx, cancel := context.WithCancel(context.Background())
		cancel()
		if y := m.earlyPlan(ctx, base); !slices.Equal(y, start) {
			t.Errorf("%v: with its context ended, the early plan is not the do-nothing plan", sc)
		}
	}
	if better == 0 {
		t.Fatal("the early plan improved on the do-nothing plan in no case")
	}
}
