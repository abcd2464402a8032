package finance

import (
	"math"
	"math/rand/v2"
	"testing"
)

// approx reports whether got and want agree within tol, absolutely or
// relatively to |want|.
func approx(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol*math.Max(1, math.Abs(want))
}

func TestDiscountFactor(t *testing.T) {
	tests := []struct {
		name    string
		r       float64
		t       int
		midYear bool
		want    float64
		tol     float64
	}{
		// source: standard present-value tables in corporate-finance
		// textbooks, r = 10 %, n = 5 (REFERENCES.md §3; from memory),
		// tabulated to 5 decimals.
		{"table r=10% n=5", 0.10, 5, false, 0.62092, 5e-6},
		// Year 0 is now: nothing to discount (definition).
		{"year 0", 0.10, 0, false, 1, 1e-15},
		{"year 0 mid-year", 0.10, 0, true, 1, 1e-15},
		// Mid-year: (1+r)^−(t−0.5) (DESIGN.md §2), 1.1^−0.5 by hand.
		{"mid-year t=1", 0.10, 1, true, 1 / math.Sqrt(1.1), 1e-15},
		{"zero rate", 0, 7, false, 1, 1e-15},
		// Negative rate: money later is worth more (definition).
		{"negative rate", -0.5, 2, false, 4, 1e-15},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := DiscountFactor(tc.r, tc.t, tc.midYear)
			if !approx(got, tc.want, tc.tol) {
				t.Errorf("DiscountFactor(%v, %d, %v) = %.10f, want %.10f", tc.r, tc.t, tc.midYear, got, tc.want)
			}
		})
	}
}

func TestAnnuityFactor(t *testing.T) {
	tests := []struct {
		name string
		r    float64
		n    int
		want float64
		tol  float64
	}{
		// source: standard annuity tables in corporate-finance textbooks,
		// r = 10 %, n = 5 (REFERENCES.md §3; from memory), 5 decimals.
		{"table r=10% n=5", 0.10, 5, 3.79079, 5e-6},
		{"zero rate", 0, 5, 5, 1e-15},
		{"zero years", 0.1, 0, 0, 1e-15},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := AnnuityFactor(tc.r, tc.n)
			if !approx(got, tc.want, tc.tol) {
				t.Errorf("AnnuityFactor(%v, %d) = %.10f, want %.10f", tc.r, tc.n, got, tc.want)
			}
		})
	}
}

// The annuity factor is the sum of the present-value factors of years 1..n
// (its definition); check the closed form against that sum.
func TestAnnuityFactorIsSumOfDiscountFactors(t *testing.T) {
	for _, r := range []float64{-0.3, 0.01, 0.08, 0.1, 0.5} {
		for n := 0; n <= 40; n += 7 {
			sum := 0.0
			for k := 1; k <= n; k++ {
				sum += DiscountFactor(r, k, false)
			}
			if got := AnnuityFactor(r, n); !approx(got, sum, 1e-12) {
				t.Errorf("AnnuityFactor(%v, %d) = %.15g, want Σ DF = %.15g", r, n, got, sum)
			}
		}
	}
}

func TestNPV(t *testing.T) {
	// source: definition of NPV; −100 now and 60 at the end of years 1 and
	// 2 at 10 %: −100 + 60/1.1 + 60/1.21 computed by hand.
	got := NPV(0.10, []float64{-100, 60, 60}, false)
	want := -100 + 60/1.1 + 60/1.21
	if !approx(got, want, 1e-13) {
		t.Errorf("NPV = %.12f, want %.12f", got, want)
	}
	// Mid-year: flows of years ≥ 1 move half a year earlier, so they are
	// worth (1+r)^0.5 more (definition).
	gotMid := NPV(0.10, []float64{-100, 60, 60}, true)
	wantMid := -100 + (60/1.1+60/1.21)*math.Sqrt(1.1)
	if !approx(gotMid, wantMid, 1e-13) {
		t.Errorf("mid-year NPV = %.12f, want %.12f", gotMid, wantMid)
	}
	// A level payment of 1 in years 1..5 is worth the annuity factor.
	if got := NPV(0.1, []float64{0, 1, 1, 1, 1, 1}, false); !approx(got, 3.79079, 5e-6) {
		// source: annuity table value, REFERENCES.md §3 (from memory)
		t.Errorf("NPV of level payments = %.6f, want 3.79079", got)
	}
}

func TestIRR(t *testing.T) {
	// source: REFERENCES.md §3, IRR of −100, +60, +60 is 13.07 %. Derived
	// here from the quadratic: with v = 1+r, −100v² + 60v + 60 = 0, so
	// v = (60 + √(60² + 4·100·60)) / (2·100).
	quadratic := (60+math.Sqrt(60*60+4*100*60))/200 - 1
	if math.Abs(quadratic-0.1307) > 5e-5 {
		t.Fatalf("closed form gives %.6f, not 13.07 %%: the derivation is wrong", quadratic)
	}
	tests := []struct {
		name   string
		flows  []float64
		want   float64
		wantOK bool
	}{
		{"reference -100,60,60", []float64{-100, 60, 60}, quadratic, true},
		// One period: −100 now, 110 in a year is 10 % (definition).
		{"one period", []float64{-100, 110}, 0.10, true},
		// Leading and trailing zeros do not move the root.
		{"zeros around", []float64{0, 0, -100, 110, 0}, 0.10, true},
		// Investment a year later: same rate.
		{"shifted", []float64{0, -100, 60, 60}, quadratic, true},
		// Returns below the outlay: negative IRR. −100 + 50 + 50 = 0 at 0 %.
		{"zero rate", []float64{-100, 50, 50}, 0, true},
		// Flows that start positive (a loan taken): one sign change too.
		{"borrowing", []float64{100, -110}, 0.10, true},
		// Level annuity: 3.79079 is the annuity factor at 10 % over 5 years
		// (REFERENCES.md §3, from memory), so the IRR is 10 % up to the
		// table's rounding.
		{"annuity", []float64{-3.79079, 1, 1, 1, 1, 1}, 0.10, true},
		{"no sign change", []float64{10, 20, 30}, 0, false},
		{"all negative", []float64{-10, -20}, 0, false},
		// Two sign changes: −100, 230, −132 has IRRs 10 % and 20 %
		// ((1.1)(1.2) = 1.32, 1.1 + 1.2 = 2.3): not unique, none reported.
		{"two sign changes", []float64{-100, 230, -132}, 0, false},
		{"empty", nil, 0, false},
		{"all zero", []float64{0, 0}, 0, false},
		{"NaN", []float64{-100, math.NaN()}, 0, false},
		{"Inf", []float64{-100, math.Inf(1)}, 0, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, ok := IRR(tc.flows)
			if ok != tc.wantOK {
				t.Fatalf("IRR(%v) ok = %v, want %v", tc.flows, ok, tc.wantOK)
			}
			if !ok {
				return
			}
			tol := 1e-10
			if tc.name == "annuity" {
				tol = 1e-5
			}
			if math.Abs(got-tc.want) > tol {
				t.Errorf("IRR(%v) = %.12f, want %.12f", tc.flows, got, tc.want)
			}
		})
	}
}

// TestIRRRandom builds conventional flows with a known rate (an outlay, then
// returns, with the last flow chosen so that the NPV at the rate is zero)
// and checks that IRR finds the rate and that the NPV there is zero.
func TestIRRRandom(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 1))
	n := 2000
	if testing.Short() {
		n = 200
	}
	for i := 0; i < n; i++ {
		rate := -0.9 + 3*rng.Float64() // −90 % … +210 %
		years := 1 + rng.IntN(30)
		flows := make([]float64, years+1)
		flows[0] = -(1 + 1000*rng.Float64())
		for t := 1; t < years; t++ {
			flows[t] = 1000 * rng.Float64() * rng.Float64()
		}
		// Choose the last flow so that the NPV at rate is zero; it must be
		// positive to keep one sign change, otherwise skip this draw.
		partial := NPV(rate, flows, false)
		flows[years] = -partial / DiscountFactor(rate, years, false)
		if !(flows[years] > 0) {
			continue
		}
		got, ok := IRR(flows)
		if !ok {
			t.Fatalf("IRR(%v) found nothing, want %.10f", flows, rate)
		}
		if math.Abs(got-rate) > 1e-8*(1+math.Abs(rate)) {
			t.Fatalf("IRR(%v) = %.12f, want %.12f", flows, got, rate)
		}
	}
}

func TestPaybackYear(t *testing.T) {
	tests := []struct {
		name   string
		flows  []float64
		first  int
		want   int
		wantOK bool
	}{
		// Cumulative −100, −40, 20: first non-negative at index 2.
		{"simple", []float64{-100, 60, 60}, 2027, 2029, true},
		// Cumulative reaches exactly 0 at index 2 (≥ 0 counts).
		{"exactly zero", []float64{-100, 50, 50}, 1, 3, true},
		// Cumulative −10, 5, −5, 5: it dips again, so payback is index 3.
		{"dips again", []float64{-10, 15, -10, 10}, 0, 3, true},
		// Never pays back.
		{"never", []float64{-100, 30, 30}, 0, 0, false},
		// No outlay: paid back from the start.
		{"no outlay", []float64{0, 5, 5}, 2030, 2030, true},
		// Pays back, then a final loss pulls the total negative.
		{"ends negative", []float64{-10, 20, -30}, 0, 0, false},
		{"empty", nil, 0, 0, false},
		// Rounding: 0.1+0.2−0.3 is not exactly 0 in floating point.
		{"rounding", []float64{-0.3, 0.1, 0.2}, 0, 2, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, ok := PaybackYear(tc.flows, tc.first)
			if ok != tc.wantOK || (ok && got != tc.want) {
				t.Errorf("PaybackYear(%v, %d) = %d, %v; want %d, %v", tc.flows, tc.first, got, ok, tc.want, tc.wantOK)
			}
		})
	}
}

func TestProfitabilityIndex(t *testing.T) {
	// Definition: PV of what comes back / PV invested = 1 + NPV/PV invested.
	// −100, +60, +60 at 10 %: PV back 104.1322..., so PI = 1.041322...
	npv := NPV(0.1, []float64{-100, 60, 60}, false)
	got, ok := ProfitabilityIndex(npv, 100)
	want := (60/1.1 + 60/1.21) / 100
	if !ok || !approx(got, want, 1e-14) {
		t.Errorf("ProfitabilityIndex = %v, %v; want %v, true", got, ok, want)
	}
	if _, ok := ProfitabilityIndex(5, 0); ok {
		t.Errorf("ProfitabilityIndex with no investment reported an index")
	}
}

func TestBookValue(t *testing.T) {
	// source: accounting definition of straight-line book value,
	// cost·(1 − k/L) after k of L years (REFERENCES.md §3).
	tests := []struct {
		name      string
		cost      float64
		life, age int
		want      float64
	}{
		{"new", 1000, 5, 0, 1000},
		{"after 1 of 5", 1000, 5, 1, 1000 * (1 - 1.0/5)},
		{"after 3 of 7", 700, 7, 3, 700 * (1 - 3.0/7)},
		{"end of life", 1000, 5, 5, 0},
		{"past life", 1000, 5, 9, 0},
		{"not yet in service", 1000, 5, -2, 1000},
		{"no life", 1000, 0, 1, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := BookValue(tc.cost, tc.life, tc.age); !approx(got, tc.want, 1e-13) {
				t.Errorf("BookValue(%v, %d, %d) = %v, want %v", tc.cost, tc.life, tc.age, got, tc.want)
			}
		})
	}
}

func TestDepreciationSchedule(t *testing.T) {
	tests := []struct {
		name                   string
		cost                   float64
		life, inService, years int
		want                   []float64
	}{
		{"inside horizon", 300, 3, 2, 5, []float64{0, 100, 100, 100, 0}},
		{"cut by horizon", 500, 5, 3, 5, []float64{0, 0, 100, 100, 100}},
		{"after horizon", 500, 5, 6, 5, []float64{0, 0, 0, 0, 0}},
		{"no life", 500, 0, 2, 3, []float64{0, 500, 0}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := DepreciationSchedule(tc.cost, tc.life, tc.inService, tc.years)
			if len(got) != len(tc.want) {
				t.Fatalf("len = %d, want %d", len(got), len(tc.want))
			}
			for i := range got {
				if !approx(got[i], tc.want[i], 1e-13) {
					t.Errorf("year %d: got %v, want %v", i+1, got[i], tc.want[i])
				}
			}
		})
	}
}

// Depreciation charged inside the horizon plus the book value left at its
// end is the cost (straight-line accounting identity).
func TestDepreciationPlusBookValueIsCost(t *testing.T) {
	for life := 1; life <= 12; life++ {
		for inService := 1; inService <= 10; inService++ {
			const years, cost = 10, 1234.5
			sum := 0.0
			for _, d := range DepreciationSchedule(cost, life, inService, years) {
				sum += d
			}
			age := years - inService + 1
			if got := sum + BookValue(cost, life, age); !approx(got, cost, 1e-12) {
				t.Errorf("life %d in service %d: depreciation + book value = %v, want %v", life, inService, got, cost)
			}
		}
	}
}
