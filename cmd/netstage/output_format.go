package main

// Number formats shared by the solve and export outputs. Every number a
// report, a JSON object or a CSV file prints goes through one of these, so
// that the same plan always prints the same text (golden tests rely on it)
// and a reader knows the precision of each kind of value.

import (
	"math"
	"strconv"
	"strings"

	"netstage/plans/numfmt"
)

// Decimals of each kind of number in JSON and CSV.
const (
	moneyDecimals     = 2 // case currency, per-year and per-row amounts
	objectiveDecimals = 6 // objective, bound, NPVs: cross-checked with other solvers at 1e-6 relative
	gbpsDecimals      = 4 // capacities and traffic
	fractionDecimals  = 8 // utilisation, ceilings, discount factors, IRR, profitability index
	secondsDecimals   = 3
)

// fixed formats v with the given decimals, never printing "-0".
func fixed(v float64, decimals int) string {
	s := strconv.FormatFloat(v, 'f', decimals, 64)
	if strings.TrimLeft(s, "-0.") == "" && strings.HasPrefix(s, "-") {
		s = s[1:]
	}
	return s
}

// gapText formats a relative gap in scientific notation (gaps run from 1 to
// 1e-9 and below).
func gapText(v float64) string {
	return strconv.FormatFloat(v, 'e', 3, 64)
}

// money formats a currency amount for the terminal: whole units with
// thousands separators ("-1,234,567"), halves rounded away from zero.
func money(v float64) string {
	return numfmt.Money(math.Round(v))
}

// percent formats a fraction as a percentage with one decimal ("13.1 %").
func percent(v float64) string {
	return fixed(100*v, 1) + " %"
}

// gbpsText formats capacity or traffic for the terminal.
func gbpsText(v float64) string {
	return fixed(v, 1)
}
