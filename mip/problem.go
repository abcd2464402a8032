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

	// implied marks the integer columns that the other integer columns
	// fix (see findImplied): a candidate's completion leaves them free.
	implied []bool

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
	if tightened := tightenCoefficients(p.work, intTol); tightened != nil {
		p.work = tightened
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
	p.implied = findImplied(p)
	return p, feasible
}

// findImplied marks the integer columns whose value the other integer
// columns fix: a column in one row only, with coefficient ±1, where that
// row is an equality with an integer side over integer columns with
// integer coefficients, none of them marked. Once the others take integer
// values the row leaves such a column one value, an integer. A candidate
// point whose rounding left it stale is then completed with it free
// (complete) instead of being lost. Nil when there are none.
func findImplied(p *problem) []bool {
	var implied []bool
	isWhole := func(v float64) bool { return math.Abs(v-math.Round(v)) <= 1e-12*math.Max(1, math.Abs(v)) }
	for j := 0; j < p.n; j++ {
		if !p.isInt[j] || p.cols.Start[j+1]-p.cols.Start[j] != 1 {
			continue
		}
		q := p.cols.Start[j]
		i, a := p.cols.Index[q], p.cols.Value[q]
		if math.Abs(a) != 1 || p.rowLower[i] != p.rowUpper[i] || !isWhole(p.rowLower[i]) {
			continue
		}
		ok := true
		for r := p.rows.Start[i]; r < p.rows.Start[i+1]; r++ {
			k := p.rows.Index[r]
			if k != j && (!p.isInt[k] || !isWhole(p.rows.Value[r]) || (implied != nil && implied[k])) {
				ok = false
				break
			}
		}
		if !ok {
			continue
		}
		if implied == nil {
			implied = make([]bool, p.n)
		}
		implied[j] = true
	}
	return implied
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
	y := make([]float64, len(x))
	copy(y, x)
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

// tightenCoefficients strengthens one-sided rows over binary columns
// without changing their integer points: in a row a·x ≤ b whose largest
// activity is M, a binary column with a_j > 0 and M − a_j < b makes the
// row redundant at x_j = 0, so a_j and b may both drop by d = b − (M − a_j);
// one with a_j < 0 and M + a_j < b makes it redundant at x_j = 1, so a_j may
// rise to b − M. (≥ rows likewise, negated.) The LP relaxation gets tighter.
// It returns a modified clone of m, or nil when nothing changed.
func tightenCoefficients(m *lp.Model, intTol float64) *lp.Model {
	rows := m.Rows()
	type change struct {
		row, col int
		delta    float64
	}
	var changes []change
	newLower := append([]float64(nil), m.RowLower...)
	newUpper := append([]float64(nil), m.RowUpper...)
	isBinary := func(j int) bool {
		return m.Integer[j] && math.Ceil(m.ColLower[j]-intTol) == 0 && math.Floor(m.ColUpper[j]+intTol) == 1
	}
	for i := 0; i < m.NumRows(); i++ {
		hasLo, hasUp := !math.IsInf(m.RowLower[i], -1), !math.IsInf(m.RowUpper[i], 1)
		if hasLo == hasUp {
			continue // ranges and equalities stay as they are
		}
		sign, b := 1.0, m.RowUpper[i]
		if hasLo {
			sign, b = -1, -m.RowLower[i]
		}
		lo, hi := rows.Start[i], rows.Start[i+1]
		// largest activity of sign·a·x
		maxAct := 0.0
		for q := lo; q < hi; q++ {
			j, a := rows.Index[q], sign*rows.Value[q]
			bnd := m.ColUpper[j]
			if a < 0 {
				bnd = m.ColLower[j]
			}
			if isBinary(j) {
				bnd = math.Max(0, math.Min(1, bnd))
				if a > 0 {
					bnd = 1
				} else {
					bnd = 0
				}
			}
			if math.IsInf(bnd, 0) {
				maxAct = math.Inf(1)
				break
			}
			maxAct += a * bnd
		}
		if math.IsInf(maxAct, 1) || maxAct <= b {
			continue // unbounded activity, or a redundant row
		}
		tol := 1e-9 * math.Max(1, math.Abs(b))
		for q := lo; q < hi; q++ {
			j, a := rows.Index[q], sign*rows.Value[q]
			if !isBinary(j) {
				continue
			}
			if a > 0 && maxAct-a < b-tol {
				d := b - (maxAct - a)
				changes = append(changes, change{i, j, -sign * d})
				b -= d
				maxAct -= d
			} else if a < 0 && maxAct+a < b-tol {
				d := b - (maxAct + a)
				changes = append(changes, change{i, j, sign * d})
			}
		}
		if sign > 0 {
			newUpper[i] = b
		} else {
			newLower[i] = -b
		}
	}
	if len(changes) == 0 {
		return nil
	}
	c := m.Clone()
	for _, ch := range changes {
		c.SetCoef(ch.row, ch.col, ch.delta)
	}
	copy(c.RowLower, newLower)
	copy(c.RowUpper, newUpper)
	return c
}
