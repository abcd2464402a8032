package lp

import (
	"context"
	"math"
	"testing"
)

// TestMIPLIBRelaxations solves the LP relaxations of the MIPLIB 3 samples.
// source: MIPLIB 3 problem table (also glpk-doc miplib3.txt), LP relaxation
// column; the table rounds, so the check is to its printed digits.
func TestMIPLIBRelaxations(t *testing.T) {
	for _, tc := range []struct {
		name string
		want float64
		tol  float64 // absolute, half a unit of the last printed digit
	}{
		{"p0033", 2520.57, 0.005},
		{"p0201", 6875, 0.5},
		{"p0548", 315.2549, 0.00005},
		{"lseu", 834.68, 0.005},
	} {
		t.Run(tc.name, func(t *testing.T) {
			m := readSample(t, tc.name)
			r, err := Solve(context.Background(), m, Settings{})
			if err != nil {
				t.Fatal(err)
			}
			if err := verifyOptimal(m, r); err != nil {
				t.Fatal(err)
			}
			if math.Abs(r.Objective-tc.want) > tc.tol {
				t.Fatalf("LP relaxation %.6f, want %v ± %v", r.Objective, tc.want, tc.tol)
			}
		})
	}
}
