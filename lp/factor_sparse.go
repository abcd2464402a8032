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
const (
	// hyperInShare: a right-hand side with more nonzeros than this share of
	// the rows is solved densely.
	hyperInShare = 0.05
	// hyperReachShare: when the reachable steps exceed this share of the
	// rows, the symbolic phase gives up and the dense solve runs.
	hyperReachShare = 0.10
	// hyperMinRows: bases with fewer rows are always solved densely; their
	// dense solves are cheap, and the symbolic work did not pay on the
	// synthetic S case (1022 rows: 5 to 10 % more CPU), while it did on M
	// (5061 rows) and L (23212 rows).
	hyperMinRows = 2000
)

// sparseScratch is the work space of the hyper-sparse solves, shared by a
// factor and its copies (the solver is single-threaded).
type sparseScratch struct {
	mark  []uint32 // mark[k] == gen: step k (or a position/row) is listed
	gen   uint32
	steps []int
	stack []int
	out   []int
	start []int
	// Running shares of recent attempts whose reach overflowed, for the
	// ftran U pass and the btran Lᵀ pass; above overflowSkip the sparse
	// attempt is skipped (except every retryEvery-th call, to notice when
	// the vectors become sparse again).
	overU, overLt float64
	callsU        int
	callsLt       int
}

const (
	overflowDecay = 0.05
	overflowSkip  = 0.5
	retryEvery    = 16
)

// tryStage reports whether a stage with running overflow share *over and
// call counter *calls should attempt its sparse pass.
func tryStage(over *float64, calls *int) bool {
	*calls++
	return *over <= overflowSkip || *calls%retryEvery == 0
}

// noteStage records whether an attempted sparse pass overflowed.
func noteStage(over *float64, overflowed bool) {
	v := 0.0
	if overflowed {
		v = 1
	}
	*over += overflowDecay * (v - *over)
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
// the four step graphs the sparse solves walk, and the scratch space.
// Called by transpose; nothing for bases under hyperMinRows rows. Cost
// O(m + nonzeros of L and U).
func (f *factor) initSparse() {
	m := f.m
	if m < hyperMinRows {
		return
	}
	f.stepOfRow = make([]int, m)
	f.stepOfCol = make([]int, m)
	for k := range f.pivRow {
		f.stepOfRow[f.pivRow[k]] = k
		f.stepOfCol[f.pivCol[k]] = k
	}
	mapped := func(idx, of []int) []int {
		out := make([]int, len(idx))
		for p, i := range idx {
			out[p] = of[i]
		}
		return out
	}
	// ftran, L pass: step k updates the rows of its L column.
	f.gL = stepGraph{ptr: f.lstart, adj: mapped(f.lidx, f.stepOfRow)}
	// ftran, U pass: step k updates the rows of earlier steps in its U column.
	f.gU = stepGraph{ptr: f.ucStart, adj: mapped(f.ucRow, f.stepOfRow)}
	// btran, Uᵀ pass: step k updates the positions of U row k.
	f.gUt = stepGraph{ptr: f.ustart, adj: mapped(f.uidx, f.stepOfCol)}
	// btran, Lᵀ pass: row pivRow[k] updates the pivot rows of the steps
	// whose multipliers touch it.
	f.gLt = stepGraph{ptr: f.ltStart, adj: mapped(f.ltRow, f.stepOfRow), byRow: true}
	f.sc = &sparseScratch{mark: make([]uint32, m)}
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

// ftranSparse solves B·x = b in place like ftran, given the rows where b
// may be nonzero (nz; nil: anywhere). It returns the positions where x may be nonzero, or
// nil when it solved densely (then x may be nonzero anywhere). The list is
// valid until the next solve with this factor.
func (f *factor) ftranSparse(b []float64, nz []int) []int {
	m := f.m
	if f.sc == nil || nz == nil || float64(len(nz)) > hyperInShare*float64(m) {
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
	// U pass, backwards: step k reaches the earlier steps whose rows
	// have an entry in its column.
	if !tryStage(&sc.overU, &sc.callsU) {
		f.ftranU(b)
		return nil
	}
	start = append(start[:0], sc.steps...)
	ok := f.reach(start, limit, &f.gU)
	noteStage(&sc.overU, !ok)
	if !ok {
		f.ftranU(b)
		return nil
	}
	out := f.work // zero between solves
	steps := sc.steps
	for i := len(steps) - 1; i >= 0; i-- {
		k := steps[i]
		r := f.pivRow[k]
		v := b[r]
		b[r] = 0
		if v == 0 {
			continue
		}
		v /= f.diag[k]
		out[f.pivCol[k]] = v
		for p := f.ucStart[k]; p < f.ucStart[k+1]; p++ {
			b[f.ucRow[p]] -= f.ucVal[p] * v
		}
	}
	// The rows of the L pass outside the U reach are zero already (the U
	// reach contains every step of the L reach). List the positions.
	gen := sc.nextGen()
	list := sc.out[:0]
	for _, k := range steps {
		c := f.pivCol[k]
		sc.mark[c] = gen
		list = append(list, c)
	}
	for e, p := range f.etaPos {
		xp := out[p] / f.etaPiv[e]
		if xp != 0 {
			for q := f.etaStart[e]; q < f.etaStart[e+1]; q++ {
				i := f.etaIdx[q]
				out[i] -= f.etaVal[q] * xp
				if sc.mark[i] != gen {
					sc.mark[i] = gen
					list = append(list, i)
				}
			}
		}
		out[p] = xp
		if sc.mark[p] != gen {
			sc.mark[p] = gen
			list = append(list, p)
		}
	}
	for _, p := range list {
		b[p] = out[p]
		out[p] = 0
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
	if f.sc == nil || nz == nil || float64(len(nz)+len(f.etaPos)) > hyperInShare*float64(m) {
		f.btran(d)
		return nil
	}
	limit := int(hyperReachShare * float64(m))
	sc := f.sc
	// Eta file, newest first: position p may become nonzero.
	start := sc.start[:0]
	defer func() { sc.start = start[:0] }()
	for _, p := range nz {
		start = append(start, f.stepOfCol[p])
	}
	for e := len(f.etaPos) - 1; e >= 0; e-- {
		if f.btranEta(e, d) != 0 {
			start = append(start, f.stepOfCol[f.etaPos[e]])
		}
	}
	// Uᵀ pass: step k reaches the later steps of the columns in U row k.
	if !f.reach(start, limit, &f.gUt) {
		f.btranFromU(d)
		return nil
	}
	w := f.work // zero between solves
	for _, k := range sc.steps {
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
	// Lᵀ pass, backwards: row pivRow[k] reaches the earlier steps whose
	// multipliers touch it.
	if !tryStage(&sc.overLt, &sc.callsLt) {
		f.btranFromL(d)
		return nil
	}
	start = append(start[:0], sc.steps...)
	ok := f.reach(start, limit, &f.gLt)
	noteStage(&sc.overLt, !ok)
	if !ok {
		f.btranFromL(d)
		return nil
	}
	steps := sc.steps
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
	// d is zero now except at positions the eta file touched outside the
	// reach (none: every nonzero position started a step). Move w to d.
	list := sc.out[:0]
	for _, k := range steps {
		r := f.pivRow[k]
		d[r] = w[r]
		w[r] = 0
		list = append(list, r)
	}
	sc.out = list
	return list
}
