package report

import (
	"math"
	"testing"
)

// The expected strings follow the usual English conventions for figures in
// business documents: comma thousands separators, a minus sign, one decimal
// for percentages (common practice).
func TestMoney(t *testing.T) {
	tests := []struct {
		name string
		in   float64
		want string
	}{
		{"zero", 0, "0"},
		{"small", 999.4, "999"},
		{"rounds half away", 999.5, "1,000"},
		{"thousands", 1234567.4, "1,234,567"},
		{"negative", -2500, "−2,500"},
		{"negative rounds to zero", -0.4, "0"},
		{"billions", 12345678901, "12,345,678,901"},
		{"unlimited", math.Inf(1), "unlimited"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := money(tt.in); got != tt.want {
				t.Errorf("money(%v) = %q, want %q", tt.in, got, tt.want)
			}
		})
	}
}

func TestGbps(t *testing.T) {
	tests := []struct {
		name string
		in   float64
		want string
	}{
		{"zero", 0, "0 Gbps"},
		{"sub-gigabit", 0.25, "250 Mbps"},
		{"whole", 100, "100 Gbps"},
		{"one decimal", 12.46, "12.5 Gbps"},
		{"terabits", 1600, "1.6 Tbps"},
		{"terabits two decimals", 1250, "1.25 Tbps"},
		{"large", 12000, "12 Tbps"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := gbps(tt.in); got != tt.want {
				t.Errorf("gbps(%v) = %q, want %q", tt.in, got, tt.want)
			}
		})
	}
}

func TestPercent(t *testing.T) {
	tests := []struct {
		in   float64
		want string
	}{
		{0.07, "7.0%"},
		{0.12345, "12.3%"},
		{-0.051, "−5.1%"},
		{1, "100.0%"},
	}
	for _, tt := range tests {
		if got := percent(tt.in); got != tt.want {
			t.Errorf("percent(%v) = %q, want %q", tt.in, got, tt.want)
		}
	}
}

// TestParseNumberRoundTrip checks that what the report prints reads back
// to the value within the printed precision (the number test relies on it).
func TestParseNumberRoundTrip(t *testing.T) {
	for _, v := range []float64{0, 1, -1, 999.49, 1234567.89, -98765.4321, 3e9} {
		got, ok := parseNumber(money(v))
		if !ok || math.Abs(got-v) > 0.5 {
			t.Errorf("parseNumber(money(%v)) = %v, %v; want within 0.5", v, got, ok)
		}
		got, ok = parseNumber(moneyCur(v, "EUR"))
		if !ok || math.Abs(got-v) > 0.5 {
			t.Errorf("parseNumber(moneyCur(%v)) = %v, %v; want within 0.5", v, got, ok)
		}
	}
	for _, v := range []float64{0.3, 1, 12.5, 400, 1600, 25000} {
		got, ok := parseNumber(gbps(v))
		if !ok || math.Abs(got-v) > 0.05*math.Max(1, v/1000) {
			t.Errorf("parseNumber(gbps(%v)) = %v, %v", v, got, ok)
		}
	}
	for _, f := range []float64{0.0725, -0.2, 0.999} {
		got, ok := parseNumber(percent(f))
		if !ok || math.Abs(got-f) > 0.0005+1e-12 {
			t.Errorf("parseNumber(percent(%v)) = %v, %v", f, got, ok)
		}
	}
}
