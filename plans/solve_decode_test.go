package plans

import (
	"math"
	"testing"

	"netstage/plans/finance"
)

// TestReturnsIgnoreNoise: the incremental flows of a plan whose one lease
// pays from the last year, with the LPs' noise of half a cent the year
// before (the 25-site synthetic case with one catalog, 2026-12-04). Read
// as they are, they give an IRR of about 800,000 (80 million %); to the
// cent they have no sign change, so no IRR, and the cumulative cash is
// never negative, so payback in the first year. Flows of whole cents keep
// their IRR: −100, 60, 60 has 60x² + 60x − 100 = 0 at x = 1/(1 + r), so
// r = 120/(√27600 − 60) − 1 = 0.130662 (the quadratic formula).
func TestReturnsIgnoreNoise(t *testing.T) {
	raw := []float64{0, 0, 0, 0, 0, -0.00464873, 3721.87}
	if r, ok := finance.IRR(raw); !ok || r < 1000 {
		t.Fatalf("the raw flows: IRR %v %v, want an absurd one (the case this guards against)", r, ok)
	}
	irr, payback := returns(raw, 2027)
	if irr != nil {
		t.Errorf("to the cent: IRR %v, want none", *irr)
	}
	if payback == nil || *payback != 2027 {
		t.Errorf("to the cent: payback %v, want 2027", payback)
	}
	irr, payback = returns([]float64{-100, 60, 60}, 2027)
	if want := 120/(math.Sqrt(27600)-60) - 1; irr == nil || math.Abs(*irr-want) > 1e-6 {
		t.Errorf("IRR of −100, 60, 60: got %v, want %.6f", irr, want)
	}
	if payback == nil || *payback != 2029 {
		t.Errorf("payback of −100, 60, 60: got %v, want 2029", payback)
	}
}
