package mip

import (
	"context"
	"math"
	"math/rand"
	"slices"
	"testing"

	"netstage/lp"
)

// integerPoints enumerates the integer assignments of m (small, with
// finite integer bounds) that have a feasible completion, each with the
// best objective of a completion in the search's internal sense
// (minimisation, constant included).
func integerPoints(m *lp.Model) (xs [][]float64, objs []float64) {
	ints, conts, sign := splitColumns(m)
	rows := m.Rows()
	x := make([]float64, m.NumCols())
	var rec func(k int)
	rec = func(k int) {
		if k < len(ints) {
			j := ints[k]
			for v := math.Ceil(m.ColLower[j]); v <= m.ColUpper[j]; v++ {
				x[j] = v
				rec(k + 1)
			}
			return
		}
		if st, val := continuousLP(m, rows, x, conts, sign); st == Optimal {
			xs = append(xs, append([]float64(nil), x...))
			objs = append(objs, val+sign*m.Constant)
		}
	}
	rec(0)
	return xs, objs
}

// enumeratedOptimum returns the best of the objectives integerPoints
// gives, in m's own sense, and false when there are none (m infeasible).
func enumeratedOptimum(m *lp.Model, objs []float64) (float64, bool) {
	if len(objs) == 0 {
		return 0, false
	}
	best := slices.Min(objs)
	if m.Sense == lp.Maximize {
		return -best, true
	}
	return best, true
}

// correlatedKnapsack builds a binary program of 14 to 16 columns: two
// knapsack rows whose profits follow the weights closely, a kind that
// needs a real tree (the textbook hard case for branch-and-bound), and
// with withCover a row of a third weight to reach.
func correlatedKnapsack(rng *rand.Rand, withCover bool) *lp.Model {
	m := lp.NewModel("knapsack")
	m.Sense = lp.Maximize
	n := 14 + rng.Intn(3)
	w1 := make([]float64, n)
	w2 := make([]float64, n)
	w3 := make([]float64, n)
	cols := make([]int, n)
	sum1, sum2, sum3 := 0.0, 0.0, 0.0
	for j := 0; j < n; j++ {
		w1[j] = float64(10 + rng.Intn(90))
		w2[j] = float64(10 + rng.Intn(90))
		w3[j] = float64(10 + rng.Intn(90))
		sum1 += w1[j]
		sum2 += w2[j]
		sum3 += w3[j]
		cols[j] = j
		m.AddIntCol("x", w1[j]+w2[j]+float64(rng.Intn(11)), 0, 1)
	}
	m.AddRow("w1", math.Inf(-1), math.Round(sum1/2), cols, w1)
	m.AddRow("w2", math.Inf(-1), math.Round(sum2/2), cols, w2)
	if withCover {
		// A third weight that the chosen items must reach: branches that
		// drop too many items are infeasible.
		m.AddRow("w3", math.Round(sum3*0.4), math.Inf(1), cols, w3)
	}
	return m
}

// TestProofsAgainstEnumeration checks every proof the search learns on
// small random MIPs against all their integer points: each point whose
// best completion is better than the cutoff in force when the proof was
// learnt must satisfy it, and every feasible point a proof from an
// infeasible LP (proofs.go states why they must). It also checks
// that the proofs were learnt and used in numbers, so that the check does
// not pass empty, and that the answers match enumeration.
func TestProofsAgainstEnumeration(t *testing.T) {
	type learnt struct {
		pf     proof
		cutoff float64
	}
	var got []learnt
	proofHook = func(pf proof, cutoff float64) { got = append(got, learnt{pf, cutoff}) }
	checked, models, prunes, fixes, farkas := 0, 0, 0, 0, 0
	proofUseHook = func(p, f int) { prunes += p; fixes += f }
	defer func() { proofHook, proofUseHook = nil, nil }()
	for seed := 1; seed <= 60; seed++ {
		rng := rand.New(rand.NewSource(int64(seed)))
		m := correlatedKnapsack(rng, seed%3 != 0)
		xs, objs := integerPoints(m)
		wantObj, ok := enumeratedOptimum(m, objs)
		if !ok {
			continue
		}
		got = got[:0]
		// Without cuts and heuristics the trees are larger.
		set := Settings{RelGap: 1e-9, AbsGap: 1e-9, NoHeuristics: true, NoCuts: seed%2 == 0, Seed: int64(seed)}
		r, err := Solve(context.Background(), m, set)
		if err != nil {
			t.Fatal(err)
		}
		if r.Status != Optimal || math.Abs(r.Objective-wantObj) > 1e-6*math.Max(1, math.Abs(wantObj)) {
			t.Fatalf("seed %d: %v %v, want optimal %v", seed, r.Status, r.Objective, wantObj)
		}
		if len(got) == 0 {
			continue
		}
		models++
		for _, l := range got {
			rhs := l.pf.rhs(l.cutoff)
			if l.pf.farkas {
				farkas++
			}
			for k, x := range xs {
				if !l.pf.farkas && objs[k] > l.cutoff-1e-9*math.Max(1, math.Abs(l.cutoff)) {
					continue // an objective proof binds better points only
				}
				act := 0.0
				for q, j := range l.pf.idx {
					act += l.pf.val[q] * x[j]
				}
				if act > rhs+1e-7*math.Max(1, math.Abs(rhs)) {
					t.Fatalf("seed %d: a point of objective %v (cutoff %v) violates a proof: %v > %v", seed, objs[k], l.cutoff, act, rhs)
				}
				checked++
			}
		}
	}
	t.Logf("%d models with proofs (%d proofs from infeasible LPs), %d point checks, %d nodes pruned and %d bounds tightened by proofs", models, farkas, checked, prunes, fixes)
	if models < 20 || checked < 100 || prunes+fixes == 0 || farkas < 10 {
		t.Errorf("too little exercised: %d models with proofs, %d from infeasible LPs, %d point checks, %d prunes, %d fixes", models, farkas, checked, prunes, fixes)
	}
}
