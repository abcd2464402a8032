package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"regexp"
	"sort"
	"strings"
	"testing"

	"netstage/plans"
	"netstage/plans/scenario"
)

// fakeScenarioSolve is a stand-in for plans.Solve with a closed form, so
// that the golden files of compare and sweep test the output formats and
// not the model (whose own tests check its numbers): the link with the
// least installed capacity gets one unit of its cheapest module per Gbps,
// ordered in the first year; half of each forecast is served; the money follows from
// scenario.FixedPlanEvaluator's rules; over the first year's budget the
// case is infeasible.
func fakeScenarioSolve(ctx context.Context, c *plans.Case, _ plans.SolveOptions) (*plans.Result, error) {
	if len(c.Items) == 0 {
		return fakeRevenueOnly(c), nil
	}
	// Links by installed capacity, smallest first (ties by id).
	order := make([]int, len(c.Links))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool {
		la, lb := &c.Links[order[a]], &c.Links[order[b]]
		if la.Installed != lb.Installed {
			return la.Installed < lb.Installed
		}
		return la.ID < lb.ID
	})
	var rows []plans.PlanRow
	capex := 0.0
	for _, li := range order {
		l := &c.Links[li]
		if l.Candidate != nil {
			continue
		}
		best := -1
		for _, k := range l.Items {
			it := &c.Items[k]
			if it.Kind == plans.Module && it.InService[0] < c.Horizon &&
				(best < 0 || it.Capex(0, l.KM)/it.Gbps < c.Items[best].Capex(0, l.KM)/c.Items[best].Gbps) {
				best = k
			}
		}
		if best < 0 {
			continue
		}
		it := &c.Items[best]
		if len(rows) == 1 {
			break
		}
		capex += it.Capex(0, l.KM)
		rows = append(rows, plans.PlanRow{Year: c.FirstYear, InService: c.Year(it.InService[0]), Link: l.ID, Kind: plans.KindModule,
			Item: it.ID, Vendor: c.Vendors[it.Vendor].ID, Units: 1, Gbps: it.Gbps})
	}
	if capex > c.Budget.Yearly[0] {
		return &plans.Result{Case: c.Name, Status: plans.StatusInfeasible, Infeasibility: []plans.InfeasibilityRow{{
			Kind: plans.InfeasibleBudget, Name: "yearly", Year: c.FirstYear, Amount: capex - c.Budget.Yearly[0],
			Message: "the cheapest module needs more than the first year's budget"}}}, nil
	}
	res, err := scenario.FixedPlanEvaluator(func(ctx context.Context, c *plans.Case) (*plans.Result, error) {
		return fakeScenarioSolve(ctx, c, plans.SolveOptions{})
	})(ctx, c, rows)
	if err != nil {
		return nil, err
	}
	res.Bound = res.Objective
	return res, nil
}

// fakeRevenueOnly serves half of every forecast.
func fakeRevenueOnly(c *plans.Case) *plans.Result {
	res := &plans.Result{Case: c.Name, Status: plans.StatusOptimal}
	npv := 0.0
	for i := 0; i < c.Horizon; i++ {
		row := plans.CashflowRow{Year: c.Year(i)}
		for _, d := range c.Demands {
			row.Revenue += 12 * d.Tariff[i] * d.Forecast[i] / 2
		}
		npv += c.DiscountFactor(i) * row.Revenue
		res.Cashflow = append(res.Cashflow, row)
	}
	res.Objective = &npv
	return res
}

// withFakeSolve puts fakeScenarioSolve behind compare and sweep for one test.
func withFakeSolve(t *testing.T) {
	t.Helper()
	saved, savedEval := scenarioSolve, scenarioEvaluate
	scenarioSolve = fakeScenarioSolve
	// The regret of the stand-in's plans, valued by the same closed form.
	scenarioEvaluate = scenario.FixedPlanEvaluator(func(ctx context.Context, c *plans.Case) (*plans.Result, error) {
		return fakeScenarioSolve(ctx, c, plans.SolveOptions{})
	})
	t.Cleanup(func() { scenarioSolve, scenarioEvaluate = saved, savedEval })
}

// TestCompareDemoGolden is a regression guard on the compare outputs of the
// demo, with the stand-in solve.
func TestCompareDemoGolden(t *testing.T) {
	withFakeSolve(t)
	code, out, errOut := runCLI("compare", "--demo", "--quiet")
	if code != exitOK {
		t.Fatalf("exit code: got %d, want %d\n%s", code, exitOK, errOut)
	}
	checkGolden(t, "compare/demo.golden", []byte(out))
	for _, want := range []string{"brightwave.toml", "polaris.toml", "all", "break-even discount", "decision support"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q", want)
		}
	}
	code, out, errOut = runCLI("compare", "--demo", "--quiet", "--json")
	if code != exitOK {
		t.Fatalf("--json exit code: got %d, want %d\n%s", code, exitOK, errOut)
	}
	checkGolden(t, "compare/demo.json", []byte(out))
	// DESIGN.md §4: {"variants": [...]}, each with name, status, objective
	// (null when infeasible) and the break-even discount.
	var doc struct {
		Variants []map[string]json.RawMessage `json:"variants"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Variants) != 3 {
		t.Fatalf("got %d variants, want 3", len(doc.Variants))
	}
	for i, name := range []string{`"brightwave.toml"`, `"polaris.toml"`, `"all"`} {
		v := doc.Variants[i]
		if string(v["name"]) != name {
			t.Errorf("variant %d: got name %s, want %s", i, v["name"], name)
		}
		for _, key := range []string{"status", "objective", "break_even_discount"} {
			if _, ok := v[key]; !ok {
				t.Errorf("variant %s lacks %q", name, key)
			}
		}
	}
}

func TestCompareInfeasibleVariant(t *testing.T) {
	withFakeSolve(t)
	// With the budget at a tenth, the stand-in's plans do not fit the first
	// year: every variant is infeasible, shown with why, exit code 3.
	dir := t.TempDir()
	if code, _, errOut := runCLI("demo", dir); code != exitOK {
		t.Fatalf("demo: exit %d: %s", code, errOut)
	}
	path := dir + "/case.toml"
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	data = regexp.MustCompile(`(?m)^capex_per_year = .*$`).ReplaceAll(data, []byte("capex_per_year = 1000"))
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errOut := runCLI("compare", path, "--quiet")
	if code != exitInfeasible {
		t.Fatalf("exit code: got %d, want %d\n%s\n%s", code, exitInfeasible, out, errOut)
	}
	if !strings.Contains(out, "all is infeasible:") || !strings.Contains(out, "first year's budget") {
		t.Errorf("output does not say why the variants are infeasible:\n%s", out)
	}
	code, out, _ = runCLI("compare", path, "--quiet", "--json")
	if code != exitInfeasible || !strings.Contains(out, `"objective": null`) {
		t.Errorf("--json: exit %d, want %d and null objectives:\n%s", code, exitInfeasible, out)
	}
}

func TestCompareUsage(t *testing.T) {
	for _, args := range [][]string{
		{"compare"},
		{"compare", "--demo", "x.toml"},
		{"compare", "--demo", "--gap", "-1"},
		{"compare", "--demo", "--time-limit", "soon"},
	} {
		if code, _, _ := runCLI(args...); code != exitBadInput {
			t.Errorf("%v: got exit code %d, want %d", args, code, exitBadInput)
		}
	}
}

// TestCompareContendersText: when a losing catalog could still beat the
// winner (its bound is above the winner's NPV), the table says the ranking
// is not proven and names it.
func TestCompareContendersText(t *testing.T) {
	c, _, err := plans.LoadDemo()
	if err != nil {
		t.Fatal(err)
	}
	npv := 100.0
	v := scenario.Variant{Name: "a.toml", Status: "feasible", Objective: &npv, Winner: true}
	for i := 0; i < c.Horizon; i++ {
		v.CapexByYear = append(v.CapexByYear, scenario.YearAmount{Year: c.Year(i)})
	}
	cmp := &scenario.Comparison{Case: c.Name, Currency: c.Currency, Winner: "a.toml", Contenders: []string{"b.toml"},
		Variants: []scenario.Variant{v}}
	var buf bytes.Buffer
	writeComparison(&buf, c, cmp, false)
	if want := "not proven: the search stopped before ruling out that b.toml could do better"; !strings.Contains(buf.String(), want) {
		t.Errorf("missing %q in:\n%s", want, buf.String())
	}
	cmp.Contenders = nil
	buf.Reset()
	writeComparison(&buf, c, cmp, false)
	if strings.Contains(buf.String(), "not proven") {
		t.Errorf("no contenders, yet:\n%s", buf.String())
	}
}

// TestCompareTiedText: catalogs tied with the winner are named, their
// break-even note says they match at list price (not "0.0 % off"), and
// variants whose search stopped at the do-nothing plan are named as such.
func TestCompareTiedText(t *testing.T) {
	c, _, err := plans.LoadDemo()
	if err != nil {
		t.Fatal(err)
	}
	npv, zero := 100.0, 0.0
	stopped := &plans.Result{Status: plans.StatusFeasible, Objective: &npv}
	var variants []scenario.Variant
	for i, name := range []string{"a.toml", "b.toml"} {
		v := scenario.Variant{Name: name, Catalog: i, Status: "feasible", Objective: &npv, Winner: i == 0, Result: stopped}
		for y := 0; y < c.Horizon; y++ {
			v.CapexByYear = append(v.CapexByYear, scenario.YearAmount{Year: c.Year(y)})
		}
		variants = append(variants, v)
	}
	variants[1].BreakEvenDiscount, variants[1].BreakEvenNPV = &zero, &npv
	cmp := &scenario.Comparison{Case: c.Name, Currency: c.Currency, Winner: "a.toml", Tied: []string{"b.toml"}, Variants: variants}
	var buf bytes.Buffer
	writeComparison(&buf, c, cmp, true)
	out := buf.String()
	wantLines(t, out,
		"tied: b.toml reaches the same NPV; a.toml comes first only in catalog order",
		"b.toml matches a.toml at its list price (NPV 100).",
		"nothing bought by a.toml, b.toml: the search stopped before it found a plan better than the existing network")
	if strings.Contains(out, "off its quote") {
		t.Errorf("a tie reads as a discount:\n%s", out)
	}
}
