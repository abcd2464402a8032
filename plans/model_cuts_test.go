package plans

import (
	"context"
	"strings"
	"testing"

	"netstage/lp"
)

// TestSeparatedCutSetsValid: every cut-set row separated at the LP optimum
// is violated there (that is what separation promises) and holds at the
// optimal plan and at the do-nothing plan, both integer points of the
// model. A row cutting off either would be an invalid inequality: the MIR
// of a cut-set holds for every site set (see addCutSets), so this checks
// the set bookkeeping and the rounding (and, for the rows with flow terms
// of flowCrossings, the choice of arcs: dropping their flow columns makes
// the rows cut off the optimal plan, checked). Separation must find rows
// of each kind on these cases, or the test proves nothing.
func TestSeparatedCutSetsValid(t *testing.T) {
	found, subsets, flows := 0, 0, 0
	eachRelaxed(t, []synthCase{{7, 3, 1}, {8, 3, 2}, {9, 4, 3}, {8, 4, 4}}, func(t *testing.T, c *Case, m *Model, relax lp.Result) {
		rows := m.separateCutSets(relax.X)
		found += len(rows)
		for _, row := range rows {
			if strings.HasPrefix(row.Name, "sub") || strings.HasPrefix(row.Name, "flowsub") {
				subsets++
			}
			if strings.HasPrefix(row.Name, "flow") {
				flows++
			}
		}
		res, err := Solve(context.Background(), c, SolveOptions{Gap: 1e-9})
		if err != nil || res.Status != StatusOptimal {
			t.Fatalf("solve: %v %v", res.Status, err)
		}
		base, err := solveBaseline(context.Background(), c)
		if err != nil || base == nil {
			t.Fatalf("baseline: %v", err)
		}
		points := map[string][]float64{"optimal plan": res.x, "do-nothing plan": m.startFromBaseline(base)}
		for _, row := range rows {
			if v := row.Lower - rowActivity(row, relax.X); v <= minCutViolation {
				t.Errorf("%s: violation %g at the LP point, want > %g", row.Name, v, minCutViolation)
			}
			for name, x := range points {
				if a := rowActivity(row, x); a < row.Lower-1e-6*(1+abs(row.Lower)) {
					t.Errorf("%s cuts off the %s: activity %.9g < %.9g", row.Name, name, a, row.Lower)
				}
			}
		}
		// The separated rows do not change the optimum (they only
		// tighten the relaxation).
		plain, err := Solve(context.Background(), c, SolveOptions{Gap: 1e-9, NoSeparation: true})
		if err != nil || plain.Status != StatusOptimal {
			t.Fatalf("solve without separation: %v %v", plain.Status, err)
		}
		if d := *res.Objective - *plain.Objective; abs(d) > 1e-6*abs(*plain.Objective) {
			t.Errorf("NPV %.2f with separation, %.2f without", *res.Objective, *plain.Objective)
		}
	})
	if found == 0 || subsets == 0 || flows == 0 {
		t.Fatalf("separation found %d violated rows, %d on demand subsets and %d with flow terms, on these cases: want some of each", found, subsets, flows)
	}
	t.Logf("%d separated rows checked, %d of them on demand subsets, %d with flow terms", found, subsets, flows)
}
