package plans

import (
	"math"
	"testing"
)

// First-principles cases: two sites, one link, a few module orders, with
// the optimum computed here in closed form from discounted sums (source:
// the present-value and straight-line book-value definitions, REFERENCES.md
// §3, applied to DESIGN.md §2). Each case's expected NPV is the best of the
// hand-enumerated plans; the solver must find it, and must agree with
// brute-force enumeration.

const (
	fpRate  = 0.10    // discount rate
	fpCapex = 10000.0 // module capex
	fpLife  = 5       // book life, years
	fpGbps  = 10.0    // module size
)

// moduleValue is the NPV one module adds when ordered in year k (1-based,
// price factor pf) and serving from year s to T, each year carrying gain
// more revenue: gain·Σ_{t=s..T} DF_t − capex·DF_k + capex·(1 − (T−s+1)/life)·DF_T.
func moduleValue(T, k, s int, gain, capex float64) float64 {
	v := -capex * df(fpRate, k)
	for t := s; t <= T; t++ {
		v += gain * df(fpRate, t)
	}
	if used := T - s + 1; used < fpLife {
		v += capex * (1 - float64(used)/fpLife) * df(fpRate, T)
	}
	return v
}

// twoSite is sites A, B, one 10 Gbps link at ceiling 1, a demand of
// forecast Gbps, tariff per Gbps-month, one vendor V.
func twoSite(T int, forecast, tariff float64) *Case {
	c := newCase(T, fpRate, "A", "B")
	c.testLink("L", "A", "B", 100, 10, 1)
	c.testDemand("A", "B", forecast, 0, tariff)
	c.testVendor("V")
	return c
}

// baseRevenue is the NPV of carrying 10 Gbps (the installed link) for T years.
func baseRevenue(T int, tariff float64) float64 {
	v := 0.0
	for t := 1; t <= T; t++ {
		v += 12 * tariff * 10 * df(fpRate, t)
	}
	return v
}

func TestModulePaysBackOrNot(t *testing.T) {
	const T = 3
	for _, tc := range []struct {
		name   string
		tariff float64
	}{
		{"pays back", 50}, // gain 6000 a year against 10000 capex
		{"does not pay", 10},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c := twoSite(T, 20, tc.tariff)
			c.testItem(testItem{id: "M", vendor: "V", gbps: fpGbps, capex: fpCapex, lead: 0, life: fpLife, maxUnits: 1})
			gain := 12 * tc.tariff * fpGbps
			best, bestYear := 0.0, 0
			for k := 1; k <= T; k++ {
				if v := moduleValue(T, k, k, gain, fpCapex); v > best {
					best, bestYear = v, k
				}
			}
			want := baseRevenue(T, tc.tariff) + best
			res := solveBoth(t, c)
			if !near(*res.Objective, want, 1e-7) {
				t.Errorf("NPV %.4f, want %.4f", *res.Objective, want)
			}
			if bestYear == 0 && len(res.Plan) != 0 {
				t.Errorf("plan %+v, want no purchase", res.Plan)
			}
			if bestYear == 0 {
				// 10 Gbps left unserved that a module could carry: no profit.
				for _, d := range res.Demands {
					if d.Reason != ReasonNoProfit || !near(d.Unserved, 10, 1e-7) {
						t.Errorf("demand %+v: want 10 Gbps unserved for no profit", d)
					}
				}
			}
			if bestYear == 0 && (res.IRR != nil || res.PaybackYear != nil || res.ProfitabilityIndex != nil) {
				t.Errorf("a plan that buys nothing has IRR %v, payback %v, PI %v; want all null", res.IRR, res.PaybackYear, res.ProfitabilityIndex)
			}
			if bestYear > 0 && (len(res.Plan) != 1 || res.Plan[0].Year != c.Year(bestYear-1) || res.Plan[0].Units != 1) {
				t.Errorf("plan %+v, want one unit in %d", res.Plan, c.Year(bestYear-1))
			}
			// The baseline carries the installed 10 Gbps (1e-8: the LP solves
			// to a 1e-7 tolerance in money scaled to thousands).
			if !near(*res.BaselineNPV, baseRevenue(T, tc.tariff), 1e-8) {
				t.Errorf("baseline %.10g, want %.10g", *res.BaselineNPV, baseRevenue(T, tc.tariff))
			}
			if bestYear > 0 {
				// IRR: the incremental flows' NPV at the IRR is zero
				// (definition of the internal rate of return).
				if res.IRR == nil {
					t.Fatal("no IRR for a plan that pays back")
				}
				npv := 0.0
				for i, r := range res.Cashflow {
					npv += r.Incremental * math.Pow(1+*res.IRR, -float64(i+1))
				}
				if math.Abs(npv) > 1e-6*fpCapex {
					t.Errorf("NPV of the incremental flows at IRR %.6f is %g, want 0", *res.IRR, npv)
				}
			}
		})
	}
}

func TestLeadTimeDelaysService(t *testing.T) {
	const T = 3
	c := twoSite(T, 20, 50)
	// 15 months with ready-by month 9: in service ⌈(15 − 9)/12⌉ = 1 year
	// after the order (DESIGN.md §2 lead-time rule).
	c.testItem(testItem{id: "M", vendor: "V", gbps: fpGbps, capex: fpCapex, lead: 15, life: fpLife, maxUnits: 1})
	gain := 12 * 50 * fpGbps
	best, bestYear := 0.0, 0
	for k := 1; k+1 <= T; k++ { // an order in year T would serve after T: not offered
		if v := moduleValue(T, k, k+1, gain, fpCapex); v > best {
			best, bestYear = v, k
		}
	}
	res := solveBoth(t, c)
	want := baseRevenue(T, 50) + best
	if !near(*res.Objective, want, 1e-7) {
		t.Errorf("NPV %.4f, want %.4f", *res.Objective, want)
	}
	if len(res.Plan) != 1 || res.Plan[0].Year != c.Year(bestYear-1) || res.Plan[0].InService != c.Year(bestYear) {
		t.Errorf("plan %+v, want an order in %d serving from %d", res.Plan, c.Year(bestYear-1), c.Year(bestYear))
	}
}

func TestBudgetForcesLaterPurchase(t *testing.T) {
	const T = 3
	c := twoSite(T, 30, 50) // room for two modules' traffic
	c.testItem(testItem{id: "M", vendor: "V", gbps: fpGbps, capex: fpCapex, life: fpLife, maxUnits: 2})
	gain := 12 * 50 * fpGbps
	v1 := moduleValue(T, 1, 1, gain, fpCapex)
	v2 := moduleValue(T, 2, 2, gain, fpCapex)
	if !(v1 > v2 && v2 > 0) {
		t.Fatalf("case set up wrongly: V1 %.2f, V2 %.2f", v1, v2)
	}
	free := solveBoth(t, c)
	if !near(*free.Objective, baseRevenue(T, 50)+2*v1, 1e-7) {
		t.Errorf("unbudgeted NPV %.4f, want %.4f", *free.Objective, baseRevenue(T, 50)+2*v1)
	}
	for i := range c.Budget.Yearly {
		c.Budget.Yearly[i] = fpCapex // one module a year
	}
	res := solveBoth(t, c)
	want := baseRevenue(T, 50) + v1 + v2
	if !near(*res.Objective, want, 1e-7) {
		t.Errorf("budgeted NPV %.4f, want %.4f", *res.Objective, want)
	}
	if len(res.Plan) != 2 || res.Plan[0].Year != c.Year(0) || res.Plan[1].Year != c.Year(1) {
		t.Errorf("plan %+v, want one unit in %d and one in %d", res.Plan, c.Year(0), c.Year(1))
	}
}

func TestPriceErosionMakesWaitingPay(t *testing.T) {
	const T = 3
	const erosion = 0.30
	const tariff = 25.0 // gain 3000 a year
	c := twoSite(T, 20, tariff)
	c.testItem(testItem{id: "M", vendor: "V", gbps: fpGbps, capex: fpCapex, life: fpLife, maxUnits: 1, erosion: erosion})
	gain := 12 * tariff * fpGbps
	best, bestYear := 0.0, 0
	for k := 1; k <= T; k++ {
		price := fpCapex * math.Pow(1-erosion, float64(k-1))
		if v := moduleValue(T, k, k, gain, price); v > best {
			best, bestYear = v, k
		}
	}
	if bestYear != 2 {
		t.Fatalf("case set up wrongly: best order year %d, want 2", bestYear)
	}
	if moduleValue(T, 1, 1, gain, fpCapex) <= 0 {
		t.Fatal("case set up wrongly: buying at once should pay too")
	}
	res := solveBoth(t, c)
	if !near(*res.Objective, baseRevenue(T, tariff)+best, 1e-7) {
		t.Errorf("NPV %.4f, want %.4f", *res.Objective, baseRevenue(T, tariff)+best)
	}
	if len(res.Plan) != 1 || res.Plan[0].Year != c.Year(1) {
		t.Errorf("plan %+v, want one unit in %d", res.Plan, c.Year(1))
	}
	if want := fpCapex * (1 - erosion); len(res.Plan) == 1 && !near(res.Plan[0].Capex, want, 1e-12) {
		t.Errorf("capex %.2f, want %.2f", res.Plan[0].Capex, want)
	}
}

func TestVolumeTierChangesVendor(t *testing.T) {
	const T = 1
	const tariff = 200.0
	priceX, priceY, disc := 10000.0, 10500.0, 0.10
	for _, tc := range []struct {
		name       string
		threshold  float64 // units of Y for its tier
		wantVendor string
	}{
		// Two units of Y at 10 % off cost 18900 < 20000 for two of X.
		{"tier reached", 2, "Y"},
		// Out of reach: X is cheaper per unit.
		{"tier out of reach", 3, "X"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c := newCase(T, fpRate, "A", "B")
			c.testLink("L", "A", "B", 100, 10, 1)
			c.testDemand("A", "B", 30, 0, tariff)
			c.testVendor("X")
			c.testVendor("Y", Tier{Basis: TierByUnits, Threshold: tc.threshold, Discount: disc})
			c.testItem(testItem{id: "MX", vendor: "X", gbps: fpGbps, capex: priceX, life: fpLife, maxUnits: 2})
			c.testItem(testItem{id: "MY", vendor: "Y", gbps: fpGbps, capex: priceY, life: fpLife, maxUnits: 2})
			unit := priceX
			if tc.wantVendor == "Y" {
				unit = priceY * (1 - disc)
			}
			gain := 12 * tariff * fpGbps
			// Two modules bought in year 1 of a 1-year horizon: salvage is
			// the book value after one of five years, on the discounted price.
			want := baseRevenue(T, tariff) + 2*(gain*df(fpRate, 1)-unit*df(fpRate, 1)+unit*(1-1.0/fpLife)*df(fpRate, 1))
			res := solveBoth(t, c)
			if !near(*res.Objective, want, 1e-7) {
				t.Errorf("NPV %.4f, want %.4f", *res.Objective, want)
			}
			units := 0
			for _, p := range res.Plan {
				if p.Vendor != tc.wantVendor {
					t.Errorf("bought %d of %s, want vendor %s only", p.Units, p.Item, tc.wantVendor)
				}
				units += p.Units
			}
			if units != 2 {
				t.Errorf("%d units bought, want 2", units)
			}
		})
	}
}
