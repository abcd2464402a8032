package mip

import (
	"context"
	"fmt"
	"math"
	"math/rand"
	"testing"

	"netstage/lp"
)

// budgetChain builds the shape that impliedBounds is for: groups of
// priced integer columns (units), one continuous spend column per group
// that must cover the group's price total, and a budget row over the
// spend columns, so that the budget bounds the units only through the
// continuous columns. The objective pays for units and charges spend; a
// random extra row ties two units together.
func budgetChain(rng *rand.Rand) *lp.Model {
	m := lp.NewModel("budget chain")
	m.Sense = lp.Maximize
	groups := 2 + rng.Intn(2)
	var spends []int
	var units []int
	budget := float64(20 + rng.Intn(60))
	for g := 0; g < groups; g++ {
		var cols []int
		var vals []float64
		for k := 0; k < 2+rng.Intn(2); k++ {
			price := float64(5 + rng.Intn(40))
			j := m.AddIntCol(fmt.Sprintf("u%d_%d", g, k), price*(1+rng.Float64()), 0, float64(1+rng.Intn(3)))
			cols = append(cols, j)
			vals = append(vals, -price)
			units = append(units, j)
		}
		s := m.AddCol(fmt.Sprintf("spend%d", g), -0.1*float64(rng.Intn(3)), 0, lp.Inf)
		spends = append(spends, s)
		m.AddRow(fmt.Sprintf("cover%d", g), 0, lp.Inf, append(cols, s), append(vals, 1))
	}
	ones := make([]float64, len(spends))
	for k := range ones {
		ones[k] = 1
	}
	m.AddRow("budget", math.Inf(-1), budget, spends, ones)
	a, b := units[rng.Intn(len(units))], units[rng.Intn(len(units))]
	if a != b {
		m.AddRow("tie", math.Inf(-1), float64(1+rng.Intn(3)), []int{a, b}, []float64{1, 1})
	}
	return m
}

// TestImpliedBoundsChain: a budget of 70 over a spend column that covers
// units priced 30 and 50 allows at most 2 and 1 of them. Propagation over
// the integer columns alone cannot see it (the spend column is unbounded);
// impliedBounds does, and leaves the spend column's own bounds as they were.
func TestImpliedBoundsChain(t *testing.T) {
	m := lp.NewModel("chain")
	y1 := m.AddIntCol("y1", 1, 0, 5)
	y2 := m.AddIntCol("y2", 1, 0, 5)
	s := m.AddCol("s", 0, 0, lp.Inf)
	m.AddRow("cover", 0, lp.Inf, []int{s, y1, y2}, []float64{1, -30, -50})
	m.AddRow("budget", math.Inf(-1), 70, []int{s}, []float64{1})
	p, _ := newProblem(m, 1e-6)
	pr := newPropagator(p)
	lo := append([]float64(nil), p.lower...)
	up := append([]float64(nil), p.upper...)
	if !pr.propagate(lo, up, nil, nil) {
		t.Fatal("propagate: domain reported empty")
	}
	if up[y1] != 5 || up[y2] != 5 {
		t.Fatalf("integer-only propagation tightened the units to %v and %v; the test needs a chain it cannot follow", up[y1], up[y2])
	}
	if !pr.impliedBounds(lo, up) {
		t.Fatal("impliedBounds: domain reported empty")
	}
	if up[y1] != 2 || up[y2] != 1 {
		t.Errorf("implied upper bounds %v and %v, want 2 and 1", up[y1], up[y2])
	}
	if lo[s] != 0 || !math.IsInf(up[s], 1) {
		t.Errorf("the continuous column's bounds changed to [%v, %v]", lo[s], up[s])
	}
	if pr.continuous {
		t.Error("impliedBounds left the propagator tightening continuous columns")
	}

	// Three units of y1 cost 90, over the budget: the chain finds the
	// domain empty, and impliedBounds reports it and changes nothing.
	lo[y1], up[y1], up[y2] = 3, 5, 5
	if pr.impliedBounds(lo, up) {
		t.Error("impliedBounds accepted y1 ≥ 3 under a budget of 70 at 30 a unit")
	}
	if lo[y1] != 3 || up[y1] != 5 || up[y2] != 5 {
		t.Errorf("a failed impliedBounds changed the domain: y1 [%v, %v], y2 up %v", lo[y1], up[y1], up[y2])
	}
}

// TestImpliedBoundsAgainstEnumeration checks the tightening on random
// budget chains: every integer point that has a feasible completion must
// lie inside the bounds impliedBounds returns, and the search must agree
// with enumeration on the optimum. It also checks that the tightening
// bites on a good share of the cases, so that the check means something.
func TestImpliedBoundsAgainstEnumeration(t *testing.T) {
	tightened, points := 0, 0
	const count = 60
	for seed := 1; seed <= count; seed++ {
		rng := rand.New(rand.NewSource(int64(seed)))
		m := budgetChain(rng)
		p, ok := newProblem(m, 1e-6)
		if !ok {
			t.Fatalf("seed %d: empty domain", seed)
		}
		pr := newPropagator(p)
		lo := append([]float64(nil), p.lower...)
		up := append([]float64(nil), p.upper...)
		if !pr.propagate(lo, up, nil, nil) {
			t.Fatalf("seed %d: domain reported empty (the zero plan is feasible)", seed)
		}
		plainUp := append([]float64(nil), up...)
		if !pr.impliedBounds(lo, up) {
			t.Fatalf("seed %d: domain reported empty (the zero plan is feasible)", seed)
		}
		for j := range lo {
			if p.isInt[j] && up[j] < plainUp[j] {
				tightened++ // beyond what propagation over integer columns finds
			}
		}
		xs, objs := integerPoints(m)
		for _, x := range xs {
			points++
			for j := range x {
				if m.Integer[j] && (x[j] < lo[j] || x[j] > up[j]) {
					t.Fatalf("seed %d: feasible point has %s = %v outside the implied [%v, %v]", seed, m.ColName[j], x[j], lo[j], up[j])
				}
			}
		}
		wantObj, ok := enumeratedOptimum(m, objs)
		if !ok {
			t.Fatalf("seed %d: no feasible point, though buying nothing is one", seed)
		}
		r, err := Solve(context.Background(), m, Settings{RelGap: 1e-9, AbsGap: 1e-9, Seed: int64(seed)})
		if err != nil {
			t.Fatalf("seed %d: %v", seed, err)
		}
		if r.Status != Optimal || math.Abs(r.Objective-wantObj) > 1e-6*math.Max(1, math.Abs(wantObj)) {
			t.Errorf("seed %d: %v %v, want optimal %v (enumeration)", seed, r.Status, r.Objective, wantObj)
		}
	}
	t.Logf("%d integer bounds tightened beyond integer-only propagation over %d cases; %d feasible points checked", tightened, count, points)
	if tightened < count {
		t.Errorf("only %d bounds tightened over %d cases: the generator no longer makes chains that bind", tightened, count)
	}
}
