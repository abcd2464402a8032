package lp

import (
	"context"
	"math"
	"math/rand"
	"testing"
)

// TestRandomWarmSequences drives one Solver through a branch-and-bound-like
// sequence of bound changes, cuts, cut removals, cost changes and state
// restores, and compares every warm re-solve with a cold solve of the same
// model (status, optimum) and with the independent check, and the solver's
// partitioned row copy with one built anew.
func TestRandomWarmSequences(t *testing.T) {
	models, steps := 60, 12
	if testing.Short() {
		models = 15
	}
	rng := rand.New(rand.NewSource(11))
	for k := 0; k < models; k++ {
		m := randomModel(rng, k%3 != 2)
		sv, err := NewSolver(m, Settings{Seed: int64(k)})
		if err != nil {
			t.Fatal(err)
		}
		cur := m.Clone() // the model the solver should hold
		var saved *State
		var savedModel *Model
		for step := 0; step < steps; step++ {
			r := sv.Solve(context.Background())
			// The dual simplex keeps its partitioned row copy through its
			// pivots and brings it up to date at its start (after bound
			// changes, cuts, restores and primal pivots): both must leave
			// it equal to one built from scratch.
			sv.syncPartition()
			if err := partitionError(sv); err != nil {
				t.Fatalf("model %d step %d: %v", k, step, err)
			}
			cold, err := Solve(context.Background(), cur, Settings{})
			if err != nil {
				t.Fatal(err)
			}
			if r.Status != cold.Status {
				t.Fatalf("model %d step %d: warm %v, cold %v", k, step, r.Status, cold.Status)
			}
			if r.Status == Infeasible {
				if err := verifyFarkas(cur, r.Ray); err != nil {
					t.Fatalf("model %d step %d: %v", k, step, err)
				}
			}
			if r.Status == Optimal {
				if err := verifyOptimal(cur, r); err != nil {
					t.Fatalf("model %d step %d: %v", k, step, err)
				}
				if !close(r.Objective, cold.Objective, 1e-7) {
					t.Fatalf("model %d step %d: warm %v, cold %v", k, step, r.Objective, cold.Objective)
				}
			}
			switch op := rng.Intn(6); {
			case op <= 1 && r.Status == Optimal:
				// Branch on a column: tighten one side around its value.
				j := rng.Intn(cur.NumCols())
				lo, up := cur.ColLower[j], cur.ColUpper[j]
				if rng.Intn(2) == 0 {
					up = math.Max(lo, math.Floor(r.X[j]-0.25))
				} else {
					lo = math.Min(up, math.Ceil(r.X[j]+0.25))
				}
				sv.SetColBounds(j, lo, up)
				cur.ColLower[j], cur.ColUpper[j] = lo, up
			case op == 2 && r.Status == Optimal:
				// A cut through the optimum's neighbourhood.
				var idx []int
				var val []float64
				act := 0.0
				for j := range cur.Obj {
					if rng.Intn(2) == 0 {
						v := float64(rng.Intn(7) - 3)
						if v != 0 {
							idx = append(idx, j)
							val = append(val, v)
							act += v * r.X[j]
						}
					}
				}
				row := Row{Lower: math.Inf(-1), Upper: act - rng.Float64(), Index: idx, Value: val}
				sv.AddRows([]Row{row})
				cur.AddRow("", row.Lower, row.Upper, idx, val)
			case op == 3 && cur.NumRows() > 2:
				// Remove one or two rows.
				i, k := rng.Intn(cur.NumRows()), rng.Intn(cur.NumRows())
				sv.RemoveRows([]int{i, k})
				var keep []int
				for r := 0; r < cur.NumRows(); r++ {
					if r != i && r != k {
						keep = append(keep, r)
					}
				}
				cur = cur.keepRows(keep)
			case op == 3 && cur.NumRows() > 0:
				// Loosen or tighten a row.
				i := rng.Intn(cur.NumRows())
				lo, up := cur.RowLower[i], cur.RowUpper[i]
				if !math.IsInf(up, 1) {
					up += float64(rng.Intn(3) - 1)
				}
				if lo > up {
					lo = up
				}
				sv.SetRowBounds(i, lo, up)
				cur.RowLower[i], cur.RowUpper[i] = lo, up
			case op == 4:
				c := append([]float64(nil), cur.Obj...)
				c[rng.Intn(len(c))] += float64(rng.Intn(5) - 2)
				sv.SetObjective(c)
				copy(cur.Obj, c)
			default:
				if saved != nil && savedModel.NumRows() == cur.NumRows() && rng.Intn(2) == 0 {
					sv.RestoreState(saved)
					copy(cur.ColLower, savedModel.ColLower)
					copy(cur.ColUpper, savedModel.ColUpper)
				} else {
					saved, savedModel = sv.SaveState(), cur.Clone()
				}
			}
		}
	}
}
