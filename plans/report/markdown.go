package report

import (
	"fmt"
	"io"
	"strings"
)

// mdWriter collects the first write error so that the rendering code
// stays linear.
type mdWriter struct {
	w   io.Writer
	err error
}

func (m *mdWriter) printf(format string, args ...any) {
	if m.err != nil {
		return
	}
	_, m.err = fmt.Fprintf(m.w, format, args...)
}

// row writes one table row; cells are escaped.
func (m *mdWriter) row(cells ...string) {
	esc := make([]string, len(cells))
	for i, c := range cells {
		esc[i] = mdCell(c)
	}
	m.printf("| %s |\n", strings.Join(esc, " | "))
}

// head writes a table head; a name starting with ">" is right-aligned.
func (m *mdWriter) head(names ...string) {
	var cells, rules []string
	for _, n := range names {
		if strings.HasPrefix(n, ">") {
			cells = append(cells, mdCell(n[1:]))
			rules = append(rules, "---:")
		} else {
			cells = append(cells, mdCell(n))
			rules = append(rules, "---")
		}
	}
	m.printf("| %s |\n| %s |\n", strings.Join(cells, " | "), strings.Join(rules, " | "))
}

// mdCell escapes what would break a table cell.
func mdCell(s string) string {
	s = strings.ReplaceAll(s, "|", `\|`)
	return strings.ReplaceAll(s, "\n", " ")
}

// writeMarkdown renders v as Markdown. Charts become tables: the yearly
// capex and budget are in the cash-flow table, the utilisation grid is
// printed as "before → after" per link and year, and the map is only in
// the HTML report.
func writeMarkdown(w io.Writer, v *view) error {
	m := &mdWriter{w: w}
	m.printf("# %s\n\n", v.Title)
	m.printf("Staged capex plan for %s, in %s · solver status: %s\n\n", v.Years, v.Currency, v.Status)

	m.printf("## Decision\n\n%s\n\n", v.Decision)
	if len(v.Key) > 0 {
		m.head("Figure", ">Value", "Note")
		for _, k := range v.Key {
			m.row(k.Label, k.Value, k.Note)
		}
		m.printf("\n")
	}
	if len(v.Infeasibility) > 0 {
		m.printf("## What blocks a plan\n\n")
		m.head("Kind", "Name", ">Year", ">Must give by", "Explanation")
		for _, x := range v.Infeasibility {
			m.row(x.Kind, x.Name, x.Year, x.Amount, x.Message)
		}
		m.printf("\n")
	}
	if v.HasPlan {
		m.printf("## Charts\n\n")
		m.printf("The HTML report (`--format html`) draws capex against the budget, the net and cumulative discounted cash flow")
		if v.MapNote == "" {
			m.printf(" and a network map")
		}
		m.printf("; their figures are in the tables below.")
		if v.MapNote != "" {
			m.printf(" %s", v.MapNote)
		}
		m.printf("\n\n### Peak utilisation by link and year, before → after the plan\n\n")
		m.printf("Share of capacity in the busier direction. **Bold**: at the utilisation ceiling. ▲: capacity added by the plan. —: no capacity.\n\n")
		m.head(append([]string{"Link"}, prefixAll(">", v.UtilYears)...)...)
		for _, r := range v.UtilRows {
			m.row(append([]string{r.Link}, r.Cells...)...)
		}
		m.printf("\n")

		m.printf("## Staged plan\n\n")
		if len(v.Stages) == 0 {
			m.printf("The plan buys nothing.\n\n")
		} else {
			m.printf("Order year: capex is paid and counted against the budget in that year. Order by: the latest month to place the order so that the capacity is live by the case's ready-by month of its in-service year. Money in %s.\n\n", v.Currency)
			m.head("Order year", "Link", "Item", "Vendor", ">Units", ">Capacity added", ">Capex", ">In service", ">Order by")
			for _, s := range v.Stages {
				for _, r := range s.Rows {
					m.row(s.Year, r.Link, r.Item, r.Vendor, r.Units, r.Gbps, r.Capex, r.InService, r.OrderBy)
				}
				m.row(s.Year, "**stage total**", "", "budget "+s.Budget, "", "", "**"+s.Capex+"**", "", "")
			}
			m.row("**Total**", "", "", "", "", "", "**"+v.PlanTotal+"**", "", "")
			m.printf("\n")
			if v.HorizonNote != "" {
				m.printf("%s\n\n", v.HorizonNote)
			}
		}

		m.printf("## Cash flow\n\n")
		penalty := ""
		if v.HasPenalty {
			penalty = " − SLA penalty"
		}
		m.printf("%s, undiscounted except the present value (PV) columns. Net = revenue − opex − capex − tax%s + salvage. The column “vs doing nothing” is the year's net minus the net of the do-nothing network. Budgets are in the staged plan and the assumptions.\n\n", v.Currency, penalty)
		cols := []string{"Year", ">Revenue", ">Opex", ">Capex", ">Tax"}
		if v.HasPenalty {
			cols = append(cols, ">SLA penalty")
		}
		cols = append(cols, ">Salvage", ">Net", ">Discount factor", ">PV", ">Cumulative PV", ">vs doing nothing")
		m.head(cols...)
		cash := func(r cashRow, bold bool) {
			cells := []string{r.Year, r.Revenue, r.Opex, r.Capex, r.Tax}
			if v.HasPenalty {
				cells = append(cells, r.Penalty)
			}
			cells = append(cells, r.Salvage, r.Net, r.DF, r.PV, r.CumPV, r.Incremental)
			if bold {
				for i, c := range cells {
					if c != "" {
						cells[i] = "**" + c + "**"
					}
				}
			}
			m.row(cells...)
		}
		for _, r := range v.Cash {
			cash(r, false)
		}
		cash(v.CashTotal, true)
		m.printf("\n")

		m.printf("## Why each upgrade\n\n")
		if len(v.Why) == 0 {
			m.printf("The plan buys nothing, so there is nothing to justify.\n\n")
		}
		for _, w := range v.Why {
			m.printf("### Link %s\n\n", w.Link)
			for _, p := range w.Purchases {
				m.printf("- %s\n", p)
			}
			m.printf("\n%s\n\n", strings.Join(w.Text, " "))
		}
		m.printf("The demands named are those the solved plan routes over the link (of the routings with the plan's NPV, the one with the fewest Gbps·km), in the direction from the demand's first site to its second.\n\n")
		if tv := v.Tornado; tv != nil {
			m.printf("## Sensitivity: one assumption at a time\n\n%s The HTML report draws these figures as a tornado chart.\n\n", tv.Intro)
			m.head("Assumption", ">Case value", ">Low value", ">NPV at low", ">High value", ">NPV at high", ">Swing")
			for _, r := range tv.Rows {
				m.row(r.Factor, r.Case, r.Low, r.LowNPV, r.High, r.HighNPV, r.Swing)
			}
			m.printf("\n")
		}
	}

	m.printf("## Assumptions\n\n")
	m.head("Input", "Value")
	for _, a := range v.Assumptions {
		m.row(a.Label, a.Value)
	}
	m.printf("\n")
	if len(v.Budgets) > 0 {
		m.printf("### Budget by year (%s)\n\n", v.Currency)
		m.head("Year", ">Cap", ">Capex of the plan")
		for _, b := range v.Budgets {
			m.row(b.Year, b.Cap, b.Used)
		}
		m.printf("\n")
	}
	if len(v.Demands) > 0 {
		m.printf("### Demand forecast and tariffs\n\n")
		m.head("Demand", "From", "To", ">Forecast, first → last year", ">Growth", ">Committed, first year", ">Tariff, first year ("+v.Currency+" per Gbps-month)", ">Tariff erosion")
		for _, d := range v.Demands {
			m.row(d.ID, d.From, d.To, d.Forecast, d.Growth, d.Committed, d.Tariff, d.Erosion)
		}
		m.printf("\n")
	}
	if len(v.Vendors) > 0 {
		m.printf("### Vendor quotes\n\n")
		m.head("Vendor", "Catalog", "Quote", "Valid until", "Currency", "Volume tiers")
		for _, x := range v.Vendors {
			m.row(x.Vendor, x.Catalog, x.Quote, x.ValidUntil, x.Currency, x.Tiers)
		}
		m.printf("\n")
	}
	if len(v.Items) > 0 {
		m.printf("### Catalog items (%s, first-year list prices)\n\n", v.Currency)
		m.head("Item", "Vendor", "Kind", ">Capacity", ">Capex per unit", ">Capex per km", ">Opex per year", ">Lead time", ">Book life", ">Price erosion", "Orderable in")
		for _, it := range v.Items {
			m.row(it.Item, it.Vendor, it.Kind, it.Gbps, it.Capex, it.PerKM, it.Opex, it.Lead, it.Life, it.Erosion, it.Orderable)
		}
		m.printf("\n")
	}
	m.printf("### Solver\n\n")
	m.head("", "Value")
	for _, s := range v.Solver {
		m.row(s.Label, s.Value)
	}
	m.printf("\n")
	if len(v.Warnings) > 0 {
		m.printf("### Warnings\n\n")
		for _, w := range v.Warnings {
			m.printf("- %s\n", w)
		}
		m.printf("\n")
	}
	m.printf("## Caution\n\n> %s\n", v.Caution)
	if m.err != nil {
		return fmt.Errorf("report: markdown: %w", m.err)
	}
	return nil
}

func prefixAll(p string, s []string) []string {
	out := make([]string, len(s))
	for i, x := range s {
		out[i] = p + x
	}
	return out
}
