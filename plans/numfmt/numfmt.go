// Package numfmt formats numbers for people: fixed decimals with thousands
// separators and no negative zero. The terminal output, the report and the
// messages of package plans share it, so that one amount reads the same
// everywhere.
package numfmt

import (
	"math"
	"strconv"
	"strings"
)

// Grouped formats v with decimals digits after the point and a comma every
// three digits before it, prefixing minus to a negative value; a value
// that rounds to zero prints without a sign. NaN prints "n/a" and an
// infinity "unlimited" (with minus when negative).
func Grouped(v float64, decimals int, minus string) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	if math.IsInf(v, 0) {
		if v > 0 {
			return "unlimited"
		}
		return minus + "unlimited"
	}
	s := strconv.FormatFloat(math.Abs(v), 'f', decimals, 64)
	intPart, frac, _ := strings.Cut(s, ".")
	out := groupThousands(intPart)
	if decimals > 0 {
		out += "." + frac
	}
	if v < 0 && strings.Trim(s, "0.") != "" {
		out = minus + out
	}
	return out
}

// Money formats an amount in whole currency units: 1234567.4 →
// "1,234,567", −2500 → "-2,500", 0.4 → "0".
func Money(v float64) string { return Grouped(v, 0, "-") }

// groupThousands inserts commas every three digits of an unsigned string
// of digits.
func groupThousands(digits string) string {
	n := len(digits)
	if n <= 3 {
		return digits
	}
	var b strings.Builder
	head := n % 3
	if head > 0 {
		b.WriteString(digits[:head])
	}
	for i := head; i < n; i += 3 {
		if b.Len() > 0 {
			b.WriteByte(',')
		}
		b.WriteString(digits[i : i+3])
	}
	return b.String()
}
