package plans

import (
	"context"
	"encoding/json"
	"strings"
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

// TestTieBreakDeadline: the shortest-routing stage of decoding stops at its
// deadline and keeps the routing of the NPV stage, which has the same NPV
// and no fewer Gbps·km, and decode says so in a warning; without a deadline,
// or with one just passed (the stage still gets minTieBreak), the stage runs
// to its optimum (source: the lexicographic order of the two
// objectives; the first stage's optimum is the reference).
func TestTieBreakDeadline(t *testing.T) {
	c, err := loadSynthetic(t, 8, 4, 3)
	if err != nil {
		t.Fatal(err)
	}
	res, err := Solve(context.Background(), c, SolveOptions{})
	if err != nil {
		t.Fatal(err)
	}
	m := res.model
	fixed := m.fixIntegers(res.x)
	km := m.kmObjective()
	dot := func(x []float64) float64 {
		s := 0.0
		for j, v := range km {
			s += v * x[j]
		}
		return s
	}
	full, err := solveLex(context.Background(), fixed, time.Time{}, km)
	if err != nil || full == nil {
		t.Fatalf("lexicographic LP without a deadline: %v", err)
	}
	if full.tieBreakCut {
		t.Fatal("a stage without a deadline reported as stopped by one")
	}

	// A deadline already passed still leaves the stage minTieBreak (1 s),
	// far more than this small case needs: it runs to the same optimum.
	late, err := solveLex(context.Background(), fixed, time.Now().Add(-time.Second), km)
	if err != nil || late == nil {
		t.Fatalf("lexicographic LP with a past deadline and the floor: %v", err)
	}
	if late.tieBreakCut || !withinRel(dot(late.x), dot(full.x), 1e-9) {
		t.Errorf("with the floor of %v: stopped %v, Gbps·km %.3f, want %.3f", minTieBreak, late.tieBreakCut, dot(late.x), dot(full.x))
	}

	defer func(d time.Duration) { minTieBreak = d }(minTieBreak)
	minTieBreak = 0
	cut, err := solveLex(context.Background(), fixed, time.Now().Add(-time.Second), km)
	if err != nil || cut == nil {
		t.Fatalf("lexicographic LP with a past deadline: %v", err)
	}
	if !cut.tieBreakCut {
		t.Fatal("a tie-break stage past its deadline not reported as stopped")
	}
	npvCut, _ := fixed.Evaluate(cut.x)
	npvFull, _ := fixed.Evaluate(full.x)
	if !withinRel(npvCut, full.firstObj, 1e-9) || !withinRel(npvFull, full.firstObj, 1e-6) {
		t.Errorf("objective: cut %.6f, full %.6f, NPV stage %.6f", npvCut, npvFull, full.firstObj)
	}
	if dot(cut.x) < dot(full.x)-1e-6*dot(full.x) {
		t.Errorf("Gbps·km: stopped stage %.3f below the optimum %.3f", dot(cut.x), dot(full.x))
	}
	t.Logf("Gbps·km: %.1f stopped, %.1f optimal", dot(cut.x), dot(full.x))

	// decode passes the deadline on and warns.
	res2 := &Result{}
	res2.setBaseline(nil)
	if err := m.decode(context.Background(), res2, res.x, nil, time.Now().Add(-time.Second)); err != nil {
		t.Fatal(err)
	}
	warned := false
	for _, w := range res2.Warnings {
		warned = warned || strings.Contains(w, "shortest routing")
	}
	if !warned {
		t.Errorf("no warning about the stopped tie-break: %q", res2.Warnings)
	}
}
