package plans

import (
	"testing"

	"netstage/plans/finance"
)

// TestReturnsIgnoreNoise: the incremental flows of a plan whose one lease
// pays from the last year, with the LPs' noise of half a cent the year
// before (the 25-site synthetic case with one catalog, 2026-12-04). Read
// as they are, they give an IRR of about 800,000 (80 million %); to the
// cent they have no sign change, so no IRR, and the cumulative cash is
// never negative, so payback in the first year.
func TestReturnsIgnoreNoise(t *testing.T) {
	raw := []float64{0, 0, 0, 0, 0, -0.00464873, 3721.87}
	if r, ok := finance.IRR(raw); !ok || r < 1000 {
		t.Fatalf("the raw flows: IRR %v %v, want an absurd one (the case this guards against)", r, ok)
	}
	cents := toCents(raw)
	if r, ok := finance.IRR(cents); ok {
		t.Errorf("to the cent: IRR %v, want none", r)
	}
	if y, ok := finance.PaybackYear(cents, 2027); !ok || y != 2027 {
		t.Errorf("to the cent: payback %v %v, want 2027", y, ok)
	}
	if got := toCents([]float64{-1234.567, 0.004, -0.006}); got[0] != -1234.57 || got[1] != 0 || got[2] != -0.01 {
		t.Errorf("toCents: got %v", got)
	}
}
