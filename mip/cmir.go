package mip

import (
	"math"
	"sort"
)

// Aggregated c-MIR cuts (complemented mixed-integer rounding, Marchand &
// Wolsey 2001): a row that is tight at the LP point is summed with up to
// cmirMaxAggr other tight rows, each chosen to eliminate the continuous
// column of the sum that lies furthest inside its bounds; after each
// step the sum, with its columns shifted to their nearest bounds (integer
// columns complemented towards the nearer one), is divided by candidate
// divisors and rounded. On a network model the sums follow paths: a
// capacity row, then conservation rows that carry one source's flow from
// arc to arc. The cuts are valid for every integer point of the global
// domain because they use only the model's rows and the global bounds.
const (
	// cmirMaxAggr caps the rows added to a starting row (common practice
	// is five or six).
	cmirMaxAggr = 5
	// cmirMaxStarts caps the starting rows tried per round: rows with a
	// fractional integer column, the largest share of them first.
	cmirMaxStarts = 500
	// cmirMaxDivisors caps the divisors tried per sum.
	cmirMaxDivisors = 8
	// cmirMinFrac and cmirMaxFrac bound the fractional part of the divided
	// right-hand side: near 0 the rounding gains nothing, near 1 the cut
	// has huge coefficients on the continuous part.
	cmirMinFrac, cmirMaxFrac = 0.05, 0.95
	// cmirMaxNonzeros drops longer cuts (see maxGomoryNonzeros).
	cmirMaxNonzeros = 150
	// cmirSlackTol is the slack, relative to the row's scale, below which a
	// row counts as tight.
	cmirSlackTol = 1e-6
)

// cmirTerm is one column of a sum in bound-shifted form: t = x − bound
// (comp false) or t = bound − x (comp true), with coefficient a on t.
type cmirTerm struct {
	col   int
	a     float64
	bound float64
	comp  bool
	isInt bool
	t     float64 // value of t at the LP point
	width float64 // upper − lower (+Inf when unbounded)
}

// cmirSep holds the work arrays of one separation call.
type cmirSep struct {
	s       *search
	x       []float64
	act     []float64 // row activities at x (model rows)
	coef    []float64 // dense sum, by column
	touched []int
	inSum   []bool
	used    []bool // rows already in the sum
}

// separateCMIR appends to found the aggregated c-MIR cuts that x violates.
func (s *search) separateCMIR(found []*cut, x []float64) []*cut {
	p := s.p
	sep := &cmirSep{
		s: s, x: x,
		act:   make([]float64, p.m),
		coef:  make([]float64, p.n),
		inSum: make([]bool, p.n),
		used:  make([]bool, p.m),
	}
	type start struct {
		row   int
		score float64
	}
	var starts []start
	for i := 0; i < p.m; i++ {
		ri := s.rows[i]
		a, frac := 0.0, 0
		for k, j := range ri.idx {
			a += ri.val[k] * x[j]
			if p.isInt[j] {
				if f := x[j] - math.Floor(x[j]); f > 1e-3 && f < 1-1e-3 {
					frac++
				}
			}
		}
		sep.act[i] = a
		if frac > 0 && (sep.tight(i, 1) || sep.tight(i, -1)) {
			starts = append(starts, start{i, float64(frac) / float64(len(ri.idx))})
		}
	}
	sort.SliceStable(starts, func(a, b int) bool { return starts[a].score > starts[b].score })
	if len(starts) > cmirMaxStarts {
		starts = starts[:cmirMaxStarts]
	}
	for _, st := range starts {
		for _, sign := range []float64{1, -1} {
			if !sep.tight(st.row, sign) {
				continue
			}
			if c := sep.fromStart(st.row, sign); c != nil {
				found = s.addFound(found, c, x)
			}
		}
	}
	return found
}

// side returns the right-hand side of sign·row ≤ side (+Inf when that
// side is open).
func (sep *cmirSep) side(i int, sign float64) float64 {
	ri := sep.s.rows[i]
	if sign > 0 {
		return ri.upper
	}
	return -ri.lower
}

// slack returns side − sign·activity of row i.
func (sep *cmirSep) slack(i int, sign float64) float64 {
	return sep.side(i, sign) - sign*sep.act[i]
}

// tight reports whether the side sign of row i is finite and holds with
// equality at the LP point (within cmirSlackTol).
func (sep *cmirSep) tight(i int, sign float64) bool {
	b := sep.side(i, sign)
	return !math.IsInf(b, 1) && sep.slack(i, sign) <= cmirSlackTol*math.Max(1, math.Abs(b))
}

// add adds mult·row i to the sum and returns mult times its side.
func (sep *cmirSep) add(i int, mult float64) float64 {
	ri := sep.s.rows[i]
	for k, j := range ri.idx {
		if !sep.inSum[j] {
			sep.inSum[j] = true
			sep.touched = append(sep.touched, j)
		}
		sep.coef[j] += mult * ri.val[k]
	}
	sep.used[i] = true
	if mult > 0 {
		return mult * ri.upper
	}
	return mult * ri.lower
}

// fromStart builds sums from sign·row start and returns the first
// violated cut found, or nil.
func (sep *cmirSep) fromStart(start int, sign float64) *cut {
	s, p := sep.s, sep.s.p
	var rowsUsed []int
	defer func() {
		for _, j := range sep.touched {
			sep.coef[j] = 0
			sep.inSum[j] = false
		}
		sep.touched = sep.touched[:0]
		for _, i := range rowsUsed {
			sep.used[i] = false
		}
	}()
	b := sep.add(start, sign)
	rowsUsed = append(rowsUsed, start)
	for aggr := 0; ; aggr++ {
		if c := sep.cutFromSum(b); c != nil {
			return c
		}
		if aggr == cmirMaxAggr {
			return nil
		}
		// The continuous column furthest inside its bounds.
		best, bestDist := -1, 1e-6
		for _, j := range sep.touched {
			if p.isInt[j] || math.Abs(sep.coef[j]) < 1e-9 {
				continue
			}
			d := math.Min(sep.x[j]-s.glo[j], s.gup[j]-sep.x[j])
			if d > bestDist {
				best, bestDist = j, d
			}
		}
		if best < 0 {
			return nil
		}
		// The tightest unused row through it, on the side that cancels it.
		row, rowMult, rowSlack := -1, 0.0, math.Inf(1)
		for q := p.cols.Start[best]; q < p.cols.Start[best+1]; q++ {
			i, a := p.cols.Index[q], p.cols.Value[q] // p.cols holds the model rows only
			if sep.used[i] || a == 0 {
				continue
			}
			mult := -sep.coef[best] / a
			side := math.Copysign(1, mult)
			rhs := sep.side(i, side)
			if math.IsInf(rhs, 1) {
				continue
			}
			sl := sep.slack(i, side) / math.Max(1, math.Abs(rhs))
			if sl < rowSlack || (sl == rowSlack && len(s.rows[i].idx) < len(s.rows[row].idx)) {
				row, rowMult, rowSlack = i, mult, sl
			}
		}
		if row < 0 || rowSlack > 1e-3 {
			return nil
		}
		b += sep.add(row, rowMult)
		sep.coef[best] = 0
		rowsUsed = append(rowsUsed, row)
	}
}

// cutFromSum tries divisors and complementations on the current sum
// Σ coef·x ≤ b and returns the most efficacious violated cut, or nil.
func (sep *cmirSep) cutFromSum(b float64) *cut {
	s := sep.s
	c, _ := mirFromSum(sep.touched, sep.coef, b, s.glo, s.gup, sep.x, s.p.isInt)
	return c
}

// mirFromSum tries divisors and complementations on the sum
// Σ_{j in cols} coef[j]·x_j ≤ b over columns with bounds lo, up, point x
// and integrality isInt, and returns the most efficacious violated MIR
// with its divisor, or nil.
func mirFromSum(cols []int, coef []float64, b float64, lo, up, x []float64, isInt []bool) (*cut, float64) {
	terms := make([]cmirTerm, 0, len(cols))
	nInt := 0
	for _, j := range cols {
		a := coef[j]
		if math.Abs(a) < 1e-9 {
			continue
		}
		if lo[j] == up[j] {
			b -= a * lo[j]
			continue
		}
		tm := cmirTerm{col: j, isInt: isInt[j], width: up[j] - lo[j]}
		useUpper := false
		switch {
		case math.IsInf(lo[j], -1) && math.IsInf(up[j], 1):
			return nil, 0
		case math.IsInf(lo[j], -1):
			useUpper = true
		case math.IsInf(up[j], 1):
		default:
			useUpper = up[j]-x[j] < x[j]-lo[j]
		}
		if useUpper {
			tm.bound, tm.comp, tm.a, tm.t = up[j], true, -a, up[j]-x[j]
			b -= a * up[j]
		} else {
			tm.bound, tm.a, tm.t = lo[j], a, x[j]-lo[j]
			b -= a * lo[j]
		}
		if tm.isInt && tm.bound != math.Round(tm.bound) {
			tm.isInt = false // treated as continuous: a relaxation
		}
		if tm.isInt {
			nInt++
		}
		terms = append(terms, tm)
	}
	if nInt == 0 {
		return nil, 0
	}
	// Divisors: the coefficients of the integer columns strictly inside
	// their bounds, largest value first.
	var divs []float64
	seen := map[float64]bool{}
	order := make([]int, 0, len(terms))
	for k, tm := range terms {
		if tm.isInt && tm.t > 1e-6 && tm.t < tm.width-1e-6 {
			order = append(order, k)
		}
	}
	sort.SliceStable(order, func(a, c int) bool { return terms[order[a]].t > terms[order[c]].t })
	for _, k := range order {
		d := math.Abs(terms[k].a)
		if d > 1e-6 && !seen[d] && len(divs) < cmirMaxDivisors {
			seen[d] = true
			divs = append(divs, d)
		}
	}
	best, bestEff := 0.0, 1e-4
	for _, d := range divs {
		if eff := mirEfficacy(terms, b, d); eff > bestEff {
			best, bestEff = d, eff
		}
	}
	if best == 0 {
		return nil, 0
	}
	for _, f := range []float64{2, 4, 8} {
		if eff := mirEfficacy(terms, b, best/f); eff > bestEff {
			best, bestEff = best/f, eff
		}
	}
	// Complement integer columns one at a time where that helps.
	for _, k := range order {
		tm := &terms[k]
		if math.IsInf(tm.width, 1) {
			continue
		}
		old := *tm
		nb := flipTerm(tm, b)
		if eff := mirEfficacy(terms, nb, best); eff > bestEff {
			bestEff, b = eff, nb
		} else {
			*tm = old
		}
	}
	return mirCut(terms, b, best, lo, up), best
}

// flipTerm complements the integer term tm to its other bound and returns
// the sum's new right-hand side.
func flipTerm(tm *cmirTerm, b float64) float64 {
	// a·t = a·(x − l) = a·(u − l) − a·(u − x): the new term is −a on
	// t' = u − x and the right-hand side loses a·(u − l); likewise back.
	b -= tm.a * tm.width
	tm.a = -tm.a
	tm.t = tm.width - tm.t
	if tm.comp {
		tm.bound -= tm.width
	} else {
		tm.bound += tm.width
	}
	tm.comp = !tm.comp
	return b
}

// mirRound returns the coefficient in the MIR (with f0 the fractional
// part of the divided right-hand side) of a term whose divided coefficient
// is a: F(a) = ⌊a⌋ + max(0, frac(a) − f0)/(1 − f0) for an integer column,
// min(0, a)/(1 − f0) for a continuous one.
func mirRound(a, f0 float64, isInt bool) float64 {
	if isInt {
		fl := math.Floor(a)
		fa := a - fl
		return fl + math.Max(0, fa-f0)/(1-f0)
	}
	if a < 0 {
		return a / (1 - f0)
	}
	return 0
}

// mirEfficacy returns the efficacy of the MIR of the terms with divisor d
// (0 when there is no such cut).
func mirEfficacy(terms []cmirTerm, b, d float64) float64 {
	beta := b / d
	f0 := beta - math.Floor(beta)
	if f0 < cmirMinFrac || f0 > cmirMaxFrac {
		return 0
	}
	lhs, norm := 0.0, 0.0
	for _, tm := range terms {
		g := mirRound(tm.a/d, f0, tm.isInt)
		lhs += g * tm.t
		norm += g * g
	}
	if norm == 0 {
		return 0
	}
	return (lhs - math.Floor(beta)) / math.Sqrt(norm)
}

// mirCut returns the MIR of the terms with divisor d in the columns' own
// space, scaled so that its largest coefficient is 1; terms below 1e-9 of
// the largest are dropped, the right-hand side relaxed by their bounds.
func mirCut(terms []cmirTerm, b, d float64, lo, up []float64) *cut {
	beta := b / d
	f0 := beta - math.Floor(beta)
	rhs := math.Floor(beta)
	coef := map[int]float64{}
	for _, tm := range terms {
		g := mirRound(tm.a/d, f0, tm.isInt)
		if g == 0 {
			continue
		}
		// g·t with t = x − bound or bound − x.
		if tm.comp {
			coef[tm.col] -= g
			rhs -= g * tm.bound
		} else {
			coef[tm.col] += g
			rhs += g * tm.bound
		}
	}
	if len(coef) == 0 || len(coef) > cmirMaxNonzeros {
		return nil
	}
	return upperCut(coef, rhs, lo, up, "cmir")
}

// upperCut returns the cut Σ coef[j]·x_j ≤ rhs with sorted columns,
// scaled so that its largest coefficient is 1; terms below 1e-9 of the
// largest are dropped, the right-hand side relaxed by their bounds. It
// returns nil when every coefficient is 0 or a dropped term is unbounded
// on the side it needs.
func upperCut(coef map[int]float64, rhs float64, lo, up []float64, kind string) *cut {
	cols := make([]int, 0, len(coef))
	maxAbs := 0.0
	for j, v := range coef {
		cols = append(cols, j)
		maxAbs = math.Max(maxAbs, math.Abs(v))
	}
	sort.Ints(cols)
	if maxAbs == 0 {
		return nil
	}
	c := &cut{lower: math.Inf(-1), kind: kind, lpRow: -1}
	for _, j := range cols {
		v := coef[j]
		if math.Abs(v) <= 1e-9*maxAbs {
			// v·x ≥ v·lo (v > 0) or v·up (v < 0): drop it, relaxing rhs.
			m := lo[j]
			if v < 0 {
				m = up[j]
			}
			if math.IsInf(m, 0) {
				return nil
			}
			rhs -= v * m
			continue
		}
		c.idx = append(c.idx, j)
		c.val = append(c.val, v/maxAbs)
	}
	c.upper = rhs / maxAbs
	return c
}

// tableauSpace holds, for one root round, the bounds, values and
// integrality of the columns followed by the LP rows' activities: the
// variables of a tableau row.
type tableauSpace struct {
	lo, up, x []float64
	isInt     []bool
}

// newTableauSpace builds the space of the current LP (bounds lo, up; point
// x; rows, original then cuts).
func newTableauSpace(p *problem, lo, up, x []float64, rows []lpRowInfo) *tableauSpace {
	n, m := p.n, len(rows)
	sp := &tableauSpace{
		lo: make([]float64, n+m), up: make([]float64, n+m),
		x: make([]float64, n+m), isInt: make([]bool, n+m),
	}
	copy(sp.lo, lo)
	copy(sp.up, up)
	copy(sp.x, x)
	copy(sp.isInt, p.isInt)
	for i, r := range rows {
		a := 0.0
		for q, j := range r.idx {
			a += r.val[q] * x[j]
		}
		sp.lo[n+i], sp.up[n+i], sp.x[n+i], sp.isInt[n+i] = r.lower, r.upper, a, r.intSlack
	}
	return sp
}

// tableauMIR returns the most efficacious MIR of the tableau row
// Σ_k row[k]·z_k = 0 (z = columns then row activities) over the divisors
// and complementations that mirFromSum tries, in either orientation, with
// the row activities written out in columns, and its divisor; nil when
// there is none. The only integer term of the row strictly inside its
// bounds is the basic column, with coefficient 1, so the divisors are 1,
// ½, ¼ and ⅛ (the last three multiply the row by 2, 4 and 8 before
// rounding: k-cuts). With divisor 1 the MIR is the row's Gomory
// mixed-integer cut in another form: the two differ by multiples of the
// equality rows, whose activities this form folds into the right-hand
// side, so the LP sees the same inequality, but this form is often the
// sparser. The root rounds call it where gomoryFromRow gives no cut
// (longer than maxGomoryNonzeros, or badly scaled): in the root rounds
// of 10 sites over 10 years, 8 of the 28 rows whose MIR was a cut had no
// Gomory cut, and those 8 MIRs had 70 to 99 nonzeros. HiGHS rounds its
// tableau rows with the divisor search of its aggregated rows (read in
// its source).
//
// Measured 2026-12-05 on the synthetic cases of seed 1 (tree runs one
// core each, side by side, no time limit):
//   - As landed: the root bound over 10 years of 10 sites is 2,156,720
//     (8,904 simplex iterations) against 2,156,926 (8,867) without it;
//     the 10-site tree at 6,000 nodes 2,141,569 in 121 s against
//     2,144,232 in 145 s, the 15-site one at 3,000 nodes 2,729,434 in
//     163 s against 2,729,545 in 217 s, the 25-site one at 800 nodes
//     3,785,928 in 136 s against 3,787,456 in 157 s.
//   - Beside every Gomory cut, not only in their place: root 2,156,655
//     but 14,526 iterations (the same inequalities twice in the LP), and
//     at 6,000 nodes 2,143,183; 15 sites slightly better (150 tighter
//     after 163 s), 25 sites worse (3,787,356 at 800 nodes).
//   - The k-cuts alone (divisor 1 skipped) left the 10-site root where it
//     was: they seldom beat divisor 1 on efficacy (3 of 248 cuts in
//     TestTableauMIRCutsValid).
//   - On M (7 years) they cost: bound after 2,000 nodes 3,042,406 as
//     landed (3,042,449 beside every Gomory cut) against 3,041,859
//     without, so they come with Settings.CMIR.
func tableauMIR(p *problem, row []float64, sp *tableauSpace, rows []lpRowInfo) (*cut, float64) {
	var cols []int
	for k, a := range row {
		if math.Abs(a) > 1e-11 {
			cols = append(cols, k)
		}
	}
	neg := make([]float64, len(row))
	for _, k := range cols {
		neg[k] = -row[k]
	}
	var best *cut
	bestEff, bestD := 0.0, 0.0
	for _, coef := range [][]float64{row, neg} {
		c, d := mirFromSum(cols, coef, 0, sp.lo, sp.up, sp.x, sp.isInt)
		if c == nil {
			continue
		}
		if c = expandActivities(p, c, sp, rows); c == nil {
			continue
		}
		if eff := c.efficacy(sp.x[:p.n]); eff > bestEff {
			best, bestEff, bestD = c, eff, d
		}
	}
	return best, bestD
}

// expandActivities writes the row activities of a cut over tableau
// variables in terms of the columns.
func expandActivities(p *problem, c *cut, sp *tableauSpace, rows []lpRowInfo) *cut {
	n := p.n
	coef := map[int]float64{}
	for k, j := range c.idx {
		v := c.val[k]
		if j < n {
			coef[j] += v
			continue
		}
		r := rows[j-n]
		for q, jj := range r.idx {
			coef[jj] += v * r.val[q]
		}
	}
	out := upperCut(coef, c.upper, sp.lo, sp.up, "gomory")
	if out == nil {
		return nil
	}
	if len(out.idx) > maxGomoryNonzeros || !out.numericallySafe() {
		return nil
	}
	return out
}
