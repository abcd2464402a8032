package lp

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand"
	"testing"

	"gonum.org/v1/gonum/mat"
	glp "gonum.org/v1/gonum/optimize/convex/lp"
)

// randomModel returns a small random LP. With boxed set, every column has
// finite bounds and the rows are built around a point inside the bounds,
// so the LP is feasible and bounded; otherwise some columns are one-sided or
// free, and the LP may be unbounded.
func randomModel(rng *rand.Rand, boxed bool) *Model {
	n := 2 + rng.Intn(9)
	rows := 1 + rng.Intn(8)
	m := NewModel("random")
	if rng.Intn(4) == 0 {
		m.Sense = Maximize
	}
	x0 := make([]float64, n)
	for j := 0; j < n; j++ {
		lo := float64(rng.Intn(8) - 5)
		up := lo + float64(rng.Intn(7))
		if !boxed {
			switch rng.Intn(5) {
			case 0:
				lo = math.Inf(-1)
			case 1:
				up = math.Inf(1)
			case 2:
				lo, up = math.Inf(-1), math.Inf(1)
			}
		}
		c := float64(rng.Intn(11) - 5)
		if rng.Intn(3) == 0 {
			c = math.Round(rng.NormFloat64()*400) / 100
		}
		m.AddCol("", c, lo, up)
		switch {
		case !math.IsInf(lo, 0) && !math.IsInf(up, 0):
			x0[j] = lo + rng.Float64()*(up-lo)
		case !math.IsInf(lo, 0):
			x0[j] = lo + rng.Float64()*3
		case !math.IsInf(up, 0):
			x0[j] = up - rng.Float64()*3
		default:
			x0[j] = rng.NormFloat64() * 3
		}
	}
	for i := 0; i < rows; i++ {
		var cols []int
		var vals []float64
		act := 0.0
		for j := 0; j < n; j++ {
			if rng.Float64() < 0.6 {
				v := float64(rng.Intn(11) - 5)
				if rng.Intn(4) == 0 {
					v = math.Round(rng.NormFloat64()*300) / 100
				}
				if v == 0 {
					continue
				}
				cols = append(cols, j)
				vals = append(vals, v)
				act += v * x0[j]
			}
		}
		lo, up := math.Inf(-1), math.Inf(1)
		switch rng.Intn(5) {
		case 0:
			lo, up = act, act
		case 1:
			up = act + rng.Float64()*3
		case 2:
			lo = act - rng.Float64()*3
		default:
			lo, up = act-rng.Float64()*2, act+rng.Float64()*2
		}
		m.AddRow("", lo, up, cols, vals)
	}
	return m
}

// gonumSolve solves m with gonum's dense simplex after converting it to
// general form (G·x ≤ h, A·x = b, x free). It returns the optimum in m's
// sense, or the gonum error.
func gonumSolve(m *Model) (f float64, err error) {
	defer func() {
		// gonum panics on some shapes (more equations than variables).
		if p := recover(); p != nil {
			err = fmt.Errorf("gonum: %v", p)
		}
	}()
	n := m.NumCols()
	var gRows [][]float64
	var h []float64
	var aRows [][]float64
	var b []float64
	dense := make([][]float64, m.NumRows())
	rows := m.Rows()
	for i := range dense {
		dense[i] = make([]float64, n)
		for p := rows.Start[i]; p < rows.Start[i+1]; p++ {
			dense[i][rows.Index[p]] = rows.Value[p]
		}
	}
	neg := func(v []float64) []float64 {
		w := make([]float64, len(v))
		for k := range v {
			w[k] = -v[k]
		}
		return w
	}
	for i, a := range dense {
		lo, up := m.RowLower[i], m.RowUpper[i]
		if lo == up {
			aRows = append(aRows, a)
			b = append(b, lo)
			continue
		}
		if !math.IsInf(up, 1) {
			gRows = append(gRows, a)
			h = append(h, up)
		}
		if !math.IsInf(lo, -1) {
			gRows = append(gRows, neg(a))
			h = append(h, -lo)
		}
	}
	for j := 0; j < n; j++ {
		e := make([]float64, n)
		e[j] = 1
		if !math.IsInf(m.ColUpper[j], 1) {
			gRows = append(gRows, e)
			h = append(h, m.ColUpper[j])
		}
		if !math.IsInf(m.ColLower[j], -1) {
			gRows = append(gRows, neg(e))
			h = append(h, -m.ColLower[j])
		}
	}
	c := append([]float64(nil), m.Obj...)
	if m.Sense == Maximize {
		c = neg(c)
	}
	toDense := func(r [][]float64) mat.Matrix {
		if len(r) == 0 {
			return nil
		}
		d := mat.NewDense(len(r), n, nil)
		for i, row := range r {
			d.SetRow(i, row)
		}
		return d
	}
	cNew, aNew, bNew := glp.Convert(c, toDense(gRows), h, toDense(aRows), b)
	f, _, err = glp.Simplex(cNew, aNew, bNew, 1e-10, nil)
	if err != nil {
		return 0, err
	}
	if m.Sense == Maximize {
		f = -f
	}
	return f + m.Constant, nil
}

// TestRandomAgainstGonum compares optima and statuses with gonum's
// lp.Simplex on random LPs with fixed seeds.
// source: gonum optimize/convex/lp.Simplex as reference solver (REFERENCES.md §1).
func TestRandomAgainstGonum(t *testing.T) {
	for _, tc := range []struct {
		name  string
		boxed bool
		want  int // compared cases required
	}{
		{"boxed", true, 220},
		{"general", false, 150},
	} {
		t.Run(tc.name, func(t *testing.T) {
			want := tc.want
			if testing.Short() {
				want /= 5
			}
			rng := rand.New(rand.NewSource(int64(len(tc.name))))
			compared, statuses := 0, map[Status]int{}
			for k := 0; compared < want && k < 4*want; k++ {
				m := randomModel(rng, tc.boxed)
				ref, refErr := gonumSolve(m)
				var wantStatus Status
				switch {
				case refErr == nil:
					wantStatus = Optimal
				case errors.Is(refErr, glp.ErrInfeasible):
					wantStatus = Infeasible
				case errors.Is(refErr, glp.ErrUnbounded):
					wantStatus = Unbounded
				default:
					continue // gonum could not decide (singular or zero rows)
				}
				compared++
				for _, set := range []Settings{{}, {NoScaling: true, NoPerturbation: true}} {
					r, err := Solve(context.Background(), m, set)
					if err != nil {
						t.Fatal(err)
					}
					statuses[r.Status]++
					if r.Status != wantStatus {
						t.Fatalf("case %d: status %v, gonum says %v", k, r.Status, wantStatus)
					}
					if wantStatus == Unbounded {
						if err := verifyRay(m, r.Ray); err != nil {
							t.Fatalf("case %d: %v", k, err)
						}
					}
					if wantStatus != Optimal {
						continue
					}
					if err := verifyOptimal(m, r); err != nil {
						t.Fatalf("case %d: %v", k, err)
					}
					if !close(r.Objective, ref, 1e-7) {
						t.Fatalf("case %d: objective %v, gonum %v", k, r.Objective, ref)
					}
				}
			}
			if compared < want {
				t.Fatalf("only %d cases compared, want %d", compared, want)
			}
			t.Logf("%d cases, statuses %v", compared, statuses)
		})
	}
}

// TestInfeasibleAndUnbounded checks constructed cases whose status follows
// from the construction.
func TestInfeasibleAndUnbounded(t *testing.T) {
	rng := rand.New(rand.NewSource(7))
	for k := 0; k < 60; k++ {
		m := randomModel(rng, true)
		// Row activity bounds from the column boxes: a row asking for more
		// than its largest possible activity is infeasible.
		i := rng.Intn(m.NumRows())
		rows := m.Rows()
		maxAct := 0.0
		for p := rows.Start[i]; p < rows.Start[i+1]; p++ {
			j, a := rows.Index[p], rows.Value[p]
			maxAct += math.Max(a*m.ColLower[j], a*m.ColUpper[j])
		}
		inf := m.Clone()
		inf.RowLower[i], inf.RowUpper[i] = maxAct+1, math.Inf(1)
		r, err := Solve(context.Background(), inf, Settings{})
		if err != nil || r.Status != Infeasible {
			t.Fatalf("case %d: status %v (%v), want infeasible", k, r.Status, err)
		}
		if err := verifyFarkas(inf, r.Ray); err != nil {
			t.Fatalf("case %d: %v", k, err)
		}
		// A new column that improves the objective, is unbounded above and
		// only loosens ≥ rows makes a feasible LP unbounded.
		unb := m.Clone()
		for i := range unb.RowLower {
			unb.RowUpper[i] = math.Inf(1)
		}
		cost := -1.0
		if unb.Sense == Maximize {
			cost = 1
		}
		j := unb.AddCol("ray", cost, 0, math.Inf(1))
		for i := range unb.RowLower {
			unb.SetCoef(i, j, 1+rng.Float64())
		}
		r, err = Solve(context.Background(), unb, Settings{})
		if err != nil || r.Status != Unbounded {
			t.Fatalf("case %d: status %v (%v), want unbounded", k, r.Status, err)
		}
		if err := verifyRay(unb, r.Ray); err != nil {
			t.Fatalf("case %d: %v", k, err)
		}
	}
}

// verifyFarkas checks an infeasibility certificate y over the rows: the
// largest value of yᵀA·x − yᵀs over the column and row bounds must be
// negative (coefficients below 1e-9 count as zero).
func verifyFarkas(m *Model, y []float64) error {
	if len(y) != m.NumRows() {
		return fmt.Errorf("ray has %d entries, want %d", len(y), m.NumRows())
	}
	maxOver := func(c, lo, up float64) float64 {
		switch {
		case math.Abs(c) <= 1e-9:
			return 0
		case c > 0:
			return c * up
		}
		return c * lo
	}
	h := 0.0
	cols := m.Columns()
	for j := 0; j < m.NumCols(); j++ {
		c := 0.0
		for p := cols.Start[j]; p < cols.Start[j+1]; p++ {
			c += y[cols.Index[p]] * cols.Value[p]
		}
		h += maxOver(c, m.ColLower[j], m.ColUpper[j])
	}
	for i, yi := range y {
		h += maxOver(-yi, m.RowLower[i], m.RowUpper[i])
	}
	if !(h < -1e-9) {
		return fmt.Errorf("certificate does not prove infeasibility: max = %v", h)
	}
	return nil
}

// verifyRay checks an unbounded direction d over the columns: moving along
// d never violates a bound or row (each coordinate and each row activity
// moves only towards an infinite bound) and improves the objective.
func verifyRay(m *Model, d []float64) error {
	if len(d) != m.NumCols() {
		return fmt.Errorf("ray has %d entries, want %d", len(d), m.NumCols())
	}
	scale := 0.0
	for _, v := range d {
		scale = math.Max(scale, math.Abs(v))
	}
	if scale == 0 {
		return fmt.Errorf("zero ray")
	}
	tol := 1e-9 * scale
	for j, v := range d {
		if (v > tol && !math.IsInf(m.ColUpper[j], 1)) || (v < -tol && !math.IsInf(m.ColLower[j], -1)) {
			return fmt.Errorf("ray moves column %d by %v towards a finite bound", j, v)
		}
	}
	obj, act := m.Evaluate(d)
	for i, a := range act {
		if (a > tol && !math.IsInf(m.RowUpper[i], 1)) || (a < -tol && !math.IsInf(m.RowLower[i], -1)) {
			return fmt.Errorf("ray moves row %d by %v towards a finite bound", i, a)
		}
	}
	gain := obj - m.Constant
	if m.Sense == Maximize {
		gain = -gain
	}
	if !(gain < -tol) {
		return fmt.Errorf("ray does not improve the objective (%v)", gain)
	}
	return nil
}

// TestVerifyOptimalRejects makes sure the independent check can fail.
func TestVerifyOptimalRejects(t *testing.T) {
	m := readSample(t, "afiro")
	r, err := Solve(context.Background(), m, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if err := verifyOptimal(m, r); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name   string
		mutate func(r *Result)
	}{
		{"primal", func(r *Result) { r.X[0] += 1 }},
		{"dual", func(r *Result) {
			for i := range r.Dual {
				r.Dual[i] = -r.Dual[i] - 1
			}
		}},
		{"objective", func(r *Result) { r.Objective += 1 }},
	} {
		bad := r
		bad.X = append([]float64(nil), r.X...)
		bad.Dual = append([]float64(nil), r.Dual...)
		tc.mutate(&bad)
		if err := verifyOptimal(m, bad); err == nil {
			t.Errorf("%s: a broken result passed the check", tc.name)
		}
	}
}
