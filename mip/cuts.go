package mip

import (
	"math"
	"sort"

	"netstage/lp"
)

// A cut is a row lower ≤ Σ val·x[idx] ≤ upper valid for every integer point
// of the global domain.
type cut struct {
	idx          []int
	val          []float64
	lower, upper float64
	kind         string // "cover", "gomory", "cmir" or "caller": which pool cuts may re-enter the LP in the tree (poolToLP), and whether the slack is integral

	lpRow int // row index in the LP, −1 when only in the pool
	age   int // consecutive rounds the cut was slack
}

// Cut tolerances.
const (
	// minEfficacy is the smallest violation per unit of coefficient norm of a
	// cut worth adding (common practice: 1e-4 … 1e-3).
	minEfficacy = 1e-4
	// maxCutDynamism is the largest ratio of the largest to the smallest
	// nonzero coefficient of an accepted cut.
	maxCutDynamism = 1e6
	// minGomoryFrac keeps Gomory rows away from nearly integral right-hand
	// sides, whose cuts are weak and numerically poor.
	minGomoryFrac = 0.01
	// cutAgeLimit is the number of rounds an inactive cut stays in the LP.
	cutAgeLimit = 3
	// minCutsToAgeOut is the number of old cuts (or a tenth of the rows)
	// that makes removing them from the LP worth a rebuild.
	minCutsToAgeOut = 20
	// maxCutsPerRound limits the rows added at once.
	maxCutsPerRound = 200
	// maxGomoryRows limits the tableau rows read per round.
	maxGomoryRows = 100
	// maxGomoryNonzeros drops denser Gomory cuts. A dense row in the LP
	// makes every later dual simplex iteration dearer (longer pivot rows,
	// denser BTRAN results). On the synthetic L case (50 sites, 10 years)
	// the first two rounds added 83 Gomory cuts averaging 450 nonzeros
	// (the cut-set rows average 30); their re-solves took 1,447 and 1,553
	// iterations at 1.3 and 2.0 ms each. With the cap: 689 and 631
	// iterations at 0.9 and 1.4 ms. Cut generators commonly cap the
	// length of Gomory cuts in the same way (COIN-OR Cgl's Gomory
	// generator has such a limit). 100 was the best of 30, 100 and 300 in
	// 60 s runs of L (2.94 % → 2.81 %); on the M cases the gap moved
	// within noise while the nodes per minute rose by half or more.
	maxGomoryNonzeros = 100
)

// violation returns how much x violates c (0 when satisfied).
func (c *cut) violation(x []float64) float64 {
	a := 0.0
	for k, j := range c.idx {
		a += c.val[k] * x[j]
	}
	return math.Max(c.lower-a, a-c.upper)
}

func (c *cut) norm() float64 {
	s := 0.0
	for _, v := range c.val {
		s += v * v
	}
	return math.Sqrt(s)
}

func (c *cut) efficacy(x []float64) float64 {
	nrm := c.norm()
	if nrm == 0 {
		return 0
	}
	return c.violation(x) / nrm
}

// sortByEfficacy orders cs by decreasing efficacy at x, keeping the
// order of cuts of equal efficacy, and computes each efficacy once (a
// comparator that computed them would do so at every comparison).
func sortByEfficacy(cs []*cut, x []float64) {
	type scored struct {
		c   *cut
		eff float64
	}
	sc := make([]scored, len(cs))
	for k, c := range cs {
		sc[k] = scored{c, c.efficacy(x)}
	}
	sort.SliceStable(sc, func(a, b int) bool { return sc[a].eff > sc[b].eff })
	for k := range sc {
		cs[k] = sc[k].c
	}
}

func (c *cut) row(name string) lp.Row {
	return lp.Row{Name: name, Lower: c.lower, Upper: c.upper, Index: c.idx, Value: c.val}
}

// key identifies a cut (exact coefficients), against duplicates: a 64-bit
// FNV-1a hash of indices, coefficient bits and sides.
func (c *cut) key() uint64 {
	h := newFNV()
	for k, j := range c.idx {
		h.mix(uint64(j))
		h.mix(math.Float64bits(c.val[k]))
	}
	h.mix(math.Float64bits(c.lower))
	h.mix(math.Float64bits(c.upper))
	return uint64(h)
}

// fnvHash is a 64-bit FNV-1a hash fed eight bytes at a time (least
// significant first), for the keys of cuts and of sub-MIPs.
type fnvHash uint64

func newFNV() fnvHash { return 14695981039346656037 }

// mix feeds the eight bytes of v to the hash.
func (h *fnvHash) mix(v uint64) {
	for k := 0; k < 8; k++ {
		*h ^= fnvHash(v & 0xff)
		*h *= 1099511628211
		v >>= 8
	}
}

// numericallySafe reports whether the cut's coefficients have a moderate
// range and no NaN.
func (c *cut) numericallySafe() bool {
	if len(c.idx) == 0 {
		return false
	}
	mx, mn := 0.0, math.Inf(1)
	for _, v := range c.val {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
		a := math.Abs(v)
		mx = math.Max(mx, a)
		mn = math.Min(mn, a)
	}
	if math.IsNaN(c.lower) || math.IsNaN(c.upper) {
		return false
	}
	return mx/mn <= maxCutDynamism
}

// separateCover looks for a violated lifted cover inequality for
// the row rl ≤ Σ val·x[idx] ≤ ru, using both sides. lo/up is the global
// domain and x the LP point. Binary columns form the knapsack; other columns
// are moved to the right-hand side at their worst bound.
func separateCover(p *problem, idx []int, val []float64, rl, ru float64, lo, up, x []float64) []*cut {
	var out []*cut
	if !math.IsInf(ru, 1) {
		if c := coverOnSide(p, idx, val, ru, lo, up, x, 1); c != nil {
			out = append(out, c)
		}
	}
	if !math.IsInf(rl, -1) {
		if c := coverOnSide(p, idx, val, -rl, lo, up, x, -1); c != nil {
			out = append(out, c)
		}
	}
	return out
}

type knapItem struct {
	col  int
	w    float64 // weight > 0
	y    float64 // LP value of the (possibly complemented) binary
	comp bool    // y = 1 − x
}

// coverOnSide handles sign·(Σ val·x) ≤ b.
func coverOnSide(p *problem, idx []int, val []float64, b float64, lo, up, x []float64, sign float64) *cut {
	var items []knapItem
	for k, j := range idx {
		a := sign * val[k]
		if lo[j] == up[j] {
			b -= a * lo[j]
			continue
		}
		if p.isInt[j] && lo[j] == 0 && up[j] == 1 {
			if a > 0 {
				items = append(items, knapItem{col: j, w: a, y: x[j]})
			} else {
				b -= a
				items = append(items, knapItem{col: j, w: -a, y: 1 - x[j], comp: true})
			}
			continue
		}
		if a > 0 {
			if math.IsInf(lo[j], -1) {
				return nil
			}
			b -= a * lo[j]
		} else {
			if math.IsInf(up[j], 1) {
				return nil
			}
			b -= a * up[j]
		}
	}
	if len(items) < 2 || b < 0 {
		return nil
	}
	total := 0.0
	for _, it := range items {
		total += it.w
	}
	eps := 1e-9 * math.Max(1, math.Abs(b))
	if total <= b+eps {
		return nil
	}
	// Greedy cover: cheapest (1 − y)/w first.
	order := make([]int, len(items))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, c int) bool {
		ia, ic := items[order[a]], items[order[c]]
		return (1-ia.y)/ia.w < (1-ic.y)/ic.w
	})
	var cover []int
	sum := 0.0
	for _, i := range order {
		cover = append(cover, i)
		sum += items[i].w
		if sum > b+eps {
			break
		}
	}
	if sum <= b+eps {
		return nil
	}
	// Make it minimal: drop members with the smallest y while still a cover.
	sort.SliceStable(cover, func(a, c int) bool { return items[cover[a]].y < items[cover[c]].y })
	keep := cover[:0]
	for k, i := range cover {
		if sum-items[i].w > b+eps {
			sum -= items[i].w
			continue
		}
		keep = append(keep, cover[k])
	}
	cover = keep
	if len(cover) < 1 {
		return nil
	}
	inCover := make(map[int]bool, len(cover))
	lhs := 0.0
	for _, i := range cover {
		inCover[i] = true
		lhs += items[i].y
	}
	alpha := liftCover(items, cover, inCover, b)
	var ext []int
	ext = append(ext, cover...)
	for i := range items {
		if !inCover[i] && alpha[i] > 0 {
			ext = append(ext, i)
			lhs += alpha[i] * items[i].y
		}
	}
	for _, i := range cover {
		alpha[i] = 1
	}
	rhs := float64(len(cover) - 1)
	if lhs <= rhs+1e-6 {
		return nil
	}
	sort.Ints(ext)
	c := &cut{lower: math.Inf(-1), upper: rhs, kind: "cover", lpRow: -1}
	coef := map[int]float64{}
	var cols []int
	for _, i := range ext {
		it := items[i]
		if _, ok := coef[it.col]; !ok {
			cols = append(cols, it.col)
		}
		if it.comp {
			coef[it.col] -= alpha[i]
			c.upper -= alpha[i]
		} else {
			coef[it.col] += alpha[i]
		}
	}
	sort.Ints(cols)
	for _, j := range cols {
		if coef[j] != 0 {
			c.idx = append(c.idx, j)
			c.val = append(c.val, coef[j])
		}
	}
	return c
}

// lpRowInfo describes one LP row for cut derivation.
type lpRowInfo struct {
	idx          []int
	val          []float64
	lower, upper float64
	intSlack     bool // the activity is integral at every integer point
}

// gomoryFromRow derives a Gomory mixed-integer cut from one tableau row
// Σ_k row[k]·z[k] = 0 (z = columns then row activities; row[basic] = 1),
// where the basic variable is an integer column with fractional value.
// status gives the nonbasic positions; lo/up the column bounds in use.
func gomoryFromRow(p *problem, row []float64, basic int, value float64, basis lp.Basis, lo, up []float64, rows []lpRowInfo) *cut {
	n := p.n
	f0 := value - math.Floor(value)
	if f0 < minGomoryFrac || f0 > 1-minGomoryFrac {
		return nil
	}
	// In terms of t_k ≥ 0 (distance from the active bound):
	//   x_b + Σ ā_k t_k = β,   ā_k = row[k] at lower, −row[k] at upper.
	// Cut: Σ g_k t_k ≥ 1, then substituted back into z.
	coef := make(map[int]float64) // over columns
	rhs := 1.0
	addZ := func(k int, c float64) bool {
		// add c·z_k to the cut's left side
		if k < n {
			coef[k] += c
			return true
		}
		r := rows[k-n]
		for q, j := range r.idx {
			coef[j] += c * r.val[q]
		}
		return true
	}
	for k, a := range row {
		if k == basic || a == 0 || math.Abs(a) < 1e-11 {
			continue
		}
		var st lp.VarStatus
		var l, u float64
		var isInt bool
		if k < n {
			st = basis.Cols[k]
			l, u = lo[k], up[k]
			isInt = p.isInt[k]
		} else {
			st = basis.Rows[k-n]
			r := rows[k-n]
			l, u = r.lower, r.upper
			isInt = r.intSlack
		}
		if st == lp.Basic {
			continue
		}
		var abar, bnd float64
		atUpper := false
		switch {
		case st == lp.Fixed || l == u:
			continue // t_k = 0
		case st == lp.AtLower:
			abar, bnd = a, l
		case st == lp.AtUpper:
			abar, bnd, atUpper = -a, u, true
		default:
			return nil // a free nonbasic column: no cut from this row
		}
		if math.IsInf(bnd, 0) {
			return nil
		}
		var g float64
		if isInt && bnd == math.Round(bnd) {
			fk := abar - math.Floor(abar)
			if fk <= f0 {
				g = fk / f0
			} else {
				g = (1 - fk) / (1 - f0)
			}
		} else {
			if abar >= 0 {
				g = abar / f0
			} else {
				g = -abar / (1 - f0)
			}
		}
		if g == 0 {
			continue
		}
		// g·t_k with t_k = z_k − l (lower) or u − z_k (upper)
		if atUpper {
			addZ(k, -g)
			rhs -= g * bnd
		} else {
			addZ(k, g)
			rhs += g * bnd
		}
	}
	c := &cut{lower: rhs, upper: math.Inf(1), kind: "gomory", lpRow: -1}
	cols := make([]int, 0, len(coef))
	maxAbs := 0.0
	for j, v := range coef {
		cols = append(cols, j)
		maxAbs = math.Max(maxAbs, math.Abs(v))
	}
	if maxAbs == 0 {
		return nil
	}
	sort.Ints(cols)
	for _, j := range cols {
		v := coef[j]
		if math.Abs(v) <= 1e-9*maxAbs {
			// drop the tiny term, relaxing the right-hand side with a bound
			if v > 0 {
				if math.IsInf(up[j], 1) {
					return nil
				}
				c.lower -= v * up[j]
			} else if v < 0 {
				if math.IsInf(lo[j], -1) {
					return nil
				}
				c.lower -= v * lo[j]
			}
			continue
		}
		c.idx = append(c.idx, j)
		c.val = append(c.val, v)
	}
	if len(c.idx) > maxGomoryNonzeros {
		return nil
	}
	// Scale so the largest coefficient is 1 (better conditioned rows).
	s := 1 / maxAbs
	for k := range c.val {
		c.val[k] *= s
	}
	c.lower *= s
	if !c.numericallySafe() {
		return nil
	}
	return c
}

// liftCover computes sequential up-lifting coefficients for the items
// outside a minimal cover C of the knapsack Σ w·y ≤ b: lifting item j
// gives α_j = |C| − 1 − max{lifted left side : weight ≤ b − w_j}, found by a
// small dynamic programme over the left side's values 0 … |C| − 1 (no
// feasible point exceeds |C| − 1). Items are lifted in order of decreasing
// LP value. Cost O(items · |C|).
func liftCover(items []knapItem, cover []int, inCover map[int]bool, b float64) []float64 {
	k := len(cover) - 1
	alpha := make([]float64, len(items))
	if k <= 0 {
		// A single item heavier than b: it must be 0; nothing to lift.
		return alpha
	}
	// minW[v]: least weight of a set of lifted-so-far items with left-side
	// value exactly v.
	minW := make([]float64, k+1)
	for v := 1; v <= k; v++ {
		minW[v] = math.Inf(1)
	}
	add := func(w float64, val int) {
		for v := k; v >= val; v-- {
			if c := minW[v-val] + w; c < minW[v] {
				minW[v] = c
			}
		}
	}
	for _, i := range cover {
		add(items[i].w, 1)
	}
	var rest []int
	for i := range items {
		if !inCover[i] {
			rest = append(rest, i)
		}
	}
	sort.SliceStable(rest, func(a, c int) bool { return items[rest[a]].y > items[rest[c]].y })
	eps := 1e-9 * math.Max(1, math.Abs(b))
	for _, i := range rest {
		capLeft := b - items[i].w
		if capLeft < -eps {
			// y_i = 1 alone violates the knapsack: y_i is 0 at every
			// integer point; lift it fully.
			alpha[i] = float64(k)
			add(items[i].w, k)
			continue
		}
		best := 0
		for v := k; v >= 0; v-- {
			if minW[v] <= capLeft+eps {
				best = v
				break
			}
		}
		a := k - best
		if a > 0 {
			alpha[i] = float64(a)
			add(items[i].w, a)
		}
	}
	return alpha
}
