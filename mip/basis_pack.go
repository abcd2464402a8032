package mip

import "netstage/lp"

// packedBasis is a simplex basis stored at three statuses a byte: each
// status is one of five values, and 5³ = 125 fits in a byte. An open node
// keeps its parent's final basis as its warm start, and these bases are
// most of the search's memory: two thirds of the live heap after 7,600
// nodes of the synthetic M case (25 sites, 7 years), where an lp.Basis
// holds 14,600 one-byte statuses. Packed, a basis takes a third of that;
// unpacking costs a pass over it when the node is loaded.
type packedBasis struct {
	nCols, nRows int
	data         []byte
}

// packBasis returns b packed.
func packBasis(b lp.Basis) *packedBasis {
	n := len(b.Cols) + len(b.Rows)
	pb := &packedBasis{nCols: len(b.Cols), nRows: len(b.Rows), data: make([]byte, (n+2)/3)}
	at := func(k int) byte {
		if k < len(b.Cols) {
			return byte(b.Cols[k])
		}
		return byte(b.Rows[k-len(b.Cols)])
	}
	for k := 0; k < n; k += 3 {
		v := at(k)
		if k+1 < n {
			v += 5 * at(k+1)
		}
		if k+2 < n {
			v += 25 * at(k+2)
		}
		pb.data[k/3] = v
	}
	return pb
}

// unpack returns the basis pb holds, for an LP of m rows: rows added
// since it was packed (pool cuts that entered the LP later) get basic
// slacks. (Rows leave the LP only at the root, before any node is
// created, so m is not less than the packed count.)
func (pb *packedBasis) unpack(m int) lp.Basis {
	b := lp.Basis{Cols: make([]lp.VarStatus, pb.nCols), Rows: make([]lp.VarStatus, max(m, pb.nRows))}
	n := pb.nCols + pb.nRows
	set := func(k int, v byte) {
		if k < pb.nCols {
			b.Cols[k] = lp.VarStatus(v)
		} else if k < n {
			b.Rows[k-pb.nCols] = lp.VarStatus(v)
		}
	}
	for i, v := range pb.data {
		set(3*i, v%5)
		set(3*i+1, v/5%5)
		set(3*i+2, v/25)
	}
	return b // rows past the packed ones stay at the zero status, Basic
}
