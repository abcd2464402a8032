package main

// The --csv DIR output of solve: plan.csv, cashflow.csv, links.csv,
// demands.csv and routes.csv, one header row each, numbers in the fixed formats of
// output_format.go. Each file is written to a temporary name in DIR and
// renamed into place, so a reader never sees a half-written file.

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"netstage/plans"
)

// csvFiles returns the CSV files of r, by file name, in the order they are
// written.
func csvFiles(r *plans.Result) []csvFile {
	m := func(v float64) string { return fixed(v, moneyDecimals) }
	g := func(v float64) string { return fixed(v, gbpsDecimals) }
	f := func(v float64) string { return fixed(v, fractionDecimals) }
	i := strconv.Itoa
	opt := func(v *float64) string {
		if v == nil {
			return ""
		}
		return m(*v)
	}

	plan := [][]string{{"year", "in_service", "link", "kind", "item", "vendor", "units", "gbps", "list_capex", "capex", "opex"}}
	for _, p := range r.Plan {
		plan = append(plan, []string{i(p.Year), i(p.InService), p.Link, p.Kind, p.Item, p.Vendor,
			i(p.Units), g(p.Gbps), m(p.ListCapex), m(p.Capex), m(p.Opex)})
	}
	cash := [][]string{{"year", "revenue", "opex", "capex", "depreciation", "tax", "penalty", "salvage", "net",
		"discount_factor", "pv", "cumulative_pv", "budget", "budget_used", "incremental"}}
	for _, c := range r.Cashflow {
		cash = append(cash, []string{i(c.Year), m(c.Revenue), m(c.Opex), m(c.Capex), m(c.Depreciation),
			m(c.Tax), m(c.Penalty), m(c.Salvage), m(c.Net), f(c.DiscountFactor), m(c.PV),
			m(c.CumulativePV), opt(c.Budget), m(c.BudgetUsed), m(c.Incremental)})
	}
	links := [][]string{{"link", "year", "capacity_before", "utilisation_before", "capacity_after",
		"utilisation_after", "ceiling", "at_ceiling", "shadow_value"}}
	for _, l := range r.Links {
		links = append(links, []string{l.Link, i(l.Year), g(l.CapacityBefore), f(l.UtilisationBefore),
			g(l.CapacityAfter), f(l.UtilisationAfter), f(l.Ceiling), strconv.FormatBool(l.AtCeiling),
			opt(l.ShadowValue)})
	}
	demands := [][]string{{"demand", "from", "to", "year", "forecast", "served", "committed", "revenue",
		"unserved", "reason"}}
	for _, d := range r.Demands {
		demands = append(demands, []string{d.Demand, d.From, d.To, i(d.Year), g(d.Forecast), g(d.Served),
			g(d.Committed), m(d.Revenue), g(d.Unserved), d.Reason})
	}
	// One row per path; links separated by spaces (ids hold no spaces).
	routes := [][]string{{"demand", "from", "to", "year", "gbps", "links"}}
	for _, rt := range r.Routes {
		routes = append(routes, []string{rt.Demand, rt.From, rt.To, i(rt.Year), g(rt.Gbps), strings.Join(rt.Links, " ")})
	}
	return []csvFile{
		{"plan.csv", plan},
		{"cashflow.csv", cash},
		{"links.csv", links},
		{"demands.csv", demands},
		{"routes.csv", routes},
	}
}

// csvFile is one CSV output: its name and rows (header first).
type csvFile struct {
	name string
	rows [][]string
}

// writeCSVDir writes the CSV files of r into dir, creating dir if needed.
func writeCSVDir(dir string, r *plans.Result) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("csv directory: %w", err)
	}
	for _, f := range csvFiles(r) {
		var buf bytes.Buffer
		cw := csv.NewWriter(&buf)
		if err := cw.WriteAll(f.rows); err != nil {
			return fmt.Errorf("%s: %w", f.name, err)
		}
		if err := writeFileReplacing(filepath.Join(dir, f.name), buf.Bytes()); err != nil {
			return err
		}
	}
	return nil
}
