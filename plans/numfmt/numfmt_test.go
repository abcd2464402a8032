package numfmt

import (
	"math"
	"testing"
)

func TestGrouped(t *testing.T) {
	tests := []struct {
		v        float64
		decimals int
		want     string
	}{
		{0, 0, "0"},
		{-0.4, 0, "0"}, // rounds to zero: no sign
		{-0.004, 2, "0.00"},
		{999, 0, "999"},
		{1000, 0, "1,000"},
		{-1234567.4, 0, "-1,234,567"},
		{1234567.891, 2, "1,234,567.89"},
		{100000, 1, "100,000.0"},
		{999999.5, 0, "1,000,000"}, // rounding carries into a new group
		{math.NaN(), 0, "n/a"},
		{math.Inf(1), 0, "unlimited"},
		{math.Inf(-1), 0, "-unlimited"},
	}
	for _, tc := range tests {
		if got := Grouped(tc.v, tc.decimals, "-"); got != tc.want {
			t.Errorf("Grouped(%v, %d) = %q, want %q", tc.v, tc.decimals, got, tc.want)
		}
	}
	if got := Grouped(-2500, 0, "\u2212"); got != "\u22122,500" {
		t.Errorf("with U+2212: %q", got)
	}
}
