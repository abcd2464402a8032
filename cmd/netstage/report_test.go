package main

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"netstage/plans"
)

// reportNumber reads a number as the report prints it: thousands
// separators, a currency code before it, a unit or % after it, U+2212 as
// the minus sign.
func reportNumber(t *testing.T, s string) float64 {
	t.Helper()
	s = strings.Trim(strings.TrimSpace(s), "*")
	scale := 1.0
	switch {
	case strings.HasSuffix(s, "%"):
		s, scale = strings.TrimSuffix(s, "%"), 0.01
	case strings.HasSuffix(s, " Gbps"):
		s = strings.TrimSuffix(s, " Gbps")
	case strings.HasSuffix(s, " Tbps"):
		s, scale = strings.TrimSuffix(s, " Tbps"), 1000
	case strings.HasSuffix(s, " Mbps"):
		s, scale = strings.TrimSuffix(s, " Mbps"), 0.001
	}
	s = strings.ReplaceAll(s, "\u00a0", " ") // the no-break space after a currency code
	if i := strings.LastIndexByte(s, ' '); i >= 0 {
		s = s[i+1:]
	}
	s = strings.ReplaceAll(strings.ReplaceAll(s, ",", ""), "\u2212", "-")
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatalf("report number %q: %v", s, err)
	}
	return v * scale
}

// markdownTable returns the header and rows of the first table after the
// heading line.
func markdownTable(t *testing.T, md, heading string) ([]string, [][]string) {
	t.Helper()
	i := strings.Index(md, "\n"+heading+"\n")
	if i < 0 {
		t.Fatalf("report has no heading %q", heading)
	}
	var head []string
	var rows [][]string
	for _, line := range strings.Split(md[i+1:], "\n")[1:] {
		if !strings.HasPrefix(line, "|") {
			if head != nil {
				break
			}
			continue
		}
		line = strings.TrimSuffix(strings.TrimPrefix(strings.TrimSpace(line), "|"), "|")
		cells := strings.Split(line, " | ")
		for k := range cells {
			cells[k] = strings.Trim(strings.TrimSpace(cells[k]), "*")
		}
		switch {
		case head == nil:
			head = cells
		case strings.Trim(strings.Join(cells, ""), "-:") == "":
		default:
			rows = append(rows, cells)
		}
	}
	return head, rows
}

func column(t *testing.T, head []string, name string) int {
	t.Helper()
	for i, h := range head {
		if h == name {
			return i
		}
	}
	t.Fatalf("no column %q in %q", name, head)
	return -1
}

// TestReportMatchesSolveJSON runs `solve --demo --json` and `report --demo
// --out FILE.md` and checks that the report prints the same numbers, within
// its rounding (whole currency units, one decimal of a percentage, four
// decimals of a discount factor). It also checks that --out picks Markdown
// from the extension and writes nothing to stdout.
func TestReportMatchesSolveJSON(t *testing.T) {
	if testing.Short() {
		t.Skip("two solves of the demo take tens of seconds; skipped in -short (the full suite runs it)")
	}
	var out, errOut bytes.Buffer
	if code := run([]string{"solve", "--demo", "--json"}, &out, &errOut); code != exitOK {
		t.Fatalf("solve --demo --json: exit %d: %s", code, errOut.String())
	}
	var j map[string]any
	if err := json.Unmarshal(out.Bytes(), &j); err != nil {
		t.Fatalf("solve --json: %v", err)
	}

	path := filepath.Join(t.TempDir(), "plan.md")
	out.Reset()
	errOut.Reset()
	if code := run([]string{"report", "--demo", "--out", path}, &out, &errOut); code != exitOK {
		t.Fatalf("report --demo --out: exit %d: %s", code, errOut.String())
	}
	if out.Len() != 0 {
		t.Errorf("report --out wrote %d bytes to stdout, want none", out.Len())
	}
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	md := string(data)
	if !strings.HasPrefix(md, "# ") {
		t.Fatalf("report --out plan.md is not Markdown: %.60q", md)
	}

	const moneyTol = 0.5 + 1e-6
	close := func(what string, got, want, tol float64) {
		t.Helper()
		if math.Abs(got-want) > tol {
			t.Errorf("%s: report %v, solve --json %v", what, got, want)
		}
	}
	jf := func(m map[string]any, k string) float64 {
		t.Helper()
		v, ok := m[k].(float64)
		if !ok {
			t.Fatalf("solve --json field %q = %v", k, m[k])
		}
		return v
	}

	_, keys := markdownTable(t, md, "## Decision")
	fig := map[string]string{}
	for _, r := range keys {
		fig[r[0]] = r[1]
	}
	close("NPV", reportNumber(t, fig["NPV of the plan"]), jf(j, "objective"), moneyTol)
	close("baseline NPV", reportNumber(t, fig["NPV of doing nothing"]), jf(j, "baseline_npv"), moneyTol)
	close("incremental NPV", reportNumber(t, fig["Incremental NPV"]), jf(j, "incremental_npv"), moneyTol)
	close("total capex", reportNumber(t, fig["Total capex"]), jf(j, "total_capex"), moneyTol)
	if j["irr"] != nil {
		close("IRR", reportNumber(t, fig["IRR"]), jf(j, "irr"), 0.0005+1e-9)
	}
	if j["payback_year"] != nil {
		close("payback year", reportNumber(t, fig["Payback year"]), jf(j, "payback_year"), 0)
	}

	head, rows := markdownTable(t, md, "## Staged plan")
	var purchases [][]string
	for _, r := range rows {
		if r[0] != "Total" && r[1] != "stage total" {
			purchases = append(purchases, r)
		}
	}
	jplan, _ := j["plan"].([]any)
	if len(purchases) != len(jplan) {
		t.Fatalf("report plan has %d rows, solve --json %d", len(purchases), len(jplan))
	}
	for i, x := range jplan {
		p := x.(map[string]any)
		r := purchases[i]
		close("plan year", reportNumber(t, r[column(t, head, "Order year")]), jf(p, "year"), 0)
		close("plan units", reportNumber(t, r[column(t, head, "Units")]), jf(p, "units"), 0)
		close("plan Gbps", reportNumber(t, r[column(t, head, "Capacity added")]), jf(p, "gbps"), 0.05)
		close("plan capex", reportNumber(t, r[column(t, head, "Capex")]), jf(p, "capex"), moneyTol)
		close("plan in service", reportNumber(t, r[column(t, head, "In service")]), jf(p, "in_service"), 0)
		if r[column(t, head, "Link")] != p["link"] {
			t.Errorf("plan row %d: link %q, solve --json %q", i, r[column(t, head, "Link")], p["link"])
		}
	}

	head, rows = markdownTable(t, md, "## Cash flow")
	jcash, _ := j["cashflow"].([]any)
	if len(rows) != len(jcash)+1 {
		t.Fatalf("report cash flow has %d rows, want %d years and a total", len(rows), len(jcash))
	}
	for i, x := range jcash {
		cf := x.(map[string]any)
		for _, f := range []struct {
			col, key string
			tol      float64
		}{
			{"Year", "year", 0}, {"Revenue", "revenue", moneyTol}, {"Opex", "opex", moneyTol},
			{"Capex", "capex", moneyTol}, {"Tax", "tax", moneyTol}, {"Salvage", "salvage", moneyTol},
			{"Net", "net", moneyTol}, {"Discount factor", "discount_factor", 0.00005 + 1e-12},
			{"PV", "pv", moneyTol}, {"Cumulative PV", "cumulative_pv", moneyTol},
		} {
			close("cash "+f.key, reportNumber(t, rows[i][column(t, head, f.col)]), jf(cf, f.key), f.tol)
		}
	}
}

func TestReportBadFormat(t *testing.T) {
	var out, errOut bytes.Buffer
	if code := run([]string{"report", "--demo", "--format", "pdf"}, &out, &errOut); code != exitBadInput {
		t.Errorf("report --format pdf: exit %d, want %d", code, exitBadInput)
	}
	if !strings.Contains(errOut.String(), "html or md") {
		t.Errorf("report --format pdf: stderr %q does not say what is allowed", errOut.String())
	}
}

// tornadoCaseDir writes a small synthetic case (5 sites, 3 years) with a
// [report.tornado] table and returns its case file.
func tornadoCaseDir(t *testing.T) string {
	t.Helper()
	dir := filepath.Join(t.TempDir(), "case")
	if code, _, errOut := runCLI("demo", "--sites", "5", "--years", "3", "--seed", "11", dir); code != exitOK {
		t.Fatalf("demo --sites: exit %d: %s", code, errOut)
	}
	path := filepath.Join(dir, "case.toml")
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	data = append(data, "\n[report.tornado]\ntariff = [0.8, 1.2]\ncapex = [0.5, 1.5]\n"...)
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// TestReportTornado: with [report.tornado] the report solves each factor's
// two ends (progress on stderr, one line per solve; none with --quiet) and
// prints the section; check names the factors. The ends' NPVs are those of
// `solve --json` on the case with the factor applied, which plans/scenario
// and plans/report test; here the wiring is checked: the tariff's high end
// is worth at least its low end (more tariff can only help, see
// TestTornadoRealSolve in plans/scenario).
func TestReportTornado(t *testing.T) {
	path := tornadoCaseDir(t)
	code, out, errOut := runCLI("report", path, "--format", "md", "--gap", "1e-9", "--jobs", "2")
	if code != exitOK {
		t.Fatalf("report: exit %d: %s", code, errOut)
	}
	if n := strings.Count(errOut, "\ntornado: "); n < 4 {
		t.Errorf("stderr has %d tornado progress lines, want the header and 4 solves:\n%s", n, errOut)
	}
	head, rows := markdownTable(t, out, "## Sensitivity: one assumption at a time")
	if len(rows) != 2 {
		t.Fatalf("tornado table has %d rows, want 2 (capex, tariff)", len(rows))
	}
	for _, row := range rows {
		if row[0] != "Tariffs" {
			continue
		}
		lo := reportNumber(t, row[column(t, head, "NPV at low")])
		hi := reportNumber(t, row[column(t, head, "NPV at high")])
		if hi < lo {
			t.Errorf("tariff: NPV %v at ×1.2 below %v at ×0.8", hi, lo)
		}
	}
	_, _, errOut = runCLI("report", path, "--format", "md", "--quiet")
	if strings.Contains(errOut, "tornado") {
		t.Errorf("--quiet: stderr %q has tornado progress", errOut)
	}
	// The same case without the table: no section, no tornado solves.
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	plain := filepath.Join(filepath.Dir(path), "plain.toml")
	if err := os.WriteFile(plain, data[:bytes.Index(data, []byte("\n[report.tornado]"))], 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errOut = runCLI("report", plain, "--out", filepath.Join(t.TempDir(), "plain.html"))
	if code != exitOK || strings.Contains(errOut, "tornado") {
		t.Errorf("report without [report.tornado]: exit %d, stderr %q", code, errOut)
	}
	code, out, errOut = runCLI("check", path)
	if code != exitOK {
		t.Fatalf("check: exit %d: %s", code, errOut)
	}
	if want := "tornado chart over capex 0.5–1.5, tariff 0.8–1.2 (4 more solves)"; !strings.Contains(out, "\nreport ") || !strings.Contains(out, want) {
		t.Errorf("check output lacks %q:\n%s", want, out)
	}
	if code, _, errOut := runCLI("report", path, "--jobs", "-1"); code != exitBadInput || !strings.Contains(errOut, "--jobs") {
		t.Errorf("--jobs -1: exit %d, stderr %q", code, errOut)
	}
}

// TestReportTornadoStopped: Ctrl-C during the tornado's solves still
// writes the report of the plan, without the chart, saying so.
func TestReportTornadoStopped(t *testing.T) {
	path := tornadoCaseDir(t)
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	saved := scenarioSolve
	scenarioSolve = func(ctx context.Context, c *plans.Case, o plans.SolveOptions) (*plans.Result, error) {
		cancel() // as if Ctrl-C came during the first tornado solve
		return saved(ctx, c, o)
	}
	t.Cleanup(func() { scenarioSolve = saved })
	var out, errb bytes.Buffer
	err := runReport(ctx, &cmdEnv{stdout: &out, stderr: &errb}, &reportOptions{casePath: path, format: "md", jobs: 1})
	if err != nil {
		t.Fatalf("runReport: %v\n%s", err, errb.String())
	}
	md := out.String()
	if strings.Contains(md, "## Sensitivity") {
		t.Error("a stopped tornado is in the report")
	}
	if !strings.Contains(md, "## Staged plan") || !strings.Contains(md, "tornado chart of [report.tornado] is missing") {
		t.Error("the report lacks the plan or the note that the tornado is missing")
	}
	if !strings.Contains(errb.String(), "warning: the tornado chart") {
		t.Errorf("stderr %q does not warn", errb.String())
	}
}
