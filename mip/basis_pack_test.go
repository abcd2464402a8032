package mip

import (
	"math/rand"
	"slices"
	"testing"

	"netstage/lp"
)

// TestPackedBasisRoundTrip: every status survives packing at every
// position of the three in a byte, for lengths that leave 0, 1 or 2
// statuses in the last byte and for empty column or row lists; unpacked
// for an LP with more rows, the new rows' slacks are basic.
func TestPackedBasisRoundTrip(t *testing.T) {
	statuses := []lp.VarStatus{lp.Basic, lp.AtLower, lp.AtUpper, lp.AtZero, lp.Fixed}
	rng := rand.New(rand.NewSource(1))
	for _, size := range [][2]int{{0, 0}, {1, 0}, {0, 1}, {1, 1}, {2, 2}, {3, 4}, {5, 0}, {0, 7}, {100, 41}, {1000, 300}} {
		for trial := 0; trial < 20; trial++ {
			b := lp.Basis{Cols: make([]lp.VarStatus, size[0]), Rows: make([]lp.VarStatus, size[1])}
			for k := range b.Cols {
				b.Cols[k] = statuses[rng.Intn(len(statuses))]
			}
			for k := range b.Rows {
				b.Rows[k] = statuses[rng.Intn(len(statuses))]
			}
			pb := packBasis(b)
			if want := (size[0] + size[1] + 2) / 3; len(pb.data) != want {
				t.Fatalf("%v: %d bytes, want %d", size, len(pb.data), want)
			}
			got := pb.unpack(size[1])
			if !slices.Equal(got.Cols, b.Cols) || !slices.Equal(got.Rows, b.Rows) {
				t.Fatalf("%v: unpacked %v / %v, want %v / %v", size, got.Cols, got.Rows, b.Cols, b.Rows)
			}
			// Rows added to the LP since: their slacks come out basic.
			wide := pb.unpack(size[1] + 3)
			want := append(slices.Clone(b.Rows), lp.Basic, lp.Basic, lp.Basic)
			if !slices.Equal(wide.Cols, b.Cols) || !slices.Equal(wide.Rows, want) {
				t.Fatalf("%v: unpacked for 3 more rows %v / %v, want %v / %v", size, wide.Cols, wide.Rows, b.Cols, want)
			}
		}
	}
}
