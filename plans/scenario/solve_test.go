package scenario

// Checks with the real planning solve (plans.Solve) on the embedded demo and
// on small synthetic cases. Each states why the property must hold.

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"math"
	"testing"
	"testing/fstest"

	"netstage/plans"
)

// exactGap is the gap of solves whose optima are compared (DESIGN.md §4:
// checks that compare optima run with --gap 1e-9).
const exactGap = 1e-9

func exactSolve(ctx context.Context, c *plans.Case) (*plans.Result, error) {
	return plans.Solve(ctx, c, plans.SolveOptions{Gap: exactGap})
}

// optTolerance is how far apart two optima solved to exactGap may be and
// still be equal: both gaps, relative to max(|NPV|, 1).
func optTolerance(a, b float64) float64 {
	return 2 * exactGap * math.Max(1, math.Max(math.Abs(a), math.Abs(b)))
}

func demoCase(t *testing.T) *plans.Case {
	t.Helper()
	c, _, err := plans.LoadDemo()
	if err != nil {
		t.Fatal(err)
	}
	return c
}

func syntheticCase(t *testing.T, sites, years int, seed int64) *plans.Case {
	t.Helper()
	files, err := plans.Synthetic(sites, years, seed)
	if err != nil {
		t.Fatal(err)
	}
	fsys := fstest.MapFS{}
	for _, f := range files {
		fsys[f.Name] = &fstest.MapFile{Data: f.Data}
	}
	c, _, err := plans.LoadFS(fsys, files[0].Name)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// testCases returns the demo and a few small synthetic cases; with -short
// one synthetic case only (a demo solve takes seconds).
func testCases(t *testing.T) map[string]*plans.Case {
	cases := map[string]*plans.Case{}
	seeds := []int64{1, 2, 3}
	if testing.Short() {
		seeds = seeds[:1]
	} else {
		cases["demo"] = demoCase(t)
	}
	for _, s := range seeds {
		cases[fmt.Sprintf("synthetic-6x3-seed%d", s)] = syntheticCase(t, 6, 3, s)
	}
	return cases
}

func objective(t *testing.T, name string, r *plans.Result) float64 {
	t.Helper()
	if r.Objective == nil {
		t.Fatalf("%s: status %s, no plan", name, r.Status)
	}
	return *r.Objective
}

// TestEvaluateBasePlanGivesOptimum: the base plan re-evaluated in its own
// case, with the budget lifted, is worth exactly its optimum (the routing
// LP given the optimal purchases can do no better, or the MIP would have
// found it; and no worse, since the optimal routing is one of its
// solutions). This ties FixedPlanEvaluator's money rules to the model's.
//
// The plan need not be proven optimal for this (the evaluation values the
// plan that was returned), so the solves run at the default gap.
func TestEvaluateBasePlanGivesOptimum(t *testing.T) {
	ctx := context.Background()
	solve := func(ctx context.Context, c *plans.Case) (*plans.Result, error) {
		return plans.Solve(ctx, c, plans.SolveOptions{})
	}
	eval := FixedPlanEvaluator(solve)
	for name, c := range testCases(t) {
		t.Run(name, func(t *testing.T) {
			res, err := solve(ctx, c)
			if err != nil {
				t.Fatal(err)
			}
			want := objective(t, name, res)
			ev, err := eval(ctx, c, res.Plan)
			if err != nil {
				t.Fatal(err)
			}
			got := objective(t, name+" re-evaluated", ev)
			if math.Abs(got-want) > 1e-6*math.Max(1, math.Abs(want)) {
				t.Fatalf("base plan re-evaluated: got NPV %.6f, want the optimum %.6f", got, want)
			}
			for i, row := range ev.Cashflow {
				if math.Abs(row.Capex-res.Cashflow[i].Capex) > 1e-6*math.Max(1, row.Capex) {
					t.Errorf("year %d: got capex %.2f, want %.2f", row.Year, row.Capex, res.Cashflow[i].Capex)
				}
			}
		})
	}
}

// TestAllCatalogsBeatEachAlone: any plan that uses one catalog alone is a
// plan of the mixed case too (same network, budget and demands, a superset
// of items), so NPV(all) ≥ NPV(each catalog alone), up to the solve gap.
func TestAllCatalogsBeatEachAlone(t *testing.T) {
	ctx := context.Background()
	for name, c := range testCases(t) {
		t.Run(name, func(t *testing.T) {
			cmp, err := Compare(ctx, c, CompareOptions{Solve: exactSolve, NoBreakEven: true, Jobs: 2})
			if err != nil {
				t.Fatal(err)
			}
			all := cmp.Variants[len(cmp.Variants)-1]
			if all.Name != AllVariant {
				t.Fatalf("last variant %s, want %s", all.Name, AllVariant)
			}
			for _, v := range cmp.Variants[:len(cmp.Variants)-1] {
				if v.Objective == nil {
					continue
				}
				if all.Objective == nil {
					t.Fatalf("%s alone has a plan, all has none (%s)", v.Name, all.Status)
				}
				if *all.Objective < *v.Objective-optTolerance(*all.Objective, *v.Objective) {
					t.Errorf("NPV(all) = %.6f < NPV(%s) = %.6f", *all.Objective, v.Name, *v.Objective)
				}
			}
		})
	}
}

// TestNPVMonotoneInTariffAndCapex: with higher tariffs every plan earns at
// least as much (revenue is tariff × served ≥ 0) and stays feasible, so the
// optimum cannot fall; with higher equipment prices every plan costs at
// least as much (capex scales by the multiplier, tiers with it) and a plan
// within budget at the higher price is within budget at the lower one, so
// the optimum cannot rise. A larger budget keeps every plan feasible, so
// the optimum cannot fall either (the budget frontier rises).
func TestNPVMonotoneInTariffCapexBudget(t *testing.T) {
	ctx := context.Background()
	values := []float64{0.6, 0.8, 1, 1.25, 1.5}
	for name, c := range testCases(t) {
		if name == "demo" {
			// Ten demo solves at gap 1e-9 take minutes on a shared
			// machine; the demo's optima are compared in
			// TestAllCatalogsBeatEachAlone.
			continue
		}
		for _, f := range []struct {
			name string
			sign float64 // +1 non-decreasing, −1 non-increasing
		}{{Tariff, 1}, {Capex, -1}, {Budget, 1}} {
			t.Run(name+"/"+f.name, func(t *testing.T) {
				g, err := NewGrid([]Factor{{Name: f.name, Values: values}})
				if err != nil {
					t.Fatal(err)
				}
				out, err := Run(ctx, c, g, Options{Solve: exactSolve, Jobs: 2})
				if err != nil {
					t.Fatal(err)
				}
				prev := math.Inf(-int(f.sign))
				for _, r := range out.Records[:g.Size()] {
					v := math.Inf(-1)
					if r.Objective != nil {
						v = *r.Objective
					}
					tol := 0.0
					if !math.IsInf(v, 0) && !math.IsInf(prev, 0) {
						tol = optTolerance(v, prev)
					}
					if f.sign*(v-prev) < -tol {
						t.Errorf("%s: NPV %.6f after %.6f: want %s", r.Factors, v, prev, map[float64]string{1: "non-decreasing", -1: "non-increasing"}[f.sign])
					}
					prev = v
				}
			})
		}
	}
}

// TestBreakEvenMatchesWinner: at the reported break-even discount the
// losing catalog, solved again on its own, is within 0.5 % of the winner.
// The default gap (1e-4) is far inside that tolerance.
func TestBreakEvenMatchesWinner(t *testing.T) {
	ctx := context.Background()
	solve := func(ctx context.Context, c *plans.Case) (*plans.Result, error) {
		return plans.Solve(ctx, c, plans.SolveOptions{})
	}
	cases := testCases(t)
	names := []string{"demo", "synthetic-6x3-seed1"}
	if testing.Short() {
		names = names[1:]
	}
	for _, name := range names {
		c := cases[name]
		t.Run(name, func(t *testing.T) {
			cmp, err := Compare(ctx, c, CompareOptions{Solve: solve, Jobs: 2})
			if err != nil {
				t.Fatal(err)
			}
			var winner *Variant
			for i := range cmp.Variants {
				if cmp.Variants[i].Winner {
					winner = &cmp.Variants[i]
				}
			}
			if winner == nil {
				t.Fatal("no winner")
			}
			checked := 0
			for _, v := range cmp.Variants {
				if v.Catalog < 0 || v.Winner {
					continue
				}
				if v.BreakEvenDiscount == nil {
					t.Logf("%s: no break-even (%s)", v.Name, v.BreakEvenNote)
					continue
				}
				p := 1 - *v.BreakEvenDiscount
				res, err := solve(ctx, OnlyCatalog(ScaleQuote(c, v.Catalog, p), v.Catalog))
				if err != nil {
					t.Fatal(err)
				}
				got, want := objective(t, v.Name, res), *winner.Objective
				// source: issue 7, "within 0.5 % of the winner's"
				if math.Abs(got-want) > BreakEvenNPVTolerance*math.Max(1, math.Abs(want)) {
					t.Errorf("%s at %.2f %% off: NPV %.2f, winner %s %.2f: more than 0.5 %% apart", v.Name, 100**v.BreakEvenDiscount, got, winner.Name, want)
				}
				checked++
			}
			t.Logf("%d losing catalogs checked", checked)
		})
	}
}

// TestRealSweepShardsAndRegret: a sweep of the real solve, sharded and
// merged, equals the unsharded run byte for byte; every regret is ≥ 0 (the
// base plan, where it fits the scenario's budget and demand, is one of the
// plans the scenario's optimum was chosen from).
func TestRealSweepShardsAndRegret(t *testing.T) {
	ctx := context.Background()
	c := syntheticCase(t, 6, 3, 2)
	g, err := NewGrid([]Factor{{Name: Growth, Values: []float64{0.5, 1.5}}, {Name: Tariff, Values: []float64{0.7, 1.3}}, {Name: Budget, Values: []float64{0.8, 1.2}}})
	if err != nil {
		t.Fatal(err)
	}
	opts := Options{Solve: exactSolve, Evaluate: FixedPlanEvaluator(exactSolve), Jobs: 2}
	full, err := Run(ctx, c, g, opts)
	if err != nil {
		t.Fatal(err)
	}
	want := runJSON(t, full)
	var shards []*Output
	for i := 0; i < 3; i++ {
		o := opts
		o.Shard = Shard{i, 3}
		out, err := Run(ctx, c, g, o)
		if err != nil {
			t.Fatal(err)
		}
		var buf bytes.Buffer
		if err := WriteLines(&buf, out); err != nil {
			t.Fatal(err)
		}
		back, err := ReadLines(&buf, fmt.Sprint(i))
		if err != nil {
			t.Fatal(err)
		}
		shards = append(shards, back)
	}
	merged, err := Merge(shards)
	if err != nil {
		t.Fatal(err)
	}
	if got := runJSON(t, merged); !bytes.Equal(got, want) {
		t.Fatal("sharded and merged differs from the unsharded sweep")
	}
	var rep Report
	if err := json.Unmarshal(want, &rep); err != nil {
		t.Fatal(err)
	}
	counts := map[string]int{}
	for _, r := range append(rep.Scenarios, rep.References...) {
		counts[r.RegretStatus]++
		switch r.RegretStatus {
		case RegretOK:
			if *r.Regret < 0 {
				t.Errorf("%s: regret %.6f < 0", r.Factors, *r.Regret)
			}
		case RegretInconsistent:
			t.Errorf("%s: base plan valued %.6f above the scenario's bound (optimum %.6f)", r.Factors, *r.BasePlan.Objective, *r.Objective)
		}
	}
	if counts[RegretOK] == 0 {
		t.Errorf("no scenario with a regret: %v", counts)
	}
	if rep.Base.Regret == nil || *rep.Base.Regret > optTolerance(*rep.Base.Objective, 0) {
		t.Errorf("base point: regret %v, want 0", deref(rep.Base.Regret))
	}
	t.Logf("regret statuses: %v", counts)
}

// TestDiscountRateRevaluesBasePlan: the base plan's yearly cash flows do
// not depend on the discount rate (each year's routing serves what pays in
// that year alone), so its NPV re-evaluated at rate r must equal the
// standard NPV of those flows, Σ net_t·(1+r)^−t with salvage at the end of
// year T (source: present value formula of corporate-finance textbooks;
// DESIGN.md §2 for salvage). Computed here from the base solve's own
// undiscounted cash flows, independently of the evaluator's discounting.
func TestDiscountRateRevaluesBasePlan(t *testing.T) {
	ctx := context.Background()
	c := syntheticCase(t, 6, 3, 1)
	base, err := exactSolve(ctx, c)
	if err != nil {
		t.Fatal(err)
	}
	objective(t, "base", base)
	g, err := NewGrid([]Factor{{Name: DiscountRate, Values: []float64{0, 0.05, 0.2}}})
	if err != nil {
		t.Fatal(err)
	}
	out, err := Run(ctx, c, g, Options{Solve: exactSolve, Evaluate: FixedPlanEvaluator(exactSolve)})
	if err != nil {
		t.Fatal(err)
	}
	for _, rec := range out.Records[:g.Size()] {
		r, _ := rec.Factors.Value(DiscountRate)
		want := 0.0
		for i, row := range base.Cashflow {
			df := math.Pow(1+r, -float64(i+1))
			if c.MidYear {
				df = math.Pow(1+r, -(float64(i) + 0.5))
			}
			want += df*(row.Net-row.Salvage) + math.Pow(1+r, -float64(c.Horizon))*row.Salvage
		}
		if rec.BasePlan == nil || rec.BasePlan.Objective == nil {
			t.Fatalf("r = %g: base plan not re-evaluated (%s)", r, rec.RegretStatus)
		}
		if got := *rec.BasePlan.Objective; math.Abs(got-want) > 1e-6*math.Max(1, math.Abs(want)) {
			t.Errorf("r = %g: base plan NPV %.6f, want %.6f from its cash flows", r, got, want)
		}
		if rec.RegretStatus != RegretOK || *rec.Regret < 0 {
			t.Errorf("r = %g: regret %v (%s), want ≥ 0", r, deref(rec.Regret), rec.RegretStatus)
		}
	}
}
