package mip

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand"
	"testing"

	"gonum.org/v1/gonum/mat"
	glp "gonum.org/v1/gonum/optimize/convex/lp"

	"netstage/lp"
)

// bruteForce solves a tiny MIP by enumerating every assignment of its
// (bounded) integer columns and, for each, solving the LP over the
// continuous columns with gonum's simplex (an independent LP code). It
// returns the status (Optimal, Infeasible or Unbounded) and, for Optimal,
// the optimum in the model's sense.
func bruteForce(m *lp.Model) (Status, float64) {
	n := m.NumCols()
	ints, conts, sign := splitColumns(m)
	best := math.Inf(1)
	found := false
	x := make([]float64, n)
	rows := m.Rows()
	var rec func(k int) bool // returns true when unbounded
	rec = func(k int) bool {
		if k < len(ints) {
			j := ints[k]
			for v := math.Ceil(m.ColLower[j]); v <= m.ColUpper[j]; v++ {
				x[j] = v
				if rec(k + 1) {
					return true
				}
			}
			return false
		}
		st, val := continuousLP(m, rows, x, conts, sign)
		switch st {
		case Unbounded:
			return true
		case Optimal:
			found = true
			best = math.Min(best, val)
		}
		return false
	}
	if rec(0) {
		return Unbounded, 0
	}
	if !found {
		return Infeasible, 0
	}
	return Optimal, sign*best + m.Constant
}

// splitColumns lists m's integer and continuous columns, with the sign
// that turns its objective into a minimisation.
func splitColumns(m *lp.Model) (ints, conts []int, sign float64) {
	for j := 0; j < m.NumCols(); j++ {
		if m.Integer[j] {
			ints = append(ints, j)
		} else {
			conts = append(conts, j)
		}
	}
	sign = 1
	if m.Sense == lp.Maximize {
		sign = -1
	}
	return ints, conts, sign
}

// continuousLP minimises sign·c·x over the continuous columns with the
// integer columns fixed at x. It returns Optimal (value without the
// constant), Infeasible or Unbounded. Continuous columns need a finite
// lower bound; rows over them must not be equalities (keeps the standard
// form of full row rank).
func continuousLP(m *lp.Model, rows *lp.Sparse, x []float64, conts []int, sign float64) (Status, float64) {
	pos := map[int]int{}
	for k, j := range conts {
		pos[j] = k
	}
	fixedObj := 0.0
	for j := range x {
		if m.Integer[j] {
			fixedObj += sign * m.Obj[j] * x[j]
		}
	}
	// Variables: y' (shifted continuous), then slacks. Rows as equalities.
	type eq struct {
		coef map[int]float64
		rhs  float64
	}
	var eqs []eq
	nv := len(conts)
	newVar := func() int { nv++; return nv - 1 }
	for k, j := range conts {
		if !math.IsInf(m.ColUpper[j], 1) {
			eqs = append(eqs, eq{map[int]float64{k: 1, newVar(): 1}, m.ColUpper[j] - m.ColLower[j]})
		}
	}
	for i := 0; i < m.NumRows(); i++ {
		r := 0.0
		coef := map[int]float64{}
		for q := rows.Start[i]; q < rows.Start[i+1]; q++ {
			j, a := rows.Index[q], rows.Value[q]
			if m.Integer[j] {
				r += a * x[j]
			} else {
				r += a * m.ColLower[j]
				coef[pos[j]] += a
			}
		}
		L, U := m.RowLower[i]-r, m.RowUpper[i]-r
		if len(coef) == 0 {
			if L > 1e-9 || U < -1e-9 {
				return Infeasible, 0
			}
			continue
		}
		switch {
		case L == U:
			panic("continuousLP: equality row over continuous columns")
		case math.IsInf(L, -1):
			c := copyMap(coef)
			c[newVar()] = 1
			eqs = append(eqs, eq{c, U})
		case math.IsInf(U, 1):
			c := copyMap(coef)
			c[newVar()] = -1
			eqs = append(eqs, eq{c, L})
		default:
			c := copyMap(coef)
			s := newVar()
			c[s] = -1
			eqs = append(eqs, eq{c, L})
			eqs = append(eqs, eq{map[int]float64{s: 1, newVar(): 1}, U - L})
		}
	}
	cost := make([]float64, nv)
	shift := fixedObj
	for k, j := range conts {
		cost[k] = sign * m.Obj[j]
		shift += sign * m.Obj[j] * m.ColLower[j]
	}
	if len(eqs) == 0 {
		for k := range conts {
			if cost[k] < 0 {
				return Unbounded, 0 // no row: feasible, and a free ray
			}
		}
		return Optimal, shift
	}
	// Columns in no row sit at their lower bound, or make the LP unbounded.
	used := make([]bool, nv)
	for _, e := range eqs {
		for k, v := range e.coef {
			if v != 0 {
				used[k] = true
			}
		}
	}
	newIdx := make([]int, nv)
	nu := 0
	freeRay := false
	for k := 0; k < nv; k++ {
		if !used[k] {
			if cost[k] < 0 {
				freeRay = true // unbounded if the rest is feasible
			}
			newIdx[k] = -1
			continue
		}
		newIdx[k] = nu
		nu++
	}
	A := mat.NewDense(len(eqs), nu, nil)
	b := make([]float64, len(eqs))
	c := make([]float64, nu)
	for k := 0; k < nv; k++ {
		if newIdx[k] >= 0 {
			c[newIdx[k]] = cost[k]
		}
	}
	for i, e := range eqs {
		for k, v := range e.coef {
			if newIdx[k] >= 0 {
				A.Set(i, newIdx[k], A.At(i, newIdx[k])+v)
			}
		}
		b[i] = e.rhs
	}
	opt, _, err := glp.Simplex(c, A, b, 1e-10, nil)
	switch {
	case errors.Is(err, glp.ErrInfeasible):
		return Infeasible, 0
	case errors.Is(err, glp.ErrUnbounded):
		return Unbounded, 0
	case err != nil:
		panic(fmt.Sprintf("continuousLP: %v", err))
	}
	if freeRay {
		return Unbounded, 0
	}
	return Optimal, opt + shift
}

func copyMap(m map[int]float64) map[int]float64 {
	c := make(map[int]float64, len(m))
	for k, v := range m {
		c[k] = v
	}
	return c
}

// randomMIP builds a tiny random MIP. Integer columns have small finite
// domains; continuous columns have a finite lower bound and sometimes no
// upper bound, so that some instances are unbounded. Equality rows appear
// only in pure integer instances (see continuousLP).
func randomMIP(rng *rand.Rand) *lp.Model {
	m := lp.NewModel("random")
	if rng.Intn(2) == 0 {
		m.Sense = lp.Maximize
	}
	n := 2 + rng.Intn(4)
	pureInt := rng.Intn(3) == 0
	for j := 0; j < n; j++ {
		c := float64(rng.Intn(11) - 5)
		if pureInt || rng.Intn(3) > 0 {
			lo := float64(rng.Intn(3) - 1)
			up := lo + float64(1+rng.Intn(4))
			m.AddIntCol(fmt.Sprintf("x%d", j), c, lo, up)
		} else {
			lo := float64(rng.Intn(3) - 1)
			up := lp.Inf
			if rng.Intn(2) > 0 {
				up = lo + float64(1+rng.Intn(5))*0.75
			}
			m.AddCol(fmt.Sprintf("y%d", j), c+0.5*float64(rng.Intn(3)-1), lo, up)
		}
	}
	if rng.Intn(2) == 0 {
		m.Constant = float64(rng.Intn(7) - 3)
	}
	rowsN := 1 + rng.Intn(4)
	for i := 0; i < rowsN; i++ {
		var cols []int
		var vals []float64
		act := 0.0 // activity at a random integer-ish point, to centre the bounds
		for j := 0; j < n; j++ {
			if rng.Intn(4) == 0 {
				continue
			}
			a := float64(rng.Intn(13) - 6)
			if a == 0 {
				continue
			}
			cols = append(cols, j)
			vals = append(vals, a)
			act += a * (m.ColLower[j] + float64(rng.Intn(3)))
		}
		if len(cols) == 0 {
			continue
		}
		lo, up := math.Inf(-1), math.Inf(1)
		switch k := rng.Intn(5); {
		case k == 0 && pureInt:
			lo = math.Round(act) + float64(rng.Intn(3)-1)
			up = lo
		case k <= 1:
			up = act + float64(rng.Intn(7)-3)
		case k <= 3:
			lo = act + float64(rng.Intn(7)-3)
		default:
			lo = act - float64(rng.Intn(5))
			up = lo + float64(rng.Intn(6))
			if up == lo && !pureInt {
				up++
			}
		}
		m.AddRow(fmt.Sprintf("r%d", i), lo, up, cols, vals)
	}
	return m
}

// TestRandomAgainstBruteForce compares the search with enumeration on tiny
// random MIPs (fixed seeds), cycling through setting variants so that cuts
// (c-MIR among them), strong branching, heuristics and proofs are each on
// and off somewhere, and giving every third case random branching
// priorities.
func TestRandomAgainstBruteForce(t *testing.T) {
	count := 1000
	if testing.Short() {
		count = 300
	}
	variants := []Settings{
		{RelGap: 1e-9, AbsGap: 1e-9},
		{RelGap: 1e-9, AbsGap: 1e-9, NoCuts: true},
		{RelGap: 1e-9, AbsGap: 1e-9, NoStrongBranching: true, NoHeuristics: true, CMIR: true},
		{RelGap: 1e-9, AbsGap: 1e-9, NoCuts: true, NoStrongBranching: true, NoProofs: true},
	}
	tally := map[Status]int{}
	for seed := 1; seed <= count; seed++ {
		rng := rand.New(rand.NewSource(int64(seed)))
		m := randomMIP(rng)
		want, wantObj := bruteForce(m)
		tally[want]++
		set := variants[seed%len(variants)]
		set.Seed = int64(seed)
		if seed%3 == 0 {
			// Branching priorities change the tree, never the answer.
			set.Priority = make([]int, m.NumCols())
			for j := range set.Priority {
				set.Priority[j] = rng.Intn(3)
			}
		}
		r, err := Solve(context.Background(), m, set)
		if err != nil {
			t.Fatalf("seed %d: %v", seed, err)
		}
		if r.Status != want {
			t.Errorf("seed %d: status %v, want %v (brute force, obj %v); got obj %v", seed, r.Status, want, wantObj, r.Objective)
			continue
		}
		switch want {
		case Optimal:
			checkIncumbent(t, m, r)
			if math.Abs(r.Objective-wantObj) > 1e-6*math.Max(1, math.Abs(wantObj)) {
				t.Errorf("seed %d: objective %v, want %v (brute force)", seed, r.Objective, wantObj)
			}
			if math.Abs(r.Bound-wantObj) > 1e-6*math.Max(1, math.Abs(wantObj)) {
				t.Errorf("seed %d: bound %v, want %v", seed, r.Bound, wantObj)
			}
		case Unbounded:
			// The point returned must be feasible.
			checkIncumbent(t, m, r)
		}
	}
	t.Logf("brute-force outcomes: %v", tally)
	if tally[Infeasible] < count/20 || tally[Unbounded] < count/40 || tally[Optimal] < count/2 {
		t.Errorf("generator mix %v: too few infeasible, unbounded or optimal cases", tally)
	}
}

// randomBinaryMIP builds a pure binary program with 10–16 columns and a few
// knapsack-like rows, large enough for cuts, strong branching and a real
// tree, small enough for enumeration.
func randomBinaryMIP(rng *rand.Rand) *lp.Model {
	m := lp.NewModel("binary")
	if rng.Intn(2) == 0 {
		m.Sense = lp.Maximize
	}
	n := 10 + rng.Intn(7)
	for j := 0; j < n; j++ {
		m.AddIntCol(fmt.Sprintf("x%d", j), float64(rng.Intn(41)-20), 0, 1)
	}
	rowsN := 2 + rng.Intn(5)
	for i := 0; i < rowsN; i++ {
		var cols []int
		var vals []float64
		sum := 0.0
		for j := 0; j < n; j++ {
			if rng.Intn(3) == 0 {
				continue
			}
			a := float64(rng.Intn(30) - 8)
			if a == 0 {
				continue
			}
			cols = append(cols, j)
			vals = append(vals, a)
			sum += math.Abs(a)
		}
		if len(cols) == 0 {
			continue
		}
		rhs := math.Round(sum * (0.2 + 0.4*rng.Float64()))
		switch rng.Intn(6) {
		case 0:
			m.AddRow(fmt.Sprintf("r%d", i), rhs, rhs, cols, vals)
		case 1:
			m.AddRow(fmt.Sprintf("r%d", i), rhs, lp.Inf, cols, vals)
		default:
			m.AddRow(fmt.Sprintf("r%d", i), math.Inf(-1), rhs, cols, vals)
		}
	}
	return m
}

// TestRandomBinaryAgainstBruteForce runs larger pure binary programs.
func TestRandomBinaryAgainstBruteForce(t *testing.T) {
	count := 80
	if testing.Short() {
		count = 20
	}
	tally := map[Status]int{}
	for seed := 1; seed <= count; seed++ {
		rng := rand.New(rand.NewSource(int64(1000 + seed)))
		m := randomBinaryMIP(rng)
		want, wantObj := bruteForce(m)
		tally[want]++
		r, err := Solve(context.Background(), m, Settings{RelGap: 1e-9, AbsGap: 1e-9, Seed: int64(seed)})
		if err != nil {
			t.Fatalf("seed %d: %v", seed, err)
		}
		if r.Status != want {
			t.Errorf("seed %d: status %v, want %v (brute force)", seed, r.Status, want)
			continue
		}
		if want == Optimal {
			checkIncumbent(t, m, r)
			if math.Abs(r.Objective-wantObj) > 1e-6*math.Max(1, math.Abs(wantObj)) {
				t.Errorf("seed %d: objective %v, want %v (brute force)", seed, r.Objective, wantObj)
			}
		}
	}
	t.Logf("brute-force outcomes: %v", tally)
}

// FuzzSolve compares the search with enumeration on random tiny MIPs
// drawn from the fuzzer's seed and setting bits.
func FuzzSolve(f *testing.F) {
	for _, s := range []int64{1, 2, 3, 344, 1015} {
		f.Add(s, uint8(0))
	}
	f.Fuzz(func(t *testing.T, seed int64, flags uint8) {
		rng := rand.New(rand.NewSource(seed))
		var m *lp.Model
		if flags&8 != 0 {
			m = randomBinaryMIP(rng)
		} else {
			m = randomMIP(rng)
		}
		want, wantObj := bruteForce(m)
		set := Settings{RelGap: 1e-9, AbsGap: 1e-9, Seed: seed,
			NoCuts: flags&1 != 0, NoStrongBranching: flags&2 != 0, NoHeuristics: flags&4 != 0}
		r, err := Solve(context.Background(), m, set)
		if err != nil {
			t.Fatal(err)
		}
		if r.Status != want {
			t.Fatalf("status %v, want %v (brute force)", r.Status, want)
		}
		if want == Optimal || want == Unbounded {
			checkIncumbent(t, m, r)
		}
		if want == Optimal && math.Abs(r.Objective-wantObj) > 1e-6*math.Max(1, math.Abs(wantObj)) {
			t.Fatalf("objective %v, want %v (brute force)", r.Objective, wantObj)
		}
	})
}
