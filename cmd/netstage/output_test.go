package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"netstage/plans"
)

func f64(v float64) *float64 { return &v }
func intp(v int) *int        { return &v }

// handResult is a small plan built by hand: one module bought in 2027 on
// link L1, three years, a capped budget in the first two.
func handResult() *plans.Result {
	return &plans.Result{
		Case:               "hand",
		Currency:           "EUR",
		Status:             plans.StatusOptimal,
		Objective:          f64(1234567.891),
		Bound:              f64(1234600),
		Gap:                f64(2.6e-5),
		BaselineNPV:        f64(1000000),
		IncrementalNPV:     f64(234567.891),
		IRR:                f64(0.1307),
		PaybackYear:        intp(2028),
		ProfitabilityIndex: f64(1.5),
		TotalCapex:         100000,
		MPSObjective:       f64(-1234567.891),
		Plan: []plans.PlanRow{
			{Year: 2027, InService: 2027, Link: "L1", Kind: plans.KindModule, Item: "m100", Vendor: "acme", Units: 2, Gbps: 200, ListCapex: 110000, Capex: 100000, Opex: 5000},
			{Year: 2028, InService: 2029, Link: "L9", Kind: plans.KindBuild, Units: 1, Capex: 0},
		},
		Cashflow: []plans.CashflowRow{
			{Year: 2027, Revenue: 500000, Opex: 5000, Capex: 100000, Net: 395000, DiscountFactor: 0.9090909, PV: 359090.9, CumulativePV: 359090.9, Budget: f64(150000), BudgetUsed: 100000},
			{Year: 2028, Revenue: 500000, Opex: 5000, Net: 495000, DiscountFactor: 0.8264463, PV: 409090.9, CumulativePV: 768181.8, Budget: f64(150000)},
			{Year: 2029, Revenue: 500000, Opex: 5000, Salvage: 40000, Net: 535000, DiscountFactor: 0.7513148, PV: 466386.1, CumulativePV: 1234567.891},
		},
		Links: []plans.LinkYear{
			{Link: "L1", Year: 2027, CapacityBefore: 100, CapacityAfter: 300, UtilisationBefore: 0.95, UtilisationAfter: 0.7, Ceiling: 0.7, AtCeiling: true, ShadowValue: f64(812.5)},
			{Link: "L1", Year: 2028, CapacityBefore: 100, CapacityAfter: 300, UtilisationBefore: 0.5, UtilisationAfter: 0.2, Ceiling: 0.7},
		},
		Demands: []plans.DemandYear{
			{Demand: "A-B", From: "A", To: "B", Year: 2027, Forecast: 210, Served: 200, Committed: 50, Revenue: 500000, Unserved: 10, Reason: plans.ReasonCapacity},
			{Demand: "A-B", From: "A", To: "B", Year: 2028, Forecast: 60, Served: 60, Committed: 50, Revenue: 500000},
		},
		Routes: []plans.Route{
			{Demand: "A-B", From: "A", To: "B", Year: 2027, Links: []string{"L1"}, Gbps: 150},
			{Demand: "A-B", From: "A", To: "B", Year: 2027, Links: []string{"AB", "BC"}, Gbps: 50},
		},
		Shortfall: []plans.ShortfallRow{
			{Demand: "A-B", From: "A", To: "B", Year: 2027, Committed: 50, Carried: 40, Shortfall: 10, Penalty: 1200, RevenueAtRisk: 6000},
		},
		Stats: plans.SolverStats{Rows: 10, Columns: 20, Integers: 4, Nodes: 3, Iterations: 40, Seconds: 0.25},
	}
}

func TestMoney(t *testing.T) {
	tests := []struct {
		in   float64
		want string
	}{
		{0, "0"}, {-0.4, "0"}, {999, "999"}, {1000, "1,000"}, {-1234567.5, "-1,234,568"},
		{123456, "123,456"}, {1e9, "1,000,000,000"},
	}
	for _, tc := range tests {
		if got := money(tc.in); got != tc.want {
			t.Errorf("money(%v) = %q, want %q", tc.in, got, tc.want)
		}
	}
}

func TestFixedNoNegativeZero(t *testing.T) {
	tests := []struct {
		in   float64
		d    int
		want string
	}{
		{-0.0001, 2, "0.00"}, {-0.006, 2, "-0.01"}, {0, 0, "0"}, {-1e-12, 4, "0.0000"}, {2.5, 1, "2.5"},
	}
	for _, tc := range tests {
		if got := fixed(tc.in, tc.d); got != tc.want {
			t.Errorf("fixed(%v, %d) = %q, want %q", tc.in, tc.d, got, tc.want)
		}
	}
}

func TestWriteTextSectionsInOrder(t *testing.T) {
	var buf bytes.Buffer
	if err := writeText(&buf, handResult(), textOptions{}); err != nil {
		t.Fatal(err)
	}
	out := buf.String()
	pos := -1
	for _, heading := range []string{"Summary", "Staged plan by order year", "Cash flow by year",
		"Links by year", "Demands by year", "Baseline shortfall", "decision support"} {
		i := strings.Index(out, heading)
		if i < 0 {
			t.Fatalf("report lacks %q:\n%s", heading, out)
		}
		if i < pos {
			t.Errorf("%q comes before an earlier section", heading)
		}
		pos = i
	}
	for _, want := range []string{
		"1,234,568",     // plan NPV, rounded
		"13.1 %",        // IRR
		"2028",          // payback year
		"at ceiling",    // L1 2027 flag
		"813",           // its shadow value 812.5, rounded half away from zero
		"capacity: the", // the reason a demand is unserved
		"(build link)",
		"0.25 s",
		"0.0026 %", // the gap
	} {
		if !strings.Contains(out, want) {
			t.Errorf("report lacks %q:\n%s", want, out)
		}
	}
	for i, line := range strings.Split(out, "\n") {
		if strings.HasSuffix(line, " ") {
			t.Errorf("line %d ends in a blank: %q", i+1, line)
		}
	}
	buf.Reset()
	writeText(&buf, handResult(), textOptions{hideEffort: true})
	if strings.Contains(buf.String(), "0.25 s") {
		t.Errorf("hideEffort still prints the solve time")
	}
	root := handResult()
	root.Stats.Nodes = 1
	buf.Reset()
	writeText(&buf, root, textOptions{})
	if !strings.Contains(buf.String(), "(4 integer), 1 node, 40 simplex") {
		t.Errorf("a search of one node is not reported as such:\n%s", buf.String())
	}
}

func TestWriteTextInfeasible(t *testing.T) {
	r := &plans.Result{Case: "x", Currency: "USD", Status: plans.StatusInfeasible,
		Infeasibility: []plans.InfeasibilityRow{
			{Kind: plans.InfeasibleBudget, Name: "yearly", Year: 2027, Amount: 25000, Unit: "USD", Message: "the 2027 budget is 25,000 short"},
			{Kind: plans.InfeasibleDemand, Name: "A-B", Year: 2028, Amount: 3.5, Unit: plans.UnitGbps, Message: "committed A-B cannot be carried"},
			{Kind: plans.InfeasibleLink, Name: "L", Amount: 2, Unit: plans.UnitSlots, Message: "link L would need 2 more slots"},
			{Kind: plans.InfeasibleLink, Name: "M", Year: 2028, Amount: 400, Unit: plans.UnitGbpsMax, Message: "link M is full"},
		}}
	var buf bytes.Buffer
	if err := writeText(&buf, r, textOptions{}); err != nil {
		t.Fatal(err)
	}
	out := buf.String()
	for _, want := range []string{"infeasible", "Why no plan exists", "USD 25,000 short", "3.5 Gbps short", "committed A-B",
		"all years  2 slots short", "400.0 Gbps at most"} {
		if !strings.Contains(out, want) {
			t.Errorf("report lacks %q:\n%s", want, out)
		}
	}
	if strings.Contains(out, "Cash flow by year") {
		t.Errorf("an infeasible report prints a cash flow")
	}
}

func TestWriteJSON(t *testing.T) {
	var buf bytes.Buffer
	if err := writeJSON(&buf, handResult(), jsonOptions{}); err != nil {
		t.Fatal(err)
	}
	out := buf.Bytes()
	var m map[string]any
	if err := json.Unmarshal(out, &m); err != nil {
		t.Fatalf("output is not JSON: %v\n%s", err, out)
	}
	// DESIGN.md §4 fields.
	for _, k := range []string{"status", "objective", "bound", "gap", "baseline_npv", "incremental_npv",
		"irr", "payback_year", "mps_objective", "plan", "cashflow", "infeasibility"} {
		if _, ok := m[k]; !ok {
			t.Errorf("JSON lacks %q", k)
		}
	}
	for _, k := range []string{"year", "in_service", "link", "item", "vendor", "units", "gbps", "capex"} {
		if _, ok := m["plan"].([]any)[0].(map[string]any)[k]; !ok {
			t.Errorf("plan row lacks %q", k)
		}
	}
	for _, k := range []string{"year", "revenue", "opex", "capex", "tax", "salvage", "net", "discount_factor", "pv", "budget"} {
		if _, ok := m["cashflow"].([]any)[0].(map[string]any)[k]; !ok {
			t.Errorf("cashflow row lacks %q", k)
		}
	}
	if m["cashflow"].([]any)[2].(map[string]any)["budget"] != nil {
		t.Errorf("uncapped budget is not null")
	}
	if _, ok := m["infeasibility"].([]any); !ok {
		t.Errorf("empty infeasibility is %v, want []", m["infeasibility"])
	}
	// Fixed formats: the text itself.
	for _, want := range []string{
		`"objective": 1234567.891000`,
		`"mps_objective": -1234567.891000`,
		`"gap": 2.600000e-05`,
		`"irr": 0.13070000`,
		`"payback_year": 2028`,
		`"gbps": 200.0000`,
		`"capex": 100000.00`,
		`"discount_factor": 0.90909090`,
		`"units": 2`,
	} {
		if !bytes.Contains(out, []byte(want)) {
			t.Errorf("JSON lacks %s", want)
		}
	}
	// Keys of every object are sorted.
	keyRE := regexp.MustCompile(`(?m)^(\s*)"([a-z_]+)":`)
	last := map[string]string{}
	for _, line := range strings.Split(string(out), "\n") {
		if strings.HasSuffix(strings.TrimSpace(line), "{") || strings.HasSuffix(strings.TrimSpace(line), "[") {
			// a new object starts at a deeper indentation: forget keys there
			ind := len(line) - len(strings.TrimLeft(line, " "))
			for k := range last {
				if len(k) > ind {
					delete(last, k)
				}
			}
		}
		sm := keyRE.FindStringSubmatch(line)
		if sm == nil {
			continue
		}
		if prev, ok := last[sm[1]]; ok && prev > sm[2] {
			t.Errorf("key %q after %q: not sorted", sm[2], prev)
		}
		last[sm[1]] = sm[2]
	}
	// Same input, same bytes.
	var again bytes.Buffer
	writeJSON(&again, handResult(), jsonOptions{})
	if !bytes.Equal(out, again.Bytes()) {
		t.Errorf("two encodings of the same result differ")
	}
}

func TestWriteJSONRejectsNaN(t *testing.T) {
	r := handResult()
	r.TotalCapex = 0
	r.Cashflow[0].PV = 0
	r.Objective = f64(0)
	var buf bytes.Buffer
	if err := writeJSON(&buf, r, jsonOptions{}); err != nil {
		t.Fatalf("zero values: %v", err)
	}
	// encoding/json itself refuses NaN: the writer must report it, not panic.
	r.Cashflow[0].PV = nan()
	if err := writeJSON(&buf, r, jsonOptions{}); err == nil {
		t.Errorf("NaN in the result: no error")
	}
}

func nan() float64 { var z float64; return z / z }

func TestWriteCSVDir(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	if err := writeCSVDir(dir, handResult()); err != nil {
		t.Fatal(err)
	}
	entries, _ := os.ReadDir(dir)
	var names []string
	for _, e := range entries {
		names = append(names, e.Name())
	}
	if got, want := strings.Join(names, " "), "cashflow.csv demands.csv links.csv plan.csv routes.csv"; got != want {
		t.Errorf("files = %s, want %s (no temporary files left)", got, want)
	}
	tests := []struct {
		file   string
		rows   int
		header string
		cell   [3]string // row, column name, value
	}{
		{"plan.csv", 3, "year,in_service,link,kind,item,vendor,units,gbps,list_capex,capex,opex", [3]string{"1", "capex", "100000.00"}},
		{"cashflow.csv", 4, "year,revenue,opex,capex,depreciation,tax,penalty,salvage,net,discount_factor,pv,cumulative_pv,budget,budget_used,incremental", [3]string{"3", "budget", ""}},
		{"links.csv", 3, "link,year,capacity_before,utilisation_before,capacity_after,utilisation_after,ceiling,at_ceiling,shadow_value", [3]string{"1", "shadow_value", "812.50"}},
		{"demands.csv", 3, "demand,from,to,year,forecast,served,committed,revenue,unserved,reason", [3]string{"1", "reason", "capacity"}},
		{"routes.csv", 3, "demand,from,to,year,gbps,links", [3]string{"2", "links", "AB BC"}},
	}
	for _, tc := range tests {
		t.Run(tc.file, func(t *testing.T) {
			f, err := os.Open(filepath.Join(dir, tc.file))
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			rows, err := csv.NewReader(f).ReadAll()
			if err != nil {
				t.Fatal(err)
			}
			if len(rows) != tc.rows {
				t.Fatalf("got %d rows, want %d", len(rows), tc.rows)
			}
			if got := strings.Join(rows[0], ","); got != tc.header {
				t.Errorf("header %s, want %s", got, tc.header)
			}
			col := -1
			for i, h := range rows[0] {
				if h == tc.cell[1] {
					col = i
				}
			}
			row := int(tc.cell[0][0] - '0')
			if got := rows[row][col]; got != tc.cell[2] {
				t.Errorf("row %d %s = %q, want %q", row, tc.cell[1], got, tc.cell[2])
			}
		})
	}
}

func TestWriteFileReplacing(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "a.txt")
	if err := os.WriteFile(p, []byte("old"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := writeFileReplacing(p, []byte("new")); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(p); string(b) != "new" {
		t.Errorf("content %q, want new", b)
	}
	if err := writeFileReplacing(filepath.Join(dir, "missing", "b.txt"), []byte("x")); err == nil {
		t.Errorf("write into a missing directory: no error")
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("%d files left in the directory, want 1", len(entries))
	}
}

// In cost mode the report speaks of present cost (minus the objective) and
// reports no IRR or payback (DESIGN.md §2).
func TestWriteTextCostMode(t *testing.T) {
	r := handResult()
	r.CostMode = true
	r.Objective = f64(-500000)
	r.BaselineNPV = f64(-650000)
	r.IncrementalNPV = f64(150000)
	r.Bound = f64(-499000)
	r.IRR, r.PaybackYear = nil, nil
	var buf bytes.Buffer
	if err := writeText(&buf, r, textOptions{}); err != nil {
		t.Fatal(err)
	}
	out := buf.String()
	for _, want := range []string{"plan present cost", "500,000", "baseline present cost", "650,000",
		"saving against baseline", "150,000", "present cost ≥ 499,000",
		"no plan costs less than this one by more than 1,000"} {
		if !strings.Contains(out, want) {
			t.Errorf("cost-mode report lacks %q:\n%s", want, out)
		}
	}
	for _, unwanted := range []string{"plan NPV", "IRR", "payback year"} {
		if strings.Contains(out, unwanted) {
			t.Errorf("cost-mode report shows %q", unwanted)
		}
	}
}

// TestWriteTextGapInMoney: the gap row also gives the gap as money, the
// most a better plan could add (bound − NPV), which a planner weighs
// against the incremental NPV.
func TestWriteTextGapInMoney(t *testing.T) {
	r := handResult() // NPV 1,234,567.891, bound 1,234,600
	var buf bytes.Buffer
	if err := writeText(&buf, r, textOptions{}); err != nil {
		t.Fatal(err)
	}
	if want := "no plan beats this one by more than 32 of NPV"; !strings.Contains(buf.String(), want) {
		t.Errorf("summary lacks %q:\n%s", want, buf.String())
	}
}

// TestWriteTextPaybackFirstYear: a payback in the first year says why (the
// cumulative incremental cash never falls below zero); a later one does not.
func TestWriteTextPaybackFirstYear(t *testing.T) {
	for _, tc := range []struct {
		year int
		note bool
	}{{2027, true}, {2028, false}} {
		r := handResult() // cash flow from 2027
		r.PaybackYear = intp(tc.year)
		var buf bytes.Buffer
		if err := writeText(&buf, r, textOptions{}); err != nil {
			t.Fatal(err)
		}
		if got := strings.Contains(buf.String(), "never negative"); got != tc.note {
			t.Errorf("payback %d: note shown %v, want %v:\n%s", tc.year, got, tc.note, buf.String())
		}
	}
}

// TestWriteTextStoppedBeforeBetter: a search stopped before it found a plan
// better than the existing network (a large case with a short time limit)
// must not read as "nothing to buy": the plan table says why nothing is
// bought, the summary that no bound is known and that IRR and payback are
// not applicable for want of purchases. A proven empty plan keeps its
// "nothing to buy".
func TestWriteTextStoppedBeforeBetter(t *testing.T) {
	r := handResult()
	r.Plan = nil
	r.IRR, r.PaybackYear, r.Bound, r.Gap = nil, nil, nil, nil
	r.Status = plans.StatusFeasible
	var buf bytes.Buffer
	if err := writeText(&buf, r, textOptions{}); err != nil {
		t.Fatal(err)
	}
	out := buf.String()
	wantLines(t, out,
		"nothing bought: the search stopped before it found a plan better than the existing network, which does not show that no upgrade pays; allow more time",
		"bound                none: the search stopped before its first LP was solved",
		"IRR (incremental)    n/a (nothing bought)",
		"payback year         n/a (nothing bought)")
	if strings.Contains(out, "nothing to buy") {
		t.Errorf("a stopped search reads as a finding:\n%s", out)
	}
	r.Status = plans.StatusOptimal
	buf.Reset()
	if err := writeText(&buf, r, textOptions{}); err != nil {
		t.Fatal(err)
	}
	if out := buf.String(); !strings.Contains(out, "nothing to buy: the existing network is the best plan") || strings.Contains(out, "none: the search stopped") {
		t.Errorf("a proven empty plan:\n%s", out)
	}
}
