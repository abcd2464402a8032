package lp

import (
	"context"
	"math/rand"
	"testing"
)

// FuzzSolve solves small random models drawn from the fuzzed seed with two
// settings; statuses must agree and optimal answers must pass the
// independent check and agree on the optimum.
func FuzzSolve(f *testing.F) {
	for seed := int64(0); seed < 8; seed++ {
		f.Add(seed, seed%2 == 0, uint8(seed))
	}
	f.Fuzz(func(t *testing.T, seed int64, boxed bool, branch uint8) {
		m := randomModel(rand.New(rand.NewSource(seed)), boxed)
		var first Result
		for v, set := range []Settings{{}, {NoScaling: true, NoPerturbation: true}} {
			r, err := Solve(context.Background(), m, set)
			if err != nil {
				t.Fatal(err)
			}
			if v == 0 {
				first = r
			}
			if r.Status != first.Status {
				t.Fatalf("settings %d: status %v, default %v", v, r.Status, first.Status)
			}
			if r.Status == Optimal {
				if err := verifyOptimal(m, r); err != nil {
					t.Fatalf("settings %d: %v", v, err)
				}
				if !close(r.Objective, first.Objective, 1e-7) {
					t.Fatalf("settings %d: %v, default %v", v, r.Objective, first.Objective)
				}
			}
		}
		if first.Status != Optimal {
			return
		}
		// Branch on one column and compare the warm re-solve with a cold one.
		sv, err := NewSolver(m, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		r := sv.Solve(context.Background())
		j := int(branch) % m.NumCols()
		lo := r.X[j] + 0.5
		if lo > m.ColUpper[j] {
			lo = m.ColUpper[j]
		}
		sv.SetColBounds(j, lo, m.ColUpper[j])
		warm := sv.Solve(context.Background())
		child := m.Clone()
		child.ColLower[j] = lo
		cold, _ := Solve(context.Background(), child, Settings{})
		if warm.Status != cold.Status {
			t.Fatalf("branch: warm %v, cold %v", warm.Status, cold.Status)
		}
		if cold.Status == Infeasible {
			if err := verifyFarkas(child, warm.Ray); err != nil {
				t.Fatal(err)
			}
		}
		if cold.Status == Optimal {
			if err := verifyOptimal(child, warm); err != nil {
				t.Fatal(err)
			}
			if !close(warm.Objective, cold.Objective, 1e-7) {
				t.Fatalf("branch: warm %v, cold %v", warm.Objective, cold.Objective)
			}
		}
	})
}
