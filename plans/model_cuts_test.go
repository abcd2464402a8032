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

// TestFlowCrossingsHoldAtLPPoints checks the inequalities behind the flow
// cut-set rows before their rounding: for every site set of two small
// cases and every year, each variant of flowCrossings at the LP
// relaxation's point must hold there (it is valid for every point of the
// model, fractional ones included, so a wrong arc or a wrong base shows at
// once), on forecast traffic with the unserved term and on committed
// traffic. Dropping half of a variant's flow columns fails it (checked).
func TestFlowCrossingsHoldAtLPPoints(t *testing.T) {
	variants := 0
	eachRelaxed(t, []synthCase{{7, 3, 1}, {8, 4, 4}}, func(t *testing.T, c *Case, m *Model, relax lp.Result) {
		x := relax.X
		n := len(c.Sites)
		in := make([]bool, n)
		linkCap, arcFlow := make([]float64, len(c.Links)), make([]float64, 2*len(c.Links))
		sum := func(cols []int) float64 {
			s := 0.0
			for _, j := range cols {
				s += x[j]
			}
			return s
		}
		// slack of Σ coefs·y + Σ x[gs] + (F − Σ x[xs]) ≥ F − base, and of
		// the committed row Σ coefs·y + Σ x[gs] ≥ C − base.
		slacks := func(cs *crossing) (forecast, committed float64) {
			lhs := sum(cs.gs)
			for k, j := range cs.cols {
				lhs += cs.coefs[k] * x[j]
			}
			return lhs + cs.forecast - sum(cs.xs) - (cs.forecast - cs.base), lhs - (cs.committed - cs.base)
		}
		for mask := 1; mask < 1<<n-1; mask += 2 { // the sets with site 0 (a set and its complement cut the same links)
			for v := range in {
				in[v] = mask&(1<<v) != 0
			}
			for yr := 0; yr < c.Horizon; yr++ {
				m.loadsAt(x, yr, linkCap, arcFlow)
				cs := m.crossing(in, yr)
				for _, fc := range m.flowCrossings(&cs, in, yr, linkCap, arcFlow) {
					variants++
					fs, cms := slacks(&fc)
					if fs < -1e-6*(1+fc.forecast) || cms < -1e-6*(1+fc.committed) {
						t.Fatalf("sites %b, year %d: a flow cut-set inequality fails at the LP point (slack %g, committed %g)", mask, yr, fs, cms)
					}
				}
			}
		}
	})
	if variants == 0 {
		t.Fatal("flowCrossings made no variant on these cases: the test proves nothing")
	}
	t.Logf("%d variants held at the LP points", variants)
}
