package plans

import (
	"strings"
	"testing"
)

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

// TestHorizonEndNote: only purchases (modules and builds, not leases) that
// enter service in the last cash-flow year count; the wording follows the
// count and mentions salvage only when the last year credits some.
func TestHorizonEndNote(t *testing.T) {
	years := func(salvage float64) []CashflowRow {
		return []CashflowRow{{Year: 2030}, {Year: 2031}, {Year: 2032, Salvage: salvage}}
	}
	module := func(inService int) PlanRow { return PlanRow{Year: inService, InService: inService, Kind: KindModule} }
	const salvage = "and the book value credited as salvage at the horizon"
	for _, c := range []struct {
		name string
		r    Result
		want []string // substrings; nil: no note
	}{
		{"nothing in the last year", Result{Cashflow: years(500), Plan: []PlanRow{module(2031)}}, nil},
		{"a lease only", Result{Cashflow: years(0), Plan: []PlanRow{{Year: 2032, InService: 2032, Kind: KindLease}}}, nil},
		{"one module", Result{Cashflow: years(500), Plan: []PlanRow{module(2031), module(2032)}},
			[]string{"1 purchase enters service in 2032, the horizon's last year", "weighs it against", salvage, "Review it "}},
		{"a module and a build, no salvage", Result{Cashflow: years(0), Plan: []PlanRow{module(2032), {Year: 2031, InService: 2032, Kind: KindBuild}, {Year: 2032, InService: 2032, Kind: KindLease}}},
			[]string{"2 purchases enter service in 2032", "weighs each against nothing but that one year of traffic. Review them "}},
		{"no cash flow", Result{Plan: []PlanRow{module(2032)}}, nil},
	} {
		got := c.r.HorizonEndNote()
		if c.want == nil {
			if got != "" {
				t.Errorf("%s: got %q, want no note", c.name, got)
			}
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(got, w) {
				t.Errorf("%s: got %q, want it to contain %q", c.name, got, w)
			}
		}
		if strings.Contains(got, "salvage") != (c.r.Cashflow[len(c.r.Cashflow)-1].Salvage > 0) {
			t.Errorf("%s: got %q: salvage mentioned without salvage, or left out", c.name, got)
		}
	}
}
