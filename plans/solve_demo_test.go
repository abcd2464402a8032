package plans

import (
	"context"
	"testing"

	"netstage/mip"
)

// TestSolveDemo solves the embedded demo to proven optimality (default
// gap) and checks the invariants of every solve on it, and that the gap
// reported for a proven plan is within the target: the search stops with
// its bound right at the target, and the NPV recomputed from the plan,
// a fraction of a cent lower, read as a gap of 1.00001e-4 before.
func TestSolveDemo(t *testing.T) {
	if testing.Short() {
		t.Skip("the demo solve runs in the full suite (too slow under the race detector)")
	}
	c, _, err := LoadDemo()
	if err != nil {
		t.Fatal(err)
	}
	res, err := Solve(context.Background(), c, SolveOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != StatusOptimal {
		t.Fatalf("status %s, want optimal", res.Status)
	}
	if res.Gap == nil || *res.Gap > mip.DefaultRelGap {
		t.Errorf("proven plan reports gap %v, above the default target %v", deref(res.Gap), mip.DefaultRelGap)
	}
	t.Logf("demo: NPV %.0f, baseline %.0f, bound %.0f, %d plan rows, %d rows × %d columns (%d integer), %d nodes, %.2f s",
		*res.Objective, deref(res.BaselineNPV), *res.Bound, len(res.Plan), res.Stats.Rows, res.Stats.Columns, res.Stats.Integers, res.Stats.Nodes, res.Stats.Seconds)
	checkInvariants(t, c, res)
}
