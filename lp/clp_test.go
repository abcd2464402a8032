package lp

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"testing"
)

var clpObjective = regexp.MustCompile(`(?m)^Optimal objective\s+(\S+)`)

// TestWrittenMPSSolvedByCLP writes models with WriteMPS and lets CLP solve
// the written file: CLP's optimum must equal ours (CLP prints 10
// significant digits).
// source: reference solver CLP 1.17 (Debian coinor-clp), REFERENCES.md §1.
func TestWrittenMPSSolvedByCLP(t *testing.T) {
	clp, err := exec.LookPath("clp")
	if err != nil {
		t.Skip("clp missing: install the Debian package coinor-clp")
	}
	dir := t.TempDir()
	models := map[string]*Model{}
	// Random boxed models: ranges, equations, negative bounds, both senses.
	rng := rand.New(rand.NewSource(17))
	for k := 0; k < 20; k++ {
		m := randomModel(rng, true)
		m.Constant = float64(k%5 - 2)
		models[fmt.Sprintf("random%02d", k)] = m
	}
	names := []string{"afiro", "brandy", "e226", "finnis", "exmip1", "p0548"}
	for k := 0; k < 20; k++ {
		names = append(names, fmt.Sprintf("random%02d", k))
	}
	for _, name := range names {
		t.Run(name, func(t *testing.T) {
			m := models[name]
			if m == nil {
				m = readSample(t, name)
			}
			r, err := Solve(context.Background(), m, Settings{})
			if err != nil || r.Status != Optimal {
				t.Fatalf("status %v, error %v", r.Status, err)
			}
			path := filepath.Join(dir, name+".mps")
			f, err := os.Create(path)
			if err != nil {
				t.Fatal(err)
			}
			if err := WriteMPS(f, m); err != nil {
				t.Fatal(err)
			}
			if err := f.Close(); err != nil {
				t.Fatal(err)
			}
			args := []string{path}
			if m.Sense == Maximize {
				// CLP 1.17 reads OBJSENSE MAX but ignores it ("Coin
				// ignores"), so the sense goes on its command line.
				args = append(args, "-maximize", "-solve")
			}
			out, err := exec.Command(clp, args...).CombinedOutput()
			if err != nil {
				t.Fatalf("clp: %v\n%s", err, out)
			}
			match := clpObjective.FindSubmatch(out)
			if match == nil {
				t.Fatalf("no optimum in clp output:\n%s", out)
			}
			want, err := strconv.ParseFloat(string(match[1]), 64)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(r.Objective-want) > 1e-8*(1+math.Abs(want)) {
				t.Fatalf("objective %.10g, clp on the written file %.10g", r.Objective, want)
			}
		})
	}
}

// TestSamplesAgainstCLP solves every sample MPS file of
// coinor-libcoinutils-dev that we read and compares the LP optimum or the
// infeasible status with CLP on the same file.
// source: reference solver CLP 1.17 (Debian coinor-clp), REFERENCES.md §1.
func TestSamplesAgainstCLP(t *testing.T) {
	clp, err := exec.LookPath("clp")
	if err != nil {
		t.Skip("clp missing: install the Debian package coinor-clp")
	}
	files, _ := filepath.Glob(sampleDir + "*.mps")
	if len(files) == 0 {
		t.Skipf("no samples in %s: install the Debian package coinor-libcoinutils-dev", sampleDir)
	}
	skip := map[string]string{
		// Integer columns without bounds: CLP makes them binary, we read
		// general integers in [0, +∞) (REFERENCES.md, exmip1 note).
		"nw460": "integer columns without bounds are read differently",
	}
	compared := 0
	for _, path := range files {
		name := filepath.Base(path)
		name = name[:len(name)-len(".mps")]
		t.Run(name, func(t *testing.T) {
			if why, ok := skip[name]; ok {
				t.Skip(why)
			}
			m, err := ReadMPSFile(path)
			if errors.Is(err, ErrMPSUnsupported) {
				t.Skipf("uses an unsupported extension: %v", err)
			}
			if err != nil {
				t.Fatal(err)
			}
			r, err := Solve(context.Background(), m, Settings{})
			if err != nil {
				t.Fatal(err)
			}
			out, err := exec.Command(clp, path).CombinedOutput()
			if err != nil {
				t.Fatalf("clp: %v\n%s", err, out)
			}
			compared++
			if match := clpObjective.FindSubmatch(out); match != nil {
				want, _ := strconv.ParseFloat(string(match[1]), 64)
				if err := verifyOptimal(m, r); err != nil {
					t.Fatal(err)
				}
				if math.Abs(r.Objective-want) > 1e-8*(1+math.Abs(want)) {
					t.Fatalf("objective %.10g, clp %.10g", r.Objective, want)
				}
				return
			}
			if bytes.Contains(out, []byte("infeasible")) {
				if r.Status != Infeasible {
					t.Fatalf("status %v, clp says infeasible", r.Status)
				}
				if err := verifyFarkas(m, r.Ray); err != nil {
					t.Fatal(err)
				}
				return
			}
			t.Fatalf("status %v; clp output not understood:\n%s", r.Status, out)
		})
	}
	t.Logf("%d files compared", compared)
}
