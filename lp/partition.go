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
			if b {
				s.partitionEnter(j)
			} else {
				s.partitionLeave(j)
			}
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

// partitionEnter moves the entries of column j, which has become basic,
// to the basic part of their rows. Cost O(entries of j · row length).
func (s *Solver) partitionEnter(j int) {
	if j >= s.n {
		return
	}
	pt := &s.part
	pt.basic[j] = true
	rows, _ := s.column(j)
	for _, i := range rows {
		lo, end := s.csr.Start[i], pt.end[i]
		p, found := slices.BinarySearch(pt.idx[lo:end], j)
		if !found {
			panic("lp: partition lost a nonbasic entry")
		}
		p += lo
		v := pt.val[p]
		copy(pt.idx[p:end-1], pt.idx[p+1:end])
		copy(pt.val[p:end-1], pt.val[p+1:end])
		pt.idx[end-1], pt.val[end-1] = j, v
		pt.end[i] = end - 1
	}
}

// partitionLeave moves the entries of column j, which has left the basis,
// to their places among the nonbasic entries of their rows.
func (s *Solver) partitionLeave(j int) {
	if j >= s.n {
		return
	}
	pt := &s.part
	pt.basic[j] = false
	rows, _ := s.column(j)
	for _, i := range rows {
		lo, end, hi := s.csr.Start[i], pt.end[i], s.csr.Start[i+1]
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
		pt.end[i] = end + 1
	}
}
