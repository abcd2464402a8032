package mip

import (
	"context"
	"math"
	"os"
	"path/filepath"
	"testing"

	"netstage/lp"
)

// sampleDir holds the MIPLIB 3 files shipped by the Debian package
// coinor-libcoinutils-dev.
const sampleDir = "/usr/share/coin/Data/Sample"

func readSample(tb testing.TB, name string) *lp.Model {
	tb.Helper()
	path := filepath.Join(sampleDir, name+".mps")
	if _, err := os.Stat(path); err != nil {
		tb.Skipf("%s not found: install the Debian package coinor-libcoinutils-dev", path)
	}
	m, err := lp.ReadMPSFile(path)
	if err != nil {
		tb.Fatalf("read %s: %v", path, err)
	}
	return m
}

// miplibCases are the optimal values of the MIPLIB 3 problem table.
var miplibCases = []struct {
	name    string
	optimum float64
}{
	{"p0033", 3089}, // source: MIPLIB 3 problem table
	{"lseu", 1120},  // source: MIPLIB 3 problem table
	{"p0201", 7615}, // source: MIPLIB 3 problem table
	{"p0548", 8691}, // source: MIPLIB 3 problem table
}

func TestMIPLIB(t *testing.T) {
	for _, tc := range miplibCases {
		t.Run(tc.name, func(t *testing.T) {
			if testing.Short() && (tc.name == "p0201" || tc.name == "p0548") {
				t.Skip("short mode: the larger MIPLIB files run in the full suite")
			}
			m := readSample(t, tc.name)
			r, err := Solve(context.Background(), m, Settings{})
			if err != nil {
				t.Fatal(err)
			}
			t.Logf("%s: status %v obj %v bound %v gap %.2g nodes %d iters %d cuts %d root %v time %v",
				tc.name, r.Status, r.Objective, r.Bound, r.Gap, r.Nodes, r.LPIterations, r.Cuts, r.RootBound, r.Time)
			if r.Status != Optimal {
				t.Fatalf("status %v, want optimal", r.Status)
			}
			checkIncumbent(t, m, r)
			if math.Abs(r.Objective-tc.optimum) > 1e-6*math.Max(1, math.Abs(tc.optimum)) {
				t.Errorf("objective %v, want %v", r.Objective, tc.optimum)
			}
			if r.Gap > 1e-4 {
				t.Errorf("gap %v, want ≤ 1e-4", r.Gap)
			}
		})
	}
}

// checkIncumbent checks a result's point against the original model:
// bounds, rows, integrality and the reported objective.
func checkIncumbent(t *testing.T, m *lp.Model, r Result) {
	t.Helper()
	if r.X == nil {
		t.Fatalf("status %v without a solution", r.Status)
	}
	viol, integral := m.MaxViolation(r.X, DefaultIntTol)
	if viol > DefaultFeasTol || !integral {
		t.Fatalf("incumbent violates the model by %g (integral %v)", viol, integral)
	}
	obj, _ := m.Evaluate(r.X)
	if math.Abs(obj-r.Objective) > 1e-9*math.Max(1, math.Abs(obj)) {
		t.Fatalf("reported objective %v, evaluated %v", r.Objective, obj)
	}
}
