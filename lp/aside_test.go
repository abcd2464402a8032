package lp

import (
	"context"
	"math"
	"math/rand"
	"runtime"
	"testing"
)

// TestAsideSameResult solves LPs large enough for the steepest-edge solve
// to run aside (asideWorker), cold and then warm after bound changes, once
// on one core (no worker) and once on two, and wants the same iterations
// and bit for bit the same objective and point: the aside solve must see
// the factor and the vector the inline solve would. Under -race it also
// checks that the worker and the simplex share nothing they both write.
func TestAsideSameResult(t *testing.T) {
	type run struct {
		iters []int
		obj   []float64
		x     [][]float64
	}
	solveAll := func(procs int) (run, int64) {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
		before := asideStarts.Load()
		var out run
		rng := rand.New(rand.NewSource(3))
		models := 2
		if testing.Short() {
			models = 1 // the race detector's run
		}
		for k := 0; k < models; k++ {
			n := 4000
			m := sparseRandomModel(rng, n, asideMinRows+500)
			sv, err := NewSolver(m, Settings{})
			if err != nil {
				t.Fatal(err)
			}
			change := rand.New(rand.NewSource(int64(k)))
			for round := 0; round < 4; round++ {
				if round > 0 {
					// Tighten some bounds around the last point: the
					// dual simplex re-solves from the last basis.
					for c := 0; c < 40; c++ {
						j := change.Intn(n)
						v := out.x[len(out.x)-1][j]
						if change.Intn(2) == 0 {
							sv.SetColBounds(j, m.ColLower[j], math.Max(m.ColLower[j], math.Floor(v-0.5)))
						} else {
							sv.SetColBounds(j, math.Min(m.ColUpper[j], math.Ceil(v+0.5)), m.ColUpper[j])
						}
					}
				}
				r := sv.Solve(context.Background())
				out.iters = append(out.iters, r.Iterations)
				out.obj = append(out.obj, r.Objective)
				out.x = append(out.x, append([]float64(nil), r.X...))
			}
		}
		return out, asideStarts.Load() - before
	}
	one, starts1 := solveAll(1)
	two, starts2 := solveAll(2)
	if starts1 != 0 {
		t.Errorf("one core: %d solves handed aside, want 0", starts1)
	}
	if starts2 == 0 {
		t.Fatal("two cores: no solve handed aside; the test does not exercise the worker")
	}
	for i := range one.iters {
		if one.iters[i] != two.iters[i] || math.Float64bits(one.obj[i]) != math.Float64bits(two.obj[i]) {
			t.Fatalf("solve %d: %d iterations, objective %v on one core; %d, %v on two", i, one.iters[i], one.obj[i], two.iters[i], two.obj[i])
		}
		for j := range one.x[i] {
			if math.Float64bits(one.x[i][j]) != math.Float64bits(two.x[i][j]) {
				t.Fatalf("solve %d: x[%d] = %v on one core, %v on two", i, j, one.x[i][j], two.x[i][j])
			}
		}
	}
	t.Logf("%d solves handed aside; iterations %v", starts2, two.iters)
}
