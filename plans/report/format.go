package report

import (
	"math"
	"strconv"
	"strings"

	"netstage/plans/numfmt"
)

// minus is the sign printed before negative numbers: U+2212 reads better
// than a hyphen and does not break a number across lines.
const minus = "\u2212"

// zeroMoney is the absolute amount below which money prints as 0 (half a
// currency unit: the tables round to whole units, and "−0" reads badly).
const zeroMoney = 0.5

// formatFixed formats v with decimals digits after the point, thousands
// separators and the minus sign (plans/numfmt).
func formatFixed(v float64, decimals int) string {
	return numfmt.Grouped(v, decimals, minus)
}

// money formats an amount in whole currency units with thousands
// separators: 1234567.4 → "1,234,567", −2500 → "−2,500".
func money(v float64) string {
	if math.Abs(v) < zeroMoney {
		return "0"
	}
	return formatFixed(v, 0)
}

// nbsp joins a currency code to its amount so that a line never breaks
// between them.
const nbsp = "\u00a0"

// moneyCur formats an amount with its currency code: "USD 1,234,567"
// (joined by a no-break space).
func moneyCur(v float64, currency string) string {
	return currency + nbsp + money(v)
}

// percent formats a fraction as a percentage with one decimal:
// 0.0725 → "7.3%".
func percent(f float64) string {
	return formatFixed(100*f, 1) + "%"
}

// gbps formats a capacity or traffic in Gbps with the unit that reads best:
// below 1 Gbps in Mbps, from 1000 Gbps in Tbps, with at most one decimal and
// no trailing ".0": 0.25 → "250 Mbps", 12.5 → "12.5 Gbps", 1600 → "1.6 Tbps".
func gbps(v float64) string {
	a := math.Abs(v)
	switch {
	case a == 0:
		return "0 Gbps"
	case a < 1:
		return trimZero(formatFixed(v*1000, 1)) + " Mbps"
	case a >= 1000:
		return trimZero(formatFixed(v/1000, 2)) + " Tbps"
	}
	return trimZero(formatFixed(v, 1)) + " Gbps"
}

// trimZero removes trailing zeros after a decimal point, and the point.
func trimZero(s string) string {
	if !strings.Contains(s, ".") {
		return s
	}
	s = strings.TrimRight(s, "0")
	return strings.TrimSuffix(s, ".")
}

// factor formats a discount factor with four decimals.
func factor(v float64) string { return formatFixed(v, 4) }

// count formats a whole number with thousands separators.
func count(n int) string { return formatFixed(float64(n), 0) }

// parseNumber reads back a number printed by this package: it drops
// thousands separators, a currency code, units and the percent sign, and
// understands the minus sign. The scale of a unit (Mbps, Tbps, %) is
// applied, so parseNumber(gbps(x)) ≈ x and parseNumber(percent(f)) ≈ f.
// It is used by the tests and by nobody else.
func parseNumber(s string) (float64, bool) {
	s = strings.TrimSpace(s)
	scale := 1.0
	for _, u := range []struct {
		suffix string
		scale  float64
	}{{"Mbps", 1e-3}, {"Gbps", 1}, {"Tbps", 1e3}, {"%", 0.01}} {
		if strings.HasSuffix(s, u.suffix) {
			s = strings.TrimSpace(strings.TrimSuffix(s, u.suffix))
			scale = u.scale
			break
		}
	}
	s = strings.ReplaceAll(s, nbsp, " ")
	if i := strings.LastIndexByte(s, ' '); i >= 0 {
		s = s[i+1:] // drop a currency code
	}
	s = strings.ReplaceAll(s, ",", "")
	s = strings.ReplaceAll(s, minus, "-")
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return 0, false
	}
	return v * scale, true
}
