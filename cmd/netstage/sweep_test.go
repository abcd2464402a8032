package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"netstage/plans/scenario"
)

// TestSweepDemoGolden is a regression guard on the sweep outputs (tables
// and JSON) of the demo, with the stand-in solve of compare_test.go.
func TestSweepDemoGolden(t *testing.T) {
	withFakeSolve(t)
	args := []string{"sweep", "--demo", "--quiet", "--vary", "tariff=0.8,1.2", "--vary", "budget=0.25,1,2", "--vary", "capex=1.5,0.5"}
	code, out, errOut := runCLI(args...)
	if code != exitOK {
		t.Fatalf("exit code: got %d, want %d\n%s", code, exitOK, errOut)
	}
	checkGolden(t, "sweep/demo.golden", []byte(out))
	for _, want := range []string{"Tornado", "Budget frontier", "budget not enforced", "decision support"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q", want)
		}
	}
	code, out, errOut = runCLI(append(args, "--json")...)
	if code != exitOK {
		t.Fatalf("--json exit code: got %d, want %d\n%s", code, exitOK, errOut)
	}
	checkGolden(t, "sweep/demo.json", []byte(out))
	// DESIGN.md §4: {"scenarios": [...]} in grid order (values in the order
	// given, the first --vary outermost), each with its factor values,
	// status and objective.
	var doc struct {
		Scenarios []struct {
			Factors   map[string]float64 `json:"factors"`
			Status    string             `json:"status"`
			Objective *float64           `json:"objective"`
		} `json:"scenarios"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Scenarios) != 12 {
		t.Fatalf("got %d scenarios, want 2 × 3 × 2 = 12", len(doc.Scenarios))
	}
	want := func(j int) (float64, float64, float64) {
		return []float64{0.8, 1.2}[j/6], []float64{0.25, 1, 2}[j/2%3], []float64{1.5, 0.5}[j%2]
	}
	for j, s := range doc.Scenarios {
		tariff, budget, capex := want(j)
		if s.Factors["tariff"] != tariff || s.Factors["budget"] != budget || s.Factors["capex"] != capex {
			t.Errorf("scenario %d: got %v, want tariff=%g budget=%g capex=%g", j, s.Factors, tariff, budget, capex)
		}
		if s.Status == "" || (s.Status == "optimal") != (s.Objective != nil) {
			t.Errorf("scenario %d: status %q with objective %v", j, s.Status, s.Objective)
		}
	}
}

// TestSweepShardsMergeCLI runs a small synthetic sweep with the real solve
// whole and in three shards, and checks that sweep merge prints exactly the
// whole run's JSON and tables.
func TestSweepShardsMergeCLI(t *testing.T) {
	dir := t.TempDir()
	if code, _, errOut := runCLI("demo", "--sites", "5", "--years", "3", "--seed", "11", filepath.Join(dir, "case")); code != exitOK {
		t.Fatalf("demo --sites: exit %d: %s", code, errOut)
	}
	path := filepath.Join(dir, "case", "case.toml")
	args := []string{"sweep", path, "--quiet", "--gap", "1e-9", "--vary", "growth=0.5,1.5", "--vary", "tariff=0.7,1,1.3", "--jobs", "2"}
	code, whole, errOut := runCLI(append(args, "--json")...)
	if code != exitOK {
		t.Fatalf("whole sweep: exit %d: %s", code, errOut)
	}
	_, wholeText, _ := runCLI(args...)
	var parts []string
	for i := 0; i < 3; i++ {
		part := filepath.Join(dir, fmt.Sprintf("part-%d.jsonl", i))
		if code, _, errOut := runCLI(append(args, "--shard", fmt.Sprintf("%d/3", i), "--out", part)...); code != exitOK {
			t.Fatalf("shard %d: exit %d: %s", i, code, errOut)
		}
		parts = append(parts, part)
	}
	code, merged, errOut := runCLI(append([]string{"sweep", "merge", "--json"}, parts...)...)
	if code != exitOK {
		t.Fatalf("merge: exit %d: %s", code, errOut)
	}
	if merged != whole {
		t.Errorf("merged shards differ from the whole sweep:\n%s\nwant:\n%s", merged, whole)
	}
	if _, mergedText, _ := runCLI(append([]string{"sweep", "merge"}, parts...)...); mergedText != wholeText {
		t.Errorf("merged tables differ from the whole sweep's")
	}
	code, _, errOut = runCLI("sweep", "merge", parts[0], parts[2])
	if code != exitBadInput || !strings.Contains(errOut, "missing shards [1]") {
		t.Errorf("merge without shard 1: exit %d, stderr %q; want %d and the missing shard named", code, errOut, exitBadInput)
	}
	// A shard's lines: a header, then its scenarios j with j mod 3 = 1.
	data, err := os.ReadFile(parts[1])
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(data)), "\n")
	if !strings.HasPrefix(lines[0], `{"sweep":`) {
		t.Fatalf("first line %q is no header", lines[0])
	}
	for _, line := range lines[1:] {
		var rec struct{ Index int }
		if err := json.Unmarshal([]byte(line), &rec); err != nil {
			t.Fatal(err)
		}
		if rec.Index%3 != 1 {
			t.Errorf("shard 1/3 holds scenario %d", rec.Index)
		}
	}
}

func TestSweepUsage(t *testing.T) {
	for _, tt := range []struct {
		args []string
		want string
	}{
		{[]string{"sweep", "--demo"}, "--vary"},
		{[]string{"sweep", "--demo", "--vary", "speed=1,2"}, "unknown factor"},
		{[]string{"sweep", "--demo", "--vary", "growth=1", "--vary", "growth=2"}, "varied twice"},
		{[]string{"sweep", "--demo", "--vary", "growth=1", "--shard", "2/2"}, "0 ≤ i < n"},
		{[]string{"sweep", "--demo", "--vary", "growth=1", "--shard", "0/2", "--json"}, "JSON lines"},
		{[]string{"sweep", "--demo", "--vary", "growth=1", "--jobs", "-1"}, "--jobs"},
		{[]string{"sweep", "--demo", "--vary", "growth=-100"}, "growth rate"},
		{[]string{"sweep", "merge"}, "arg"},
		{[]string{"sweep", "merge", "no-such-file.jsonl"}, "no-such-file"},
	} {
		code, _, errOut := runCLI(tt.args...)
		if code != exitBadInput || !strings.Contains(errOut, tt.want) {
			t.Errorf("%v: got exit %d, stderr %q; want %d mentioning %q", tt.args, code, errOut, exitBadInput, tt.want)
		}
	}
}

// TestSweepGridCap: a grid over --max-scenarios is refused with its size
// and how to go on, before the case is read (the case file here does not
// exist) and so before any solve.
func TestSweepGridCap(t *testing.T) {
	list := func(n int) string {
		v := make([]string, n)
		for i := range v {
			v[i] = fmt.Sprintf("%g", 0.5+float64(i)/float64(n))
		}
		return strings.Join(v, ",")
	}
	missing := filepath.Join(t.TempDir(), "no-such-case.toml")
	for _, tt := range []struct {
		args []string
		want []string
	}{
		{[]string{"--vary", "growth=" + list(101), "--vary", "tariff=" + list(100)},
			[]string{"10,100 scenarios", "growth 101 × tariff 100", "cap of 10,000", "--max-scenarios 10100", "--shard"}},
		{[]string{"--vary", "tariff=0.9,1.1", "--vary", "capex=0.9,1.1", "--max-scenarios", "3"},
			[]string{"4 scenarios", "cap of 3"}},
		{[]string{"--vary", "tariff=0.9,1.1", "--max-scenarios", "0"}, []string{"--max-scenarios must be ≥ 1"}},
	} {
		code, _, errOut := runCLI(append([]string{"sweep", missing}, tt.args...)...)
		if code != exitBadInput {
			t.Errorf("%v: exit %d, want %d", tt.want[0], code, exitBadInput)
		}
		for _, w := range tt.want {
			if !strings.Contains(errOut, w) {
				t.Errorf("stderr %q lacks %q", errOut, w)
			}
		}
		if strings.Contains(errOut, "no-such-case") {
			t.Errorf("stderr %q: the case was read before the grid was checked", errOut)
		}
	}
	// Under the cap the sweep goes on (and fails only on the missing file).
	code, _, errOut := runCLI("sweep", missing, "--vary", "tariff=0.9,1.1", "--max-scenarios", "2")
	if code != exitBadInput || !strings.Contains(errOut, "no-such-case") {
		t.Errorf("grid at the cap: exit %d, stderr %q; want the missing case file reported", code, errOut)
	}
}

// TestSweepTextStoppedBeforeBetter: scenarios whose search stopped before it
// found a plan better than the existing network are not shown as "no
// purchases" with a regret of 0 that reads as a robust plan: the plan
// column and a note say the search stopped, and so does the base line.
func TestSweepTextStoppedBeforeBetter(t *testing.T) {
	npv, zero := 100.0, 0.0
	rec := func(i int, status string, orders int) scenario.Record {
		return scenario.Record{Index: i, Status: status, Objective: &npv, Plan: scenario.PlanSummary{Orders: orders, Units: orders, Links: orders},
			Regret: &zero, RegretStatus: scenario.RegretOK}
	}
	rep := &scenario.Report{Case: "c", Base: rec(0, "feasible", 0),
		Scenarios: []scenario.Record{rec(0, "feasible", 0), rec(1, "optimal", 0), rec(2, "feasible", 1)}}
	var buf bytes.Buffer
	writeSweepText(&buf, rep)
	out := buf.String()
	wantLines(t, out,
		"NPV 100 (the search stopped before it found a plan better than the existing network)",
		"none found (stopped)",
		"In 1 of 3 scenarios (\"none found (stopped)\") the search stopped before it found a plan better than the existing network")
	if strings.Count(out, "none found (stopped)\n") != 1 || !strings.Contains(out, "no purchases") {
		t.Errorf("only scenario 0 stopped before a better plan; scenario 1 proved that nothing pays:\n%s", out)
	}
}
