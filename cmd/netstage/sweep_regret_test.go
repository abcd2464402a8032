package main

import (
	"bytes"
	"encoding/json"
	"math"
	"path/filepath"
	"testing"
)

// TestSweepRegretRealSolve runs sweep with the real solve and the real
// valuation of the base plan (plans.Evaluate) on a small synthetic case:
// regret can never be negative (each scenario's own optimum is at least
// the base plan's value there, solved to a 1e-9 gap), and is zero in the
// scenario that is the base case itself.
func TestSweepRegretRealSolve(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "syn")
	var out, errOut bytes.Buffer
	if code := run([]string{"demo", "--sites", "5", "--years", "4", "--seed", "4", dir}, &out, &errOut); code != exitOK {
		t.Fatalf("demo: exit %d, %s", code, errOut.String())
	}
	out.Reset()
	errOut.Reset()
	code := run([]string{"sweep", filepath.Join(dir, "case.toml"), "--vary", "tariff=0.6,1,1.5", "--vary", "capex=0.7,1.4",
		"--gap", "1e-9", "--jobs", "1", "--json", "--quiet"}, &out, &errOut)
	if code != exitOK {
		t.Fatalf("sweep: exit %d, %s", code, errOut.String())
	}
	var rep struct {
		Scenarios []struct {
			Factors   map[string]float64 `json:"factors"`
			Objective *float64           `json:"objective"`
			Regret    *float64           `json:"regret"`
			Status    string             `json:"regret_status"`
		} `json:"scenarios"`
		References []struct {
			Factors map[string]float64 `json:"factors"`
			Regret  *float64           `json:"regret"`
		} `json:"references"`
	}
	if err := json.Unmarshal(out.Bytes(), &rep); err != nil {
		t.Fatal(err)
	}
	if len(rep.Scenarios) != 6 {
		t.Fatalf("%d scenarios, want 6", len(rep.Scenarios))
	}
	positive := 0
	for _, s := range rep.Scenarios {
		if s.Objective == nil || s.Regret == nil {
			t.Fatalf("%v: no plan or no regret", s.Factors)
		}
		if *s.Regret < -2e-9*max(1, *s.Objective) {
			t.Errorf("%v: regret %g < 0", s.Factors, *s.Regret)
		}
		if *s.Regret > 1 {
			positive++
		}
	}
	// The base case (tariff 1, capex 1) is among the references.
	base := false
	for _, r := range rep.References {
		if r.Factors["tariff"] == 1 && r.Factors["capex"] == 1 {
			base = true
			if r.Regret == nil || math.Abs(*r.Regret) > 1e-3 {
				t.Errorf("base case: regret %v, want 0", r.Regret)
			}
		}
	}
	if !base {
		t.Error("no reference point for the base case")
	}
	if positive == 0 {
		t.Error("test input: no scenario where the base plan is worse than the scenario's own: the check proves little")
	}
}
