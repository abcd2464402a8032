package lp

import (
	"math/bits"
	"slices"
)

// Hyper-sparse solves. On the planning models most right-hand sides of
// FTRAN and BTRAN have a handful of nonzeros among thousands of rows (a
// column of A, a unit vector), and so have most results: a solve that walks
// every elimination step spends its time skipping zeros. The sparse solves
// below first find, symbolically, the steps the right-hand side can reach
// (Gilbert and Peierls, SIAM J. Sci. Stat. Comput. 9(5), 1988: the nonzeros
// of the solution of a triangular system are the nodes reachable from the
// nonzeros of the right-hand side), then do the arithmetic on those steps
// alone, in elimination order. The result is the same, operation for
// operation, as the dense solve's, since the dense solve skips exactly the
// steps whose value is zero.
//
// The second pass of each solve (the U pass of FTRAN, the Lᵀ pass of
// BTRAN) is driven by the values instead: a heap hands out the pending
// steps latest first, and a step whose value has cancelled to zero reaches
// nothing. On the network rows of the planning models cancellation is the
// rule: on the 50-site case the symbolic reach of the U pass overflowed
// for entering columns whose result had a median of 26 nonzeros in 23,826.
const (
	// hyperInShare: a right-hand side with more nonzeros than this share of
	// the rows is solved densely.
	hyperInShare = 0.05
	// hyperReachShare: when the steps reached (symbolically in the first
	// pass, by a nonzero update in the second) exceed this share of the
	// rows, the dense solve takes over from where the sparse one stands.
	// Measured on the 50-site root LP (23,826 rows; the same pivots at
	// every value): 0.10 took 21–23 s, 0.05 21–23 s, 0.02 19–20 s; and
	// on M at 300 nodes 0.02 took 27 s against 29–30 s for 0.10.
	hyperReachShare = 0.02
	// hyperMinRows: bases with fewer rows are always solved densely; their
	// dense solves are cheap, and the symbolic work did not pay on the
	// synthetic S case (1022 rows: 5 to 10 % more CPU), while it did on M
	// (5061 rows) and L (23212 rows).
	hyperMinRows = 2000
)

// sparseScratch is the work space of the hyper-sparse solves, shared by a
// factor and its copies (one solver uses them at a time; its aside
// solve, the one piece on another goroutine, is dense and does not).
type sparseScratch struct {
	mark    []uint32 // mark[k] == gen: step k (or a position/row) is listed
	gen     uint32
	steps   []int
	stack   []int
	out     []int
	start   []int
	touched []int
	rows    []int
}

// nextGen starts a new marking round.
func (sc *sparseScratch) nextGen() uint32 {
	sc.gen++
	if sc.gen == 0 {
		clear(sc.mark)
		sc.gen = 1
	}
	return sc.gen
}

// stepGraph is a graph on elimination steps in compressed form: the
// successors of step k are adj[ptr[k]:ptr[k+1]], or, when byRow is set,
// adj[ptr[r]:ptr[r+1]] with r the pivot row of step k.
type stepGraph struct {
	ptr, adj []int
	byRow    bool
}

// initSparse builds the maps from rows and positions to elimination steps,
// the four step graphs of the sparse solves (the first passes walk gL and
// gUt; the second passes, driven by the values, read the steps of their
// entries from gU and gLt), and the scratch space.
// Called by transpose, with the factor old whose arrays it may take over;
// nothing for bases under hyperMinRows rows. Cost O(m + nonzeros of L and
// U).
func (f *factor) initSparse(old *factor) {
	m := f.m
	if m < hyperMinRows {
		return
	}
	f.stepOfRow = reuse(old.stepOfRow, m)[:m]
	f.stepOfCol = reuse(old.stepOfCol, m)[:m]
	for k := range f.pivRow {
		f.stepOfRow[f.pivRow[k]] = k
		f.stepOfCol[f.pivCol[k]] = k
	}
	mapped := func(idx, of, into []int) []int {
		out := reuse(into, len(idx))[:len(idx)]
		for p, i := range idx {
			out[p] = of[i]
		}
		return out
	}
	// ftran, L pass: step k updates the rows of its L column.
	f.gL = stepGraph{ptr: f.lstart, adj: mapped(f.lidx, f.stepOfRow, old.gL.adj)}
	// ftran, U pass: step k updates the rows of earlier steps in its U column.
	f.gU = stepGraph{ptr: f.ucStart, adj: mapped(f.ucRow, f.stepOfRow, old.gU.adj)}
	// btran, Uᵀ pass: step k updates the positions of U row k.
	f.gUt = stepGraph{ptr: f.ustart, adj: mapped(f.uidx, f.stepOfCol, old.gUt.adj)}
	// btran, Lᵀ pass: row pivRow[k] updates the pivot rows of the steps
	// whose multipliers touch it.
	f.gLt = stepGraph{ptr: f.ltStart, adj: mapped(f.ltRow, f.stepOfRow, old.gLt.adj), byRow: true}
	// Marks for steps (the updates' numbered from m on), rows and
	// positions.
	if old.sc != nil && len(old.sc.mark) == m+refactorEvery {
		f.sc = old.sc // its marks are older than its generation
	} else {
		f.sc = &sparseScratch{mark: make([]uint32, m+refactorEvery)}
	}
}

// reach lists in f.sc.steps the steps reachable in g from the start steps,
// sorted ascending. It reports false (leaving the list unusable) when more
// than limit steps are reached. Cost O(steps and edges reached), plus the
// ordering: a sort, or a scan of the marks when that is cheaper.
func (f *factor) reach(start []int, limit int, g *stepGraph) bool {
	sc := f.sc
	gen := sc.nextGen()
	mark := sc.mark
	steps := sc.steps[:0]
	stack := sc.stack[:0]
	for _, k := range start {
		if mark[k] != gen {
			mark[k] = gen
			steps = append(steps, k)
			stack = append(stack, k)
		}
	}
	for len(stack) > 0 && len(steps) <= limit {
		k := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		at := k
		if g.byRow {
			at = f.pivRow[k]
		}
		for _, q := range g.adj[g.ptr[at]:g.ptr[at+1]] {
			if mark[q] != gen {
				mark[q] = gen
				steps = append(steps, q)
				stack = append(stack, q)
			}
		}
	}
	sc.stack = stack[:0]
	if len(steps) > limit {
		sc.steps = steps[:0]
		return false
	}
	if n := len(steps); n*bits.Len(uint(n)) > f.m/4 {
		steps = steps[:0]
		for k, v := range mark {
			if v == gen {
				steps = append(steps, k)
			}
		}
	} else {
		slices.Sort(steps)
	}
	sc.steps = steps
	return true
}

// denseFromStart reports whether ftranSparse solves a right-hand side with
// nonzeros in the rows nz densely from the start: no hyper-sparse work
// space, or too many nonzeros. (It may still go dense later, when the
// solve reaches too many steps.)
func (f *factor) denseFromStart(nz []int) bool {
	return f.sc == nil || nz == nil || float64(len(nz)) > hyperInShare*float64(f.m)
}

// ftranSparse solves B·x = b in place like ftran, given the rows where b
// may be nonzero (nz; nil: anywhere). It returns the positions where x may be nonzero, or
// nil when it solved densely (then x may be nonzero anywhere). The list is
// valid until the next solve with this factor.
func (f *factor) ftranSparse(b []float64, nz []int) []int {
	m := f.m
	if f.denseFromStart(nz) {
		f.ftran(b)
		return nil
	}
	limit := int(hyperReachShare * float64(m))
	sc := f.sc
	// L pass: step k is touched when its pivot row is nonzero; its column
	// then reaches the rows lidx.
	start := sc.start[:0]
	defer func() { sc.start = start[:0] }()
	for _, r := range nz {
		start = append(start, f.stepOfRow[r])
	}
	if !f.reach(start, limit, &f.gL) {
		f.ftran(b)
		return nil
	}
	for _, k := range sc.steps {
		br := b[f.pivRow[k]]
		if br == 0 {
			continue
		}
		for p := f.lstart[k]; p < f.lstart[k+1]; p++ {
			b[f.lidx[p]] -= f.lval[p] * br
		}
	}
	updated := len(f.newRow) > 0
	if updated {
		// The row etas may make more rows nonzero: their steps join the
		// list (no longer sorted).
		f.rowEtas(b)
		for _, r := range f.retaRow {
			if k := f.stepOfRow[r]; b[r] != 0 && sc.mark[k] != sc.gen {
				sc.mark[k] = sc.gen
				sc.steps = append(sc.steps, k)
			}
		}
	}
	if f.keepSpike {
		sp := f.spike
		sp.idx, sp.val = sp.idx[:0], sp.val[:0]
		for _, k := range sc.steps {
			if i := f.pivRow[k]; b[i] != 0 {
				sp.idx = append(sp.idx, i)
				sp.val = append(sp.val, b[i])
			}
		}
		f.spikeOK = true
	}
	// U pass, latest step first: step k sends its value to the rows of
	// the earlier steps in its U column. The steps of the rows the L pass
	// reached are pending (with no updates, sorted ascending: reversed
	// they form a heap); b keeps the rows' values until the end, so that a
	// dense finish can take over.
	out := f.work // zero between solves
	gen := sc.nextGen()
	var heap, touched []int
	push := func(k int) {
		if sc.mark[k] != gen {
			sc.mark[k] = gen
			heap = pushMax(heap, k)
			touched = append(touched, k)
		}
	}
	if updated {
		heap, touched = sc.stack[:0], sc.touched[:0]
		for _, k := range sc.steps {
			if i := f.pivRow[k]; b[i] != 0 {
				push(f.ownRow[i])
			}
		}
	} else {
		heap, touched = f.pending(gen, b)
	}
	done := sc.steps[:0]
	adj := f.gU.adj
	dead := f.dead
	for len(heap) > 0 {
		var k int
		k, heap = popMax(heap)
		if len(touched) > limit {
			// Too many steps: finish densely below k.
			sc.stack, sc.touched, sc.steps = heap[:0], touched[:0], done[:0]
			f.ftranU(b, k+1, out)
			return nil
		}
		row, pos, diag := f.pivot(k)
		v := b[row]
		if v == 0 {
			continue
		}
		v /= diag
		out[pos] = v
		done = append(done, k)
		if k < m {
			for p := f.ucStart[k]; p < f.ucStart[k+1]; p++ {
				q := adj[p]
				if updated && dead[q] {
					continue // the row moved to an update's step: eliminated
				}
				b[f.ucRow[p]] -= f.ucVal[p] * v
				push(q)
			}
			continue
		}
		// An update's step: its spike reaches rows of earlier steps
		// (entries in rows now owned by later steps were eliminated by
		// their row etas).
		n := k - m
		for q := f.spkStart[n]; q < f.spkStart[n+1]; q++ {
			i := f.spkIdx[q]
			if o := f.ownRow[i]; o < k {
				b[i] -= f.spkVal[q] * v
				push(o)
			}
		}
	}
	for _, k := range touched {
		row, _, _ := f.pivot(k)
		b[row] = 0
	}
	sc.stack, sc.touched, sc.steps = heap[:0], touched[:0], done
	// List the positions.
	list := sc.out[:0]
	for _, k := range done {
		_, p, _ := f.pivot(k)
		b[p] = out[p]
		out[p] = 0
		list = append(list, p)
	}
	sc.out = list
	return list
}

// btranSparse solves yᵀ·B = dᵀ in place like btran, given the positions
// where d may be nonzero (nz; nil: anywhere). It returns the rows where y may be nonzero,
// or nil when it solved densely. The list is valid until the next solve
// with this factor.
func (f *factor) btranSparse(d []float64, nz []int) []int {
	m := f.m
	if f.sc == nil || nz == nil || float64(len(nz)+len(f.newRow)) > hyperInShare*float64(m) {
		f.btran(d)
		return nil
	}
	limit := int(hyperReachShare * float64(m))
	sc := f.sc
	updated := len(f.newRow) > 0
	start := sc.start[:0]
	defer func() { sc.start = start[:0] }()
	for _, p := range nz {
		k := f.stepOfCol[p]
		if updated {
			k = f.ownCol[p]
		}
		if k < m {
			start = append(start, k)
		}
	}
	// Uᵀ pass: step k reaches the later steps of the columns in U row k.
	if !f.reach(start, limit, &f.gUt) {
		f.btran(d)
		return nil
	}
	saved := f.saveNew(d)
	w := f.work // zero between solves
	dead := f.dead
	for _, k := range sc.steps {
		if updated && dead[k] {
			continue
		}
		c := f.pivCol[k]
		wr := d[c] / f.diag[k]
		d[c] = 0
		w[f.pivRow[k]] = wr
		if wr == 0 {
			continue
		}
		for p := f.ustart[k]; p < f.ustart[k+1]; p++ {
			d[f.uidx[p]] -= wr * f.uval[p]
		}
	}
	var extra []int // rows written outside the steps of the reach
	if updated {
		// The updates' steps, and the row etas. The Uᵀ pass wrote into
		// the updates' positions from entries no longer in the basis.
		for _, p := range f.newPos {
			d[p] = 0
		}
		extra = sc.rows[:0]
		f.btranNew(saved, w, &extra)
		f.rowEtasT(w, &extra)
	}
	// Lᵀ pass, latest step first: the row of step k sends its value to
	// the pivot rows of the earlier steps whose multipliers touch it.
	// Pending steps are the Uᵀ reach (sorted ascending, reversed a heap)
	// and the steps of the rows the updates wrote (L keeps the steps of
	// the factorisation).
	gen := sc.nextGen()
	heap, touched := f.pending(gen, w)
	for _, i := range extra {
		if k := f.stepOfRow[i]; sc.mark[k] != gen && w[i] != 0 {
			sc.mark[k] = gen
			heap = pushMax(heap, k)
			touched = append(touched, k)
		}
	}
	if updated {
		sc.rows = extra[:0]
	}
	adj := f.gLt.adj
	for len(heap) > 0 {
		var k int
		k, heap = popMax(heap)
		if len(touched) > limit {
			// Too many steps: finish densely below k.
			sc.stack, sc.touched = heap[:0], touched[:0]
			f.btranFromL(d, k+1)
			return nil
		}
		r := f.pivRow[k]
		v := w[r]
		if v == 0 {
			continue
		}
		for p := f.ltStart[r]; p < f.ltStart[r+1]; p++ {
			w[f.ltRow[p]] -= f.ltVal[p] * v
			if q := adj[p]; sc.mark[q] != gen {
				sc.mark[q] = gen
				heap = pushMax(heap, q)
				touched = append(touched, q)
			}
		}
	}
	// d is zero now (every nonzero position started a step of the reach
	// or is an update's). Move w to d.
	list := sc.out[:0]
	for _, k := range touched {
		r := f.pivRow[k]
		d[r] = w[r]
		w[r] = 0
		list = append(list, r)
	}
	sc.stack, sc.touched, sc.out = heap[:0], touched[:0], list
	return list
}

// pending returns the steps of sc.steps whose pivot row holds a nonzero
// in vals, marked with gen, as a max-heap (the list is ascending, so
// reversed it is one) and as the start of the list of touched steps. A
// step left out is reached later if an update makes its row nonzero.
func (f *factor) pending(gen uint32, vals []float64) (heap, touched []int) {
	sc := f.sc
	heap, touched = sc.stack[:0], sc.touched[:0]
	for i := len(sc.steps) - 1; i >= 0; i-- {
		k := sc.steps[i]
		if vals[f.pivRow[k]] == 0 {
			continue
		}
		sc.mark[k] = gen
		heap = append(heap, k)
		touched = append(touched, k)
	}
	return heap, touched
}

// pushMax adds k to the max-heap h.
func pushMax(h []int, k int) []int {
	h = append(h, 0)
	i := len(h) - 1
	for i > 0 {
		up := (i - 1) / 2
		if h[up] >= k {
			break
		}
		h[i] = h[up]
		i = up
	}
	h[i] = k
	return h
}

// popMax removes and returns the largest element of the non-empty
// max-heap h.
func popMax(h []int) (int, []int) {
	top := h[0]
	last := h[len(h)-1]
	h = h[:len(h)-1]
	n := len(h)
	if n == 0 {
		return top, h
	}
	i := 0
	for {
		c := 2*i + 1
		if c >= n {
			break
		}
		if c+1 < n && h[c+1] > h[c] {
			c++
		}
		if last >= h[c] {
			break
		}
		h[i] = h[c]
		i = c
	}
	h[i] = last
	return top, h
}
