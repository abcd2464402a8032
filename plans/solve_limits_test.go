package plans

import (
	"context"
	"encoding/json"
	"testing"
	"time"
)

// TestCancelledSolveKeepsPlan: a search stopped at once (cancelled
// context) still reports a plan when mip had one, never "optimal" without
// proof, and the baseline either way.
func TestCancelledSolveKeepsPlan(t *testing.T) {
	c, err := loadSynthetic(t, 8, 5, 2)
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	var once bool
	res, err := Solve(ctx, c, SolveOptions{Gap: 1e-12, Progress: func(p Progress) {
		if p.HasIncumbent && !once {
			once = true
			cancel()
		}
	}})
	cancel()
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("status %s, gap %v", res.Status, deref(res.Gap))
	if res.BaselineNPV == nil {
		t.Error("no baseline")
	}
	switch res.Status {
	case StatusFeasible:
		// The bound may be unknown (nil) when the stop came before the
		// first LP; when known it is at least the objective.
		if res.Objective == nil || (res.Bound == nil) != (res.Gap == nil) || res.Bound != nil && *res.Bound < *res.Objective-1e-6*abs(*res.Objective) {
			t.Errorf("feasible result without a consistent objective, bound and gap: %v %v %v", deref(res.Objective), deref(res.Bound), deref(res.Gap))
		}
		if _, err := json.Marshal(res); err != nil {
			t.Errorf("result does not encode as JSON: %v", err)
		}
		checkInvariants(t, c, res)
	case StatusOptimal:
		// Possible when the proof completes before the stop is seen.
		checkInvariants(t, c, res)
	default:
		t.Errorf("status %s, want feasible (or optimal)", res.Status)
	}
}

// TestTimeLimitHonoured: a tiny time limit ends the search with a plan or
// status limit, never an error.
func TestTimeLimitHonoured(t *testing.T) {
	c, err := loadSynthetic(t, 8, 5, 2)
	if err != nil {
		t.Fatal(err)
	}
	res, err := Solve(context.Background(), c, SolveOptions{TimeLimit: time.Millisecond, Gap: 1e-12})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("status %s, gap %v", res.Status, deref(res.Gap))
	if res.Status != StatusFeasible && res.Status != StatusLimit && res.Status != StatusOptimal {
		t.Errorf("status %s", res.Status)
	}
	if res.Status == StatusFeasible {
		checkInvariants(t, c, res)
	}
}
