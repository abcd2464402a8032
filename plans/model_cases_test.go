package plans

import (
	"context"
	"math"
	"strings"
	"testing"
)

// More hand-computed cases (same sources as model_firstprinciples_test.go:
// present-value and straight-line book-value definitions applied to
// DESIGN.md §2).

// TestCostModeAndShortfall: no tariffs, so every demand is committed; the
// network must grow from 10 to 20 Gbps at once and the plan's NPV is minus
// its present cost. The baseline cannot carry 10 Gbps a year, charged the
// SLA penalty of 12 × penalty × 10 a year.
func TestCostModeAndShortfall(t *testing.T) {
	const T = 3
	const penalty = 30.0
	c := twoSite(T, 20, 0)
	c.SLAPenalty = penalty
	c.testItem(testItem{id: "M", vendor: "V", gbps: fpGbps, capex: fpCapex, opex: 500, life: fpLife, maxUnits: 2})
	res := solveBoth(t, c)
	if !res.CostMode {
		t.Fatal("cost mode not detected")
	}
	// −capex·DF1 − opex·Σ DF + book value 2/5 at T.
	want := -fpCapex*df(fpRate, 1) + fpCapex*0.4*df(fpRate, 3)
	for y := 1; y <= T; y++ {
		want -= 500 * df(fpRate, y)
	}
	if !near(*res.Objective, want, 1e-7) {
		t.Errorf("NPV %.4f, want %.4f", *res.Objective, want)
	}
	if res.IRR != nil || res.PaybackYear != nil {
		t.Errorf("IRR %v, payback %v: want none in cost mode", deref(res.IRR), res.PaybackYear)
	}
	baseWant := 0.0
	for y := 1; y <= T; y++ {
		baseWant -= 12 * penalty * 10 * df(fpRate, y)
	}
	if !near(*res.BaselineNPV, baseWant, 1e-7) {
		t.Errorf("baseline NPV %.4f, want %.4f", *res.BaselineNPV, baseWant)
	}
	if len(res.Shortfall) != T {
		t.Fatalf("%d shortfall rows, want %d", len(res.Shortfall), T)
	}
	for _, s := range res.Shortfall {
		if !near(s.Shortfall, 10, 1e-6) || !near(s.Penalty, 12*penalty*10, 1e-6) {
			t.Errorf("shortfall %+v, want 10 Gbps and penalty %g", s, 12*penalty*10)
		}
	}
}

// TestCandidateLinkAndLease: a second, candidate link between the sites
// can be built (build cost, opex, ten-year book life) to carry a module or
// a lease; a module and a lease also fit the existing link. The expected
// NPV enumerates every combination ordered in the first year (later orders
// serve fewer years at these prices; the brute-force check in solveBoth
// covers them).
func TestCandidateLinkAndLease(t *testing.T) {
	const T = 2 // small enough for the brute-force check (2¹⁰ points)
	const tariff = 50.0
	const build, buildOpex, buildLife = 5000.0, 200.0, 10
	for _, tc := range []struct {
		name     string
		leaseFee float64
	}{
		{"expensive lease", 7000}, // loses money: build and buy a module
		{"cheap lease", 1000},     // lease on both links, building the second
	} {
		t.Run(tc.name, func(t *testing.T) {
			c := newCase(T, fpRate, "A", "B")
			c.testLink("L1", "A", "B", 100, 10, 1)
			cand := c.testLink("L2", "A", "B", 120, 0, 1)
			cand.Candidate = &Candidate{BuildCost: build, Opex: buildOpex, BookLife: buildLife, InService: []int{0, 1}}
			c.testDemand("A", "B", 30, 0, tariff)
			c.testVendor("V")
			c.testItem(testItem{id: "M", vendor: "V", gbps: fpGbps, capex: fpCapex, life: fpLife, maxUnits: 1})
			c.testItem(testItem{id: "LS", vendor: "V", gbps: fpGbps, opex: tc.leaseFee, maxUnits: 1, lease: true})
			annuity := 0.0
			for y := 1; y <= T; y++ {
				annuity += df(fpRate, y)
			}
			moduleCost := fpCapex*df(fpRate, 1) - fpCapex*(1-float64(T)/fpLife)*df(fpRate, T)
			buildCost := build*df(fpRate, 1) - build*(1-float64(T)/buildLife)*df(fpRate, T) + buildOpex*annuity
			best, wantBuild, wantLease := math.Inf(-1), false, false
			for mask := 0; mask < 32; mask++ {
				m1, l1, b, m2, l2 := mask&1, mask>>1&1, mask>>2&1, mask>>3&1, mask>>4&1
				if b == 0 && m2+l2 > 0 {
					continue
				}
				extra := math.Min(20, 10*float64(m1+l1+m2+l2))
				v := 12*tariff*extra*annuity - float64(m1+m2)*moduleCost - float64(l1+l2)*tc.leaseFee*annuity - float64(b)*buildCost
				if v > best+1e-9 {
					best, wantBuild, wantLease = v, b == 1, l1+l2 > 0
				}
			}
			want := baseRevenue(T, tariff) + best
			res := solveBoth(t, c)
			if !near(*res.Objective, want, 1e-7) {
				t.Errorf("NPV %.4f, want %.4f", *res.Objective, want)
			}
			built, leased := false, false
			builtFrom := 1 << 30 // calendar year the candidate serves from
			for _, p := range res.Plan {
				built = built || p.Kind == KindBuild
				leased = leased || p.Kind == KindLease
				if p.Kind == KindBuild {
					builtFrom = min(builtFrom, p.InService)
				}
			}
			if built != wantBuild || leased != wantLease {
				t.Errorf("plan %+v: built %v leased %v, want %v %v", res.Plan, built, leased, wantBuild, wantLease)
			}
			// Links by year: existing links are always built; a candidate
			// only from the in-service year of its build.
			for _, ly := range res.Links {
				link := c.Links[c.LinkIndex(ly.Link)]
				want := link.Candidate == nil || ly.Year >= builtFrom
				if ly.Candidate != (link.Candidate != nil) || ly.Built != want {
					t.Errorf("link %s %d: candidate %v built %v, want %v %v", ly.Link, ly.Year, ly.Candidate, ly.Built, link.Candidate != nil, want)
				}
			}
		})
	}
}

// TestTaxAndMidYear: tax 25 % with depreciation as a shield, mid-year
// discounting (salvage still at the end of year T).
func TestTaxAndMidYear(t *testing.T) {
	const T = 3
	const tax, tariff = 0.25, 50.0
	c := twoSite(T, 20, tariff)
	c.MidYear = true
	c.Finance.TaxRate = tax
	c.testItem(testItem{id: "M", vendor: "V", gbps: fpGbps, capex: fpCapex, life: fpLife, maxUnits: 1})
	mid := func(y int) float64 { return math.Pow(1+fpRate, -(float64(y) - 0.5)) }
	best := 0.0
	for k := 1; k <= T; k++ {
		v := -fpCapex * mid(k)
		for y := k; y <= T; y++ {
			v += (1-tax)*12*tariff*fpGbps*mid(y) + tax*fpCapex/fpLife*mid(y)
		}
		v += fpCapex * (1 - float64(T-k+1)/fpLife) * df(fpRate, T)
		best = math.Max(best, v)
	}
	want := best
	for y := 1; y <= T; y++ {
		want += (1 - tax) * 12 * tariff * 10 * mid(y)
	}
	res := solveBoth(t, c)
	if !near(*res.Objective, want, 1e-7) {
		t.Errorf("NPV %.4f, want %.4f", *res.Objective, want)
	}
}

// TestInfeasibleExplained: committed traffic beyond what the link can ever
// carry names the demand and the full link; a budget too small for the one
// module needed names the budget.
func TestInfeasibleExplained(t *testing.T) {
	t.Run("capacity", func(t *testing.T) {
		c := newCase(2, fpRate, "A", "B")
		c.testLink("L", "A", "B", 100, 10, 1)
		c.testDemand("A", "B", 30, 30, 50)
		c.testVendor("V")
		c.testItem(testItem{id: "M", vendor: "V", gbps: fpGbps, capex: fpCapex, life: fpLife, maxUnits: 1})
		res, err := Solve(context.Background(), c, SolveOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if res.Status != StatusInfeasible {
			t.Fatalf("status %s, want infeasible", res.Status)
		}
		var demand, link bool
		for _, r := range res.Infeasibility {
			if r.Kind == InfeasibleDemand && r.Name == "A-B" && near(r.Amount, 10, 1e-6) && r.Unit == UnitGbps {
				demand = true
			}
			if r.Kind == InfeasibleLink && r.Name == "L" && near(r.Amount, 20, 1e-9) && r.Unit == UnitGbpsMax {
				link = true
			}
		}
		if !demand || !link {
			t.Errorf("infeasibility %+v: want demand A-B short 10 Gbps and link L full at 20 Gbps", res.Infeasibility)
		}
	})
	t.Run("slots", func(t *testing.T) {
		// Two 10 Gbps modules needed (10 installed, 30 committed), each
		// taking 2 slots of a link with 3: one slot short, for no year.
		c := newCase(2, fpRate, "A", "B")
		l := c.testLink("L", "A", "B", 100, 10, 1)
		l.Slots = 3
		c.testDemand("A", "B", 30, 30, 50)
		c.testVendor("V")
		c.testItem(testItem{id: "M", vendor: "V", gbps: fpGbps, capex: fpCapex, life: fpLife, maxUnits: 2, slotsPerUnit: 2})
		r := onlyCause(t, c)
		if r.Kind != InfeasibleLink || r.Name != "L" || r.Year != 0 || !near(r.Amount, 1, 1e-6) || r.Unit != UnitSlots {
			t.Errorf("cause %+v, want link L one slot short", r)
		}
	})
	t.Run("budget", func(t *testing.T) {
		c := newCase(2, fpRate, "A", "B")
		c.testLink("L", "A", "B", 100, 10, 1)
		c.testDemand("A", "B", 20, 20, 50)
		c.testVendor("V")
		c.testItem(testItem{id: "M", vendor: "V", gbps: fpGbps, capex: fpCapex, life: fpLife, maxUnits: 1})
		c.Budget.Yearly = []float64{6000, 6000}
		r := onlyCause(t, c)
		if r.Kind != InfeasibleBudget || r.Year != 2030 || !near(r.Amount, 4000, 1e-6) || r.Unit != "EUR" ||
			!strings.Contains(r.Message, "2030") || !strings.Contains(r.Message, "EUR 4,000") {
			t.Errorf("cause %+v, want the 2030 budget short by 4000", r)
		}
	})
}

// onlyCause solves c, which must be infeasible for exactly one reason, and
// returns that reason.
func onlyCause(t *testing.T, c *Case) InfeasibilityRow {
	t.Helper()
	res, err := Solve(context.Background(), c, SolveOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != StatusInfeasible || len(res.Infeasibility) != 1 {
		t.Fatalf("status %s, %+v: want infeasible with one cause", res.Status, res.Infeasibility)
	}
	return res.Infeasibility[0]
}
