package plans

import (
	"testing"
	"time"
)

// TestSearchLimit checks the budget rule of a time-limited solve: the search
// gets the limit less the time spent and a reserve for the decode LPs of
// twice the baseline LP's time, capped at a quarter of the limit (10 % when
// the baseline failed), and never less than minSearchTime. Expected values are
// the rule worked by hand (source: the rule as documented on searchLimit).
func TestSearchLimit(t *testing.T) {
	s := time.Second
	tests := []struct {
		name                     string
		limit, elapsed, baseline time.Duration
		solved                   bool
		want                     time.Duration
	}{
		{"small baseline", 60 * s, 1 * s, 1 * s, true, 57 * s},
		{"large case", 60 * s, 6 * s, 6 * s, true, 42 * s},
		{"reserve capped", 60 * s, 10 * s, 10 * s, true, 35 * s},
		{"baseline failed", 60 * s, 5 * s, 5 * s, false, 49 * s},
		{"limit used up", 10 * s, 12 * s, 12 * s, true, minSearchTime},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := searchLimit(tc.limit, tc.elapsed, tc.baseline, tc.solved); got != tc.want {
				t.Errorf("searchLimit(%v, %v, %v, %v) = %v, want %v", tc.limit, tc.elapsed, tc.baseline, tc.solved, got, tc.want)
			}
		})
	}
}
