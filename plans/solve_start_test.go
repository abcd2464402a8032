package plans

import (
	"context"
	"testing"
)

// TestStartPlan: a search that may not leave the root, with no heuristics
// of its own, still ends with the plan it was given to start from (it keeps
// the plan's NPV), and ends below it without that plan, so the start is
// what makes the difference. A plan the case does not offer is ignored.
func TestStartPlan(t *testing.T) {
	c, err := loadSynthetic(t, 8, 5, 101)
	if err != nil {
		t.Fatal(err)
	}
	best, err := Solve(context.Background(), c, SolveOptions{Gap: 1e-9})
	if err != nil || best.Status != StatusOptimal {
		t.Fatalf("full solve: %v %v", best.Status, err)
	}
	if len(best.Plan) == 0 {
		t.Fatal("the optimal plan buys nothing: choose another case")
	}
	rootOnly := SolveOptions{NodeLimit: 1, NoHeuristic: true, NoImprove: true, NoRINS: true}
	withoutStart, err := Solve(context.Background(), c, rootOnly)
	if err != nil {
		t.Fatal(err)
	}
	if !(*withoutStart.Objective < *best.Objective-1) {
		t.Fatalf("the root alone already reaches NPV %.2f (optimum %.2f): the test cannot tell the start's effect", *withoutStart.Objective, *best.Objective)
	}
	started := rootOnly
	started.StartPlan = best.Plan
	res, err := Solve(context.Background(), c, started)
	if err != nil {
		t.Fatal(err)
	}
	checkInvariants(t, c, res)
	if !near(*res.Objective, *best.Objective, 1e-9) {
		t.Errorf("started from the optimal plan: NPV %.4f, want %.4f (without the start %.4f)", *res.Objective, *best.Objective, *withoutStart.Objective)
	}
	misfit := append([]PlanRow{{Year: c.FirstYear, Link: c.Links[0].ID, Kind: KindModule, Item: "no-such-item", Vendor: "alpha", Units: 1}}, best.Plan...)
	started.StartPlan = misfit
	res, err = Solve(context.Background(), c, started)
	if err != nil {
		t.Fatal(err)
	}
	if *res.Objective != *withoutStart.Objective {
		t.Errorf("a plan with an item the case does not offer: NPV %.4f, want %.4f as without a start", *res.Objective, *withoutStart.Objective)
	}
}
