package lp

import (
	"fmt"
	"slices"
)

// partitionError compares s.part with the plain row-wise copy and the
// statuses: each row must list its nonbasic columns' entries first, in
// ascending column order, then its basic columns' entries, with their
// values.
func partitionError(s *Solver) error {
	pt := &s.part
	for i := 0; i < s.m; i++ {
		lo, hi := s.csr.Start[i], s.csr.Start[i+1]
		var wantNB, wantB []string
		for p := lo; p < hi; p++ {
			e := fmt.Sprint(s.csr.Index[p], s.csr.Value[p])
			if s.stat[s.csr.Index[p]] == Basic {
				wantB = append(wantB, e)
			} else {
				wantNB = append(wantNB, e)
			}
		}
		var gotNB, gotB []string
		for p := lo; p < hi; p++ {
			e := fmt.Sprint(pt.idx[p], pt.val[p])
			if p < pt.end[i] {
				gotNB = append(gotNB, e)
			} else {
				gotB = append(gotB, e)
			}
		}
		slices.Sort(wantB)
		slices.Sort(gotB)
		if !slices.Equal(gotNB, wantNB) || !slices.Equal(gotB, wantB) {
			return fmt.Errorf("row %d: partition nonbasic %v basic %v, want %v and %v", i, gotNB, gotB, wantNB, wantB)
		}
	}
	return nil
}
