package lp

import "math"

// Forrest–Tomlin updates of the LU factors (J. J. H. Forrest and J. A.
// Tomlin, Math. Programming 2(1), 1972). When the column at basis position
// p is replaced, the new U differs from the old in one column, the spike
// L⁻¹·a (the entering column a after the L pass and the row etas so far),
// which breaks the triangle. The update moves that column and the pivot
// row r of the replaced step to the end of the elimination order, and
// removes the entries of row r left of its new diagonal with a row eta:
// row r minus multiples of the rows of the later steps. The factors
// themselves are never rewritten: the replaced step is marked dead, and a
// new step at the end carries the spike as its U column. Against the
// product form (one column B⁻¹·a per update) this stores far fewer
// nonzeros on the planning models: on the synthetic 25-site case (M) an
// update holds 41 nonzeros on average (spike 18, row eta 23) where B⁻¹·a
// averaged 313, and the root LP of M and of the 50-site case (L) took
// 9 to 25 % (M) and 21 to 24 % (L) less time per iteration
// (BenchmarkRelaxation, three pairs of runs of the two builds, on a
// machine whose speed drifts).

// spikeScratch holds the spike of the last entering column, and scratch of
// the solves with updates; shared by a factor and its copies (one solver
// uses them at a time; its aside solve keeps no spike and does not).
type spikeScratch struct {
	idx   []int
	val   []float64
	saved []float64
	rows  []int
}

// startUpdates readies a new factorisation for updates, taking over the
// arrays of the factor old (no longer in use) where they are large enough.
func (f *factor) startUpdates(old *factor) {
	m := f.m
	f.newRow = reuse(old.newRow, refactorEvery)
	f.newPos = reuse(old.newPos, refactorEvery)
	f.newDiag = reuse(old.newDiag, refactorEvery)
	f.spkStart = append(reuse(old.spkStart, refactorEvery+1), 0)
	f.spkIdx = reuse(old.spkIdx, 16*refactorEvery)
	f.spkVal = reuse(old.spkVal, 16*refactorEvery)
	f.retaRow = reuse(old.retaRow, refactorEvery)
	f.retaStart = append(reuse(old.retaStart, refactorEvery+1), 0)
	f.retaIdx = reuse(old.retaIdx, 16*refactorEvery)
	f.retaVal = reuse(old.retaVal, 16*refactorEvery)
	if old.ftOwned {
		f.dead, f.ownRow, f.ownCol = old.dead[:0], old.ownRow[:0], old.ownCol[:0]
		f.ftOwned = true
	}
	f.spike = old.spike
	if f.spike == nil {
		f.spike = &spikeScratch{}
	}
	f.work2 = old.work2
	if len(f.work2) != m {
		f.work2 = make([]float64, m)
	}
}

// needsRefactor reports whether the updates have grown enough that a fresh
// factorisation pays: after refactorEvery updates, or once their nonzeros
// exceed etaGrowth times those of L, U and the diagonal.
func (f *factor) needsRefactor() bool {
	n := len(f.newRow)
	return n >= refactorEvery || (n > 0 && float64(len(f.spkIdx)+len(f.retaIdx)) > etaGrowth*float64(len(f.lidx)+len(f.uidx)+f.m))
}

// numUpdates returns the number of updates since factorisation.
func (f *factor) numUpdates() int { return len(f.newRow) }

// pivot returns the pivot row, position and diagonal of step k (of the
// factorisation below m, of an update from m on).
func (f *factor) pivot(k int) (row, pos int, diag float64) {
	if k < f.m {
		return f.pivRow[k], f.pivCol[k], f.diag[k]
	}
	n := k - f.m
	return f.newRow[n], f.newPos[n], f.newDiag[n]
}

// own makes dead, ownRow and ownCol this factor's own and sets them up at
// the first update.
func (f *factor) own() {
	m := f.m
	if len(f.ownRow) == 0 {
		if !f.ftOwned {
			// Empty, but perhaps over the arrays of another factor.
			f.dead, f.ownRow, f.ownCol = nil, nil, nil
		}
		f.dead = zeroed(f.dead, m+refactorEvery+1)
		f.ownRow = reuse(f.ownRow, m)[:m]
		f.ownCol = reuse(f.ownCol, m)[:m]
		for k, r := range f.pivRow {
			f.ownRow[r] = k
			f.ownCol[f.pivCol[k]] = k
		}
		f.ftOwned = true
		return
	}
	if !f.ftOwned {
		f.dead = append([]bool(nil), f.dead...)
		f.ownRow = append([]int(nil), f.ownRow...)
		f.ownCol = append([]int(nil), f.ownCol...)
		f.ftOwned = true
	}
}

// rowEtas applies the row etas to b (indexed by rows), oldest first.
func (f *factor) rowEtas(b []float64) {
	for e, r := range f.retaRow {
		v := b[r]
		for q := f.retaStart[e]; q < f.retaStart[e+1]; q++ {
			v -= f.retaVal[q] * b[f.retaIdx[q]]
		}
		b[r] = v
	}
}

// rowEtasT applies the row etas transposed to w (indexed by rows), newest
// first, and appends to *rows (when not nil) the rows they write.
func (f *factor) rowEtasT(w []float64, rows *[]int) {
	for e := len(f.retaRow) - 1; e >= 0; e-- {
		v := w[f.retaRow[e]]
		if v == 0 {
			continue
		}
		for q := f.retaStart[e]; q < f.retaStart[e+1]; q++ {
			i := f.retaIdx[q]
			w[i] -= f.retaVal[q] * v
			if rows != nil {
				*rows = append(*rows, i)
			}
		}
	}
}

// keepDense keeps the nonzeros of b (indexed by rows) as the spike.
func (f *factor) keepDense(b []float64) {
	sp := f.spike
	sp.idx, sp.val = sp.idx[:0], sp.val[:0]
	for i, v := range b {
		if v != 0 {
			sp.idx = append(sp.idx, i)
			sp.val = append(sp.val, v)
		}
	}
	f.spikeOK = true
}

// saveNew returns the values of d (indexed by positions) at the positions
// of the updates' steps, before the Uᵀ pass of the factorisation's steps
// writes into them (their columns there are no longer in the basis).
func (f *factor) saveNew(d []float64) []float64 {
	sp := f.spike
	sp.saved = sp.saved[:0]
	for _, p := range f.newPos {
		sp.saved = append(sp.saved, d[p])
	}
	return sp.saved
}

// btranNew is the Uᵀ pass over the updates' steps, in order, after that of
// the factorisation's: each takes its value at its position (saved) less
// its spike against w. It appends to *rows (when not nil) the rows it
// writes.
func (f *factor) btranNew(saved, w []float64, rows *[]int) {
	for n, r := range f.newRow {
		if f.dead[f.m+n] {
			continue
		}
		v := saved[n]
		for q := f.spkStart[n]; q < f.spkStart[n+1]; q++ {
			v -= f.spkVal[q] * w[f.spkIdx[q]]
		}
		if v == 0 {
			continue
		}
		w[r] = v / f.newDiag[n]
		if rows != nil {
			*rows = append(*rows, r)
		}
	}
}

// ftranEntering is ftranSparse for the column entering the basis: it keeps
// the spike for the update that follows.
func (f *factor) ftranEntering(b []float64, nz []int) []int {
	f.keepSpike = true
	list := f.ftranSparse(b, nz)
	f.keepSpike = false
	return list
}

// update replaces the column at position p by the entering column whose
// spike the last ftranEntering kept; alphaP is that column's B⁻¹ entry at
// p (the pivot). It reports false, leaving the factor unchanged, when no
// spike is kept, the updates are full, or the new diagonal disagrees with
// alphaP times the old one (the determinant's change) beyond
// pivotMismatchTol: the caller should factorise afresh. Cost O(m) for the
// scan of the later steps, plus the nonzeros of the U rows and spikes met.
func (f *factor) update(p int, alphaP float64) bool {
	if !f.spikeOK || len(f.newRow) >= refactorEvery {
		f.spikeOK = false
		return false
	}
	f.spikeOK = false
	f.own()
	m := f.m
	sp := f.spike
	k := f.ownCol[p]
	r, _, diagK := f.pivot(k)
	// coef: row r and minus the multipliers of the rows found so far.
	coef := f.work2
	coef[r] = 1
	rows := append(sp.rows[:0], r)
	start := len(f.retaIdx)
	addEta := func(i int, mu float64) {
		f.retaIdx = append(f.retaIdx, i)
		f.retaVal = append(f.retaVal, mu)
		coef[i] = -mu
		rows = append(rows, i)
	}
	if k < m && f.ustart[k] < f.ustart[k+1] {
		// Row r's entries in the factorisation's columns still in the
		// basis, eliminated in step order with the U rows of the later
		// steps (w by positions; left holds its nonzeros).
		w := f.work
		left := 0
		for q := f.ustart[k]; q < f.ustart[k+1]; q++ {
			if c := f.uidx[q]; f.ownCol[c] < m {
				w[c] = f.uval[q]
				left++
			}
		}
		for k2 := k + 1; k2 < m && left > 0; k2++ {
			c := f.pivCol[k2]
			v := w[c]
			if v == 0 {
				continue
			}
			w[c] = 0
			left--
			mu := v / f.diag[k2]
			addEta(f.pivRow[k2], mu)
			for q := f.ustart[k2]; q < f.ustart[k2+1]; q++ {
				if c := f.uidx[q]; f.ownCol[c] < m {
					if w[c] == 0 {
						left++
					}
					w[c] -= mu * f.uval[q]
				}
			}
		}
		clear(w) // cancellations may leave entries the count missed
	}
	// The updates' columns after step k: row r's entry, less the
	// multiples taken so far, is the spike against coef.
	first := 0
	if k >= m {
		first = k - m + 1
	}
	for n := first; n < len(f.newRow); n++ {
		if f.dead[m+n] {
			continue
		}
		v := 0.0
		for q := f.spkStart[n]; q < f.spkStart[n+1]; q++ {
			v += coef[f.spkIdx[q]] * f.spkVal[q]
		}
		if v != 0 {
			addEta(f.newRow[n], v/f.newDiag[n])
		}
	}
	d := 0.0
	for t, i := range sp.idx {
		d += coef[i] * sp.val[t]
	}
	for _, i := range rows {
		coef[i] = 0
	}
	sp.rows = rows[:0]
	want := alphaP * diagK
	if math.Abs(d) < luAbsPivotTol || math.Abs(d-want) > pivotMismatchTol*math.Abs(want) {
		f.retaIdx, f.retaVal = f.retaIdx[:start], f.retaVal[:start]
		return false
	}
	f.retaRow = append(f.retaRow, r)
	f.retaStart = append(f.retaStart, len(f.retaIdx))
	n := len(f.newRow)
	f.newRow = append(f.newRow, r)
	f.newPos = append(f.newPos, p)
	f.newDiag = append(f.newDiag, d)
	for t, i := range sp.idx {
		if i != r {
			f.spkIdx = append(f.spkIdx, i)
			f.spkVal = append(f.spkVal, sp.val[t])
		}
	}
	f.spkStart = append(f.spkStart, len(f.spkIdx))
	f.dead[k] = true
	f.ownRow[r] = m + n
	f.ownCol[p] = m + n
	return true
}

// clipUpdates gives the update arrays of a copy of a saved factor their
// length as capacity, so that the copy's updates cannot overwrite what
// another copy still refers to, and marks dead, ownRow and ownCol shared.
func (f *factor) clipUpdates() {
	f.newRow = f.newRow[:len(f.newRow):len(f.newRow)]
	f.newPos = f.newPos[:len(f.newPos):len(f.newPos)]
	f.newDiag = f.newDiag[:len(f.newDiag):len(f.newDiag)]
	f.spkStart = f.spkStart[:len(f.spkStart):len(f.spkStart)]
	f.spkIdx = f.spkIdx[:len(f.spkIdx):len(f.spkIdx)]
	f.spkVal = f.spkVal[:len(f.spkVal):len(f.spkVal)]
	f.retaRow = f.retaRow[:len(f.retaRow):len(f.retaRow)]
	f.retaStart = f.retaStart[:len(f.retaStart):len(f.retaStart)]
	f.retaIdx = f.retaIdx[:len(f.retaIdx):len(f.retaIdx)]
	f.retaVal = f.retaVal[:len(f.retaVal):len(f.retaVal)]
	f.ftOwned, f.spikeOK = false, false
}
