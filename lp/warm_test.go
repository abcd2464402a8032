package lp

import (
	"context"
	"fmt"
	"gonum.org/v1/gonum/mat"
	"math"
	"math/rand"
	"testing"
	"time"
)

// interiorColumn returns a column strictly between its bounds at the
// optimum, with the largest distance to its lower bound.
func interiorColumn(m *Model, r Result) int {
	best, bestGap := -1, 0.0
	for j, x := range r.X {
		gap := math.Min(x-m.ColLower[j], m.ColUpper[j]-x)
		if gap > 1e-3 && gap > bestGap {
			best, bestGap = j, gap
		}
	}
	return best
}

func solveOK(t *testing.T, m *Model, r Result) {
	t.Helper()
	if err := verifyOptimal(m, r); err != nil {
		t.Fatal(err)
	}
}

// TestWarmStartBoundChange tightens one bound after an optimal solve and
// checks that the warm re-solve reaches the cold optimum in far fewer
// iterations. The ratio 1/4 is this test's own bar (common practice for
// branch-and-bound re-solves is a handful of pivots).
func TestWarmStartBoundChange(t *testing.T) {
	for _, name := range []string{"afiro", "brandy", "e226", "finnis"} {
		t.Run(name, func(t *testing.T) {
			m, sv, r0 := solvedSample(t, name)
			j := interiorColumn(m, r0)
			if j < 0 {
				t.Fatal("no interior column")
			}
			// Branch down as branch-and-bound would: one unit below the
			// value, or halfway to the lower bound when that is closer.
			newUp := r0.X[j] - math.Min(1, (r0.X[j]-m.ColLower[j])/2)
			sv.SetColBounds(j, m.ColLower[j], newUp)
			warm := sv.Solve(context.Background())

			child := m.Clone()
			child.ColUpper[j] = newUp
			cold, err := Solve(context.Background(), child, Settings{})
			if err != nil {
				t.Fatal(err)
			}
			if cold.Status != warm.Status {
				t.Fatalf("warm status %v, cold %v", warm.Status, cold.Status)
			}
			if cold.Status == Optimal {
				solveOK(t, child, warm)
				solveOK(t, child, cold)
				if !close(warm.Objective, cold.Objective, 1e-9) {
					t.Fatalf("warm objective %v, cold %v", warm.Objective, cold.Objective)
				}
			}
			t.Logf("column %d: cold %d iterations, warm %d", j, cold.Iterations, warm.Iterations)
			if warm.Iterations*4 > cold.Iterations {
				t.Fatalf("warm re-solve took %d iterations, cold %d: want at most a quarter", warm.Iterations, cold.Iterations)
			}
			// Back to the original bounds: the optimum returns.
			sv.SetColBounds(j, m.ColLower[j], m.ColUpper[j])
			back := sv.Solve(context.Background())
			solveOK(t, m, back)
			if !close(back.Objective, r0.Objective, 1e-9) {
				t.Fatalf("after undoing the bound: %v, want %v", back.Objective, r0.Objective)
			}
		})
	}
}

// TestSaveRestoreState runs a strong-branching round: save, branch both
// ways, restore; after restoring, the original optimum comes back with no
// pivots.
func TestSaveRestoreState(t *testing.T) {
	m, sv, r0 := solvedSample(t, "brandy")
	j := interiorColumn(m, r0)
	st := sv.SaveState()
	for _, up := range []bool{false, true} {
		lo, hi := m.ColLower[j], math.Floor(r0.X[j])
		if up {
			lo, hi = math.Ceil(r0.X[j]), m.ColUpper[j]
		}
		if lo > hi {
			continue
		}
		sv.SetColBounds(j, lo, hi)
		r := sv.Solve(context.Background())
		if r.Status == Optimal {
			child := m.Clone()
			child.ColLower[j], child.ColUpper[j] = lo, hi
			solveOK(t, child, r)
		}
		sv.RestoreState(st)
	}
	wantRestored(t, m, sv, r0)
}

// solvedSample reads the sample LP name and solves it from scratch with a
// new solver, which it returns with the model and the (checked) optimum.
func solvedSample(t *testing.T, name string) (*Model, *Solver, Result) {
	t.Helper()
	m := readSample(t, name)
	sv, r0 := solved(t, m)
	return m, sv, r0
}

// solved solves m from scratch with a new solver, which it returns with
// the (checked) optimum.
func solved(t *testing.T, m *Model) (*Solver, Result) {
	t.Helper()
	sv, err := NewSolver(m, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	r0 := sv.Solve(context.Background())
	solveOK(t, m, r0)
	return sv, r0
}

// wantRestored solves again after a RestoreState: the saved optimum r0 of
// m must come back with no pivots.
func wantRestored(t *testing.T, m *Model, sv *Solver, r0 Result) {
	t.Helper()
	r := sv.Solve(context.Background())
	solveOK(t, m, r)
	if r.Iterations != 0 || !close(r.Objective, r0.Objective, 1e-9) {
		t.Fatalf("after restore: %d iterations, objective %v; want 0 and %v", r.Iterations, r.Objective, r0.Objective)
	}
}

// TestRestoreAfterRefactors saves a state, then solves branches large
// enough that the solver factorises again (a new factorisation takes over
// the arrays of the one it replaces, unless a State refers to them), and
// restores after each: the original optimum must come back with no pivots.
// It fails when the saved factorisation is recycled (tried).
func TestRestoreAfterRefactors(t *testing.T) {
	m, sv, r0 := solvedSample(t, "brandy")
	var inner []int
	for j, x := range r0.X {
		if x-m.ColLower[j] > 1e-3 && m.ColUpper[j]-x > 1e-3 {
			inner = append(inner, j)
		}
	}
	st := sv.SaveState()
	branchIters := 0
	for k := 0; k < 4; k++ {
		// Move a different half of the interior columns to a
		// bound each time: far from the saved basis.
		child := m.Clone()
		for q, j := range inner {
			if q%4 == k || q%4 == (k+1)%4 {
				lo := m.ColLower[j]
				if math.IsInf(lo, -1) {
					lo = math.Floor(r0.X[j])
				}
				child.ColLower[j], child.ColUpper[j] = lo, lo
				sv.SetColBounds(j, lo, lo)
			}
		}
		r := sv.Solve(context.Background())
		branchIters += r.Iterations
		if r.Status == Optimal {
			solveOK(t, child, r)
		}
		sv.RestoreState(st)
		wantRestored(t, m, sv, r0)
	}
	t.Logf("%d iterations in the branches", branchIters)
	if branchIters < 2*freshUpdates {
		t.Fatalf("the branches took %d iterations in all: too few to be sure a factorisation was replaced", branchIters)
	}
}

// TestAddRemoveRows adds a cut that removes the optimum, checks the warm
// re-solve against a cold solve of the extended model, then removes the cut.
// objectiveRow returns the objective's nonzeros as a row.
func objectiveRow(m *Model) (idx []int, val []float64) {
	for j, c := range m.Obj {
		if c != 0 {
			idx = append(idx, j)
			val = append(val, c)
		}
	}
	return idx, val
}

// TestNewRowWeights checks the dual steepest-edge weights of the slacks
// of added rows: after AddRows the next solve sets each to ‖e_pᵀB⁻¹‖²,
// here checked against the row of a dense inverse of the basis (gonum)
// on afiro with a cut on the objective.
func TestNewRowWeights(t *testing.T) {
	m, sv, _ := solvedSample(t, "afiro")
	idx, val := objectiveRow(m)
	sv.AddRows([]Row{{Name: "cut", Lower: 0, Upper: math.Inf(1), Index: idx, Value: val}})
	p := sv.NumRows() - 1
	if !sv.ensureFactor() {
		t.Fatal("no factorisation")
	}
	sv.newRowWeights()
	b := mat.NewDense(sv.m, sv.m, nil)
	for q, v := range sv.head {
		rows, vals := sv.column(v)
		for k, i := range rows {
			b.Set(i, q, vals[k])
		}
	}
	var inv mat.Dense
	if err := inv.Inverse(b); err != nil {
		t.Fatal(err)
	}
	want := 0.0
	for i := 0; i < sv.m; i++ {
		want += inv.At(p, i) * inv.At(p, i)
	}
	if want <= 1+1e-9 {
		t.Fatalf("exact weight %v: the cut has no basic columns, the test shows nothing", want)
	}
	if !close(sv.dse[p], want, 1e-9) {
		t.Fatalf("weight of the new row's slack %v, want ‖e_pᵀB⁻¹‖² = %v", sv.dse[p], want)
	}
}

func TestAddRemoveRows(t *testing.T) {
	for _, name := range []string{"afiro", "e226"} {
		t.Run(name, func(t *testing.T) {
			m, sv, r0 := solvedSample(t, name)
			// Cut: the objective's own row, c·x ≥ optimum + 1% (minimisation).
			idx, val := objectiveRow(m)
			cx := r0.Objective - m.Constant
			bound := cx + 0.01*math.Abs(cx) + 0.01
			sv.AddRows([]Row{{Name: "cut", Lower: bound, Upper: math.Inf(1), Index: idx, Value: val}})
			warm := sv.Solve(context.Background())
			ext := m.Clone()
			ext.AddRow("cut", bound, math.Inf(1), idx, val)
			solveOK(t, ext, warm)
			cold, _ := Solve(context.Background(), ext, Settings{})
			solveOK(t, ext, cold)
			if !close(warm.Objective, cold.Objective, 1e-9) || !close(warm.Objective-m.Constant, bound, 1e-9) {
				t.Fatalf("with cut: warm %v, cold %v, want c·x = %v", warm.Objective, cold.Objective, bound)
			}
			t.Logf("cut: warm %d iterations, cold %d", warm.Iterations, cold.Iterations)
			sv.RemoveRows([]int{m.NumRows()})
			if sv.NumRows() != m.NumRows() {
				t.Fatalf("%d rows after removal, want %d", sv.NumRows(), m.NumRows())
			}
			back := sv.Solve(context.Background())
			solveOK(t, m, back)
			if !close(back.Objective, r0.Objective, 1e-9) {
				t.Fatalf("after removing the cut: %v, want %v", back.Objective, r0.Objective)
			}
			// Removing an original row whose slack is nonbasic must repair
			// the basis: compare with a cold solve of the smaller model.
			drop := -1
			for i, st := range back.Basis.Rows {
				if st != Basic {
					drop = i
					break
				}
			}
			sv.RemoveRows([]int{drop})
			small := m.keepRows(without(m.NumRows(), drop))
			rs := sv.Solve(context.Background())
			cs, _ := Solve(context.Background(), small, Settings{})
			if rs.Status != cs.Status {
				t.Fatalf("after dropping row %d: status %v, cold %v", drop, rs.Status, cs.Status)
			}
			if cs.Status == Optimal {
				solveOK(t, small, rs)
				if !close(rs.Objective, cs.Objective, 1e-9) {
					t.Fatalf("after dropping row %d: %v, cold %v", drop, rs.Objective, cs.Objective)
				}
			}
		})
	}
}

func without(n, drop int) []int {
	var keep []int
	for i := 0; i < n; i++ {
		if i != drop {
			keep = append(keep, i)
		}
	}
	return keep
}

// TestSetObjective changes the costs and re-solves from the old basis.
func TestSetObjective(t *testing.T) {
	m, sv, _ := solvedSample(t, "brandy")
	c := append([]float64(nil), m.Obj...)
	for j := range c {
		c[j] *= 1 + 0.1*math.Sin(float64(j))
	}
	sv.SetObjective(c)
	warm := sv.Solve(context.Background())
	m2 := m.Clone()
	copy(m2.Obj, c)
	cold, _ := Solve(context.Background(), m2, Settings{})
	solveOK(t, m2, warm)
	solveOK(t, m2, cold)
	if !close(warm.Objective, cold.Objective, 1e-9) {
		t.Fatalf("warm %v, cold %v", warm.Objective, cold.Objective)
	}
	t.Logf("new costs: warm %d iterations, cold %d", warm.Iterations, cold.Iterations)
}

// TestTableauRow checks each tableau row against its definition: a row of
// B⁻¹[A | −I] is ρᵀ[A | −I] for some ρ (here ρ = −out[slacks]), has 1 at
// its basic variable and 0 at the other basic variables, and the point
// found satisfies it.
func TestTableauRow(t *testing.T) {
	m, sv, r := solvedSample(t, "afiro")
	n, rows := m.NumCols(), m.NumRows()
	z := append(append([]float64(nil), r.X...), r.RowActivity...)
	out := make([]float64, n+rows)
	heading := sv.BasicVars()
	cols := m.Columns()
	for pos := range heading {
		basic, value := sv.TableauRow(pos, out)
		if basic != heading[pos] {
			t.Fatalf("position %d: basic %d, heading says %d", pos, basic, heading[pos])
		}
		if !close(value, z[basic], 1e-9) {
			t.Fatalf("position %d: value %v, solution %v", pos, value, z[basic])
		}
		for _, v := range heading {
			want := 0.0
			if v == basic {
				want = 1
			}
			if out[v] != want {
				t.Fatalf("position %d: entry of basic %d is %v, want %v", pos, v, out[v], want)
			}
		}
		scale, sum := 1.0, 0.0
		for j := 0; j < n; j++ {
			// out[j] must equal Σ_i ρ_i a_ij with ρ_i = −out[n+i], except
			// at basic columns where the row has been set exactly.
			want := 0.0
			for p := cols.Start[j]; p < cols.Start[j+1]; p++ {
				want -= out[n+cols.Index[p]] * cols.Value[p]
			}
			if r.Basis.Cols[j] == Basic {
				want = out[j]
			}
			if !close(out[j], want, 1e-9) {
				t.Fatalf("position %d column %d: %v, want ρᵀa_j = %v", pos, j, out[j], want)
			}
		}
		for k := range out {
			sum += out[k] * z[k]
			scale = math.Max(scale, math.Abs(out[k]*z[k]))
		}
		if math.Abs(sum) > 1e-9*scale {
			t.Fatalf("position %d: row·z = %v", pos, sum)
		}
	}
}

// TestObjectiveCutoff stops a warm re-solve whose optimum is worse than the
// cutoff. The multipliers it returns must be those of the basis it stopped
// at, not of an earlier one: a basic column has no reduced cost and a row
// whose slack is basic no multiplier (branch-and-bound derives inequalities
// from them, mip/proofs.go). brandy is not in the list: the same branch
// makes it infeasible.
func TestObjectiveCutoff(t *testing.T) {
	for _, name := range []string{"afiro", "e226", "finnis"} {
		t.Run(name, func(t *testing.T) {
			m, sv, r0 := solvedSample(t, name)
			j := interiorColumn(m, r0)
			child := m.Clone()
			child.ColUpper[j] = m.ColLower[j]
			cold, _ := Solve(context.Background(), child, Settings{})
			if cold.Status != Optimal || cold.Objective <= r0.Objective+1e-3*(1+math.Abs(r0.Objective)) {
				t.Fatalf("branch on column %d: %v at %v after %v, want optimal and worse by 0.1 %%", j, cold.Status, cold.Objective, r0.Objective)
			}
			sv.SetSettings(Settings{HasCutoff: true, ObjectiveCutoff: (r0.Objective + cold.Objective) / 2})
			sv.SetColBounds(j, m.ColLower[j], m.ColLower[j])
			r := sv.Solve(context.Background())
			if r.Status != ObjectiveCutoff {
				t.Fatalf("status %v (objective %v), want objective cutoff", r.Status, r.Objective)
			}
			scale := 1.0
			for _, c := range m.Obj {
				scale = math.Max(scale, math.Abs(c))
			}
			for k, st := range r.Basis.Cols {
				if st == Basic && math.Abs(r.ReducedCost[k]) > 1e-7*scale {
					t.Errorf("basic column %d has reduced cost %v", k, r.ReducedCost[k])
				}
			}
			for i, st := range r.Basis.Rows {
				if st == Basic && math.Abs(r.Dual[i]) > 1e-7*scale {
					t.Errorf("row %d with a basic slack has multiplier %v", i, r.Dual[i])
				}
			}
		})
	}
}

// TestLimits checks the iteration limit and cancellation statuses.
func TestLimits(t *testing.T) {
	m := readSample(t, "finnis")
	r, _ := Solve(context.Background(), m, Settings{MaxIterations: 10})
	if r.Status != IterationLimit || r.Iterations != 10 {
		t.Fatalf("status %v after %d iterations, want iteration limit after 10", r.Status, r.Iterations)
	}
	r, _ = Solve(context.Background(), m, Settings{TimeLimit: time.Nanosecond})
	if r.Status != TimeLimit {
		t.Fatalf("status %v, want time limit", r.Status)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	r, _ = Solve(ctx, m, Settings{})
	if r.Status != Cancelled {
		t.Fatalf("status %v, want cancelled", r.Status)
	}
}

// TestSlackBasisWarm re-solves from the slack basis on a solver that has
// solved before, so no up-front perturbation: the stall guard must still
// reach the optimum.
func TestSlackBasisWarm(t *testing.T) {
	for _, tc := range netlibCases {
		t.Run(tc.name, func(t *testing.T) {
			m, sv, first := solvedSample(t, tc.name)
			b := sv.Basis()
			for j := range b.Cols {
				b.Cols[j] = AtLower
			}
			for i := range b.Rows {
				b.Rows[i] = Basic
			}
			if err := sv.SetBasis(b); err != nil {
				t.Fatal(err)
			}
			r := sv.Solve(context.Background())
			solveOK(t, m, r)
			if !close(r.Objective, first.Objective, 1e-9) {
				t.Fatalf("objective %v, want %v", r.Objective, first.Objective)
			}
			t.Logf("%d iterations (first solve %d)", r.Iterations, first.Iterations)
		})
	}
}

// TestLoadedOptimalBasis loads the optimal basis of a solve into a new
// solver of the same model (as a caller that keeps bases between solvers
// does): the solve must stop at once, without perturbing the costs away
// from that optimum first.
func TestLoadedOptimalBasis(t *testing.T) {
	// A transportation problem with equal costs: every feasible basis is
	// optimal and most reduced costs are zero, so perturbed costs would
	// make the loaded basis non-optimal.
	tp := NewModel("flat transport")
	const n = 8
	var x [n][n]int
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			x[i][j] = tp.AddCol(fmt.Sprintf("x%d_%d", i, j), 1, 0, Inf)
		}
	}
	for i := 0; i < n; i++ {
		var out, in []int
		for j := 0; j < n; j++ {
			out, in = append(out, x[i][j]), append(in, x[j][i])
		}
		tp.AddRow(fmt.Sprintf("supply%d", i), -Inf, float64(10+i), out, ones(n))
		tp.AddRow(fmt.Sprintf("demand%d", i), float64(10+n-1-i), Inf, in, ones(n))
	}
	cases := []string{"flat transport"}
	for _, tc := range netlibCases {
		cases = append(cases, tc.name)
	}
	for _, name := range cases {
		t.Run(name, func(t *testing.T) {
			m := tp
			if name != tp.Name {
				m = readSample(t, name)
			}
			first, err := Solve(context.Background(), m, Settings{})
			if err != nil {
				t.Fatal(err)
			}
			solveOK(t, m, first)
			sv, err := NewSolver(m, Settings{})
			if err != nil {
				t.Fatal(err)
			}
			if err := sv.SetBasis(first.Basis); err != nil {
				t.Fatal(err)
			}
			r := sv.Solve(context.Background())
			solveOK(t, m, r)
			if !close(r.Objective, first.Objective, 1e-9) || r.Iterations > 0 {
				t.Fatalf("objective %v after %d iterations, want %v at once", r.Objective, r.Iterations, first.Objective)
			}
		})
	}
}

// TestSingularBasis loads a basis with two equal columns: the solve must
// replace one by a slack and still reach the optimum.
func TestSingularBasis(t *testing.T) {
	m := readSample(t, "afiro")
	dup := m.Clone()
	cols := m.Columns()
	j := 0
	k := dup.AddCol("copy", m.Obj[j], m.ColLower[j], m.ColUpper[j])
	for p := cols.Start[j]; p < cols.Start[j+1]; p++ {
		dup.SetCoef(cols.Index[p], k, cols.Value[p])
	}
	sv, err := NewSolver(dup, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	b := sv.Basis()
	b.Cols[j], b.Cols[k] = Basic, Basic
	// Two slacks leave to keep the count: those of column j's first two rows.
	b.Rows[cols.Index[cols.Start[j]]] = AtLower
	b.Rows[cols.Index[cols.Start[j]+1]] = AtLower
	if err := sv.SetBasis(b); err != nil {
		t.Fatal(err)
	}
	r := sv.Solve(context.Background())
	solveOK(t, dup, r)
	want, _ := Solve(context.Background(), m, Settings{})
	if !close(r.Objective, want.Objective, 1e-9) {
		t.Fatalf("objective %v, want %v", r.Objective, want.Objective)
	}
	if err := sv.SetBasis(Basis{Cols: b.Cols, Rows: b.Rows[1:]}); err == nil {
		t.Fatal("a basis of the wrong length was accepted")
	}
}

// TestCostChanges replaces the costs several times (as a feasibility pump
// or a changed scenario would) and compares every warm re-solve with a cold
// solve; unbounded outcomes must come with a valid ray.
func TestCostChanges(t *testing.T) {
	for _, name := range []string{"brandy", "e226", "finnis", "p0548"} {
		t.Run(name, func(t *testing.T) {
			m, sv, _ := solvedSample(t, name)
			rng := rand.New(rand.NewSource(1))
			total := 0
			for k := 0; k < 5; k++ {
				c := make([]float64, m.NumCols())
				for j := range c {
					c[j] = m.Obj[j] * (0.5 + rng.Float64())
				}
				sv.SetObjective(c)
				r := sv.Solve(context.Background())
				total += r.Iterations
				m2 := m.Clone()
				copy(m2.Obj, c)
				cold, _ := Solve(context.Background(), m2, Settings{})
				if r.Status != cold.Status {
					t.Fatalf("change %d: warm %v, cold %v", k, r.Status, cold.Status)
				}
				switch r.Status {
				case Optimal:
					solveOK(t, m2, r)
					if !close(r.Objective, cold.Objective, 1e-9) {
						t.Fatalf("change %d: warm %v, cold %v", k, r.Objective, cold.Objective)
					}
				case Unbounded:
					if err := verifyRay(m2, r.Ray); err != nil {
						t.Fatalf("change %d: %v", k, err)
					}
				}
			}
			t.Logf("%d iterations over 5 cost changes", total)
		})
	}
}

// ones returns n ones.
func ones(n int) []float64 {
	v := make([]float64, n)
	for k := range v {
		v[k] = 1
	}
	return v
}

// assignmentLP returns the LP relaxation of an n×n assignment problem with
// random integer costs in [10, 50): column i·n+j assigns row i to column
// j, and each side is assigned exactly once.
func assignmentLP(rng *rand.Rand, n int) *Model {
	m := NewModel("assignment")
	for k := 0; k < n*n; k++ {
		m.AddCol("", float64(10+rng.Intn(40)), 0, Inf)
	}
	for side := 0; side < 2; side++ {
		for a := 0; a < n; a++ {
			idx := make([]int, n)
			for b := range idx {
				idx[b] = a*n + b
				if side == 1 {
					idx[b] = b*n + a
				}
			}
			m.AddRow("", 1, 1, idx, ones(n))
		}
	}
	return m
}

// TestLimitBound stops warm re-solves at iteration limits after a row that
// cuts off the optimum was added, and checks the bound they report: the
// dual simplex keeps a dual feasible basis, so the objective of every
// stopped iterate lies between the old optimum and the new one (weak
// duality: a dual feasible point bounds every feasible point), and it
// never falls as the limit grows. The row forbids every cell of the old
// assignment.
func TestLimitBound(t *testing.T) {
	for seed := int64(1); seed <= 5; seed++ {
		rng := rand.New(rand.NewSource(seed))
		const n = 30
		m := assignmentLP(rng, n)
		sv, r0 := solved(t, m)
		var cut Row
		for j, x := range r0.X {
			if x > 0.5 {
				cut.Index = append(cut.Index, j)
				cut.Value = append(cut.Value, 1)
			}
		}
		cut.Lower, cut.Upper = -Inf, 0
		cut.Name = "forbid"
		child := m.Clone()
		child.AddRow(cut.Name, cut.Lower, cut.Upper, cut.Index, cut.Value)
		final, _ := Solve(context.Background(), child, Settings{})
		if final.Status != Optimal || final.Objective <= r0.Objective+0.5 {
			t.Fatalf("seed %d: the cut row leaves %v at %v (old optimum %v)", seed, final.Status, final.Objective, r0.Objective)
		}
		sv.AddRows([]Row{cut})
		state := sv.SaveState()
		prev, bounds := r0.Objective, 0
		for limit := 1; ; limit++ {
			sv.RestoreState(state)
			sv.SetSettings(Settings{MaxIterations: limit})
			r := sv.Solve(context.Background())
			if r.Status == Optimal {
				if math.Abs(r.Objective-final.Objective) > 1e-6 {
					t.Fatalf("seed %d: warm optimum %v, cold %v", seed, r.Objective, final.Objective)
				}
				break
			}
			if r.Status != IterationLimit {
				t.Fatalf("seed %d, limit %d: status %v", seed, limit, r.Status)
			}
			if !r.ObjectiveIsBound {
				continue
			}
			bounds++
			tol := 1e-6 * (1 + math.Abs(final.Objective))
			if r.Objective > final.Objective+tol || r.Objective < prev-tol {
				t.Fatalf("seed %d, limit %d: bound %v outside [%v, %v]", seed, limit, r.Objective, prev, final.Objective)
			}
			prev = r.Objective
		}
		if bounds == 0 {
			t.Fatalf("seed %d: no stopped re-solve reported a bound", seed)
		}
		t.Logf("seed %d: %d stopped re-solves bounded the optimum, from %v to %v (optimum %v)", seed, bounds, r0.Objective, prev, final.Objective)
		// A cold solve perturbs its costs. Stopped at a limit, it reports
		// a bound only after getting the true costs back on a basis that
		// stays dual feasible (unperturb); under perturbed costs its dual
		// objective bounds another problem and must not be reported.
		restored := 0
		for limit := 1; limit < 200; limit += 7 {
			cold, err := NewSolver(child, Settings{MaxIterations: limit})
			if err != nil {
				t.Fatal(err)
			}
			r := cold.Solve(context.Background())
			if r.Status == Optimal {
				break
			}
			switch {
			case cold.perturbed && r.ObjectiveIsBound:
				t.Fatalf("seed %d, cold solve stopped at %d iterations: objective %v reported as a bound under perturbed costs", seed, limit, r.Objective)
			case r.ObjectiveIsBound:
				restored++
				if tol := 1e-6 * (1 + math.Abs(final.Objective)); r.Objective > final.Objective+tol {
					t.Fatalf("seed %d, cold solve stopped at %d iterations: bound %v above the optimum %v", seed, limit, r.Objective, final.Objective)
				}
			}
		}
		if restored == 0 {
			t.Fatalf("seed %d: no cold solve stopped at a limit reported a bound", seed)
		}
		t.Logf("seed %d: %d cold solves stopped at a limit got their true costs back and reported a bound", seed, restored)
	}
}
