package report

import (
	"bytes"
	"context"
	"html"
	"strings"
	"sync"
	"testing"
	"testing/fstest"

	"netstage/plans"
	"netstage/plans/scenario"
)

// tornadoFactors are the factors of the test tornado; the high capex end
// is far enough to move the plan.
var tornadoFactors = []plans.Sensitivity{
	{Name: plans.FactorCapex, Low: 0.7, High: 1.4},
	{Name: plans.FactorDiscountRate, Low: 0.04, High: 0.12},
	{Name: plans.FactorTariff, Low: 0.8, High: 1.2},
}

var (
	tornadoOnce   sync.Once
	tornadoCaseV  *plans.Case
	tornadoResult *plans.Result
	tornadoBarsV  []scenario.TornadoBar
	tornadoErr    error
)

// solvedTornado loads a small synthetic case (6 sites, 3 years, seed 4:
// its plan buys, so every factor moves the NPV), solves it and runs the
// tornado with the planning solve, once per test binary. The solves take
// well under a second, so they run in -short mode too.
func solvedTornado(t *testing.T) (*plans.Case, *plans.Result, []scenario.TornadoBar) {
	t.Helper()
	tornadoOnce.Do(func() {
		files, err := plans.Synthetic(6, 3, 4)
		if err != nil {
			tornadoErr = err
			return
		}
		fsys := fstest.MapFS{}
		for _, f := range files {
			fsys[f.Name] = &fstest.MapFile{Data: f.Data}
		}
		if tornadoCaseV, _, tornadoErr = plans.LoadFS(fsys, files[0].Name); tornadoErr != nil {
			return
		}
		solve := func(ctx context.Context, c *plans.Case) (*plans.Result, error) {
			return plans.Solve(ctx, c, plans.SolveOptions{Gap: 1e-9})
		}
		if tornadoResult, tornadoErr = solve(context.Background(), tornadoCaseV); tornadoErr != nil {
			return
		}
		tornadoBarsV, _, tornadoErr = scenario.Tornado(context.Background(), tornadoCaseV, tornadoFactors,
			scenario.TornadoOptions{Solve: solve, Base: tornadoResult, Jobs: 2})
	})
	if tornadoErr != nil {
		t.Fatalf("tornado case: %v", tornadoErr)
	}
	if tornadoResult.Objective == nil {
		t.Fatalf("tornado case: status %s, want a plan", tornadoResult.Status)
	}
	return tornadoCaseV, tornadoResult, tornadoBarsV
}

func renderWith(t *testing.T, c *plans.Case, r *plans.Result, f Format, opts Options) string {
	t.Helper()
	var buf bytes.Buffer
	if err := WriteWith(&buf, c, r, f, opts); err != nil {
		t.Fatalf("WriteWith %s: %v", f, err)
	}
	return buf.String()
}

// section returns the HTML of the section with the given id, or "".
func section(page, id string) string {
	i := strings.Index(page, `<section id="`+id+`"`)
	if i < 0 {
		return ""
	}
	s := page[i:]
	return s[:strings.Index(s, "</section>")]
}

// TestTornadoSection: the tornado section, its chart and its table appear
// only when the report is given bars; the numbers in both formats are the
// bars' to the currency unit; the section sits after the reasons and before
// the assumptions, and the caution stays.
func TestTornadoSection(t *testing.T) {
	c, r, bars := solvedTornado(t)
	plain := render(t, c, r, HTML)
	if strings.Contains(plain, `id="tornado"`) || strings.Contains(plain, "chart-tornado") {
		t.Error("report without tornado bars has a tornado section")
	}
	if md := render(t, c, r, Markdown); strings.Contains(md, "Sensitivity") {
		t.Error("markdown without tornado bars has a sensitivity section")
	}

	opts := Options{Tornado: bars}
	page := renderWith(t, c, r, HTML, opts)
	checkSections(t, page, []string{"decision", "charts", "plan", "cashflow", "why", "tornado", "assumptions", "caution"})
	sec := section(page, "tornado")
	if n := strings.Count(sec, "<svg"); n != 1 {
		t.Errorf("tornado section has %d <svg>, want 1", n)
	}
	if !strings.Contains(sec, `aria-label="NPV when one assumption moves (tornado)"`) {
		t.Error("tornado chart has no label for screen readers")
	}
	if text := html.UnescapeString(sec); !strings.Contains(text, "one assumption at a time") || !strings.Contains(text, "every other assumption at the case's values") {
		t.Error("tornado section does not say that it moves one assumption at a time, the others at the case's values")
	}
	if !strings.Contains(section(page, "caution"), "finance and engineering") {
		t.Error("the caution is gone")
	}
	md := renderWith(t, c, r, Markdown, opts)
	if strings.Contains(md, "<svg") {
		t.Error("markdown has an svg")
	}
	for name, tb := range map[string]table{
		"html":     htmlTable(t, page, "tornado"),
		"markdown": mdTable(t, md, "## Sensitivity: one assumption at a time"),
	} {
		if len(tb.rows) != len(bars) {
			t.Fatalf("%s: %d rows, want %d", name, len(tb.rows), len(bars))
		}
		for i, b := range bars {
			row := tb.rows[i]
			if row[0] != factorLabel(b.Factor) {
				t.Errorf("%s row %d: factor %q, want %q (widest swing first)", name, i, row[0], factorLabel(b.Factor))
			}
			if want := factorValue(b.Factor, scenario.BaseValue(c, b.Factor)); row[tb.col("Case value")] != want {
				t.Errorf("%s %s: case value %q, want %q", name, b.Factor, row[tb.col("Case value")], want)
			}
			checkClose(t, name+" "+b.Factor+" NPV at low", num(t, row[tb.col("NPV at low")]), *b.LowNPV, moneyTol)
			checkClose(t, name+" "+b.Factor+" NPV at high", num(t, row[tb.col("NPV at high")]), *b.HighNPV, moneyTol)
			checkClose(t, name+" "+b.Factor+" swing", num(t, row[tb.col("Swing")]), *b.Swing, moneyTol)
		}
	}
	// The table's first line names the base NPV, the report's own.
	if !strings.Contains(sec, moneyCur(*r.Objective, r.Currency)) {
		t.Errorf("tornado section does not give the base NPV %s", moneyCur(*r.Objective, r.Currency))
	}
}

// TestTornadoNoPlanEnd: an end without a plan is said in words, in the
// chart and in the table, and draws no bar.
func TestTornadoNoPlanEnd(t *testing.T) {
	c, r, bars := solvedTornado(t)
	bad := append([]scenario.TornadoBar(nil), bars...)
	bad[0].HighNPV, bad[0].HighStatus, bad[0].Swing = nil, string(plans.StatusInfeasible), nil
	bad[1].LowNPV, bad[1].LowStatus, bad[1].Swing = nil, string(plans.StatusLimit), nil
	page := renderWith(t, c, r, HTML, Options{Tornado: bad})
	sec := section(page, "tornado")
	for _, want := range []string{factorValue(bad[0].Factor, bad[0].High) + ": no plan (infeasible)", factorValue(bad[1].Factor, bad[1].Low) + ": no plan within the limits"} {
		if !strings.Contains(sec, want) {
			t.Errorf("tornado chart lacks %q", want)
		}
	}
	tb := htmlTable(t, page, "tornado")
	if got := tb.rows[0][tb.col("NPV at high")]; got != "no plan (infeasible)" {
		t.Errorf("table: NPV at high %q, want %q", got, "no plan (infeasible)")
	}
	if got := tb.rows[0][tb.col("Swing")]; got != "no plan at one end" {
		t.Errorf("table: swing %q, want %q", got, "no plan at one end")
	}
}

// TestTornadoWithoutPlan: a result without a plan has no base NPV to move,
// so bars passed anyway draw nothing.
func TestTornadoWithoutPlan(t *testing.T) {
	c, r, bars := solvedTornado(t)
	none := &plans.Result{Case: c.Name, Currency: r.Currency, Status: plans.StatusInfeasible}
	if page := renderWith(t, c, none, HTML, Options{Tornado: bars}); strings.Contains(page, `id="tornado"`) {
		t.Error("report without a plan has a tornado section")
	}
}

// TestTornadoFactorValues checks the value labels: multipliers as ×m,
// the discount rate as a percentage.
func TestTornadoFactorValues(t *testing.T) {
	for _, tt := range []struct {
		name string
		v    float64
		want string
	}{{plans.FactorGrowth, 1.5, "×1.5"}, {plans.FactorBudget, 0.25, "×0.25"}, {plans.FactorDiscountRate, 0.12, "12.0%"}} {
		if got := factorValue(tt.name, tt.v); got != tt.want {
			t.Errorf("factorValue(%s, %g) = %q, want %q", tt.name, tt.v, got, tt.want)
		}
	}
}
