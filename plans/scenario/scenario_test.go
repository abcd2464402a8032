package scenario

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"math"
	"strings"
	"sync"
	"testing"

	"netstage/plans"
)

func TestParseVary(t *testing.T) {
	tests := []struct {
		in      string
		want    []float64
		wantErr string
	}{
		{in: "growth=0.5,1,1.5", want: []float64{0.5, 1, 1.5}},
		{in: " tariff = 0.8 , 1.2", want: []float64{0.8, 1.2}},
		{in: "discount_rate=0.05,0.12", want: []float64{0.05, 0.12}},
		{in: "speed=1,2", wantErr: "unknown factor"},
		{in: "growth", wantErr: "want NAME=v1,v2"},
		{in: "growth=", wantErr: "want NAME=v1,v2"},
		{in: "capex=1,x", wantErr: "not a finite number"},
		{in: "budget=-1", wantErr: "must be ≥ 0"},
		{in: "discount_rate=-0.01", wantErr: "≥ 0 and < 1"},
		{in: "discount_rate=1", wantErr: "≥ 0 and < 1"},
		{in: "tariff=NaN", wantErr: "not a finite number"},
	}
	for _, tt := range tests {
		t.Run(tt.in, func(t *testing.T) {
			f, err := ParseVary(tt.in)
			if tt.wantErr != "" {
				if err == nil || !strings.Contains(err.Error(), tt.wantErr) {
					t.Fatalf("got error %v, want one containing %q", err, tt.wantErr)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if len(f.Values) != len(tt.want) {
				t.Fatalf("got %v, want %v", f.Values, tt.want)
			}
			for i := range tt.want {
				if f.Values[i] != tt.want[i] {
					t.Fatalf("got %v, want %v", f.Values, tt.want)
				}
			}
		})
	}
}

func TestGridOrder(t *testing.T) {
	g, err := NewGrid([]Factor{{Name: Growth, Values: []float64{0.5, 1}}, {Name: Tariff, Values: []float64{0.8, 1, 1.2}}})
	if err != nil {
		t.Fatal(err)
	}
	// The first --vary is outermost: it changes slowest (DESIGN.md §4).
	want := []string{
		"growth=0.5 tariff=0.8", "growth=0.5 tariff=1", "growth=0.5 tariff=1.2",
		"growth=1 tariff=0.8", "growth=1 tariff=1", "growth=1 tariff=1.2",
	}
	if g.Size() != len(want) {
		t.Fatalf("got size %d, want %d", g.Size(), len(want))
	}
	for j, w := range want {
		p := g.Point(j)
		if p.String() != w {
			t.Errorf("point %d: got %s, want %s", j, p, w)
		}
		if g.Index(p) != j {
			t.Errorf("Index(Point(%d)) = %d", j, g.Index(p))
		}
	}
	if _, err := NewGrid([]Factor{{Name: Growth, Values: []float64{1}}, {Name: Growth, Values: []float64{2}}}); err == nil {
		t.Error("a factor varied twice: got no error")
	}
}

func TestShardOwnership(t *testing.T) {
	s, err := ParseShard("1/3")
	if err != nil {
		t.Fatal(err)
	}
	var got []int
	for j := 0; j < 8; j++ {
		if s.Owns(j) {
			got = append(got, j)
		}
	}
	// Scenario j belongs to shard j mod n (DESIGN.md §4).
	if want := []int{1, 4, 7}; !equalInts(got, want) {
		t.Fatalf("got %v, want %v", got, want)
	}
	for _, bad := range []string{"3/3", "-1/2", "1", "a/b", "0/0"} {
		if _, err := ParseShard(bad); err == nil {
			t.Errorf("ParseShard(%q): got no error", bad)
		}
	}
}

func equalInts(a, b []int) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

const closeRel = 1e-12

func near(a, b float64) bool {
	return math.Abs(a-b) <= closeRel*math.Max(1, math.Max(math.Abs(a), math.Abs(b)))
}

func TestApplyFactors(t *testing.T) {
	c := testCase()
	orig := testCase()
	t.Run("growth", func(t *testing.T) {
		cc, err := Apply(c, []Setting{{Growth, 0.5}})
		if err != nil {
			t.Fatal(err)
		}
		for k, d := range cc.Demands {
			o := c.Demands[k]
			for i := range d.Forecast {
				// source: DESIGN.md §2, forecast f₁·(1+g)^(t−1), with g ×0.5
				want := o.Forecast[0] * math.Pow(1+0.5*o.Growth, float64(i))
				if !near(d.Forecast[i], want) {
					t.Errorf("%s year %d: got forecast %g, want %g", d.ID, i, d.Forecast[i], want)
				}
				// contracts stay in Gbps, capped by the new forecast
				if want := math.Min(o.Committed[i], d.Forecast[i]); d.Committed[i] != want {
					t.Errorf("%s year %d: got committed %g, want %g", d.ID, i, d.Committed[i], want)
				}
			}
		}
	})
	t.Run("growth turned to decline caps contracts", func(t *testing.T) {
		cc, err := Apply(c, []Setting{{Growth, -2}})
		if err != nil {
			t.Fatal(err)
		}
		// a-b: g = 0.2 becomes −0.4; in year 3 the forecast 40·0.6² = 14.4
		// is below the contracted 40·1.2²/2 = 28.8 Gbps
		d := cc.Demands[0]
		if !near(d.Forecast[2], 14.4) || d.Committed[2] != d.Forecast[2] {
			t.Errorf("year 3: got forecast %g committed %g, want 14.4 and 14.4", d.Forecast[2], d.Committed[2])
		}
	})
	t.Run("growth of an explicit list", func(t *testing.T) {
		c := testCase()
		c.Demands[0].Growth = math.NaN()
		c.Demands[0].Forecast = []float64{10, 20, 15}
		cc, err := Apply(c, []Setting{{Growth, 0.5}})
		if err != nil {
			t.Fatal(err)
		}
		// year-on-year changes +100 % and −25 % halved: +50 %, −12.5 %
		want := []float64{10, 15, 15 * 0.875}
		for i, w := range want {
			if !near(cc.Demands[0].Forecast[i], w) {
				t.Errorf("year %d: got %g, want %g", i, cc.Demands[0].Forecast[i], w)
			}
		}
	})
	t.Run("tariff", func(t *testing.T) {
		cc, _ := Apply(c, []Setting{{Tariff, 1.25}})
		for k, d := range cc.Demands {
			for i, p := range d.Tariff {
				if !near(p, 1.25*c.Demands[k].Tariff[i]) {
					t.Errorf("%s year %d: got tariff %g, want %g", d.ID, i, p, 1.25*c.Demands[k].Tariff[i])
				}
			}
		}
	})
	t.Run("capex", func(t *testing.T) {
		cc, _ := Apply(c, []Setting{{Capex, 0.8}})
		for k, it := range cc.Items {
			o := c.Items[k]
			for i := range it.UnitCapex {
				if !near(it.Capex(i, 10), 0.8*o.Capex(i, 10)) {
					t.Errorf("%s year %d: got capex %g, want %g", it.ID, i, it.Capex(i, 10), 0.8*o.Capex(i, 10))
				}
				if !near(it.OrderOpex[i], o.OrderOpex[i]) {
					t.Errorf("%s: opex changed with capex", it.ID)
				}
			}
		}
		if got, want := cc.Vendors[0].Tiers[0].Threshold, 0.8*2000.0; !near(got, want) {
			t.Errorf("spend threshold: got %g, want %g", got, want)
		}
		if got := cc.Vendors[1].Tiers[0].Threshold; got != 3 {
			t.Errorf("units threshold: got %g, want 3", got)
		}
	})
	t.Run("discount_rate", func(t *testing.T) {
		cc, _ := Apply(c, []Setting{{DiscountRate, 0.05}})
		for i := 0; i < c.Horizon; i++ {
			// source: present value factor (1+r)^−t, standard corporate-finance formula
			want := math.Pow(1.05, -float64(i+1))
			if !near(cc.DiscountFactor(i), want) {
				t.Errorf("year %d: got DF %g, want %g", i, cc.DiscountFactor(i), want)
			}
		}
		if got, want := cc.SalvageDiscountFactor(), math.Pow(1.05, -3); !near(got, want) {
			t.Errorf("salvage DF: got %g, want %g", got, want)
		}
	})
	t.Run("budget", func(t *testing.T) {
		cc, _ := Apply(c, []Setting{{Budget, 2}})
		want := []float64{10000, math.Inf(1), 6000}
		for i, w := range want {
			if cc.Budget.Yearly[i] != w {
				t.Errorf("year %d: got cap %g, want %g", i, cc.Budget.Yearly[i], w)
			}
		}
		if got, ok := BudgetCap(cc); ok {
			t.Errorf("BudgetCap with an uncapped year: got %g, capped", got)
		}
	})
	t.Run("unknown", func(t *testing.T) {
		if _, err := Apply(c, []Setting{{"speed", 2}}); err == nil {
			t.Error("got no error")
		}
	})
	t.Run("growth below -100 %", func(t *testing.T) {
		if _, err := Apply(c, []Setting{{Growth, -10}}); err == nil {
			t.Error("got no error")
		}
	})
	// Apply never changes its input.
	a, _ := json.Marshal(c)
	b, _ := json.Marshal(orig)
	if !bytes.Equal(a, b) {
		t.Error("Apply changed the case it was given")
	}
}

func TestOnlyCatalog(t *testing.T) {
	c := testCase()
	cc := OnlyCatalog(c, 1)
	if len(cc.Vendors) != 1 || cc.Vendors[0].ID != "sv" || cc.Vendors[0].Catalog != 0 {
		t.Fatalf("got vendors %+v, want only sv in catalog 0", cc.Vendors)
	}
	if len(cc.Items) != 2 || cc.Items[0].ID != "s100" || cc.Items[1].ID != "slease" || cc.Items[0].Vendor != 0 {
		t.Fatalf("got items %v %v, want s100, slease of vendor 0", cc.Items[0].ID, cc.Items[1].ID)
	}
	for _, l := range cc.Links {
		if !equalInts(l.Items, []int{0, 1}) {
			t.Errorf("link %s: got items %v, want [0 1]", l.ID, l.Items)
		}
	}
	if len(c.Vendors) != 2 || len(c.Items) != 3 || !equalInts(c.Links[0].Items, []int{0, 1, 2}) {
		t.Error("OnlyCatalog changed its input")
	}
}

func TestScaleQuote(t *testing.T) {
	c := testCase()
	cc := ScaleQuote(c, 1, 0.7)
	if !near(cc.Items[0].Capex(1, 5), c.Items[0].Capex(1, 5)) {
		t.Error("another catalog's price changed")
	}
	if !near(cc.Items[1].Capex(1, 5), 0.7*c.Items[1].Capex(1, 5)) || !near(cc.Items[1].OrderOpex[1], c.Items[1].OrderOpex[1]) {
		t.Error("module: want capex ×0.7 and opex unchanged")
	}
	if !near(cc.Items[2].OrderOpex[2], 0.7*c.Items[2].OrderOpex[2]) {
		t.Error("lease fee: want ×0.7")
	}
}

func sweepGrid(t *testing.T) Grid {
	t.Helper()
	g, err := NewGrid([]Factor{
		{Name: Tariff, Values: []float64{1.2, 0.8}},
		{Name: Capex, Values: []float64{0.5, 2, 1.5}},
		{Name: Budget, Values: []float64{0.5, 1, 2}},
	})
	if err != nil {
		t.Fatal(err)
	}
	return g
}

func runJSON(t *testing.T, out *Output) []byte {
	t.Helper()
	rep, err := BuildReport(out)
	if err != nil {
		t.Fatal(err)
	}
	b, err := json.Marshal(rep)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// TestSweepFromBasePlan: with SolveFrom, every scenario but the base point
// is solved from the base plan (solved first), and its result is
// SolveFrom's.
func TestSweepFromBasePlan(t *testing.T) {
	c := testCase()
	g := sweepGrid(t)
	base, err := fakeSolve(context.Background(), c)
	if err != nil || len(base.Plan) == 0 {
		t.Fatalf("the base point's fake plan buys nothing (%v): the test needs one", err)
	}
	var mu sync.Mutex
	froms := 0
	from := func(ctx context.Context, vc *plans.Case, start []plans.PlanRow) (*plans.Result, error) {
		if len(start) != len(base.Plan) || start[0] != base.Plan[0] {
			t.Errorf("started from %v, want the base plan %v", start, base.Plan)
		}
		mu.Lock()
		froms++
		mu.Unlock()
		return fakeSolve(ctx, vc)
	}
	out, err := Run(context.Background(), c, g, Options{Solve: fakeSolve, SolveFrom: from, Jobs: 2})
	if err != nil {
		t.Fatal(err)
	}
	if want := len(out.Records) - 1; froms != want {
		t.Errorf("SolveFrom solved %d scenarios, want all %d but the base point", froms, want)
	}
}

// TestShardsMergeEqualUnsharded checks the sweep contract: sharded runs
// merged give exactly the unsharded result, whatever the number of jobs.
func TestShardsMergeEqualUnsharded(t *testing.T) {
	c := testCase()
	g := sweepGrid(t)
	ctx := context.Background()
	full, err := Run(ctx, c, g, Options{Solve: fakeSolve, Evaluate: fakeEvaluate})
	if err != nil {
		t.Fatal(err)
	}
	want := runJSON(t, full)
	parallel, err := Run(ctx, c, g, Options{Solve: fakeSolve, Evaluate: fakeEvaluate, Jobs: 3})
	if err != nil {
		t.Fatal(err)
	}
	if got := runJSON(t, parallel); !bytes.Equal(got, want) {
		t.Fatalf("jobs 3 differs from jobs 1:\n%s\n%s", got, want)
	}
	for _, n := range []int{1, 2, 4, 25} {
		var shards []*Output
		for i := n - 1; i >= 0; i-- { // any order
			out, err := Run(ctx, c, g, Options{Solve: fakeSolve, Evaluate: fakeEvaluate, Shard: Shard{i, n}, Jobs: 2})
			if err != nil {
				t.Fatal(err)
			}
			var buf bytes.Buffer
			if err := WriteLines(&buf, out); err != nil {
				t.Fatal(err)
			}
			back, err := ReadLines(&buf, "shard")
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
			t.Errorf("%d shards merged differ from the unsharded run", n)
		}
	}
}

func TestMergeRejects(t *testing.T) {
	c := testCase()
	g := sweepGrid(t)
	ctx := context.Background()
	shard := func(i, n int, settings string) *Output {
		out, err := Run(ctx, c, g, Options{Solve: fakeSolve, Shard: Shard{i, n}, Settings: settings})
		if err != nil {
			t.Fatal(err)
		}
		return out
	}
	s0, s1, s2 := shard(0, 3, ""), shard(1, 3, ""), shard(2, 3, "")
	other := shard(2, 3, "gap=1e-9")
	otherCase := *s2
	otherCase.Header.CaseDigest = "sha256:another"
	truncated := *s1
	truncated.Records = truncated.Records[:len(truncated.Records)-1]
	tests := []struct {
		name   string
		shards []*Output
		want   string
	}{
		{"missing shard", []*Output{s0, s2}, "missing shards [1]"},
		{"shard twice", []*Output{s0, s1, s1, s2}, "given twice"},
		{"other settings", []*Output{s0, s1, other}, "another sweep"},
		{"other case content", []*Output{s0, s1, &otherCase}, "another sweep"},
		{"incomplete shard", []*Output{s0, &truncated, s2}, "is missing"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := Merge(tt.shards)
			if err == nil || !strings.Contains(err.Error(), tt.want) {
				t.Fatalf("got error %v, want one containing %q", err, tt.want)
			}
		})
	}
	if _, err := BuildReport(s0); err == nil {
		t.Error("BuildReport of one shard of three: got no error")
	}
}

func TestSweepReport(t *testing.T) {
	c := testCase()
	c.Budget.Yearly[1] = 4000 // every year capped: the frontier has caps
	g := sweepGrid(t)
	out, err := Run(context.Background(), c, g, Options{Solve: fakeSolve, Evaluate: fakeEvaluate})
	if err != nil {
		t.Fatal(err)
	}
	rep, err := BuildReport(out)
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Scenarios) != 18 {
		t.Fatalf("got %d scenarios, want 18", len(rep.Scenarios))
	}
	// Tariff and capex lists lack the base value 1: their base point and
	// the one-at-a-time points are solved off the grid.
	if len(rep.References) == 0 {
		t.Fatal("no reference points off the grid")
	}
	if rep.Base.Factors.String() != "tariff=1 capex=1 budget=1" {
		t.Errorf("got base %s", rep.Base.Factors)
	}
	if len(rep.Tornado) != 3 {
		t.Fatalf("got %d tornado bars, want 3", len(rep.Tornado))
	}
	for _, bar := range rep.Tornado {
		if bar.Swing != nil && !near(*bar.Swing, math.Abs(*bar.HighNPV-*bar.LowNPV)) {
			t.Errorf("%s: swing %g is not |high − low|", bar.Factor, *bar.Swing)
		}
	}
	for i := 1; i < len(rep.Tornado); i++ {
		a, b := rep.Tornado[i-1].Swing, rep.Tornado[i].Swing
		if a != nil && b != nil && *a < *b {
			t.Errorf("tornado not sorted by swing: %g before %g", *a, *b)
		}
	}
	// The frontier: budgets 0.5, 1, 2 in increasing order; with the fake
	// solver the plan does not depend on the budget unless infeasible, so
	// the next million buys nothing once the plan fits.
	if len(rep.BudgetFrontier) != 3 || rep.BudgetFrontier[0].Multiplier != 0.5 || rep.BudgetFrontier[2].Multiplier != 2 {
		t.Fatalf("got frontier %+v", rep.BudgetFrontier)
	}
	last := rep.BudgetFrontier[2]
	if last.Cap == nil || !near(*last.Cap, 2*12000) {
		t.Errorf("cap at ×2: got %v, want 24000", last.Cap)
	}
	if last.PerMillion == nil || *last.PerMillion != 0 {
		t.Errorf("frontier ×1→×2: got %v, want 0 per million", last.PerMillion)
	}
	for _, r := range rep.Scenarios {
		budget, _ := r.Factors.Value(Budget)
		switch {
		case r.RegretStatus == RegretOK && (r.Regret == nil || *r.Regret < 0):
			t.Errorf("%s: regret %v, want ≥ 0", r.Factors, r.Regret)
		case r.RegretStatus == RegretInconsistent:
			t.Errorf("%s: inconsistent regret %v", r.Factors, *r.Regret)
		}
		if r.BasePlan != nil && budget == 0.5 && !r.BasePlan.OverBudget {
			// the base plan's capex at capex ×c: 0.5 × the base cap is
			// exceeded whenever c × base capex > 0.5 × 5000
			if capex, _ := r.Factors.Value(Capex); capex*rep.Base.Capex > 2500 {
				t.Errorf("%s: base plan capex %g should break the cap", r.Factors, r.BasePlan.Capex)
			}
		}
	}
}

// TestRegretRules checks each regret outcome on hand-made results.
func TestRegretRules(t *testing.T) {
	c := testCase()
	v := func(x float64) *float64 { return &x }
	plan := []plans.PlanRow{{Year: 2030, Link: "a-b", Kind: plans.KindModule, Item: "n100", Units: 1, Capex: 1000}}
	eval := func(obj *float64, capex float64) EvaluateFunc {
		return func(context.Context, *plans.Case, []plans.PlanRow) (*plans.Result, error) {
			st := plans.StatusOptimal
			if obj == nil {
				st = plans.StatusInfeasible
			}
			return &plans.Result{Status: st, Objective: obj, Cashflow: []plans.CashflowRow{{Year: 2030, Capex: capex}}}, nil
		}
	}
	tests := []struct {
		name       string
		opt, bound *float64
		evalObj    *float64
		evalCapex  float64
		status     string
		regret     *float64
	}{
		{"better optimum", v(100), v(100), v(60), 1000, RegretOK, v(40)},
		{"same plan", v(100), v(100), v(100), 1000, RegretOK, v(0)},
		{"solve stopped within its gap", v(100), v(101), v(100.5), 1000, RegretOK, v(0)},
		{"above the proven bound", v(100), v(101), v(120), 1000, RegretInconsistent, v(-20)},
		{"cannot carry", v(100), v(100), nil, 1000, RegretCannotCarry, nil},
		{"over budget", v(100), v(100), v(150), 6000, RegretOverBudget, nil},
		{"scenario infeasible", nil, nil, v(10), 1000, RegretNoPlan, nil},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			rec := Record{}
			res := &plans.Result{Objective: tt.opt, Bound: tt.bound}
			if err := regret(context.Background(), &rec, c, res, plan, true, eval(tt.evalObj, tt.evalCapex)); err != nil {
				t.Fatal(err)
			}
			if rec.RegretStatus != tt.status {
				t.Fatalf("got status %s, want %s", rec.RegretStatus, tt.status)
			}
			if (rec.Regret == nil) != (tt.regret == nil) || (rec.Regret != nil && *rec.Regret != *tt.regret) {
				t.Fatalf("got regret %v, want %v", deref(rec.Regret), deref(tt.regret))
			}
		})
	}
}

func deref(p *float64) any {
	if p == nil {
		return nil
	}
	return *p
}

// TestBreakEvenFake checks the bisection against the closed form of the
// fake solver, whose NPV falls linearly with the quote's price multiplier.
func TestBreakEvenFake(t *testing.T) {
	c := testCase()
	c.Budget.Yearly[0] = math.Inf(1)
	ctx := context.Background()
	cmp, err := Compare(ctx, c, CompareOptions{Solve: fakeSolve})
	if err != nil {
		t.Fatal(err)
	}
	if cmp.Winner != "south.toml" {
		t.Fatalf("got winner %q, want south.toml (cheaper per Gbps)", cmp.Winner)
	}
	north := cmp.Variants[0]
	if north.Name != "north.toml" || north.Winner || north.BreakEvenDiscount == nil {
		t.Fatalf("north: got %+v", north)
	}
	// Closed form: NPV(p) = R − p·(R − NPV(1)) (R the discounted revenue,
	// capex paid in the first year); break-even p* where it equals the
	// winner's NPV.
	r := fakeRevenue(c)
	capexNorth := r - *north.Objective
	pStar := (r - *cmp.Variants[1].Objective) / capexNorth
	got := 1 - *north.BreakEvenDiscount
	if got > pStar || pStar-got > BreakEvenStep {
		t.Errorf("break-even multiplier: got %g, want within %g below %g", got, BreakEvenStep, pStar)
	}
	winner := *cmp.Variants[1].Objective
	if d := *north.BreakEvenNPV - winner; d < 0 || d > BreakEvenNPVTolerance*math.Abs(winner) {
		t.Errorf("NPV at break-even %g, winner %g: want within 0.5 %% above", *north.BreakEvenNPV, winner)
	}
	all := cmp.Variants[2]
	if all.Name != AllVariant || all.BreakEvenDiscount != nil {
		t.Errorf("all: got %+v", all)
	}
	if len(cmp.Differences) == 0 {
		t.Error("no differences between the north and south plans")
	}
	// Solving the variants and break-evens in parallel changes nothing.
	par, err := Compare(ctx, c, CompareOptions{Solve: fakeSolve, Jobs: 3})
	if err != nil {
		t.Fatal(err)
	}
	a, _ := json.Marshal(cmp)
	b, _ := json.Marshal(par)
	if !bytes.Equal(a, b) {
		t.Errorf("jobs 3 differs from jobs 1:\n%s\n%s", b, a)
	}
}

// TestCompareAllFromWinner: with SolveFrom, the all-catalogs variant is
// solved after the single catalogs (which may run side by side), from the
// winner's plan, and its result is SolveFrom's. That the answer is then
// never worse than the start is plans.TestStartPlan's part.
func TestCompareAllFromWinner(t *testing.T) {
	c := testCase()
	c.Budget.Yearly[0] = math.Inf(1)
	var mu sync.Mutex
	singles := 0
	solve := func(ctx context.Context, vc *plans.Case) (*plans.Result, error) {
		mu.Lock()
		singles++
		mu.Unlock()
		return fakeSolve(ctx, vc)
	}
	var gotStart []plans.PlanRow
	singlesBefore := -1
	from := func(ctx context.Context, vc *plans.Case, start []plans.PlanRow) (*plans.Result, error) {
		mu.Lock()
		singlesBefore = singles
		mu.Unlock()
		gotStart = start
		return fakeResult(vc, nil, 1.0e9), nil
	}
	cmp, err := Compare(context.Background(), c, CompareOptions{Solve: solve, SolveFrom: from, NoBreakEven: true, Jobs: 3})
	if err != nil {
		t.Fatal(err)
	}
	if singlesBefore != 2 || singles != 2 {
		t.Fatalf("SolveFrom ran after %d of the single catalogs' solves (%d in all): want after both", singlesBefore, singles)
	}
	win := cmp.Variants[1]
	if cmp.Winner != win.Name || len(gotStart) == 0 || len(gotStart) != len(win.Result.Plan) || gotStart[0] != win.Result.Plan[0] {
		t.Fatalf("winner %s: the all-catalogs solve started from %v, want the winner's plan %v", cmp.Winner, gotStart, win.Result.Plan)
	}
	if all := cmp.Variants[2]; all.Name != AllVariant || *all.Objective != 1.0e9 {
		t.Errorf("all: got %s with NPV %v, want SolveFrom's result", all.Name, deref(all.Objective))
	}
}

// TestCompareContenders: a losing catalog whose search stopped with a
// bound above the winner's NPV is named as a contender (the ranking is not
// proven against it); one whose bound is below is not.
func TestCompareContenders(t *testing.T) {
	c := testCase()
	c.Budget.Yearly[0] = math.Inf(1)
	for _, tc := range []struct {
		name  string
		above float64 // north's bound above south's NPV (NaN: no bound)
		want  []string
	}{{"bound above", 1, []string{"north.toml"}}, {"bound below", -1, []string{}}, {"no bound", math.NaN(), []string{"north.toml"}}} {
		t.Run(tc.name, func(t *testing.T) {
			south, err := fakeSolve(context.Background(), OnlyCatalog(c, 1))
			if err != nil {
				t.Fatal(err)
			}
			solve := func(ctx context.Context, vc *plans.Case) (*plans.Result, error) {
				res, err := fakeSolve(ctx, vc)
				if err == nil && vc.Catalogs[0].Name == "north.toml" && len(vc.Catalogs) == 1 {
					b := *south.Objective + tc.above
					res.Bound, res.Status = &b, plans.StatusFeasible
					if math.IsNaN(tc.above) {
						res.Bound, res.Gap = nil, nil // stopped before its first LP
					}
				}
				return res, err
			}
			cmp, err := Compare(context.Background(), c, CompareOptions{Solve: solve, NoBreakEven: true})
			if err != nil {
				t.Fatal(err)
			}
			if cmp.Winner != "south.toml" || strings.Join(cmp.Contenders, ",") != strings.Join(tc.want, ",") || cmp.Contenders == nil {
				t.Errorf("winner %s, contenders %v; want south.toml and %v", cmp.Winner, cmp.Contenders, tc.want)
			}
		})
	}
}

// TestCompareTied: a losing catalog with the winner's NPV (as when every
// search stops at the do-nothing plan) is listed as tied, with a break-even
// discount of 0 and no bisection; one just below is not tied.
func TestCompareTied(t *testing.T) {
	c := testCase()
	c.Budget.Yearly[0] = math.Inf(1)
	north, err := fakeSolve(context.Background(), OnlyCatalog(c, 0))
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name  string
		below float64 // south's NPV below north's
		tied  bool
	}{{"tied", 0, true}, {"below", 1, false}} {
		t.Run(tc.name, func(t *testing.T) {
			solves := 0
			solve := func(ctx context.Context, vc *plans.Case) (*plans.Result, error) {
				solves++
				res, err := fakeSolve(ctx, vc)
				if err == nil && vc.Catalogs[0].Name == "south.toml" && len(vc.Catalogs) == 1 && res.Objective != nil {
					v := *north.Objective - tc.below
					res.Objective = &v
				}
				return res, err
			}
			cmp, err := Compare(context.Background(), c, CompareOptions{Solve: solve})
			if err != nil {
				t.Fatal(err)
			}
			south := cmp.Variants[1]
			if cmp.Winner != "north.toml" || (len(cmp.Tied) == 1) != tc.tied || cmp.Tied == nil {
				t.Fatalf("winner %s, tied %v; want north.toml, tied %v", cmp.Winner, cmp.Tied, tc.tied)
			}
			if tc.tied && (south.BreakEvenDiscount == nil || *south.BreakEvenDiscount != 0 || solves != 3) {
				t.Errorf("tied: break-even %v after %d solves; want 0 after the 3 variants' solves", south.BreakEvenDiscount, solves)
			}
			if !tc.tied && solves == 3 {
				t.Error("below: no break-even search")
			}
		})
	}
}

// TestBreakEvenStarts: with a SolveFrom, the break-even search solves each
// price level from a plan that fits it: the catalog's own plan at list
// price until a level falls short of the target, then that level's plan
// (a plan made at a higher price fits every lower one). The discount found
// is the one found without starts.
func TestBreakEvenStarts(t *testing.T) {
	c := testCase()
	c.Budget.Yearly[0] = math.Inf(1)
	ctx := context.Background()
	own, err := fakeSolve(ctx, OnlyCatalog(c, 0)) // north at list price
	if err != nil {
		t.Fatal(err)
	}
	south, err := fakeSolve(ctx, OnlyCatalog(c, 1)) // the winner
	if err != nil {
		t.Fatal(err)
	}
	target := *south.Objective
	var starts [][]plans.PlanRow
	var results []*plans.Result
	from := func(ctx context.Context, vc *plans.Case, start []plans.PlanRow) (*plans.Result, error) {
		starts = append(starts, start)
		res, err := fakeSolve(ctx, vc)
		results = append(results, res)
		return res, err
	}
	be, err := BreakEven(ctx, c, 0, target, fakeSolve, from, own.Plan)
	if err != nil {
		t.Fatal(err)
	}
	if len(starts) < 3 {
		t.Fatalf("%d solves: the bisection should take several", len(starts))
	}
	// Plans of different price levels differ in their capex.
	for i, start := range starts {
		want := own.Plan
		for j := i - 1; j >= 1; j-- {
			if *results[j].Objective < target {
				want = results[j].Plan
				break
			}
		}
		if len(start) == 0 || start[0].Capex != want[0].Capex {
			t.Errorf("solve %d started from a plan with capex %v, want %v", i, start, want[0].Capex)
		}
	}
	plain, err := BreakEven(ctx, c, 0, target, fakeSolve, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	if be.Discount == nil || plain.Discount == nil || *be.Discount != *plain.Discount {
		t.Errorf("discount %v with starts, %v without", deref(be.Discount), deref(plain.Discount))
	}
}

func TestCompareInfeasibleVariant(t *testing.T) {
	c := testCase()
	c.Budget.Yearly[0] = 2000 // south (1830) fits, north's dearer modules do not
	cmp, err := Compare(context.Background(), c, CompareOptions{Solve: fakeSolve})
	if err != nil {
		t.Fatal(err)
	}
	north := cmp.Variants[0]
	if north.Status != string(plans.StatusInfeasible) || north.Objective != nil || len(north.Infeasibility) == 0 {
		t.Fatalf("north: got status %s objective %v why %v, want infeasible with a reason", north.Status, deref(north.Objective), north.Infeasibility)
	}
	// A lower price brings the plan within the budget: break-even exists.
	if north.BreakEvenDiscount == nil {
		t.Errorf("north: no break-even discount (%s)", north.BreakEvenNote)
	}
}

// TestScenarioSolveFailure: a solve that fails in one scenario is recorded
// as an error in that scenario and the sweep goes on; a failing base solve
// stops the sweep (every regret needs the base plan).
func TestScenarioSolveFailure(t *testing.T) {
	c := testCase()
	g, err := NewGrid([]Factor{{Name: Tariff, Values: []float64{0.5, 1, 2}}})
	if err != nil {
		t.Fatal(err)
	}
	failAt := func(m float64) SolveFunc {
		return func(ctx context.Context, cc *plans.Case) (*plans.Result, error) {
			if near(cc.Demands[0].Tariff[0], m*c.Demands[0].Tariff[0]) {
				return nil, errors.New("out of memory")
			}
			return fakeSolve(ctx, cc)
		}
	}
	out, err := Run(context.Background(), c, g, Options{Solve: failAt(2), Evaluate: fakeEvaluate})
	if err != nil {
		t.Fatal(err)
	}
	rep, err := BuildReport(out)
	if err != nil {
		t.Fatal(err)
	}
	if got := rep.Scenarios[2]; got.Status != StatusError || got.Error != "out of memory" || got.Objective != nil {
		t.Errorf("failed scenario: got status %s error %q", got.Status, got.Error)
	}
	if got := rep.Scenarios[0]; got.Status != string(plans.StatusOptimal) || got.RegretStatus != RegretOK {
		t.Errorf("other scenario: got status %s regret %s", got.Status, got.RegretStatus)
	}
	if _, err := Run(context.Background(), c, g, Options{Solve: failAt(1)}); err == nil || !strings.Contains(err.Error(), "base point") {
		t.Errorf("failing base solve: got error %v, want one naming the base point", err)
	}
}
