package lp

import (
	"context"
	"math"
	"math/rand"
	"runtime"
	"slices"
	"testing"
)

// TestAsideSameResult solves LPs large enough for the steepest-edge solve
// to run aside (asideWorker), cold and then warm after bound changes: on
// one core and on two without SecondCore (no worker either time), and on
// two with it. It wants the same iterations and bit for bit the same
// objective and point: the aside solve must see the factor and the vector
// the inline solve would. Under -race it also checks that the worker and
// the simplex share nothing they both write.
func TestAsideSameResult(t *testing.T) {
	type run struct {
		iters []int
		obj   []float64
		x     [][]float64
	}
	solveAll := func(procs int, set Settings) (run, int64) {
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
			sv, err := NewSolver(m, set)
			if err != nil {
				t.Fatal(err)
			}
			change := rand.New(rand.NewSource(int64(k)))
			for round := 0; round < 4; round++ {
				if round > 0 {
					// Cut the last point off by bounds on columns it
					// holds strictly inside theirs: the dual simplex
					// re-solves from the last basis.
					for c, tries := 0, 0; c < 40 && tries < 100*n; tries++ {
						j := change.Intn(n)
						v := out.x[len(out.x)-1][j]
						if v <= m.ColLower[j]+1e-6 || v >= m.ColUpper[j]-1e-6 {
							continue
						}
						c++
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
	one, starts1 := solveAll(1, Settings{SecondCore: true})
	off, startsOff := solveAll(2, Settings{})
	two, starts2 := solveAll(2, Settings{SecondCore: true})
	if starts1 != 0 || startsOff != 0 {
		t.Errorf("%d solves handed aside on one core, %d on two without SecondCore; want none", starts1, startsOff)
	}
	if starts2 == 0 {
		t.Fatal("two cores: no solve handed aside; the test does not exercise the worker")
	}
	if !slices.Equal(one.iters, off.iters) {
		t.Fatalf("iterations %v on one core, %v on two without SecondCore", one.iters, off.iters)
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
