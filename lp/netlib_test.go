package lp

import (
	"context"
	"math"
	"testing"
)

// netlibCases are the Netlib instances shipped by coinor-libcoinutils-dev,
// with their published optimal values of c·x (without the objective
// constant).
var netlibCases = []struct {
	name      string
	rows      int // including the objective row, as the readme counts
	cols      int
	cx        float64 // optimal c·x
	objective float64 // optimal c·x + constant, constant = −RHS of the objective row
}{
	// source: Netlib lp/data readme (also glpk-doc netlib.txt).
	{"afiro", 28, 32, -4.6475314286e+02, -4.6475314286e+02},
	// source: Netlib lp/data readme.
	{"brandy", 221, 249, 1.5185098965e+03, 1.5185098965e+03},
	// source: Netlib lp/data readme gives c·x; the file's objective RHS is
	// −7.113, read as constant +7.113 as CLP and HiGHS do, giving −11.638929066.
	{"e226", 224, 282, -1.8751929066e+01, -11.638929066},
	// source: exact rational optimum from GLPK glpsol --exact
	// (172791.06559379); the Netlib readme's 1.7279096547E+05 is off by
	// 5.8e-7 relative.
	{"finnis", 498, 614, 172791.06559379, 172791.06559379},
}

func TestNetlib(t *testing.T) {
	for _, tc := range netlibCases {
		t.Run(tc.name, func(t *testing.T) {
			m := readSample(t, tc.name)
			if m.NumRows()+1 != tc.rows || m.NumCols() != tc.cols {
				t.Fatalf("size %d×%d, want %d×%d", m.NumRows()+1, m.NumCols(), tc.rows, tc.cols)
			}
			for _, set := range []struct {
				name string
				s    Settings
			}{
				{"default", Settings{}},
				{"unscaled", Settings{NoScaling: true}},
				{"unperturbed", Settings{NoPerturbation: true}},
			} {
				r, err := Solve(context.Background(), m, set.s)
				if err != nil {
					t.Fatal(err)
				}
				if err := verifyOptimal(m, r); err != nil {
					t.Fatalf("%s: %v", set.name, err)
				}
				cx := r.Objective - m.Constant
				if rel := math.Abs(cx-tc.cx) / math.Abs(tc.cx); rel > 1e-6 {
					t.Errorf("%s: c·x = %.10g, want %.10g (rel. error %.2g)", set.name, cx, tc.cx, rel)
				}
				if rel := math.Abs(r.Objective-tc.objective) / math.Abs(tc.objective); rel > 1e-6 {
					t.Errorf("%s: objective = %.10g, want %.10g", set.name, r.Objective, tc.objective)
				}
			}
		})
	}
}

// TestInfeasibleSamples solves the infeasible samples and checks their
// certificates.
// source: galenet is in the Netlib lp/infeas collection of infeasible
// problems (from memory); clp (Debian coinor-clp 1.17) also reports
// galenet, galenetbnds and exmip1.5 infeasible.
func TestInfeasibleSamples(t *testing.T) {
	for _, name := range []string{"galenet", "galenetbnds", "exmip1.5"} {
		t.Run(name, func(t *testing.T) {
			m := readSample(t, name)
			for _, set := range []Settings{{}, {NoScaling: true, NoPerturbation: true}} {
				r, err := Solve(context.Background(), m, set)
				if err != nil {
					t.Fatal(err)
				}
				if r.Status != Infeasible {
					t.Fatalf("status %v, want infeasible", r.Status)
				}
				if err := verifyFarkas(m, r.Ray); err != nil {
					t.Fatal(err)
				}
			}
		})
	}
}
