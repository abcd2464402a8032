package mip

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"math/rand"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"netstage/lp"
)

// randomMediumMIP is a mixed-integer program too large for enumeration:
// general integer and binary columns, continuous columns, ≤, ≥, range and
// equality rows, either sense.
func randomMediumMIP(rng *rand.Rand) *lp.Model {
	m := lp.NewModel("medium")
	if rng.Intn(2) == 0 {
		m.Sense = lp.Maximize
	}
	n := 20 + rng.Intn(20)
	for j := 0; j < n; j++ {
		c := float64(rng.Intn(41) - 20)
		switch rng.Intn(3) {
		case 0:
			m.AddIntCol(fmt.Sprintf("binary_%03d", j), c, 0, 1)
		case 1:
			m.AddIntCol(fmt.Sprintf("integer_%03d", j), c, float64(-rng.Intn(3)), float64(2+rng.Intn(20)))
		default:
			m.AddCol(fmt.Sprintf("continuous_%03d", j), c+0.25*float64(rng.Intn(4)), 0, float64(5+rng.Intn(30)))
		}
	}
	rows := 10 + rng.Intn(15)
	for i := 0; i < rows; i++ {
		var cols []int
		var vals []float64
		for j := 0; j < n; j++ {
			if rng.Intn(4) != 0 {
				continue
			}
			cols = append(cols, j)
			vals = append(vals, float64(rng.Intn(21)-7)+0.5*float64(rng.Intn(2)))
		}
		if len(cols) == 0 {
			continue
		}
		b := float64(rng.Intn(60) - 10)
		switch k := rng.Intn(10); {
		case k == 0:
			m.AddRow(fmt.Sprintf("row_e_%03d", i), b, b, cols, vals)
		case k <= 2:
			m.AddRow(fmt.Sprintf("row_g_%03d", i), -b, lp.Inf, cols, vals)
		case k == 3:
			m.AddRow(fmt.Sprintf("row_r_%03d", i), -b, -b+float64(10+rng.Intn(30)), cols, vals)
		default:
			m.AddRow(fmt.Sprintf("row_l_%03d", i), math.Inf(-1), b+20, cols, vals)
		}
	}
	return m
}

var (
	cbcObjective = regexp.MustCompile(`(?m)^Objective value:\s*(\S+)`)
	cbcResult    = regexp.MustCompile(`(?m)^Result - (.*)$`)
)

// solveWithCBC runs the reference solver CBC on m (written as MPS) and
// returns "optimal", "infeasible" or "unbounded" and the optimum in the
// model's sense. CBC 2.10 ignores OBJSENSE, so a maximisation is written as
// the minimisation of the negated objective; names longer than eight
// characters keep CBC from reading the file as fixed-format MPS.
func solveWithCBC(t *testing.T, m *lp.Model) (string, float64) {
	t.Helper()
	sign := 1.0
	if m.Sense == lp.Maximize {
		m = m.Clone()
		m.Sense = lp.Minimize
		for j := range m.Obj {
			m.Obj[j] = -m.Obj[j]
		}
		m.Constant = -m.Constant
		sign = -1
	}
	dir := t.TempDir()
	path := filepath.Join(dir, "model.mps")
	var buf bytes.Buffer
	if err := lp.WriteMPS(&buf, m); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command("cbc", path, "-ratio", "1e-9", "-allowableGap", "1e-9", "-solve", "-quit").CombinedOutput()
	if err != nil {
		t.Fatalf("cbc: %v\n%s", err, out)
	}
	var line string
	if res := cbcResult.FindSubmatch(out); res != nil {
		line = strings.ToLower(string(res[1]))
	} else if bytes.Contains(out, []byte("Problem is infeasible")) {
		line = "infeasible" // found by CBC's presolve
	} else if bytes.Contains(out, []byte("Problem is unbounded")) {
		line = "unbounded"
	} else {
		t.Fatalf("cbc printed no result line:\n%s", out)
	}
	switch {
	case strings.Contains(line, "infeasible"):
		return "infeasible", 0
	case strings.Contains(line, "unbounded"):
		return "unbounded", 0
	case strings.Contains(line, "optimal"):
		obj := cbcObjective.FindSubmatch(out)
		if obj == nil {
			t.Fatalf("cbc printed no objective:\n%s", out)
		}
		v, err := strconv.ParseFloat(string(obj[1]), 64)
		if err != nil {
			t.Fatal(err)
		}
		return "optimal", sign * v
	}
	t.Fatalf("cbc result %q", line)
	return "", 0
}

// TestAgainstCBC cross-checks medium random MIPs with the reference solver
// CBC (Debian package coinor-cbc), both run to a gap of 1e-9.
func TestAgainstCBC(t *testing.T) {
	if _, err := exec.LookPath("cbc"); err != nil {
		t.Skip("cbc not found: install the Debian package coinor-cbc")
	}
	count := 30
	if testing.Short() {
		count = 8
	}
	tally := map[string]int{}
	for seed := 1; seed <= count; seed++ {
		m := randomMediumMIP(rand.New(rand.NewSource(int64(5000 + seed))))
		want, wantObj := solveWithCBC(t, m)
		tally[want]++
		r, err := Solve(context.Background(), m, Settings{RelGap: 1e-9, AbsGap: 1e-9, Seed: int64(seed)})
		if err != nil {
			t.Fatal(err)
		}
		if r.Status.String() != want {
			t.Errorf("seed %d: status %v, CBC says %s (%v)", seed, r.Status, want, wantObj)
			continue
		}
		if want == "optimal" {
			checkIncumbent(t, m, r)
			// source: CBC 2.10 on the same model
			if math.Abs(r.Objective-wantObj) > 1e-6*math.Max(1, math.Abs(wantObj)) {
				t.Errorf("seed %d: objective %v, CBC %v", seed, r.Objective, wantObj)
			}
		}
	}
	t.Logf("CBC outcomes: %v", tally)
	if tally["optimal"] < count/3 {
		t.Errorf("too few optimal instances (%v): the generator needs retuning", tally)
	}
}
