package mip

import "math"

// propagator tightens integer column bounds from row activities: for a row
// L ≤ a·x ≤ U, each term a_j·x_j is bounded by U minus the smallest
// activity of the other terms (and by L minus the largest). Continuous
// columns take part in activities but keep their bounds (unless continuous
// is set), so that the LP sees no tiny tightenings. An extra objective row
// c·x ≤ cutoff is used when a cutoff is set.
type propagator struct {
	p      *problem
	inRow  []bool // row queued
	queue  []int
	cutoff float64 // objective cutoff (internal sense, constant removed); +Inf for none
	objIdx []int   // the objective as a row, built on first use
	objVal []float64
	// continuous makes propagateRow tighten continuous columns too (see
	// impliedBounds); off, they keep their bounds.
	continuous bool
}

// infeasTol is the relative amount by which a row's activity range must
// miss its sides before propagation declares a domain empty.
const infeasTol = 1e-5

// maxPropagationRounds bounds the work of one propagate call: each round
// visits the queued rows once.
const maxPropagationRounds = 20

func newPropagator(p *problem) *propagator {
	return &propagator{p: p, inRow: make([]bool, p.m+1), cutoff: math.Inf(1)}
}

// rowActivity returns the smallest and largest activity of the row given by
// idx/val over the domain, with the number of infinite contributions of each.
func rowActivity(idx []int, val []float64, lo, up []float64) (minAct, maxAct float64, minInf, maxInf int) {
	for k, j := range idx {
		a := val[k]
		if a > 0 {
			if math.IsInf(lo[j], -1) {
				minInf++
			} else {
				minAct += a * lo[j]
			}
			if math.IsInf(up[j], 1) {
				maxInf++
			} else {
				maxAct += a * up[j]
			}
		} else {
			if math.IsInf(up[j], 1) {
				minInf++
			} else {
				minAct += a * up[j]
			}
			if math.IsInf(lo[j], -1) {
				maxInf++
			} else {
				maxAct += a * lo[j]
			}
		}
	}
	return
}

// propagate tightens lo/up in place, starting from the rows touching the
// columns in changed (all rows when changed is nil). It returns false when
// the domain is proven empty. tightened receives each column it changes.
func (pr *propagator) propagate(lo, up []float64, changed []int, tightened func(j int)) bool {
	p := pr.p
	nr := p.m
	useObj := !math.IsInf(pr.cutoff, 1)
	if useObj {
		nr++
	}
	pr.queue = pr.queue[:0]
	for i := range pr.inRow {
		pr.inRow[i] = false
	}
	push := func(i int) {
		if !pr.inRow[i] {
			pr.inRow[i] = true
			pr.queue = append(pr.queue, i)
		}
	}
	if changed == nil {
		for i := 0; i < nr; i++ {
			push(i)
		}
	} else {
		for _, j := range changed {
			for q := p.cols.Start[j]; q < p.cols.Start[j+1]; q++ {
				push(p.cols.Index[q])
			}
			if useObj && p.obj[j] != 0 {
				push(p.m)
			}
		}
	}
	if pr.objIdx == nil {
		pr.objIdx, pr.objVal = pr.objRow()
	}
	objIdx, objVal := pr.objIdx, pr.objVal
	for round := 0; round < maxPropagationRounds && len(pr.queue) > 0; round++ {
		work := append([]int(nil), pr.queue...)
		pr.queue = pr.queue[:0]
		for _, i := range work {
			pr.inRow[i] = false
		}
		for _, i := range work {
			var idx []int
			var val []float64
			var rl, ru float64
			if i == p.m {
				idx, val, rl, ru = objIdx, objVal, math.Inf(-1), pr.cutoff
			} else {
				idx = p.rows.Index[p.rows.Start[i]:p.rows.Start[i+1]]
				val = p.rows.Value[p.rows.Start[i]:p.rows.Start[i+1]]
				rl, ru = p.rowLower[i], p.rowUpper[i]
			}
			ok := pr.propagateRow(idx, val, rl, ru, lo, up, func(j int) {
				if tightened != nil {
					tightened(j)
				}
				for q := p.cols.Start[j]; q < p.cols.Start[j+1]; q++ {
					if r := p.cols.Index[q]; r != i {
						push(r)
					}
				}
				if useObj && i != p.m && p.obj[j] != 0 {
					push(p.m)
				}
			})
			if !ok {
				return false
			}
		}
	}
	return true
}

func (pr *propagator) objRow() ([]int, []float64) {
	var idx []int
	var val []float64
	for j, c := range pr.p.obj {
		if c != 0 {
			idx = append(idx, j)
			val = append(val, c)
		}
	}
	return idx, val
}

// propagateRow handles one row; see propagate.
func (pr *propagator) propagateRow(idx []int, val []float64, rl, ru float64, lo, up []float64, tightened func(j int)) bool {
	p := pr.p
	minAct, maxAct, minInf, maxInf := rowActivity(idx, val, lo, up)
	// infeasibility tolerance, relative to the finite sides
	mag := 1.0
	if !math.IsInf(rl, 0) {
		mag = math.Max(mag, math.Abs(rl))
	}
	if !math.IsInf(ru, 0) {
		mag = math.Max(mag, math.Abs(ru))
	}
	tol := infeasTol * mag
	if minInf == 0 && !math.IsInf(ru, 1) && minAct > ru+tol {
		return false
	}
	if maxInf == 0 && !math.IsInf(rl, -1) && maxAct < rl-tol {
		return false
	}
	canUp := !math.IsInf(ru, 1) && minInf <= 1
	canLo := !math.IsInf(rl, -1) && maxInf <= 1
	if !canUp && !canLo {
		return true
	}
	for k, j := range idx {
		if lo[j] == up[j] || !p.isInt[j] && !pr.continuous {
			continue
		}
		a := val[k]
		// smallest / largest contribution of this term
		var cMin, cMax float64
		var cMinInf, cMaxInf bool
		if a > 0 {
			cMin, cMinInf = a*lo[j], math.IsInf(lo[j], -1)
			cMax, cMaxInf = a*up[j], math.IsInf(up[j], 1)
		} else {
			cMin, cMinInf = a*up[j], math.IsInf(up[j], 1)
			cMax, cMaxInf = a*lo[j], math.IsInf(lo[j], -1)
		}
		newLo, newUp := lo[j], up[j]
		if canUp {
			// residual minimum activity of the other terms
			var res float64
			ok := false
			if minInf == 0 {
				res, ok = minAct-cMin, true
			} else if minInf == 1 && cMinInf {
				res, ok = minAct, true
			}
			if ok {
				lim := (ru - res) / a
				if a > 0 {
					newUp = math.Min(newUp, pr.roundUp(j, lim))
				} else {
					newLo = math.Max(newLo, pr.roundLo(j, lim))
				}
			}
		}
		if canLo {
			var res float64
			ok := false
			if maxInf == 0 {
				res, ok = maxAct-cMax, true
			} else if maxInf == 1 && cMaxInf {
				res, ok = maxAct, true
			}
			if ok {
				lim := (rl - res) / a
				if a > 0 {
					newLo = math.Max(newLo, pr.roundLo(j, lim))
				} else {
					newUp = math.Min(newUp, pr.roundUp(j, lim))
				}
			}
		}
		if !p.isInt[j] {
			// a continuous column takes only tightenings worth having:
			// small steps would repeat round after round
			newLo, newUp = worthwhile(lo[j], up[j], newLo, newUp)
			if newLo > newUp && newLo-newUp <= boundTol*math.Max(1, math.Abs(newUp)) {
				newLo = newUp
			}
		}
		if newLo > newUp {
			return false
		}
		if newLo > lo[j] || newUp < up[j] {
			// keep the activities consistent with the new bounds
			oldMin, oldMax := cMin, cMax
			lo[j], up[j] = newLo, newUp
			if a > 0 {
				cMin, cMinInf2 := a*lo[j], math.IsInf(lo[j], -1)
				cMax, cMaxInf2 := a*up[j], math.IsInf(up[j], 1)
				minAct, minInf = adjust(minAct, minInf, oldMin, cMinInf, cMin, cMinInf2)
				maxAct, maxInf = adjust(maxAct, maxInf, oldMax, cMaxInf, cMax, cMaxInf2)
			} else {
				cMin, cMinInf2 := a*up[j], math.IsInf(up[j], 1)
				cMax, cMaxInf2 := a*lo[j], math.IsInf(lo[j], -1)
				minAct, minInf = adjust(minAct, minInf, oldMin, cMinInf, cMin, cMinInf2)
				maxAct, maxInf = adjust(maxAct, maxInf, oldMax, cMaxInf, cMax, cMaxInf2)
			}
			canUp = !math.IsInf(ru, 1) && minInf <= 1
			canLo = !math.IsInf(rl, -1) && maxInf <= 1
			tightened(j)
		}
	}
	return true
}

// roundUp turns a limit on column j from above into its new upper bound:
// rounded down for an integer column, with slack boundTol either way.
func (pr *propagator) roundUp(j int, lim float64) float64 {
	if pr.p.isInt[j] {
		return math.Floor(lim + boundTol*math.Max(1, math.Abs(lim)))
	}
	return lim + boundTol*math.Max(1, math.Abs(lim))
}

// roundLo is roundUp for a limit from below.
func (pr *propagator) roundLo(j int, lim float64) float64 {
	if pr.p.isInt[j] {
		return math.Ceil(lim - boundTol*math.Max(1, math.Abs(lim)))
	}
	return lim - boundTol*math.Max(1, math.Abs(lim))
}

// minContinuousStep is the least tightening of a continuous bound that
// propagation takes, as a share of the old domain's width (or of the
// new bound's size when the old one was infinite).
const minContinuousStep = 1e-3

// worthwhile keeps the new bounds of a continuous column only where they
// tighten the old ones by minContinuousStep or more.
func worthwhile(lo, up, newLo, newUp float64) (float64, float64) {
	width := up - lo
	step := func(nw float64) float64 {
		if math.IsInf(width, 1) {
			return minContinuousStep * math.Max(1, math.Abs(nw))
		}
		return minContinuousStep * math.Max(width, 1e-9)
	}
	if newLo > lo && newLo-lo < step(newLo) {
		newLo = lo
	}
	if newUp < up && up-newUp < step(newUp) {
		newUp = up
	}
	return newLo, newUp
}

// impliedBounds tightens the integer columns of lo/up by a propagation that
// also tightens the continuous columns on a copy of the domain: a chain of
// rows through continuous columns (a budget row over spend columns, each
// the sum of priced unit columns) then bounds the integer columns at its
// end, which propagation over integer columns alone cannot do. The
// continuous bounds are not kept, so the LP sees the model's own. It
// returns false, changing nothing, when it finds the domain empty.
func (pr *propagator) impliedBounds(lo, up []float64) bool {
	clo := append([]float64(nil), lo...)
	cup := append([]float64(nil), up...)
	pr.continuous = true
	ok := pr.propagate(clo, cup, nil, nil)
	pr.continuous = false
	if !ok {
		return false
	}
	for j, isInt := range pr.p.isInt {
		if isInt {
			lo[j], up[j] = clo[j], cup[j]
		}
	}
	return true
}

// adjust replaces one term's contribution in an activity sum.
func adjust(act float64, nInf int, old float64, oldInf bool, nw float64, nwInf bool) (float64, int) {
	if oldInf {
		nInf--
	} else {
		act -= old
	}
	if nwInf {
		nInf++
	} else {
		act += nw
	}
	return act, nInf
}
