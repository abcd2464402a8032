package lp

import (
	"math"
	"slices"
)

// Factorisation constants.
const (
	// luAbsPivotTol is the smallest |pivot| the LU accepts; a column with
	// no larger entry is treated as dependent (common practice: 1e-10).
	luAbsPivotTol = 1e-10
	// luThreshold: a kernel pivot must be at least this fraction of the
	// largest entry of its column (threshold partial pivoting; common
	// practice 0.1).
	luThreshold = 0.1
	// luSearchCols is how many columns of smallest count the Markowitz
	// search examines before taking its best candidate.
	luSearchCols = 4
)

// factor is a sparse LU factorisation of a basis matrix B (m×m) with
// Forrest–Tomlin updates (factor_update.go). Rows of B are constraint
// rows; columns are basis positions.
//
// Elimination step k pivots on (pivRow[k], pivCol[k]): the multiples
// lval[...] of row pivRow[k] are subtracted from rows lidx[...] (the L
// part), and what remains of row pivRow[k] is U row k: diagonal diag[k] and
// entries uidx/uval in columns pivoted later. Storage is proportional to
// the nonzeros of L and U.
type factor struct {
	m      int
	pivRow []int
	pivCol []int
	diag   []float64
	lstart []int
	lidx   []int
	lval   []float64
	ustart []int
	uidx   []int
	uval   []float64
	// Copies for solves that skip zeros: U by columns (step k' lists the
	// rows pivRow[k] of earlier steps k with an entry in column pivCol[k'])
	// and L by rows (for row i, the steps whose multipliers touch it).
	ucStart []int
	ucRow   []int
	ucVal   []float64
	ltStart []int
	ltRow   []int // pivRow of the step
	ltVal   []float64
	// The steps each dense pass must visit in order, and those it may do
	// last in any order (they read values no later step changes and change
	// none): most steps of a basis with many slacks have no L or U entries,
	// and walking them in the main loops costs more than their arithmetic.
	lSteps  []int // steps with an L column (ftran L pass)
	ucSteps []int // steps with a U column (ftran U pass)
	uSteps  []int // steps with a U row (btran Uᵀ pass)
	ltSteps []int // steps whose pivot row has Lᵀ entries (btran Lᵀ pass)
	// The steps without entries in the U pass at hand: those whose pivot is
	// a power of two (most are slacks, pivot −1) multiply by its exact
	// inverse, which costs a fraction of a division; the others divide.
	ucScale, uScale []scaleStep
	ucTriv, uTriv   []int

	// Forrest–Tomlin updates (factor_update.go). Update n adds elimination
	// step m+n, pivoting on row newRow[n] and position newPos[n] with
	// diagonal newDiag[n]; its U column (the spike, off the diagonal) is
	// spkIdx/spkVal (rows) over spkStart[n]…spkStart[n+1]. Row eta n
	// (retaRow, retaStart, retaIdx, retaVal) subtracts from row retaRow[n]
	// the multiples retaVal of rows retaIdx. The step replaced is dead; the
	// current step of each row and position is ownRow and ownCol. dead,
	// ownRow and ownCol are empty until the first update and may be
	// shared with a saved State (ftOwned false): they are copied before a
	// write.
	newRow, newPos     []int
	newDiag            []float64
	spkStart, spkIdx   []int
	spkVal             []float64
	retaRow, retaStart []int
	retaIdx            []int
	retaVal            []float64
	dead               []bool
	ownRow, ownCol     []int
	ftOwned            bool
	// The spike of the entering column (L⁻¹ and the row etas applied),
	// kept by the solve that keepSpike asks for and used by the next
	// update; scratch shared by a factor and its copies.
	keepSpike, spikeOK bool
	spike              *spikeScratch

	work  []float64 // zero between solves
	work2 []float64 // zero between uses (update)

	// shared: a saved State refers to this factor's arrays, which a new
	// factorisation must therefore not take over (luScratch.spare).
	shared bool

	// For the hyper-sparse solves (factor_sparse.go): the elimination step
	// of each row and position, and shared scratch.
	stepOfRow, stepOfCol []int
	gL, gU, gUt, gLt     stepGraph
	sc                   *sparseScratch
}

// scaleStep is an elimination step without L or U entries in the pass at
// hand whose pivot has an exact inverse: the pass sets the value at row
// (btran) or position (ftran) from the other index times inv.
type scaleStep struct {
	k, row, col int
	inv         float64
}

// exactInverse reports whether 1/d is exact (d a power of two), so that
// x*(1/d) equals x/d for every x.
func exactInverse(d float64) bool {
	frac, _ := math.Frexp(d)
	return frac == 0.5 || frac == -0.5
}

// column returns the entries of basis column p.
type columnFunc func(p int) (idx []int, val []float64)

// factorize computes an LU factorisation of the m×m matrix whose columns
// col(0), …, col(m−1) are given. It returns the factor and the positions of
// columns found dependent together with rows left without a pivot (equal
// in number); when that list is non-empty the factor is not usable and the
// caller should replace those columns with the slacks of those rows and
// factorise again. Cost: near O(nonzeros) for triangular bases, Markowitz
// elimination with threshold pivoting on the remaining kernel.
func factorize(m int, col columnFunc) (f *factor, badCols, freeRows []int) {
	return factorizeWith(nil, m, col)
}

// luScratch is the work space of factorizeWith, kept between
// factorisations of one solver so that they do not allocate it anew. No
// factor refers to it.
type luScratch struct {
	rowIdx, colRows                  [][]int
	rowVal                           [][]float64
	rowCount, idxStore               []int
	valStore                         []float64
	colStart, colStore               []int // the basis by columns, read once
	colVal                           []float64
	rowDone, colDone, exact          []bool
	head, next, prev, inBucket, mark []int
	rowSingles, stepOf               []int
	// spare, when set, is a factor no longer in use (and not shared with a
	// saved State): the next factorisation takes over its arrays instead
	// of allocating its own (on the 50-site relaxation the factors
	// allocated 2.4 GB in 24,294 iterations).
	spare *factor
}

// factorizeWith is factorize using the work space sc (nil: its own).
func factorizeWith(sc *luScratch, m int, col columnFunc) (f *factor, badCols, freeRows []int) {
	if sc == nil {
		sc = &luScratch{}
	}
	old := sc.spare
	sc.spare = nil
	if old == nil {
		old = &factor{}
	}
	f = &factor{m: m, work: zeroed(old.work, m)}
	rowIdx := resize(sc.rowIdx, m)
	rowVal := resize(sc.rowVal, m)
	colRows := resize(sc.colRows, m)
	sc.rowIdx, sc.rowVal, sc.colRows = rowIdx, rowVal, colRows
	// Read each basis column once, into one array by columns, counting
	// the entries of each row; then carve the rows out of shared arrays,
	// each with exactly its length as capacity (only rows and columns that
	// fill in grow), and fill them from the column array in order.
	rowCount := resize(sc.rowCount, m)
	clear(rowCount)
	sc.rowCount = rowCount
	colStart := resize(sc.colStart, m+1)
	colStore, colVal := sc.colStore[:0], sc.colVal[:0]
	for p := 0; p < m; p++ {
		colStart[p] = len(colStore)
		idx, val := col(p)
		for k, i := range idx {
			if v := val[k]; v != 0 {
				rowCount[i]++
				colStore = append(colStore, i)
				colVal = append(colVal, v)
			}
		}
	}
	nnz := len(colStore)
	colStart[m] = nnz
	sc.colStart, sc.colStore, sc.colVal = colStart, colStore, colVal
	idxStore := resize(sc.idxStore, nnz)
	valStore := resize(sc.valStore, nnz)
	sc.idxStore, sc.valStore = idxStore, valStore
	at := 0
	for i, c := range rowCount {
		rowIdx[i] = idxStore[at : at : at+c]
		rowVal[i] = valStore[at : at : at+c]
		at += c
	}
	for p := 0; p < m; p++ {
		a, b := colStart[p], colStart[p+1]
		for q := a; q < b; q++ {
			i := colStore[q]
			rowIdx[i] = append(rowIdx[i], p)
			rowVal[i] = append(rowVal[i], colVal[q])
		}
		colRows[p] = colStore[a:b:b]
	}
	rowDone := resize(sc.rowDone, m)
	colDone := resize(sc.colDone, m)
	clear(rowDone)
	clear(colDone)
	sc.rowDone, sc.colDone = rowDone, colDone

	// Column count buckets as doubly linked lists.
	head := resize(sc.head, m+2)
	for c := range head {
		head[c] = -1
	}
	next := resize(sc.next, m)
	prev := resize(sc.prev, m)
	inBucket := resize(sc.inBucket, m)
	sc.head, sc.next, sc.prev, sc.inBucket = head, next, prev, inBucket
	link := func(c int) {
		k := len(colRows[c])
		if k > m+1 {
			k = m + 1
		}
		inBucket[c] = k
		prev[c] = -1
		next[c] = head[k]
		if head[k] >= 0 {
			prev[head[k]] = c
		}
		head[k] = c
	}
	unlink := func(c int) {
		k := inBucket[c]
		if prev[c] >= 0 {
			next[prev[c]] = next[c]
		} else {
			head[k] = next[c]
		}
		if next[c] >= 0 {
			prev[next[c]] = prev[c]
		}
	}
	for c := 0; c < m; c++ {
		link(c)
	}
	rowSingles := sc.rowSingles[:0]
	defer func() { sc.rowSingles = rowSingles[:0] }()
	for i := 0; i < m; i++ {
		if len(rowIdx[i]) == 1 {
			rowSingles = append(rowSingles, i)
		}
	}
	mark := resize(sc.mark, m) // position+1 of a column in the row being updated
	clear(mark)
	sc.mark = mark
	// Every step adds one entry to these; L and U start with room for
	// the basis' own nonzeros.
	f.pivRow = reuse(old.pivRow, m)
	f.pivCol = reuse(old.pivCol, m)
	f.diag = reuse(old.diag, m)
	f.lstart = append(reuse(old.lstart, m+1), 0)
	f.ustart = append(reuse(old.ustart, m+1), 0)
	f.lidx = reuse(old.lidx, 0)
	f.lval = reuse(old.lval, 0)
	f.uidx = reuse(old.uidx, nnz)
	f.uval = reuse(old.uval, nnz)

	removeFromCol := func(c, r int) {
		rs := colRows[c]
		for k, i := range rs {
			if i == r {
				rs[k] = rs[len(rs)-1]
				colRows[c] = rs[:len(rs)-1]
				break
			}
		}
		if !colDone[c] {
			unlink(c)
			link(c)
		}
	}

	eliminate := func(r, c int) {
		// Find the pivot value in row r.
		var piv float64
		for k, j := range rowIdx[r] {
			if j == c {
				piv = rowVal[r][k]
				break
			}
		}
		f.pivRow = append(f.pivRow, r)
		f.pivCol = append(f.pivCol, c)
		f.diag = append(f.diag, piv)
		colDone[c] = true
		unlink(c)
		rowDone[r] = true
		for k, j := range rowIdx[r] {
			if j == c {
				continue
			}
			f.uidx = append(f.uidx, j)
			f.uval = append(f.uval, rowVal[r][k])
			removeFromCol(j, r)
		}
		f.ustart = append(f.ustart, len(f.uidx))
		for _, i := range colRows[c] {
			if i == r {
				continue
			}
			// Take column c out of row i, remembering its value.
			ri, rv := rowIdx[i], rowVal[i]
			var aic float64
			for k, j := range ri {
				if j == c {
					aic = rv[k]
					last := len(ri) - 1
					ri[k], rv[k] = ri[last], rv[last]
					ri, rv = ri[:last], rv[:last]
					break
				}
			}
			l := aic / piv
			f.lidx = append(f.lidx, i)
			f.lval = append(f.lval, l)
			for k, j := range ri {
				mark[j] = k + 1
			}
			for k, j := range rowIdx[r] {
				if j == c {
					continue
				}
				v := -l * rowVal[r][k]
				if q := mark[j]; q > 0 {
					rv[q-1] += v
				} else {
					ri = append(ri, j)
					rv = append(rv, v)
					mark[j] = len(ri)
					colRows[j] = append(colRows[j], i)
					unlink(j)
					link(j)
				}
			}
			for _, j := range ri {
				mark[j] = 0
			}
			rowIdx[i], rowVal[i] = ri, rv
			if len(ri) == 1 {
				rowSingles = append(rowSingles, i)
			}
		}
		colRows[c] = nil
		f.lstart = append(f.lstart, len(f.lidx))
	}

	for step := 0; step < m; step++ {
		// 1. Column singletons: no elimination, no fill.
		if c := head[1]; c >= 0 {
			r := colRows[c][0]
			var v float64
			for k, j := range rowIdx[r] {
				if j == c {
					v = rowVal[r][k]
				}
			}
			if math.Abs(v) >= luAbsPivotTol {
				eliminate(r, c)
				continue
			}
		}
		// 2. Row singletons: eliminate their column from the other rows
		// without fill.
		done := false
		for len(rowSingles) > 0 && !done {
			r := rowSingles[len(rowSingles)-1]
			rowSingles = rowSingles[:len(rowSingles)-1]
			if rowDone[r] || len(rowIdx[r]) != 1 {
				continue
			}
			if math.Abs(rowVal[r][0]) >= luAbsPivotTol {
				eliminate(r, rowIdx[r][0])
				done = true
			}
		}
		if done {
			continue
		}
		// 3. Markowitz search with threshold pivoting.
		bestR, bestC, bestCost := -1, -1, math.MaxInt
		searched := 0
		for k := 1; k <= m+1 && searched < luSearchCols; k++ {
			for c := head[k]; c >= 0 && searched < luSearchCols; c = next[c] {
				searched++
				colMax := 0.0
				for _, i := range colRows[c] {
					for q, j := range rowIdx[i] {
						if j == c {
							colMax = math.Max(colMax, math.Abs(rowVal[i][q]))
						}
					}
				}
				if colMax < luAbsPivotTol {
					continue
				}
				for _, i := range colRows[c] {
					for q, j := range rowIdx[i] {
						if j != c {
							continue
						}
						a := math.Abs(rowVal[i][q])
						if a < luThreshold*colMax || a < luAbsPivotTol {
							continue
						}
						cost := (len(rowIdx[i]) - 1) * (len(colRows[c]) - 1)
						if cost < bestCost {
							bestR, bestC, bestCost = i, c, cost
						}
					}
				}
			}
			if bestR >= 0 {
				break
			}
		}
		if bestR < 0 {
			// Examine every remaining column before declaring singularity.
			for c := 0; c < m; c++ {
				if colDone[c] {
					continue
				}
				for _, i := range colRows[c] {
					for q, j := range rowIdx[i] {
						if j == c && math.Abs(rowVal[i][q]) >= luAbsPivotTol {
							bestR, bestC = i, c
						}
					}
				}
			}
		}
		if bestR < 0 {
			break
		}
		eliminate(bestR, bestC)
	}
	if len(f.pivRow) < m {
		for c := 0; c < m; c++ {
			if !colDone[c] {
				badCols = append(badCols, c)
			}
		}
		for i := 0; i < m; i++ {
			if !rowDone[i] {
				freeRows = append(freeRows, i)
			}
		}
		return nil, badCols, freeRows
	}
	f.startUpdates(old)
	f.transpose(sc, old)
	return f, nil, nil
}

// reuse returns v emptied when its capacity holds n elements, else a new
// empty slice with room for a quarter more (as resize).
func reuse[T any](v []T, n int) []T {
	if cap(v) >= n {
		return v[:0]
	}
	return make([]T, 0, n+n/4)
}

// zeroed returns v (or a new slice, when its capacity is short) with
// length n, all zero.
func zeroed[T any](v []T, n int) []T {
	v = reuse(v, n)[:n]
	clear(v)
	return v
}

// transpose builds the column copy of U and the row copy of L, with work
// space sc, in the arrays of the factor old (no longer in use) where they
// are large enough. Cost O(nonzeros of L and U).
func (f *factor) transpose(sc *luScratch, old *factor) {
	m := f.m
	stepOf := resize(sc.stepOf, m)
	sc.stepOf = stepOf
	for k, c := range f.pivCol {
		stepOf[c] = k
	}
	f.ucStart = zeroed(old.ucStart, m+1)
	for _, j := range f.uidx {
		f.ucStart[stepOf[j]+1]++
	}
	for k := 0; k < m; k++ {
		f.ucStart[k+1] += f.ucStart[k]
	}
	f.ucRow = reuse(old.ucRow, len(f.uidx))[:len(f.uidx)]
	f.ucVal = reuse(old.ucVal, len(f.uidx))[:len(f.uidx)]
	next := append(sc.next[:0], f.ucStart[:m]...)
	for k := 0; k < m; k++ {
		for p := f.ustart[k]; p < f.ustart[k+1]; p++ {
			q := stepOf[f.uidx[p]]
			f.ucRow[next[q]] = f.pivRow[k]
			f.ucVal[next[q]] = f.uval[p]
			next[q]++
		}
	}
	f.ltStart = zeroed(old.ltStart, m+1)
	for _, i := range f.lidx {
		f.ltStart[i+1]++
	}
	for i := 0; i < m; i++ {
		f.ltStart[i+1] += f.ltStart[i]
	}
	f.ltRow = reuse(old.ltRow, len(f.lidx))[:len(f.lidx)]
	f.ltVal = reuse(old.ltVal, len(f.lidx))[:len(f.lidx)]
	next = append(next[:0], f.ltStart[:m]...)
	for k := 0; k < m; k++ {
		for p := f.lstart[k]; p < f.lstart[k+1]; p++ {
			i := f.lidx[p]
			f.ltRow[next[i]] = f.pivRow[k]
			f.ltVal[next[i]] = f.lval[p]
			next[i]++
		}
	}
	f.initSparse(old)
	// Sort the steps of each pass: those with entries, and for the U
	// passes those without entries whose pivot has an exact inverse and
	// the others. Counted first, so that each list is allocated once at
	// its size (growing them by appending allocated more than the factor).
	var nL, nLt, nUc, nU, nUcScale, nUScale int
	exact := zeroed(sc.exact, m) // by step: the pivot has an exact inverse
	sc.exact = exact
	for k, r := range f.pivRow {
		exact[k] = exactInverse(f.diag[k])
		nL += b2i(f.lstart[k] < f.lstart[k+1])
		nLt += b2i(f.ltStart[r] < f.ltStart[r+1])
		uc, u := f.ucStart[k] < f.ucStart[k+1], f.ustart[k] < f.ustart[k+1]
		nUc += b2i(uc)
		nU += b2i(u)
		nUcScale += b2i(!uc && exact[k])
		nUScale += b2i(!u && exact[k])
	}
	f.lSteps, f.ltSteps = reuse(old.lSteps, nL), reuse(old.ltSteps, nLt)
	f.ucSteps, f.uSteps = reuse(old.ucSteps, nUc), reuse(old.uSteps, nU)
	f.ucScale, f.uScale = reuse(old.ucScale, nUcScale), reuse(old.uScale, nUScale)
	f.ucTriv, f.uTriv = reuse(old.ucTriv, m-nUc-nUcScale), reuse(old.uTriv, m-nU-nUScale)
	// place files step k of a U pass under the steps with entries, the
	// exact scalings or the divisions.
	place := func(k int, entries bool, steps, triv *[]int, scale *[]scaleStep) {
		switch {
		case entries:
			*steps = append(*steps, k)
		case exact[k]:
			*scale = append(*scale, scaleStep{k, f.pivRow[k], f.pivCol[k], 1 / f.diag[k]})
		default:
			*triv = append(*triv, k)
		}
	}
	for k, r := range f.pivRow {
		if f.lstart[k] < f.lstart[k+1] {
			f.lSteps = append(f.lSteps, k)
		}
		if f.ltStart[r] < f.ltStart[r+1] {
			f.ltSteps = append(f.ltSteps, k)
		}
		place(k, f.ucStart[k] < f.ucStart[k+1], &f.ucSteps, &f.ucTriv, &f.ucScale)
		place(k, f.ustart[k] < f.ustart[k+1], &f.uSteps, &f.uTriv, &f.uScale)
	}
}

// b2i is 1 for true and 0 for false.
func b2i(b bool) int {
	if b {
		return 1
	}
	return 0
}

// ftran solves B·x = b in place: on entry b is indexed by rows, on return
// by basis positions. Cost O(m + nonzeros of L, U and the updates).
func (f *factor) ftran(b []float64) {
	f.ftranL(b)
	if f.keepSpike {
		f.keepDense(b)
	}
	f.ftranU(b, f.m+len(f.newRow), f.work)
}

// ftranAside is ftran with its own work space out (zero on entry, left
// zero) and no spike kept: it only reads the factor, so it may run on
// another goroutine beside this factor's other solves, as long as nothing
// updates or replaces the factor meanwhile.
func (f *factor) ftranAside(b, out []float64) {
	f.ftranL(b)
	f.ftranU(b, f.m+len(f.newRow), out)
}

// ftranL is ftran's L pass and the row etas.
func (f *factor) ftranL(b []float64) {
	for _, k := range f.lSteps {
		br := b[f.pivRow[k]]
		if br == 0 {
			continue
		}
		for p := f.lstart[k]; p < f.lstart[k+1]; p++ {
			b[f.lidx[p]] -= f.lval[p] * br
		}
	}
	f.rowEtas(b)
}

// ftranU is ftran after its L pass and the row etas: the U pass, the
// steps of the updates first (latest first), then those of the
// factorisation, into the work space out. The steps from below on (none
// when below is the number of steps) are done already: their values are
// in out and their rows of b unchanged. It leaves out zero.
func (f *factor) ftranU(b []float64, below int, out []float64) {
	m := f.m
	for n := min(below-m, len(f.newRow)) - 1; n >= 0; n-- {
		if f.dead[m+n] {
			continue
		}
		v := b[f.newRow[n]]
		if v == 0 {
			continue
		}
		v /= f.newDiag[n]
		out[f.newPos[n]] = v
		for q := f.spkStart[n]; q < f.spkStart[n+1]; q++ {
			b[f.spkIdx[q]] -= f.spkVal[q] * v
		}
	}
	steps := f.ucSteps
	if below < m {
		n, _ := slices.BinarySearch(steps, below)
		steps = steps[:n]
	}
	dead := f.dead
	for i := len(steps) - 1; i >= 0; i-- {
		k := steps[i]
		v := b[f.pivRow[k]]
		if v == 0 || len(dead) != 0 && dead[k] {
			continue
		}
		v /= f.diag[k]
		out[f.pivCol[k]] = v
		for p := f.ucStart[k]; p < f.ucStart[k+1]; p++ {
			b[f.ucRow[p]] -= f.ucVal[p] * v
		}
	}
	// Steps without a U column, in any order (a dead one's position
	// belongs to the update that replaced it).
	for _, k := range f.ucTriv {
		if len(dead) == 0 || !dead[k] {
			out[f.pivCol[k]] = b[f.pivRow[k]] / f.diag[k]
		}
	}
	for _, st := range f.ucScale {
		if len(dead) == 0 || !dead[st.k] {
			out[st.col] = b[st.row] * st.inv
		}
	}
	copy(b, out)
	clear(out)
}

// btran solves yᵀ·B = dᵀ in place: on entry d is indexed by basis
// positions, on return by rows. It takes the Uᵀ pass (the factorisation's
// steps, then the updates'), the row etas transposed, and the Lᵀ pass.
// Cost O(m + nonzeros of L, U and the updates).
func (f *factor) btran(d []float64) {
	w := f.work
	saved := f.saveNew(d)
	dead := f.dead
	for _, k := range f.uSteps {
		if len(dead) != 0 && dead[k] {
			continue
		}
		wr := d[f.pivCol[k]] / f.diag[k]
		w[f.pivRow[k]] = wr
		if wr == 0 {
			continue
		}
		for p := f.ustart[k]; p < f.ustart[k+1]; p++ {
			d[f.uidx[p]] -= wr * f.uval[p]
		}
	}
	for _, k := range f.uTriv {
		if len(dead) == 0 || !dead[k] {
			w[f.pivRow[k]] = d[f.pivCol[k]] / f.diag[k]
		}
	}
	for _, st := range f.uScale {
		if len(dead) == 0 || !dead[st.k] {
			w[st.row] = d[st.col] * st.inv
		}
	}
	f.btranNew(saved, w, nil)
	f.rowEtasT(w, nil)
	f.btranFromL(d, f.m)
}

// btranFromL is btran after the Uᵀ pass (its result in f.work): the Lᵀ
// pass, then the result moves to d. The steps from below on (none when
// below is m) are done already. It leaves f.work zero.
func (f *factor) btranFromL(d []float64, below int) {
	w := f.work
	steps := f.ltSteps
	if below < f.m {
		n, _ := slices.BinarySearch(steps, below)
		steps = steps[:n]
	}
	for i := len(steps) - 1; i >= 0; i-- {
		r := f.pivRow[steps[i]]
		v := w[r]
		if v == 0 {
			continue
		}
		for p := f.ltStart[r]; p < f.ltStart[r+1]; p++ {
			w[f.ltRow[p]] -= f.ltVal[p] * v
		}
	}
	copy(d, w)
	clear(w)
}
