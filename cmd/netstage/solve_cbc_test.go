package main

// The demo's exported model solved by CBC must have the optimum solve
// reports (DESIGN.md §4 check; the synthetic cross-checks live in plans).

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"testing"
	"time"
)

// TestSolveDemoAgainstCBC exports the demo model, solves it with CBC and
// compares CBC's optimum with solve's mps_objective.
// source: reference solver CBC 2.10 (Debian coinor-cbc), DESIGN.md §4
// (relative 1e-6).
func TestSolveDemoAgainstCBC(t *testing.T) {
	if testing.Short() {
		t.Skip("CBC takes tens of seconds on the demo; skipped in -short")
	}
	cbc, err := exec.LookPath("cbc")
	if err != nil {
		t.Skip("cbc not installed (Debian package coinor-cbc; .ci/run installs it): CBC cross-check skipped")
	}
	dir := t.TempDir()
	mps := filepath.Join(dir, "demo.mps")
	var out, errOut bytes.Buffer
	if code := run([]string{"export", "--demo", "--mps", mps}, &out, &errOut); code != exitOK {
		t.Fatalf("export: exit %d, %s", code, errOut.String())
	}
	ctx, cancel := context.WithTimeout(context.Background(), 5*time.Minute)
	defer cancel()
	cmd := exec.CommandContext(ctx, cbc, mps, "-ratio", "1e-9", "-allowableGap", "1e-9", "-solve", "-quit")
	text, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("cbc: %v\n%s", err, text)
	}
	m := regexp.MustCompile(`(?m)^Objective value:\s*(\S+)`).FindSubmatch(text)
	if m == nil || !bytes.Contains(text, []byte("Optimal solution found")) {
		t.Fatalf("cbc found no optimum:\n%s", text)
	}
	cbcObj, err := strconv.ParseFloat(string(m[1]), 64)
	if err != nil {
		t.Fatal(err)
	}
	js, err := demoJSON()
	if err != nil {
		t.Fatal(err)
	}
	var r demoResult
	if err := json.Unmarshal(js, &r); err != nil {
		t.Fatal(err)
	}
	got := *r.MPSObjective
	if math.Abs(got-cbcObj) > 1e-6*math.Max(1, math.Abs(cbcObj)) {
		t.Errorf("netstage mps_objective %.6f, CBC optimum %.6f", got, cbcObj)
	}
}
