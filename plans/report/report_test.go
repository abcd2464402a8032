package report

import (
	"bytes"
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"html"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"sync"
	"testing"

	"netstage/plans"
)

var update = flag.Bool("update", false, "rewrite the golden files under testdata/report")

// goldenDir holds the report goldens (the repository's top-level testdata).
var goldenDir = filepath.Join("..", "..", "testdata", "report")

var (
	demoOnce   sync.Once
	demoCase   *plans.Case
	demoResult *plans.Result
	demoErr    error
)

// solvedDemo loads and solves the embedded demo once per test binary.
func solvedDemo(t *testing.T) (*plans.Case, *plans.Result) {
	t.Helper()
	if raceEnabled && testing.Short() {
		// The report code has no concurrency; what takes minutes under the
		// race detector is the demo's solve, which package plans tests.
		t.Skip("solving the demo under -race -short takes minutes; the full suite (go test ./...) runs this check")
	}
	demoOnce.Do(func() {
		demoCase, _, demoErr = plans.LoadDemo()
		if demoErr != nil {
			return
		}
		// A gap of 1e-9 asks for the optimum itself, so that the golden file
		// does not follow whichever plan within the default gap the search
		// meets first.
		demoResult, demoErr = plans.Solve(context.Background(), demoCase, plans.SolveOptions{Gap: 1e-9})
	})
	if demoErr != nil {
		t.Fatalf("demo: %v", demoErr)
	}
	if demoResult.Objective == nil {
		t.Fatalf("demo: status %s, want a plan", demoResult.Status)
	}
	return demoCase, demoResult
}

func render(t *testing.T, c *plans.Case, r *plans.Result, f Format) string {
	t.Helper()
	var buf bytes.Buffer
	if err := Write(&buf, c, r, f); err != nil {
		t.Fatalf("Write %s: %v", f, err)
	}
	return buf.String()
}

// TestMarkdownGolden guards the demo's Markdown report against unintended
// change. It is a regression guard of our own output, not a proof; the
// numbers are checked against the Result in TestNumbersMatchResult.
func TestMarkdownGolden(t *testing.T) {
	c, r := solvedDemo(t)
	got := render(t, c, r, Markdown)
	path := filepath.Join(goldenDir, "demo.md")
	if *update {
		if err := os.MkdirAll(goldenDir, 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test ./plans/report -run TestMarkdownGolden -update)", err)
	}
	if got != string(want) {
		gl, wl := strings.Split(got, "\n"), strings.Split(string(want), "\n")
		for i := 0; i < len(gl) || i < len(wl); i++ {
			var g, w string
			if i < len(gl) {
				g = gl[i]
			}
			if i < len(wl) {
				w = wl[i]
			}
			if g != w {
				t.Fatalf("%s differs from the golden file at line %d:\ngot:  %s\nwant: %s\n(rerun with -update and read the diff)", path, i+1, g, w)
			}
		}
	}
}

// TestDeterministic renders twice: same input, same bytes (DESIGN.md §5).
func TestDeterministic(t *testing.T) {
	c, r := solvedDemo(t)
	for _, f := range []Format{HTML, Markdown} {
		if a, b := render(t, c, r, f), render(t, c, r, f); a != b {
			t.Errorf("%s report differs between two renderings of the same result", f)
		}
	}
}

// jsonOf returns the Result as the generic JSON value that `solve --json`
// consumers parse.
func jsonOf(t *testing.T, r *plans.Result) map[string]any {
	t.Helper()
	b, err := json.Marshal(r)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	return m
}

// table is a parsed report table: header cells and body rows.
type table struct {
	head []string
	rows [][]string
}

func (tb table) col(name string) int {
	for i, h := range tb.head {
		if h == name {
			return i
		}
	}
	return -1
}

// mdTable returns the first table after the heading line in a Markdown
// report.
func mdTable(t *testing.T, md, heading string) table {
	t.Helper()
	i := strings.Index(md, "\n"+heading+"\n")
	if i < 0 {
		t.Fatalf("markdown has no heading %q", heading)
	}
	var tb table
	started := false
	for _, line := range strings.Split(md[i+1:], "\n")[1:] {
		if !strings.HasPrefix(line, "|") {
			if started {
				break
			}
			continue
		}
		cells := splitMDRow(line)
		switch {
		case !started:
			tb.head, started = cells, true
		case strings.Trim(strings.Join(cells, ""), "-:") == "":
		default:
			tb.rows = append(tb.rows, cells)
		}
	}
	return tb
}

func splitMDRow(line string) []string {
	line = strings.TrimSpace(line)
	line = strings.TrimPrefix(strings.TrimSuffix(line, "|"), "|")
	parts := strings.Split(line, " | ")
	for i := range parts {
		parts[i] = strings.Trim(strings.TrimSpace(parts[i]), "*")
	}
	return parts
}

var (
	trRE   = regexp.MustCompile(`(?s)<tr[^>]*>(.*?)</tr>`)
	cellRE = regexp.MustCompile(`(?s)<t[hd][^>]*>(.*?)</t[hd]>`)
	tagRE  = regexp.MustCompile(`<[^>]+>`)
)

// htmlTable returns the first table of the section with the given id.
func htmlTable(t *testing.T, page, id string) table {
	t.Helper()
	i := strings.Index(page, `<section id="`+id+`"`)
	if i < 0 {
		t.Fatalf("html has no section %q", id)
	}
	sec := page[i:]
	sec = sec[:strings.Index(sec, "</section>")]
	start := strings.Index(sec, "<table")
	if start < 0 {
		t.Fatalf("section %q has no table", id)
	}
	sec = sec[start : strings.Index(sec, "</table>")+len("</table>")]
	var tb table
	for k, m := range trRE.FindAllStringSubmatch(sec, -1) {
		var cells []string
		for _, c := range cellRE.FindAllStringSubmatch(m[1], -1) {
			cells = append(cells, strings.TrimSpace(html.UnescapeString(tagRE.ReplaceAllString(c[1], ""))))
		}
		if k == 0 {
			tb.head = cells
		} else {
			tb.rows = append(tb.rows, cells)
		}
	}
	return tb
}

func num(t *testing.T, s string) float64 {
	t.Helper()
	v, ok := parseNumber(s)
	if !ok {
		t.Fatalf("cannot read %q as a number", s)
	}
	return v
}

func jnum(t *testing.T, m map[string]any, key string) float64 {
	t.Helper()
	v, ok := m[key].(float64)
	if !ok {
		t.Fatalf("json field %q = %v, want a number", key, m[key])
	}
	return v
}

// Tolerances of the comparison: what the report's rounding allows.
const (
	moneyTol   = 0.5 + 1e-6    // whole currency units
	percentTol = 0.0005 + 1e-9 // one decimal of a percentage, as a fraction
	factorTol  = 0.00005 + 1e-12
	gbpsTol    = 0.05 + 1e-9
)

func checkClose(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if math.Abs(got-want) > tol {
		t.Errorf("%s: report says %v, solve JSON says %v (tolerance %v)", what, got, want, tol)
	}
}

// TestNumbersMatchResult reads the numbers back from both reports of the
// demo and compares them with the JSON of the same Result (the schema of
// `solve --json`, DESIGN.md §4), within the report's printed rounding.
func TestNumbersMatchResult(t *testing.T) {
	c, r := solvedDemo(t)
	j := jsonOf(t, r)
	md := render(t, c, r, Markdown)
	page := render(t, c, r, HTML)

	type reader struct {
		name  string
		table func(t *testing.T, heading, id string) table
		keys  func(t *testing.T) table
	}
	readers := []reader{
		{"markdown", func(t *testing.T, heading, _ string) table { return mdTable(t, md, heading) },
			func(t *testing.T) table { return mdTable(t, md, "## Decision") }},
		{"html", func(t *testing.T, _, id string) table { return htmlTable(t, page, id) },
			func(t *testing.T) table { return htmlKeys(t, page) }},
	}
	for _, rd := range readers {
		t.Run(rd.name, func(t *testing.T) {
			// Key figures.
			keys := rd.keys(t)
			fig := map[string]string{}
			for _, row := range keys.rows {
				if len(row) >= 2 {
					fig[row[0]] = row[1]
				}
			}
			for label, key := range map[string]string{
				"NPV of the plan": "objective", "NPV of doing nothing": "baseline_npv",
				"Incremental NPV": "incremental_npv", "Total capex": "total_capex",
			} {
				checkClose(t, label, num(t, fig[label]), jnum(t, j, key), moneyTol)
			}
			if j["irr"] != nil {
				checkClose(t, "IRR", num(t, fig["IRR"]), jnum(t, j, "irr"), percentTol)
			}
			if j["payback_year"] != nil {
				checkClose(t, "payback year", num(t, fig["Payback year"]), jnum(t, j, "payback_year"), 0)
			}
			if j["profitability_index"] != nil {
				checkClose(t, "profitability index", num(t, fig["Profitability index"]), jnum(t, j, "profitability_index"), 0.005+1e-9)
			}

			// Staged plan: every row in order, then the stage and total rows.
			plan := rd.table(t, "## Staged plan", "plan")
			jplan, _ := j["plan"].([]any)
			var rows [][]string
			for _, row := range plan.rows {
				if len(row) == len(plan.head) && row[1] != "stage total" && row[0] != "Total" && row[0] != "Total capex" && !strings.HasPrefix(row[1], "stage total") {
					rows = append(rows, row)
				}
			}
			if len(rows) != len(jplan) {
				t.Fatalf("plan table has %d purchase rows, JSON has %d", len(rows), len(jplan))
			}
			for i, jr := range jplan {
				p := jr.(map[string]any)
				row := rows[i]
				checkClose(t, "plan year", num(t, row[plan.col("Order year")]), jnum(t, p, "year"), 0)
				if got := row[plan.col("Link")]; got != p["link"] {
					t.Errorf("plan row %d link %q, JSON %q", i, got, p["link"])
				}
				if got, want := row[plan.col("Item")], p["item"].(string); !strings.HasPrefix(got, want) {
					t.Errorf("plan row %d item %q, JSON %q", i, got, want)
				}
				if p["kind"] != plans.KindBuild && row[plan.col("Vendor")] != p["vendor"] {
					t.Errorf("plan row %d vendor %q, JSON %q", i, row[plan.col("Vendor")], p["vendor"])
				}
				checkClose(t, "plan units", num(t, row[plan.col("Units")]), jnum(t, p, "units"), 0)
				checkClose(t, "plan Gbps", num(t, row[plan.col("Capacity added")]), jnum(t, p, "gbps"), gbpsTol)
				checkClose(t, "plan capex", num(t, row[plan.col("Capex")]), jnum(t, p, "capex"), moneyTol)
				checkClose(t, "plan in service", num(t, row[plan.col("In service")]), jnum(t, p, "in_service"), 0)
			}

			// Cash flow: every year and field the table shows.
			cash := rd.table(t, "## Cash flow", "cashflow")
			jcash, _ := j["cashflow"].([]any)
			if len(cash.rows) != len(jcash)+1 {
				t.Fatalf("cash-flow table has %d rows, want %d years and a total", len(cash.rows), len(jcash))
			}
			fields := []struct {
				head, key string
				tol       float64
			}{
				{"Revenue", "revenue", moneyTol}, {"Opex", "opex", moneyTol}, {"Capex", "capex", moneyTol},
				{"Tax", "tax", moneyTol}, {"Salvage", "salvage", moneyTol}, {"Net", "net", moneyTol},
				{"Discount factor", "discount_factor", factorTol}, {"PV", "pv", moneyTol},
				{"Cumulative PV", "cumulative_pv", moneyTol}, {"vs doing nothing", "incremental", moneyTol},
			}
			sumPV := 0.0
			for i, jr := range jcash {
				cf := jr.(map[string]any)
				row := cash.rows[i]
				checkClose(t, "cash year", num(t, row[cash.col("Year")]), jnum(t, cf, "year"), 0)
				for _, f := range fields {
					k := cash.col(f.head)
					if k < 0 {
						t.Fatalf("cash-flow table has no column %q (head %q)", f.head, cash.head)
					}
					checkClose(t, "cash "+f.key+" "+row[0], num(t, row[k]), jnum(t, cf, f.key), f.tol)
				}
				sumPV += jnum(t, cf, "pv")
			}
			total := cash.rows[len(cash.rows)-1]
			checkClose(t, "total PV", num(t, total[cash.col("PV")]), sumPV, moneyTol)
			// DESIGN.md §4: objective = Σ cashflow[].pv.
			checkClose(t, "total PV against objective", num(t, total[cash.col("PV")]), jnum(t, j, "objective"), moneyTol)
		})
	}
}

var keyRE = regexp.MustCompile(`(?s)<div class="label">(.*?)</div><div class="value">(.*?)</div>`)

// htmlKeys reads the key-figure boxes of the HTML report as a table.
func htmlKeys(t *testing.T, page string) table {
	t.Helper()
	var tb table
	for _, m := range keyRE.FindAllStringSubmatch(page, -1) {
		tb.rows = append(tb.rows, []string{html.UnescapeString(m[1]), html.UnescapeString(m[2])})
	}
	if len(tb.rows) == 0 {
		t.Fatal("html has no key figures")
	}
	return tb
}

// TestHTMLSelfContained checks the page needs nothing from outside: no
// scripts, no external links, images, style sheets or web fonts.
func TestHTMLSelfContained(t *testing.T) {
	c, r := solvedDemo(t)
	page := render(t, c, r, HTML)
	for _, bad := range []string{"<script", "<link", "<img", "@import", "@font-face", "url(", `src="`, `href="http`, `xlink:href="http`} {
		if strings.Contains(page, bad) {
			t.Errorf("html contains %q: the report must be self-contained", bad)
		}
	}
	for _, want := range []string{"@media print", "@page", "break-inside:avoid"} {
		if !strings.Contains(page, want) {
			t.Errorf("html lacks %q (print layout)", want)
		}
	}
}

// sectionIDs are the sections of a report with a plan, in order (issue 6).
var sectionIDs = []string{"decision", "charts", "plan", "cashflow", "why", "assumptions", "caution"}

func checkSections(t *testing.T, page string, ids []string) {
	t.Helper()
	last := -1
	for _, id := range ids {
		i := strings.Index(page, `<section id="`+id+`"`)
		if i < 0 {
			t.Errorf("html has no section %q", id)
			continue
		}
		if i < last {
			t.Errorf("section %q is out of order", id)
		}
		last = i
	}
}

func TestHTMLSectionsAndCharts(t *testing.T) {
	c, r := solvedDemo(t)
	page := render(t, c, r, HTML)
	checkSections(t, page, sectionIDs)
	if n := strings.Count(page, "<svg"); n < 4 {
		t.Errorf("html has %d <svg> charts, want at least 4 (the demo has site coordinates)", n)
	}
	// Every chart axis is labelled with its unit.
	for _, label := range []string{"Capex (" + r.Currency, "Cash (" + r.Currency, "Order year", "Latitude (degrees north)", "Longitude (degrees east)"} {
		if !strings.Contains(page, label) {
			t.Errorf("charts lack the axis label %q", label)
		}
	}
	if !strings.Contains(page, "review") || !strings.Contains(page, "finance and engineering") {
		t.Error("html lacks the caution about review by finance and engineering")
	}
	// The demo buys two modules that enter service in its last year.
	if note := r.HorizonEndNote(); note == "" || !strings.Contains(page, `<p class="note" id="horizon-end">`+html.EscapeString(note)+`</p>`) {
		t.Errorf("html lacks the note on purchases in the horizon's last year (%q)", note)
	}
}

// TestNoCoordinates: without site coordinates the map is skipped with a
// sentence saying so, and the other three charts remain.
func TestNoCoordinates(t *testing.T) {
	c, r := solvedDemo(t)
	bare := *c
	bare.Sites = append([]plans.Site(nil), c.Sites...)
	for i := range bare.Sites {
		bare.Sites[i].HasLatLon, bare.Sites[i].HasXY = false, false
	}
	page := render(t, &bare, r, HTML)
	if n := strings.Count(page, "<svg"); n != 4 {
		t.Errorf("html has %d <svg> charts, want 4 without coordinates (capex, cash flow, utilisation before and after)", n)
	}
	if !strings.Contains(page, "no site coordinates") {
		t.Error("html does not say why the map is missing")
	}
	md := render(t, &bare, r, Markdown)
	if !strings.Contains(md, "no site coordinates") {
		t.Error("markdown does not say why the map is missing")
	}
}

// TestInfeasibleResult: a result without a plan still gives a report that
// says why, with the assumptions and the caution, and no charts.
func TestInfeasibleResult(t *testing.T) {
	c, _ := solvedDemo(t)
	r := &plans.Result{
		Case: c.Name, Currency: c.Currency, Status: plans.StatusInfeasible,
		Infeasibility: []plans.InfeasibilityRow{{
			Kind: plans.InfeasibleDemand, Name: "HAV-KOR", Year: c.FirstYear + 2, Amount: 12.5,
			Message: "committed traffic HAV-KOR cannot be carried in that year",
		}},
	}
	page := render(t, c, r, HTML)
	checkSections(t, page, []string{"decision", "infeasibility", "assumptions", "caution"})
	if strings.Contains(page, "<svg") {
		t.Error("html of an infeasible case draws charts")
	}
	if !strings.Contains(page, "no set of purchases meets the committed demands") || !strings.Contains(page, "12.5 Gbps") {
		t.Error("html does not explain the infeasibility")
	}
	md := render(t, c, r, Markdown)
	if !strings.Contains(md, "## What blocks a plan") || !strings.Contains(md, "HAV-KOR") {
		t.Error("markdown does not explain the infeasibility")
	}
}

func TestParseFormat(t *testing.T) {
	for _, tt := range []struct {
		in   string
		want Format
		ok   bool
	}{{"html", HTML, true}, {"md", Markdown, true}, {"Markdown", Markdown, true}, {"pdf", 0, false}} {
		got, err := ParseFormat(tt.in)
		if (err == nil) != tt.ok || (tt.ok && got != tt.want) {
			t.Errorf("ParseFormat(%q) = %v, %v; want %v, ok %v", tt.in, got, err, tt.want, tt.ok)
		}
	}
}

func TestOrderBy(t *testing.T) {
	c := &plans.Case{ReadyByMonth: 9}
	c.Items = []plans.Item{{ID: "x", Vendor: -1, LeadMonths: 3}, {ID: "y", Vendor: -1, LeadMonths: 14}, {ID: "z", Vendor: -1, LeadMonths: 9}}
	// DESIGN.md §2 lead-time rule: an order at the start of year t with lead
	// m serves from t + max(0, ⌈(m − c)/12⌉); the latest order month keeps
	// the capacity live by the end of month c of that year.
	for _, tt := range []struct {
		item       string
		year, serv int
		want       string
	}{
		{"x", 2027, 2027, "Jul 2027"}, // 3 months before the end of September
		{"y", 2027, 2028, "Aug 2027"}, // 14 months before the end of September 2028
		{"z", 2027, 2027, "Jan 2027"}, // 9 months: order at the start of the year
	} {
		got := orderBy(c, plans.PlanRow{Year: tt.year, InService: tt.serv, Item: tt.item, Kind: plans.KindModule})
		if got != tt.want {
			t.Errorf("orderBy(%s, %d) = %q, want %q", tt.item, tt.year, got, tt.want)
		}
	}
}

// TestCostMode: a network that earns no tariffs is judged on present cost;
// the report says so and shows no IRR or payback (DESIGN.md §2).
func TestCostMode(t *testing.T) {
	c, r := solvedDemo(t)
	cost := *r
	cost.CostMode = true
	cost.IRR, cost.PaybackYear = nil, nil
	md := render(t, c, &cost, Markdown)
	if !strings.Contains(md, "present cost is EUR\u00a0") {
		t.Errorf("cost-mode decision does not give the present cost:\n%s", md[:min(len(md), 800)])
	}
	for _, bad := range []string{"| IRR |", "| Payback year |", "an NPV of"} {
		if strings.Contains(md, bad) {
			t.Errorf("cost-mode report contains %q", bad)
		}
	}
}

// TestStoppedEarly: a plan not proven optimal says how far from the best
// possible it may be, as a share and as money (bound − NPV).
func TestStoppedEarly(t *testing.T) {
	c, r := solvedDemo(t)
	stopped := *r
	stopped.Status = plans.StatusFeasible
	bound, gap := *r.Objective+12345, 12345 / *r.Objective
	stopped.Bound, stopped.Gap = &bound, &gap
	md := render(t, c, &stopped, Markdown)
	if want := "within 1.6% (EUR\u00a012,345) of the best possible NPV, not proven optimal"; !strings.Contains(md, want) {
		t.Errorf("the decision lacks %q:\n%s", want, md[:min(len(md), 1500)])
	}
	stopped.CostMode = true
	md = render(t, c, &stopped, Markdown)
	if want := "(EUR\u00a012,345) of the least possible present cost"; !strings.Contains(md, want) {
		t.Errorf("cost mode: the decision lacks %q:\n%s", want, md[:min(len(md), 1500)])
	}
}

// TestPaybackFirstYear: a plan whose cumulative incremental cash is never
// negative (payback in the first year, as a lease that pays at once) is
// not said to have "payback in" that year, which reads as if it had costs
// to earn back; the key figure notes it.
func TestPaybackFirstYear(t *testing.T) {
	c, r := solvedDemo(t)
	first := *r
	y := first.Cashflow[0].Year
	first.PaybackYear = &y
	md := render(t, c, &first, Markdown)
	if strings.Contains(md, "payback in "+strconv.Itoa(y)) || !strings.Contains(md, "a cumulative cash flow never below that of doing nothing") {
		t.Errorf("the decision for a first-year payback:\n%s", md[:min(len(md), 1500)])
	}
	if !strings.Contains(md, "never below zero") {
		t.Error("the payback key figure does not note it")
	}
}

// TestShortfallAtRisk: committed traffic the do-nothing network cannot
// carry shows up under the upgrade of a link on its route, with the
// revenue at risk summed over the years and the SLA penalty.
func TestShortfallAtRisk(t *testing.T) {
	c, r := solvedDemo(t)
	if len(r.Plan) == 0 {
		t.Skip("the demo plan buys nothing: no upgrade to explain")
	}
	link := r.Plan[0].Link
	var d string
	for _, rt := range r.Routes {
		if slices.Contains(rt.Links, link) && rt.Year >= r.Plan[0].InService {
			d = rt.Demand
			break
		}
	}
	if d == "" {
		t.Fatalf("no demand routed over upgraded link %s once it is upgraded", link)
	}
	short := *r
	short.Shortfall = []plans.ShortfallRow{
		{Demand: d, Year: c.FirstYear + 3, Committed: 30, Carried: 25, Shortfall: 5, Penalty: 2400, RevenueAtRisk: 1500},
		{Demand: d, Year: c.FirstYear + 4, Committed: 36, Carried: 25, Shortfall: 11, Penalty: 5280, RevenueAtRisk: 3300.4},
	}
	md := render(t, c, &short, Markdown)
	// 1,500 + 3,300.4 = 4,800.4 → "4,800"; penalties 2,400 + 5,280 = 7,680.
	for _, want := range []string{"up to 11 Gbps in a year", "EUR\u00a04,800 of revenue at risk", "EUR\u00a07,680 of SLA penalties"} {
		if !strings.Contains(md, want) {
			t.Errorf("why-section of link %s lacks %q", link, want)
		}
	}
}

// TestDecisionThisYear: orders in the first year lead the decision, with
// their capex against that year's budget.
func TestDecisionThisYear(t *testing.T) {
	c, r := solvedDemo(t)
	if len(r.Plan) == 0 {
		t.Skip("the demo plan buys nothing")
	}
	now := *r
	now.Plan = append([]plans.PlanRow(nil), r.Plan...)
	now.Plan[0].Year = c.FirstYear
	v, err := buildView(c, &now)
	if err != nil {
		t.Fatal(err)
	}
	p := now.Plan[0]
	want := fmt.Sprintf("In %d, order %d × %s on link %s from %s", c.FirstYear, p.Units, p.Item, p.Link, p.Vendor)
	if !strings.HasPrefix(v.Decision, want) {
		t.Errorf("decision starts %.120q, want %q", v.Decision, want)
	}
	if cf := cashYear(now.Cashflow, c.FirstYear); cf != nil && cf.Budget != nil {
		if !strings.Contains(v.Decision, "against a budget of "+moneyCur(*cf.Budget, now.Currency)) {
			t.Errorf("decision does not give the first year's budget: %q", v.Decision)
		}
	}
}

var revenueGainRE = regexp.MustCompile(`([A-Z]{3}\x{00a0}[0-9,]+) more revenue over the horizon`)

// TestRevenueGain checks the decision's extra revenue against the JSON
// cash flows: Σ cashflow[].revenue − Σ baseline_cashflow[].revenue.
func TestRevenueGain(t *testing.T) {
	c, r := solvedDemo(t)
	j := jsonOf(t, r)
	want := 0.0
	for _, x := range j["cashflow"].([]any) {
		want += jnum(t, x.(map[string]any), "revenue")
	}
	for _, x := range j["baseline_cashflow"].([]any) {
		want -= jnum(t, x.(map[string]any), "revenue")
	}
	md := render(t, c, r, Markdown)
	m := revenueGainRE.FindStringSubmatch(md)
	if want < 0.5 || len(r.Plan) == 0 {
		if m != nil {
			t.Errorf("decision claims %s more revenue; the JSON gives %v", m[1], want)
		}
		return
	}
	if m == nil {
		t.Fatalf("decision does not give the extra revenue (%v)", want)
	}
	checkClose(t, "extra revenue", num(t, m[1]), want, moneyTol)
}

// TestEmptyPlan: when the plan buys nothing, the report says so and gives
// no IRR or payback, whatever rounding noise the incremental flows carry.
func TestEmptyPlan(t *testing.T) {
	c, r := solvedDemo(t)
	empty := *r
	empty.Plan = nil
	irr, year := -0.643, c.FirstYear
	empty.IRR, empty.PaybackYear = &irr, &year
	md := render(t, c, &empty, Markdown)
	if !strings.Contains(md, "Order nothing in") || !strings.Contains(md, "The plan buys nothing.") {
		t.Error("empty plan: the report does not say that nothing is bought")
	}
	for _, bad := range []string{"IRR of", "payback in", "−64.3%"} {
		if strings.Contains(md, bad) {
			t.Errorf("empty plan: the report contains %q", bad)
		}
	}
}

// TestGridLinks: a large network's grid keeps every upgraded link, then
// the links closest to their ceiling, in the Result's order.
func TestGridLinks(t *testing.T) {
	r := &plans.Result{}
	n := maxGridLinks + 8
	for i := 0; i < n; i++ {
		ly := plans.LinkYear{Link: fmt.Sprintf("L%02d", i), Year: 2030, CapacityBefore: 100, CapacityAfter: 100,
			Ceiling: 0.7, UtilisationAfter: float64(i) / float64(n) * 0.7}
		if i == 0 || i == 3 {
			ly.CapacityAfter = 200 // upgraded, yet lightly used
		}
		r.Links = append(r.Links, ly)
	}
	got, total := gridLinks(r)
	if total != n || len(got) != maxGridLinks {
		t.Fatalf("gridLinks: %d of %d links, want %d of %d", len(got), total, maxGridLinks, n)
	}
	if got[0] != "L00" || got[1] != "L03" {
		t.Errorf("gridLinks starts %v, want the upgraded L00 and L03 first (Result order)", got[:2])
	}
	// The rest are the busiest: the last maxGridLinks−2 by index.
	if want := fmt.Sprintf("L%02d", n-(maxGridLinks-2)); got[2] != want {
		t.Errorf("gridLinks third link %s, want %s", got[2], want)
	}
}

func TestOrderableYears(t *testing.T) {
	c := &plans.Case{FirstYear: 2027, Horizon: 5}
	for _, tt := range []struct {
		in   []bool
		want string
	}{
		{nil, "all years"},
		{[]bool{true, true, true, true, true}, "all years"},
		{[]bool{true, true, false, false, false}, "2027–2028"},
		{[]bool{true, false, false, false, false}, "2027"},
		{[]bool{false, false, false, false, false}, "none (quote expired)"},
	} {
		if got := orderableYears(c, &plans.Item{Orderable: tt.in}); got != tt.want {
			t.Errorf("orderableYears(%v) = %q, want %q", tt.in, got, tt.want)
		}
	}
}

// TestVendorPolicyShown: a case where netstage picks the vendor says so
// among the assumptions, with the vendor the plan chose.
func TestVendorPolicyShown(t *testing.T) {
	c, r := solvedDemo(t)
	cc := *c
	cc.OneVendor = plans.OneVendorPerClass
	rr := *r
	rr.VendorChoice = []plans.VendorChoice{{Class: "core", Vendor: "brightwave"}, {Class: "metro", Vendor: ""}}
	md := render(t, &cc, &rr, Markdown)
	for _, want := range []string{"one vendor per link class, chosen by netstage", "core: brightwave; metro: none bought"} {
		if !strings.Contains(md, want) {
			t.Errorf("assumptions lack %q", want)
		}
	}
	if strings.Contains(render(t, c, r, Markdown), "Vendor chosen") {
		t.Error("a case without one_vendor reports a vendor chosen")
	}
}

// TestCostText: the decision gives what the first orders cost, with the
// yearly fees of leases, which have no capex, and the year's budget beside
// the capex it caps.
func TestCostText(t *testing.T) {
	module := plans.PlanRow{Kind: plans.KindModule, Capex: 1000, Opex: 50}
	lease := plans.PlanRow{Kind: plans.KindLease, Opex: 300}
	budget := 5000.0
	for _, tc := range []struct {
		rows   []plans.PlanRow
		budget *float64
		want   string
	}{
		{[]plans.PlanRow{module}, nil, "a capex of EUR\u00a01,000"},
		{[]plans.PlanRow{module}, &budget, "a capex of EUR\u00a01,000 against a budget of EUR\u00a05,000"},
		{[]plans.PlanRow{lease}, &budget, "lease fees of EUR\u00a0300 a year"},
		{[]plans.PlanRow{module, lease}, &budget, "a capex of EUR\u00a01,000 against a budget of EUR\u00a05,000, and lease fees of EUR\u00a0300 a year"},
	} {
		if got := costText(tc.rows, "EUR", tc.budget); got != tc.want {
			t.Errorf("got %q, want %q", got, tc.want)
		}
	}
}

// TestStoppedBeforeBetter: when the solver stopped before it found a plan
// better than doing nothing, the decision does not advise ordering nothing
// and says that no bound is known; a proven empty plan still does.
func TestStoppedBeforeBetter(t *testing.T) {
	c, r := solvedDemo(t)
	stopped := *r
	stopped.Plan = nil
	stopped.Status = plans.StatusFeasible
	stopped.Bound, stopped.Gap, stopped.IRR, stopped.PaybackYear = nil, nil, nil, nil
	md := render(t, c, &stopped, Markdown)
	for _, want := range []string{"No upgrade was found in the time given", "before it had a bound: how far this plan is from the best is not known"} {
		if !strings.Contains(md, want) {
			t.Errorf("the decision lacks %q:\n%s", want, md[:min(len(md), 1500)])
		}
	}
	if strings.Contains(md, "Order nothing in") {
		t.Errorf("a stopped search reads as advice to order nothing:\n%s", md[:min(len(md), 1500)])
	}
	stopped.Status = plans.StatusOptimal
	if md := render(t, c, &stopped, Markdown); !strings.Contains(md, "Order nothing in") {
		t.Errorf("a proven empty plan:\n%s", md[:min(len(md), 1500)])
	}
}
