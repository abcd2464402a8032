package lp

import (
	"fmt"
	"math"
	"os"
	"testing"
)

// checkTol is the tolerance of the independent optimality check, relative
// to 1 + the size of the quantity compared (the solver works to 1e-7 in the
// scaled model, so 1e-6 in the original model is common practice).
const checkTol = 1e-6

// verifyOptimal checks a result claimed Optimal against the original,
// unscaled model, using only the model, X and Dual: primal feasibility of X,
// the reported objective and activities, dual feasibility of the reduced
// costs c − Aᵀy recomputed here, and complementary slackness of both the
// column bounds and the row bounds. It does not look at the basis.
func verifyOptimal(m *Model, r Result) error {
	if r.Status != Optimal {
		return fmt.Errorf("status %v, want optimal", r.Status)
	}
	n, rows := m.NumCols(), m.NumRows()
	if len(r.X) != n || len(r.Dual) != rows || len(r.ReducedCost) != n || len(r.RowActivity) != rows {
		return fmt.Errorf("result vectors have wrong lengths")
	}
	obj, act := m.Evaluate(r.X)
	if !close(obj, r.Objective, checkTol) {
		return fmt.Errorf("objective %v, but c·x+constant = %v", r.Objective, obj)
	}
	// Primal feasibility.
	for j, x := range r.X {
		tol := checkTol * (1 + math.Abs(x))
		if x < m.ColLower[j]-tol || x > m.ColUpper[j]+tol {
			return fmt.Errorf("column %d = %v outside [%v, %v]", j, x, m.ColLower[j], m.ColUpper[j])
		}
	}
	for i, a := range act {
		tol := checkTol * (1 + math.Abs(a))
		if a < m.RowLower[i]-tol || a > m.RowUpper[i]+tol {
			return fmt.Errorf("row %d activity %v outside [%v, %v]", i, a, m.RowLower[i], m.RowUpper[i])
		}
		if !close(a, r.RowActivity[i], checkTol) {
			return fmt.Errorf("row %d activity reported %v, computed %v", i, r.RowActivity[i], a)
		}
	}
	// Reduced costs from the duals, in the model's sense; for a
	// maximisation the signs of every condition flip.
	sign := 1.0
	if m.Sense == Maximize {
		sign = -1
	}
	rc := append([]float64(nil), m.Obj...)
	cols := m.Columns()
	scale := 1.0
	for j := range rc {
		scale = math.Max(scale, math.Abs(m.Obj[j]))
		for p := cols.Start[j]; p < cols.Start[j+1]; p++ {
			rc[j] -= r.Dual[cols.Index[p]] * cols.Value[p]
		}
	}
	for j := range rc {
		if !close(rc[j], r.ReducedCost[j], checkTol*scale) {
			return fmt.Errorf("column %d reduced cost reported %v, computed %v", j, r.ReducedCost[j], rc[j])
		}
		d := sign * rc[j]
		x := r.X[j]
		btol := checkTol * (1 + math.Abs(x))
		dtol := checkTol * scale
		if x > m.ColLower[j]+btol && d > dtol {
			return fmt.Errorf("column %d = %v above its lower bound %v with reduced cost %v", j, x, m.ColLower[j], rc[j])
		}
		if x < m.ColUpper[j]-btol && d < -dtol {
			return fmt.Errorf("column %d = %v below its upper bound %v with reduced cost %v", j, x, m.ColUpper[j], rc[j])
		}
	}
	for i, a := range act {
		y := sign * r.Dual[i]
		btol := checkTol * (1 + math.Abs(a))
		dtol := checkTol * scale
		if a > m.RowLower[i]+btol && y > dtol {
			return fmt.Errorf("row %d activity %v above its lower bound %v with dual %v", i, a, m.RowLower[i], r.Dual[i])
		}
		if a < m.RowUpper[i]-btol && y < -dtol {
			return fmt.Errorf("row %d activity %v below its upper bound %v with dual %v", i, a, m.RowUpper[i], r.Dual[i])
		}
	}
	return nil
}

// close reports |a−b| ≤ tol·(1+max(|a|,|b|)).
func close(a, b, tol float64) bool {
	return math.Abs(a-b) <= tol*(1+math.Max(math.Abs(a), math.Abs(b)))
}

// sampleDir is where the Debian package coinor-libcoinutils-dev installs
// the Netlib and MIPLIB samples.
const sampleDir = "/usr/share/coin/Data/Sample/"

// readSample reads one sample MPS file, skipping the test when the Debian
// package is not installed.
func readSample(tb testing.TB, name string) *Model {
	tb.Helper()
	path := sampleDir + name + ".mps"
	if _, err := os.Stat(path); err != nil {
		tb.Skipf("%s missing: install the Debian package coinor-libcoinutils-dev", path)
	}
	m, err := ReadMPSFile(path)
	if err != nil {
		tb.Fatal(err)
	}
	return m
}
