package scenario

import (
	"context"
	"fmt"
	"math"
	"testing"

	"netstage/plans"
)

// TestEvaluateAgreesWithFixedCase values the base plan of a case in
// scenarios two independent ways: plans.Evaluate (the solve model with the
// purchases fixed) and FixedPlanEvaluator (purchases turned into existing
// capacity, their money added by this package's own rules). Equal NPVs
// and statuses in every scenario tie the two money computations together;
// each scenario moves a different rule (prices, tariffs, growth, the
// discount rate, budgets the plan no longer fits).
func TestEvaluateAgreesWithFixedCase(t *testing.T) {
	ctx := context.Background()
	cases := map[string]*plans.Case{"seed-4": syntheticCase(t, 5, 4, 4)}
	if !testing.Short() {
		cases["seed-8"] = syntheticCase(t, 5, 4, 8)
		demo, _, err := plans.LoadDemo() // tiers, a lease, a candidate link
		if err != nil {
			t.Fatal(err)
		}
		cases["demo"] = demo
	}
	for name, c := range cases {
		base, err := exactSolve(ctx, c)
		if err != nil {
			t.Fatal(err)
		}
		if len(base.Plan) == 0 {
			t.Fatalf("%s: test input: the base plan buys nothing", name)
		}
		oracle := FixedPlanEvaluator(exactSolve)
		for _, s := range []Setting{
			{Tariff, 0.7}, {Tariff, 1.3}, {Capex, 0.6}, {Capex, 1.5}, {Growth, 0.3}, {Growth, 2},
			{DiscountRate, 0.03}, {DiscountRate, 0.2}, {Budget, 0.2},
			{Growth, 8}, // far more traffic than the plan was made for
		} {
			t.Run(fmt.Sprintf("%s/%s=%g", name, s.Name, s.Value), func(t *testing.T) {
				sc, err := Apply(c, []Setting{s})
				if err != nil {
					t.Fatal(err)
				}
				got, err := plans.Evaluate(ctx, sc, base.Plan)
				if err != nil {
					t.Fatal(err)
				}
				want, err := oracle(ctx, sc, base.Plan)
				if err != nil {
					t.Fatal(err)
				}
				if got.Status != want.Status {
					t.Fatalf("status %s, fixed-case valuation %s", got.Status, want.Status)
				}
				if got.Objective == nil {
					t.Logf("status %s", got.Status)
					return
				}
				if d := math.Abs(*got.Objective - *want.Objective); d > 1e-7*math.Max(1, math.Abs(*want.Objective)) {
					t.Errorf("NPV %.4f, fixed-case valuation %.4f", *got.Objective, *want.Objective)
				}
				if math.Abs(got.TotalCapex-want.TotalCapex) > 1e-6*math.Max(1, want.TotalCapex) {
					t.Errorf("capex %.2f, fixed-case valuation %.2f", got.TotalCapex, want.TotalCapex)
				}
			})
		}
	}
}
