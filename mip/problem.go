package mip

import (
	"math"

	"netstage/lp"
)

// problem is the internal form of a MIP: always a minimisation, with integer
// column bounds rounded inwards and compressed rows and columns at hand.
type problem struct {
	orig *lp.Model // the caller's model, never modified
	work *lp.Model // the minimisation handed to lp (a clone when orig maximises)
	sign float64   // orig objective = sign · work objective

	n, m     int
	obj      []float64
	constant float64
	isInt    []bool
	lower    []float64 // global column bounds
	upper    []float64
	rowLower []float64
	rowUpper []float64
	rows     *lp.Sparse
	cols     *lp.Sparse
	nInt     int

	// objStep > 0 when every integer point has an objective in
	// constant + objStep·ℤ (integer costs on integer columns only); node
	// bounds may then be rounded up to that lattice.
	objStep float64
}

// Tolerances of the search itself.
const (
	// boundTol is the slack used when rounding a bound of an integer column
	// derived by propagation or reduced costs.
	boundTol = 1e-6
	// objLatticeTol is the tolerance for snapping an LP bound to the
	// objective lattice.
	objLatticeTol = 1e-6
)

func newProblem(m *lp.Model, intTol float64) (*problem, bool) {
	p := &problem{orig: m, work: m, sign: 1}
	if m.Sense == lp.Maximize {
		w := m.Clone()
		w.Sense = lp.Minimize
		for j := range w.Obj {
			w.Obj[j] = -w.Obj[j]
		}
		w.Constant = -w.Constant
		p.work, p.sign = w, -1
	}
	w := p.work
	p.n, p.m = w.NumCols(), w.NumRows()
	p.obj = w.Obj
	p.constant = w.Constant
	p.isInt = make([]bool, p.n)
	p.lower = append([]float64(nil), w.ColLower...)
	p.upper = append([]float64(nil), w.ColUpper...)
	feasible := true
	for j := 0; j < p.n; j++ {
		if j < len(w.Integer) && w.Integer[j] {
			p.isInt[j] = true
			p.nInt++
			p.lower[j] = math.Ceil(p.lower[j] - intTol)
			p.upper[j] = math.Floor(p.upper[j] + intTol)
		}
		if p.lower[j] > p.upper[j] {
			feasible = false
		}
	}
	p.rowLower = w.RowLower
	p.rowUpper = w.RowUpper
	p.rows = w.Rows()
	p.cols = w.Columns()
	p.objStep = objectiveStep(p.obj, p.isInt)
	return p, feasible
}

// objectiveStep returns the gcd of the objective coefficients when all of
// them sit on integer columns and are integers (up to 1e-9), else 0.
func objectiveStep(c []float64, isInt []bool) float64 {
	g := 0.0
	for j, v := range c {
		if v == 0 {
			continue
		}
		if !isInt[j] || math.Abs(v-math.Round(v)) > 1e-9 || math.Abs(v) > 1e12 {
			return 0
		}
		g = gcd(g, math.Abs(math.Round(v)))
	}
	return g
}

func gcd(a, b float64) float64 {
	for b != 0 {
		a, b = b, math.Mod(a, b)
	}
	return a
}

// roundBound snaps a lower bound on the objective up to the objective
// lattice when there is one.
func (p *problem) roundBound(b float64) float64 {
	if p.objStep == 0 || math.IsInf(b, 0) {
		return b
	}
	k := math.Ceil((b-p.constant)/p.objStep - objLatticeTol)
	return p.constant + k*p.objStep
}

// objective returns c·x + constant in the internal (minimisation) sense.
func (p *problem) objective(x []float64) float64 {
	s := p.constant
	for j, c := range p.obj {
		s += c * x[j]
	}
	return s
}

// check reports whether x satisfies the ORIGINAL model's bounds, rows and
// integrality within the tolerances.
func (p *problem) check(x []float64, feasTol, intTol float64) bool {
	if len(x) != p.n {
		return false
	}
	for _, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	viol, integral := p.orig.MaxViolation(x, intTol)
	return integral && viol <= feasTol
}

// snap rounds integer columns to the nearest integer and clips every value to
// its original bounds.
func (p *problem) snap(x []float64) []float64 {
	y := append([]float64(nil), x...)
	for j := range y {
		if p.isInt[j] {
			y[j] = math.Round(y[j])
		}
		lo, up := p.orig.ColLower[j], p.orig.ColUpper[j]
		if y[j] < lo {
			y[j] = lo
		}
		if y[j] > up {
			y[j] = up
		}
	}
	return y
}
