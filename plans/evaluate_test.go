package plans

import (
	"context"
	"fmt"
	"testing"
)

// TestEvaluateOwnPlan: a plan valued in its own case must give back its
// NPV and cash flows (the fixed-plan model is the solve model with the
// integer purchases fixed at the optimum, so its optimum is the same
// point); its baseline is the case's.
func TestEvaluateOwnPlan(t *testing.T) {
	seeds := []int64{3, 4, 5, 8} // seeds whose plans buy something
	if testing.Short() {
		seeds = seeds[:2]
	}
	forSyntheticAndDemo(t, 5, 4, seeds, func(t *testing.T, c *Case) {
		res := solveExact(t, c)
		if len(res.Plan) == 0 {
			t.Fatal("test input: the plan buys nothing")
		}
		ev, err := Evaluate(context.Background(), c, res.Plan)
		if err != nil {
			t.Fatal(err)
		}
		if ev.Status != StatusOptimal {
			t.Fatalf("status %s", ev.Status)
		}
		if !near(*ev.Objective, *res.Objective, 1e-7) {
			t.Errorf("NPV of the plan valued: %.4f, solved: %.4f", *ev.Objective, *res.Objective)
		}
		if !near(*ev.BaselineNPV, *res.BaselineNPV, 1e-9) {
			t.Errorf("baseline %.4f, solve's %.4f", *ev.BaselineNPV, *res.BaselineNPV)
		}
		if fmt.Sprint(ev.Plan) != fmt.Sprint(res.Plan) {
			t.Errorf("plan valued:\n%v\nplan solved:\n%v", ev.Plan, res.Plan)
		}
		for i := range res.Cashflow {
			if !near(ev.Cashflow[i].Net, res.Cashflow[i].Net, 1e-7) {
				t.Errorf("year %d: net %.4f, solve's %.4f", res.Cashflow[i].Year, ev.Cashflow[i].Net, res.Cashflow[i].Net)
			}
		}
		checkInvariants(t, c, ev)
	})
}

// TestEvaluateBudgetNotEnforced: a plan is valued even where it spends more
// than the case's budget allows: halving every cap must leave the value of
// the plan unchanged while the solve of the halved case can only do worse.
func TestEvaluateBudgetNotEnforced(t *testing.T) {
	c, err := loadSynthetic(t, 5, 4, 4)
	if err != nil {
		t.Fatal(err)
	}
	res := solveExact(t, c)
	if len(res.Plan) == 0 {
		t.Fatal("test input: the plan buys nothing")
	}
	tight := *c
	tight.Budget.Yearly = make([]float64, c.Horizon)
	for i := range tight.Budget.Yearly {
		tight.Budget.Yearly[i] = 0
	}
	ev, err := Evaluate(context.Background(), &tight, res.Plan)
	if err != nil {
		t.Fatal(err)
	}
	if ev.Status != StatusOptimal || !near(*ev.Objective, *res.Objective, 1e-7) {
		t.Errorf("with no budget: status %s, NPV %v, want the plan's %.4f", ev.Status, ev.Objective, *res.Objective)
	}
}

// TestEvaluateKeepsTierAboveBudget: the plan of the reached-tier case of
// TestVolumeTierChangesVendor (two units of Y at 10 % off, 18,900 in
// all) keeps its discount when valued under a budget of 15,000, which
// could not pay for it: budgets are not enforced there, so the model's
// rows and fixings that rest on them (tier spend caps, unreachable
// tiers) must not apply either.
func TestEvaluateKeepsTierAboveBudget(t *testing.T) {
	c := newCase(1, fpRate, "A", "B")
	c.testLink("L", "A", "B", 100, 10, 1)
	c.testDemand("A", "B", 30, 0, 200)
	c.testVendor("X")
	c.testVendor("Y", Tier{Basis: TierByUnits, Threshold: 2, Discount: 0.10})
	c.testItem(testItem{id: "MX", vendor: "X", gbps: fpGbps, capex: 10000, life: fpLife, maxUnits: 2})
	c.testItem(testItem{id: "MY", vendor: "Y", gbps: fpGbps, capex: 10500, life: fpLife, maxUnits: 2})
	res := solveExact(t, c)
	if len(res.Plan) != 1 || res.Plan[0].Item != "MY" || res.Plan[0].Units != 2 {
		t.Fatalf("test input: plan %+v, want two units of MY", res.Plan)
	}
	c.Budget.Yearly[0] = 15000
	ev, err := Evaluate(context.Background(), c, res.Plan)
	if err != nil {
		t.Fatal(err)
	}
	if ev.Status != StatusOptimal || !near(*ev.Objective, *res.Objective, 1e-9) || !near(ev.TotalCapex, 18900, 1e-9) {
		t.Errorf("under a budget of 15,000: status %s, NPV %v, capex %v; want the plan's %.4f and 18,900", ev.Status, ev.Objective, ev.TotalCapex, *res.Objective)
	}
}

// TestEvaluateRejectsUnofferedRows: a row the case cannot order is an
// error, not a silent drop.
func TestEvaluateRejectsUnofferedRows(t *testing.T) {
	c, err := loadSynthetic(t, 4, 3, 1)
	if err != nil {
		t.Fatal(err)
	}
	link := c.Links[0].ID
	it := c.Items[c.Links[0].Items[0]]
	good := PlanRow{Year: c.FirstYear, Link: link, Kind: KindModule, Item: it.ID, Vendor: c.Vendors[it.Vendor].ID, Units: 1}
	for name, row := range map[string]PlanRow{
		"unknown link":    {Year: good.Year, Link: "nowhere", Kind: KindModule, Item: good.Item, Vendor: good.Vendor, Units: 1},
		"unknown item":    {Year: good.Year, Link: link, Kind: KindModule, Item: "no-such-item", Vendor: good.Vendor, Units: 1},
		"before the case": {Year: c.FirstYear - 1, Link: link, Kind: KindModule, Item: good.Item, Vendor: good.Vendor, Units: 1},
		"too many units":  {Year: good.Year, Link: link, Kind: KindModule, Item: good.Item, Vendor: good.Vendor, Units: it.MaxUnits + 1},
	} {
		if _, err := Evaluate(context.Background(), c, []PlanRow{row}); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
	if _, err := Evaluate(context.Background(), c, []PlanRow{good}); err != nil {
		t.Errorf("a row the case offers: %v", err)
	}
}
