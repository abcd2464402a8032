package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// mpsSample returns a sample file of the Debian package
// coinor-libcoinutils-dev, skipping the test when it is absent.
func mpsSample(t *testing.T, name string) string {
	t.Helper()
	path := "/usr/share/coin/Data/Sample/" + name + ".mps"
	if _, err := os.Stat(path); err != nil {
		t.Skipf("%s missing: install the Debian package coinor-libcoinutils-dev", path)
	}
	return path
}

func TestMPSCommand(t *testing.T) {
	dir := t.TempDir()
	infeasible := filepath.Join(dir, "infeasible.mps")
	// x ≥ 1 through a row, x ≤ 0.5 through its bound.
	src := "NAME inf\nROWS\n N obj\n G r\nCOLUMNS\n x obj 1 r 1\nRHS\n RHS r 1\nBOUNDS\n UP BND x 0.5\nENDATA\n"
	if err := os.WriteFile(infeasible, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	crossed := filepath.Join(dir, "crossed.mps")
	// Reads fine, but the column's bounds cross: bad input, not a failure.
	if err := os.WriteFile(crossed, []byte("NAME c\nROWS\n N obj\n G r\nCOLUMNS\n x r 1\nBOUNDS\n LO BND x 2\n UP BND x 1\nENDATA\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	broken := filepath.Join(dir, "broken.mps")
	if err := os.WriteFile(broken, []byte("NAME b\nROWS\n Q r\nENDATA\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name      string
		args      []string
		code      int
		status    string
		objective float64
		stderr    string
	}{
		// source: REFERENCES.md §2 — e226 with constant = −RHS, as CLP and HiGHS report it.
		{"e226 relaxation", []string{"mps", mpsSample(t, "e226"), "--relax", "--json"}, 0, "optimal", -11.638929066, ""},
		// source: Netlib lp/data readme.
		{"afiro relaxation", []string{"mps", mpsSample(t, "afiro"), "--relax", "--json", "--time-limit", "60"}, 0, "optimal", -464.75314286, ""},
		{"infeasible", []string{"mps", infeasible, "--relax", "--json"}, 3, "infeasible", math.NaN(), ""},
		{"bad file", []string{"mps", broken, "--relax"}, 2, "", 0, "broken.mps:3"},
		{"crossed bounds", []string{"mps", crossed, "--relax"}, 2, "", 0, "bounds"},
		{"missing file", []string{"mps", filepath.Join(dir, "none.mps"), "--relax"}, 2, "", 0, "no such file"},
		{"bad time limit", []string{"mps", infeasible, "--relax", "--time-limit", "soon"}, 2, "", 0, "--time-limit"},
		// source: MIPLIB 3 problem table (REFERENCES.md §2), p0033 optimum 3089.
		{"p0033 MIP", []string{"mps", mpsSample(t, "p0033"), "--json", "--gap", "1e-9"}, 0, "optimal", 3089, ""},
		{"infeasible MIP", []string{"mps", infeasible, "--json"}, 3, "infeasible", math.NaN(), ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var stdout, stderr bytes.Buffer
			code := run(tc.args, &stdout, &stderr)
			if code != tc.code {
				t.Fatalf("exit code %d, want %d (stderr %q)", code, tc.code, stderr.String())
			}
			if tc.stderr != "" && !strings.Contains(stderr.String(), tc.stderr) {
				t.Fatalf("stderr %q, want it to mention %q", stderr.String(), tc.stderr)
			}
			if tc.status == "" {
				return
			}
			var rep struct {
				Status     string   `json:"status"`
				Objective  *float64 `json:"objective"`
				Bound      *float64 `json:"bound"`
				Nodes      *int     `json:"nodes"`
				Iterations *int     `json:"iterations"`
				Seconds    *float64 `json:"seconds"`
			}
			if err := json.Unmarshal(stdout.Bytes(), &rep); err != nil {
				t.Fatalf("output %q: %v", stdout.String(), err)
			}
			if rep.Status != tc.status || rep.Nodes == nil || rep.Iterations == nil || rep.Seconds == nil {
				t.Fatalf("got %s, want status %q with nodes, iterations and seconds", stdout.String(), tc.status)
			}
			if math.IsNaN(tc.objective) {
				if rep.Objective != nil || rep.Bound != nil {
					t.Fatalf("got %s, want null objective and bound", stdout.String())
				}
				return
			}
			if rep.Objective == nil || math.Abs(*rep.Objective-tc.objective) > 1e-6*math.Abs(tc.objective) {
				t.Fatalf("got %s, want objective %v", stdout.String(), tc.objective)
			}
		})
	}
}
