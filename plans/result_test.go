package plans

import "testing"

// The rule behind the "at ceiling" flag, the HTML report's bold cells and
// its first-year-at-ceiling notes: within half the printed precision.
func TestAtCeiling(t *testing.T) {
	for _, c := range []struct {
		u, ceiling float64
		want       bool
	}{
		{0.8, 0.8, true},
		{0.7999974, 0.8, true}, // the demo's LIN-ASK 2030, printed as 80.0 %
		{0.79951, 0.8, true},
		{0.7994, 0.8, false}, // printed as 79.9 %
		{0.81, 0.8, true},
		{0, 0, false}, // no ceiling set
	} {
		if got := AtCeiling(c.u, c.ceiling); got != c.want {
			t.Errorf("AtCeiling(%v, %v) = %v, want %v", c.u, c.ceiling, got, c.want)
		}
	}
}
