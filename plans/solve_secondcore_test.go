package plans

import (
	"context"
	"math"
	"runtime"
	"testing"
)

// TestSecondCoreSamePlan solves the synthetic S case (10 sites, 5 years;
// 1,038 rows, enough for the dual simplex to hand its steepest-edge
// solves to a second goroutine) to optimality with SecondCore off and on,
// and wants the same search: the same number of nodes, the same NPV bit
// for bit and the same purchases. netstage solve sets SecondCore and
// compare or sweep with several jobs do not, so a planner must get the
// same plan from either. Under -race (CI) it also checks the worker
// against the whole search: strong branching, saved and restored states,
// cut rows added between solves.
func TestSecondCoreSamePlan(t *testing.T) {
	if runtime.GOMAXPROCS(0) < 2 {
		t.Skip("one core: SecondCore has no second goroutine to use")
	}
	c, err := loadSynthetic(t, 10, 5, 1)
	if err != nil {
		t.Fatal(err)
	}
	var res [2]*Result
	for k, on := range []bool{false, true} {
		if res[k], err = Solve(context.Background(), c, SolveOptions{SecondCore: on}); err != nil {
			t.Fatal(err)
		}
		if res[k].Status != StatusOptimal {
			t.Fatalf("SecondCore %v: status %v, want optimal", on, res[k].Status)
		}
	}
	off, on := res[0], res[1]
	if off.Stats.Nodes != on.Stats.Nodes || math.Float64bits(*off.Objective) != math.Float64bits(*on.Objective) {
		t.Fatalf("without SecondCore %d nodes, NPV %v; with it %d nodes, NPV %v", off.Stats.Nodes, *off.Objective, on.Stats.Nodes, *on.Objective)
	}
	if len(off.Plan) != len(on.Plan) {
		t.Fatalf("%d purchases without SecondCore, %d with it", len(off.Plan), len(on.Plan))
	}
	for i := range off.Plan {
		if off.Plan[i] != on.Plan[i] {
			t.Fatalf("purchase %d: %+v without SecondCore, %+v with it", i, off.Plan[i], on.Plan[i])
		}
	}
}
