package mip

import (
	"context"
	"math"
	"testing"
	"time"
)

// TestRINS checks the sub-MIP heuristic on a knapsack with two capacity
// rows. The search stops at its root with the empty start as incumbent;
// the sub-MIP must fix exactly the columns where the root LP agrees with
// that start, and its answer must be the optimum of that neighbourhood,
// found here by enumeration (bruteForce), and feasible in the full model.
// Through a call point, the answer becomes the incumbent. A second request
// for the same neighbourhood, one beyond the iteration budget, and one
// where too few columns agree are refused.
func TestRINS(t *testing.T) {
	const n = 20
	m := hardKnapsack(n, 2, 7)
	set := Settings{NoHeuristics: true, NoCuts: true, NoStrongBranching: true, NodeLimit: 1, Start: make([]float64, n)}.withDefaults()
	s := newSearch(context.Background(), m, set)
	if r := s.run([][]float64{set.Start}); r.Objective != 0 || s.rootX == nil {
		t.Fatalf("root search: %+v, want the empty start kept", r)
	}
	s.set.NoHeuristics = false
	// The root LP of so small a model takes a few iterations, far below
	// rinsMinIters: give the sub-MIPs a budget (its rule is checked below).
	s.rootIters = 100 * rinsMinIters
	x := s.rootX
	job := s.prepareRINS(x)
	if job == nil {
		t.Fatal("no sub-MIP for the root LP point and the empty start")
	}
	free := 0
	for j := 0; j < n; j++ {
		lo, up := job.model.ColLower[j], job.model.ColUpper[j]
		if math.Abs(x[j]) <= set.IntTol {
			if lo != 0 || up != 0 {
				t.Errorf("column %d: LP %v agrees with the start, bounds [%v, %v], want fixed at 0", j, x[j], lo, up)
			}
			continue
		}
		free++
		if lo != 0 || up != 1 {
			t.Errorf("column %d: LP %v, bounds [%v, %v], want free [0, 1]", j, x[j], lo, up)
		}
	}
	if free == 0 || free > 16 {
		t.Fatalf("%d free columns: the test wants a neighbourhood it can enumerate", free)
	}
	st, want := bruteForce(job.model)
	if st != Optimal || !(want < 0) {
		t.Fatalf("enumeration of the neighbourhood: %v %v, want a point better than the start (0)", st, want)
	}
	y, its := runRINS(context.Background(), job, s.set, time.Time{})
	if y == nil || its <= 0 {
		t.Fatalf("sub-MIP found nothing (%d iterations); the neighbourhood's optimum is %v", its, want)
	}
	if got, _ := job.model.Evaluate(y); math.Abs(got-want) > 1e-6 {
		t.Errorf("sub-MIP point has objective %v, want the neighbourhood's optimum %v", got, want)
	}
	if v, integral := m.MaxViolation(y, 1e-9); v > 1e-9 || !integral {
		t.Errorf("sub-MIP point breaks the model: violation %v, integral %v", v, integral)
	}
	if s.prepareRINS(x) != nil {
		t.Error("the same neighbourhood was offered twice")
	}
	// Through the search: a call point starts the sub-MIP on the helper
	// goroutine, and the next join takes its point as the incumbent and
	// counts its iterations against the budget.
	s.rinsDone = nil
	s.callHeuristic(x)
	s.joinHelper(false)
	if s.rinsIters != its || math.Abs(s.incObj-want) > 1e-6 {
		t.Errorf("after a call point and its join: incumbent %v, sub-MIP iterations %d; want %v and %d", s.incObj, s.rinsIters, want, its)
	}
	// Another point, so the neighbourhood is new: refused for budget
	// while the sub-MIPs have spent it, then for too few fixed columns.
	other := append([]float64(nil), x...)
	for j := range other {
		if other[j] == 0 {
			other[j] = 0.5
			break
		}
	}
	s.rinsIters = s.rootIters + s.iters
	s.rinsDone = nil
	if s.prepareRINS(other) != nil {
		t.Error("a sub-MIP beyond the iteration budget was offered")
	}
	s.rinsIters = 0
	for j := range other {
		other[j] = 0.5
	}
	if s.prepareRINS(other) != nil {
		t.Error("a sub-MIP with no column fixed was offered")
	}
}
