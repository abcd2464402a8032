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
			// With 4,000 columns the L pass did nothing in these models,
			// and an aside solve that skipped it went unnoticed.
			n := 3000
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
	for _, other := range []struct {
		name string
		r    run
	}{{"on two without SecondCore", off}, {"on two with it", two}} {
		got := other.r
		for i := range one.iters {
			if one.iters[i] != got.iters[i] || math.Float64bits(one.obj[i]) != math.Float64bits(got.obj[i]) {
				t.Fatalf("solve %d: %d iterations, objective %v on one core; %d, %v %s", i, one.iters[i], one.obj[i], got.iters[i], got.obj[i], other.name)
			}
			if !slices.EqualFunc(one.x[i], got.x[i], func(a, b float64) bool { return math.Float64bits(a) == math.Float64bits(b) }) {
				t.Fatalf("solve %d: the point on one core differs from the one %s", i, other.name)
			}
		}
	}
	t.Logf("%d solves handed aside; iterations %v", starts2, two.iters)
}
