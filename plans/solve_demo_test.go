package plans

import (
	"context"
	"testing"
)

// TestSolveDemo solves the embedded demo to proven optimality and checks
// the invariants of every solve on it.
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
	t.Logf("demo: NPV %.0f, baseline %.0f, bound %.0f, %d plan rows, %d rows × %d columns (%d integer), %d nodes, %.2f s",
		*res.Objective, deref(res.BaselineNPV), *res.Bound, len(res.Plan), res.Stats.Rows, res.Stats.Columns, res.Stats.Integers, res.Stats.Nodes, res.Stats.Seconds)
	checkInvariants(t, c, res)
}
