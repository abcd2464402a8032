package plans

import (
	"context"
	"math"
	"testing"
	"time"
)

// TestDecodeFromBaseline: a point that buys nothing is decoded from the
// baseline's own LP answer (lexFromBaseline) instead of two LPs from
// scratch; the answer must be the one those LPs give: the same NPV, the
// same fewest Gbps·km, and the same value of one more Gbps on every link
// and year. Synthetic cases with no budget, where nothing can be bought;
// each must carry its committed traffic without purchases, or the
// shortcut does not apply.
func TestDecodeFromBaseline(t *testing.T) {
	ctx := context.Background()
	for _, seed := range []int64{3, 4, 5} {
		c, err := loadSynthetic(t, 6, 4, seed)
		if err != nil {
			t.Fatal(err)
		}
		for i := range c.Budget.Yearly {
			c.Budget.Yearly[i] = 0
		}
		m, err := BuildModel(c, BuildOptions{})
		if err != nil {
			t.Fatal(err)
		}
		base, err := solveBaseline(ctx, c)
		if err != nil || base == nil {
			t.Fatalf("seed %d: baseline %v", seed, err)
		}
		if len(base.shortfall) > 0 {
			t.Fatalf("seed %d: test input: the baseline falls short of committed traffic", seed)
		}
		xi := m.startFromBaseline(base)
		got := m.lexFromBaseline(m.purchases(xi), base)
		if got == nil {
			t.Fatalf("seed %d: no answer from the baseline for a plan that buys nothing", seed)
		}
		want, err := solveLex(ctx, m.fixIntegers(xi), time.Time{}, m.kmObjective())
		if err != nil || want == nil {
			t.Fatalf("seed %d: fixed LP %v", seed, err)
		}
		// Both points hold the best NPV within holdObjectiveTol.
		gotObj, _ := m.LP.Evaluate(got.x)
		wantObj, _ := m.LP.Evaluate(want.x)
		if !near(gotObj, wantObj, 2*holdObjectiveTol) {
			t.Errorf("seed %d: objective %.6f, the fixed LPs' %.6f", seed, gotObj, wantObj)
		}
		km := func(x []float64) float64 {
			s := 0.0
			for j, v := range m.kmObjective() {
				s += v * x[j]
			}
			return s
		}
		if !near(km(got.x), km(want.x), 1e-7) {
			t.Errorf("seed %d: %.4f Gbps·km, the fixed LPs' %.4f", seed, km(got.x), km(want.x))
		}
		gotRows, wantRows := m.linkRows(got.x, got.firstDual, base), m.linkRows(want.x, want.firstDual, base)
		shadows := 0
		for i, w := range wantRows {
			g := gotRows[i]
			switch {
			case (g.ShadowValue == nil) != (w.ShadowValue == nil):
				t.Errorf("seed %d: %s %d: value of +1 Gbps %v, the fixed LP's %v", seed, w.Link, w.Year, g.ShadowValue, w.ShadowValue)
			case w.ShadowValue != nil:
				shadows++
				if math.Abs(*g.ShadowValue-*w.ShadowValue) > 1e-6*math.Max(1, math.Abs(*w.ShadowValue)) {
					t.Errorf("seed %d: %s %d: value of +1 Gbps %.6f, the fixed LP's %.6f", seed, w.Link, w.Year, *g.ShadowValue, *w.ShadowValue)
				}
			}
		}
		if shadows == 0 {
			t.Errorf("seed %d: test input: no binding link, so the duals are not checked", seed)
		}
		// The whole solve takes that path and reports the plan as usual.
		res := solveExact(t, c)
		if len(res.Plan) != 0 || res.Status != StatusOptimal || !near(*res.Objective, *res.BaselineNPV, 1e-9) {
			t.Errorf("seed %d: status %s, %d purchases, NPV %v against the baseline's %v", seed, res.Status, len(res.Plan), *res.Objective, *res.BaselineNPV)
		}
	}
	// A plan that buys something, or a baseline short of committed
	// traffic, takes the LPs.
	c, m := modelSynthetic(t, 6, 4, 3)
	base, err := solveBaseline(ctx, c)
	if err != nil {
		t.Fatal(err)
	}
	xi := m.startFromBaseline(base)
	xi[m.options[0].col[0]] = 1
	if m.lexFromBaseline(m.purchases(xi), base) != nil {
		t.Error("an answer from the baseline for a plan that buys a unit")
	}
	xi[m.options[0].col[0]] = 0
	short := *base
	short.shortfall = []ShortfallRow{{}}
	if m.lexFromBaseline(m.purchases(xi), &short) != nil {
		t.Error("an answer from the baseline when it falls short of committed traffic")
	}
}
