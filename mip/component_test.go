package mip

import (
	"fmt"
	"math"
	"math/rand"
	"testing"

	"netstage/lp"
)

// enumerate calls f with every integer point of the box [lo, up].
func enumerate(lo, up []float64, f func(x []float64)) {
	x := make([]float64, len(lo))
	var rec func(k int)
	rec = func(k int) {
		if k == len(lo) {
			f(x)
			return
		}
		for v := lo[k]; v <= up[k]; v++ {
			x[k] = v
			rec(k + 1)
		}
	}
	rec(0)
}

// randomRowModel is one or two random rows over small integer columns.
func randomRowModel(rng *rand.Rand, binary bool) *lp.Model {
	m := lp.NewModel("rows")
	n := 3 + rng.Intn(5)
	for j := 0; j < n; j++ {
		lo, up := 0.0, 1.0
		if !binary {
			lo = float64(rng.Intn(3) - 1)
			up = lo + float64(rng.Intn(4))
		}
		m.AddIntCol(fmt.Sprintf("x%d", j), 0, lo, up)
	}
	for i := 0; i < 1+rng.Intn(2); i++ {
		cols := make([]int, n)
		vals := make([]float64, n)
		sum := 0.0
		for j := range cols {
			cols[j] = j
			vals[j] = float64(rng.Intn(19) - 6)
			sum += math.Abs(vals[j])
		}
		b := math.Round(sum * rng.Float64() * 0.6)
		if rng.Intn(2) == 0 {
			m.AddRow("le", math.Inf(-1), b, cols, vals)
		} else {
			m.AddRow("ge", -b, math.Inf(1), cols, vals)
		}
	}
	return m
}

func feasible(m *lp.Model, x []float64) bool {
	viol, _ := m.MaxViolation(x, 1e-9)
	return viol <= 1e-9
}

// TestTightenCoefficientsKeepsIntegerPoints: the tightened model has the
// same integer points (checked by enumeration) and an LP bound no weaker.
func TestTightenCoefficientsKeepsIntegerPoints(t *testing.T) {
	changed := 0
	for seed := int64(1); seed <= 300; seed++ {
		m := randomRowModel(rand.New(rand.NewSource(seed)), seed%2 == 0)
		w := tightenCoefficients(m, DefaultIntTol)
		if w == nil {
			continue
		}
		changed++
		enumerate(m.ColLower, m.ColUpper, func(x []float64) {
			if feasible(m, x) != feasible(w, x) {
				t.Fatalf("seed %d: point %v feasible %v in the model, %v after tightening", seed, x, feasible(m, x), feasible(w, x))
			}
		})
	}
	if changed < 30 {
		t.Errorf("only %d of 300 models tightened; the test exercises too little", changed)
	}
}

// TestPropagationKeepsIntegerPoints: every feasible integer point stays in
// the propagated domain, and an empty verdict means there is none.
func TestPropagationKeepsIntegerPoints(t *testing.T) {
	tightened := 0
	for seed := int64(1); seed <= 300; seed++ {
		m := randomRowModel(rand.New(rand.NewSource(seed)), seed%3 == 0)
		p, _ := newProblem(m, DefaultIntTol)
		pr := newPropagator(p)
		lo := append([]float64(nil), p.lower...)
		up := append([]float64(nil), p.upper...)
		ok := pr.propagate(lo, up, nil, nil)
		any := false
		enumerate(m.ColLower, m.ColUpper, func(x []float64) {
			if !feasible(m, x) {
				return
			}
			any = true
			for j := range x {
				if x[j] < lo[j] || x[j] > up[j] {
					t.Fatalf("seed %d: feasible point %v outside the propagated domain %v..%v", seed, x, lo, up)
				}
			}
		})
		if !ok && any {
			t.Fatalf("seed %d: propagation says empty, but feasible points exist", seed)
		}
		for j := range lo {
			if lo[j] != p.lower[j] || up[j] != p.upper[j] {
				tightened++
				break
			}
		}
	}
	if tightened < 30 {
		t.Errorf("only %d of 300 domains tightened; the test exercises too little", tightened)
	}
}

// TestCoverCutsValid: lifted cover cuts separated at random fractional
// points are satisfied by every feasible 0/1 point.
func TestCoverCutsValid(t *testing.T) {
	cuts := 0
	for seed := int64(1); seed <= 400; seed++ {
		rng := rand.New(rand.NewSource(seed))
		m := randomRowModel(rng, true)
		p, _ := newProblem(m, DefaultIntTol)
		x := make([]float64, p.n)
		for j := range x {
			x[j] = rng.Float64()
		}
		rows := m.Rows()
		for i := 0; i < m.NumRows(); i++ {
			idx := rows.Index[rows.Start[i]:rows.Start[i+1]]
			val := rows.Value[rows.Start[i]:rows.Start[i+1]]
			for _, c := range separateCover(p, idx, val, m.RowLower[i], m.RowUpper[i], p.lower, p.upper, x) {
				cuts++
				if c.violation(x) <= 0 {
					t.Errorf("seed %d: separated cut not violated at the point", seed)
				}
				enumerate(p.lower, p.upper, func(y []float64) {
					if !feasible(m, y) {
						return
					}
					if v := c.violation(y); v > 1e-9 {
						t.Fatalf("seed %d: cut %v ≤ %v cuts off feasible %v", seed, c.val, c.upper, y)
					}
				})
			}
		}
	}
	if cuts < 50 {
		t.Errorf("only %d cuts separated; the test exercises too little", cuts)
	}
}

// TestNodeQueue checks the heap invariants after every operation.
func TestNodeQueue(t *testing.T) {
	rng := rand.New(rand.NewSource(5))
	q := newNodeQueue()
	var open []*node
	for step := 0; step < 2000; step++ {
		switch k := rng.Intn(5); {
		case k < 3:
			n := &node{id: step, bound: float64(rng.Intn(50)), estimate: float64(rng.Intn(50))}
			q.push(n)
			open = append(open, n)
		case k == 3 && len(open) > 0:
			got := q.popBest()
			for _, n := range open {
				if n.bound < got.bound {
					t.Fatalf("step %d: popBest gave bound %v, %v is open", step, got.bound, n.bound)
				}
			}
			open = removeNode(open, got)
		case k == 4 && len(open) > 0:
			got := q.popEstimate()
			for _, n := range open {
				if n.estimate < got.estimate {
					t.Fatalf("step %d: popEstimate gave %v, %v is open", step, got.estimate, n.estimate)
				}
			}
			open = removeNode(open, got)
		}
		if q.Len() != len(open) {
			t.Fatalf("step %d: queue holds %d, want %d", step, q.Len(), len(open))
		}
		if step%100 == 99 {
			lim := float64(rng.Intn(50))
			q.prune(lim)
			var keep []*node
			for _, n := range open {
				if n.bound < lim {
					keep = append(keep, n)
				}
			}
			open = keep
			if q.Len() != len(open) {
				t.Fatalf("step %d: after prune(%v) queue holds %d, want %d", step, lim, q.Len(), len(open))
			}
		}
	}
}

func removeNode(list []*node, n *node) []*node {
	for i, m := range list {
		if m == n {
			return append(list[:i], list[i+1:]...)
		}
	}
	return list
}

// TestGomoryCutsValid derives Gomory mixed-integer cuts from the optimal
// tableau of random pure integer programs and checks that every feasible
// integer point (enumerated) satisfies them and the LP point does not.
func TestGomoryCutsValid(t *testing.T) {
	cuts := 0
	count := int64(200)
	if testing.Short() {
		count = 60
	}
	for seed := int64(1); seed <= count; seed++ {
		rng := rand.New(rand.NewSource(seed))
		var m *lp.Model
		if seed%5 == 0 {
			m = randomBinaryMIP(rng)
		} else {
			m = randomRowModel(rng, false)
			for j := range m.Obj {
				m.Obj[j] = float64(rng.Intn(11) - 5)
			}
		}
		p, ok := newProblem(m, DefaultIntTol)
		if !ok {
			continue
		}
		sv, err := lp.NewSolver(p.work, lp.Settings{})
		if err != nil {
			t.Fatal(err)
		}
		for j := 0; j < p.n; j++ {
			sv.SetColBounds(j, p.lower[j], p.upper[j])
		}
		r := sv.Solve(nil)
		if r.Status != lp.Optimal {
			continue
		}
		s := &search{p: p}
		s.initRows()
		basis := sv.Basis()
		buf := make([]float64, p.n+sv.NumRows())
		for pos, v := range sv.BasicVars() {
			if v >= p.n || !p.isInt[v] {
				continue
			}
			for k := range buf {
				buf[k] = 0
			}
			basic, value := sv.TableauRow(pos, buf)
			c := gomoryFromRow(p, buf, basic, value, basis, p.lower, p.upper, s.rows)
			if c == nil {
				continue
			}
			cuts++
			if c.violation(r.X) <= 1e-7 {
				t.Errorf("seed %d: cut from row of column %d (value %v) does not cut off the LP point", seed, basic, value)
			}
			enumerate(p.lower, p.upper, func(y []float64) {
				if !feasible(m, y) {
					return
				}
				if v := c.violation(y); v > 1e-7 {
					t.Fatalf("seed %d: Gomory cut %v ≥ %v cuts off feasible %v by %v", seed, c.val, c.lower, y, v)
				}
			})
		}
	}
	if cuts < int(count)/5 {
		t.Errorf("only %d cuts derived; the test exercises too little", cuts)
	}
}

// TestGomoryDensityCap: on one knapsack row the Gomory cut of the
// fractional item's tableau row reaches every item (the row's slack, an
// integral activity, expands into all of them), so its length is the
// item count. Below maxGomoryNonzeros items the cut is derived; above it
// the cut is dropped.
func TestGomoryDensityCap(t *testing.T) {
	for _, n := range []int{maxGomoryNonzeros / 2, 2 * maxGomoryNonzeros} {
		m := lp.NewModel("knapsack")
		m.Sense = lp.Maximize
		cols := make([]int, n)
		vals := make([]float64, n)
		sum := 0.0
		for j := 0; j < n; j++ {
			w := float64(2 + j%7)
			cols[j] = m.AddIntCol(fmt.Sprintf("x%d", j), w+float64(j%5), 0, 1)
			vals[j] = w
			sum += w
		}
		m.AddRow("cap", -lp.Inf, math.Floor(sum/2)+0.5, cols, vals)
		p, ok := newProblem(m, DefaultIntTol)
		if !ok {
			t.Fatalf("%d items: newProblem refused the model", n)
		}
		sv, err := lp.NewSolver(p.work, lp.Settings{})
		if err != nil {
			t.Fatal(err)
		}
		r := sv.Solve(nil)
		if r.Status != lp.Optimal {
			t.Fatalf("%d items: LP status %v", n, r.Status)
		}
		s := &search{p: p}
		s.initRows()
		basis := sv.Basis()
		buf := make([]float64, p.n+sv.NumRows())
		derived, longest := 0, 0
		for pos, v := range sv.BasicVars() {
			if v >= p.n || !p.isInt[v] {
				continue
			}
			f := r.X[v] - math.Floor(r.X[v])
			if f < minGomoryFrac || f > 1-minGomoryFrac {
				continue
			}
			clear(buf)
			basic, value := sv.TableauRow(pos, buf)
			if c := gomoryFromRow(p, buf, basic, value, basis, p.lower, p.upper, s.rows); c != nil {
				derived++
				longest = max(longest, len(c.idx))
			}
		}
		if n < maxGomoryNonzeros && derived == 0 {
			t.Errorf("%d items: no Gomory cut derived from the fractional item's row", n)
		}
		if longest > maxGomoryNonzeros {
			t.Errorf("%d items: a Gomory cut of %d nonzeros passed the cap of %d", n, longest, maxGomoryNonzeros)
		}
		if n > maxGomoryNonzeros && derived != 0 {
			t.Errorf("%d items: %d Gomory cuts derived; each reaches every item, so the cap should drop them", n, derived)
		}
	}
}
