package lp

import "slices"

// The pivot row ρᵀA of the dual simplex is needed only at nonbasic
// columns: the ratio test and the update of the reduced costs skip basic
// ones. Built from the plain row-wise copy of A it visits every entry of
// the rows where ρ is nonzero, and on the planning models about a third of
// those entries belong to basic columns (flows on the routes in use). The
// solver therefore keeps a second row-wise copy whose rows list the
// entries of nonbasic columns first, in ascending column order (so the
// pivot row lists its variables in the same order as from the plain copy,
// and the path is the same), and those of basic columns after them;
// a basis change moves the entries of the two columns concerned (the
// technique of HiGHS' partitioned row matrix; Huangfu and Hall,
// "Parallelizing the dual revised simplex method", Math. Programming
// Computation 10(1), 2018).
type rowPartition struct {
	idx []int
	val []float64
	// end[i]: row i's nonbasic entries are idx[start[i]:end[i]], start
	// being the plain copy's csr.Start.
	end []int
	// basic[j]: column j's entries are in the basic parts.
	basic []bool
	// shape is Solver.shape when the copy was built (built: ever).
	shape int
	built bool
}

// syncPartition brings s.part up to date with the statuses: it moves the
// entries of the columns whose status changed since (outside the dual
// simplex, which keeps the copy itself: a new basis, a primal simplex, a
// factorisation that replaced dependent columns), or builds the copy anew
// when the rows changed. Cost O(columns) plus the moves, or O(nonzeros).
func (s *Solver) syncPartition() {
	pt := &s.part
	if !pt.built || pt.shape != s.shape {
		s.buildPartition()
		return
	}
	for j := 0; j < s.n; j++ {
		if b := s.stat[j] == Basic; b != pt.basic[j] {
			s.partitionMove(j, b)
		}
	}
}

// buildPartition fills s.part from s.csr and the statuses. Cost
// O(nonzeros).
func (s *Solver) buildPartition() {
	a := s.csr
	pt := &s.part
	pt.built, pt.shape = true, s.shape
	pt.idx = resize(pt.idx, len(a.Index))
	pt.val = resize(pt.val, len(a.Value))
	pt.end = resize(pt.end, s.m)
	pt.basic = resize(pt.basic, s.n)
	for j := 0; j < s.n; j++ {
		pt.basic[j] = s.stat[j] == Basic
	}
	for i := 0; i < s.m; i++ {
		lo, hi := a.Start[i], a.Start[i+1]
		k := lo
		for p := lo; p < hi; p++ {
			if s.stat[a.Index[p]] != Basic {
				pt.idx[k], pt.val[k] = a.Index[p], a.Value[p]
				k++
			}
		}
		pt.end[i] = k
		for p := lo; p < hi; p++ {
			if s.stat[a.Index[p]] == Basic {
				pt.idx[k], pt.val[k] = a.Index[p], a.Value[p]
				k++
			}
		}
	}
}

// partitionMove moves the entries of column j, whose status has become
// basic or nonbasic as basic says, to that part of their rows: to the end
// of the nonbasic part and across the boundary, or from the basic part to
// their place in the nonbasic part's column order. Cost O(entries of j ·
// row length).
func (s *Solver) partitionMove(j int, basic bool) {
	if j >= s.n {
		return
	}
	pt := &s.part
	pt.basic[j] = basic
	rows, _ := s.column(j)
	for _, i := range rows {
		lo, end := s.csr.Start[i], pt.end[i]
		if basic {
			pt.toBasic(lo, end, j)
			pt.end[i] = end - 1
		} else {
			pt.toNonbasic(lo, end, s.csr.Start[i+1], j)
			pt.end[i] = end + 1
		}
	}
}

// toBasic moves column j's entry, among the nonbasic entries lo…end−1 of
// its row, to position end−1, the first of the basic part once end is
// lowered.
func (pt *rowPartition) toBasic(lo, end, j int) {
	p, found := slices.BinarySearch(pt.idx[lo:end], j)
	if !found {
		panic("lp: partition lost a nonbasic entry")
	}
	p += lo
	v := pt.val[p]
	copy(pt.idx[p:end-1], pt.idx[p+1:end])
	copy(pt.val[p:end-1], pt.val[p+1:end])
	pt.idx[end-1], pt.val[end-1] = j, v
}

// toNonbasic moves column j's entry, among the basic entries end…hi−1 of
// its row, to its place in the nonbasic entries lo…end, which end+1 then
// closes.
func (pt *rowPartition) toNonbasic(lo, end, hi, j int) {
	b := end
	for b < hi && pt.idx[b] != j {
		b++
	}
	if b == hi {
		panic("lp: partition lost a basic entry")
	}
	v := pt.val[b]
	pt.idx[b], pt.val[b] = pt.idx[end], pt.val[end]
	p, _ := slices.BinarySearch(pt.idx[lo:end], j)
	p += lo
	copy(pt.idx[p+1:end+1], pt.idx[p:end])
	copy(pt.val[p+1:end+1], pt.val[p:end])
	pt.idx[p], pt.val[p] = j, v
}
