package main

// The terminal report of a solved plan, read top to bottom: summary, staged
// plan by order year, cash flow by year, links by year, demands by year.

import (
	"bytes"
	"fmt"
	"io"
	"strconv"
	"strings"
	"text/tabwriter"
	"unicode/utf8"

	"netstage/plans"
)

// decisionSupportNote ends every report: the plan is advice to be reviewed,
// not a purchase order.
const decisionSupportNote = `Results are decision support: traffic forecasts, tariffs and prices are
uncertain, and every capex decision needs review by finance and engineering
under the operator's own policies and local rules.`

// textOptions tune the terminal report. The zero value prints everything.
type textOptions struct {
	// hideEffort leaves out the solver line (model size, nodes,
	// iterations, time): golden tests compare the plan, and these vary
	// with the machine and with every change of the model or solver.
	hideEffort bool
}

// writeText prints r as the terminal report. It returns the first write
// error.
func writeText(w io.Writer, r *plans.Result, opts textOptions) error {
	var buf bytes.Buffer
	ew := &errWriter{w: &buf}
	writeSummary(ew, r, opts)
	if r.Status == plans.StatusInfeasible {
		writeInfeasibility(ew, r)
	}
	if r.Objective != nil {
		writePlanTable(ew, r)
		writeCashflowTable(ew, r)
		writeLinksTable(ew, r)
		writeDemandsTable(ew, r)
	}
	if len(r.Shortfall) > 0 {
		writeShortfallTable(ew, r)
	}
	if len(r.Warnings) > 0 {
		fmt.Fprintln(ew, "\nWarnings")
		for _, s := range r.Warnings {
			fmt.Fprintf(ew, "  - %s\n", s)
		}
	}
	fmt.Fprintf(ew, "\n%s\n", decisionSupportNote)
	if ew.err != nil {
		return ew.err
	}
	// Aligned tables pad empty cells; drop the trailing blanks.
	lines := strings.Split(buf.String(), "\n")
	for i, l := range lines {
		lines[i] = strings.TrimRight(l, " ")
	}
	_, err := io.WriteString(w, strings.Join(lines, "\n"))
	return err
}

// errWriter remembers the first write error so that the report code can
// print without checking each call.
type errWriter struct {
	w   io.Writer
	err error
}

func (e *errWriter) Write(p []byte) (int, error) {
	if e.err != nil {
		return len(p), nil
	}
	n, err := e.w.Write(p)
	e.err = err
	return n, nil
}

// newTable returns a tabwriter with right-aligned numeric columns.
func newTable(w io.Writer) *tabwriter.Writer {
	return tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
}

func optMoney(v *float64) string {
	if v == nil {
		return "n/a"
	}
	return money(*v)
}

func writeSummary(w io.Writer, r *plans.Result, opts textOptions) {
	title := r.Case
	if title == "" {
		title = "(unnamed case)"
	}
	fmt.Fprintf(w, "netstage plan for %s (money in %s)\n\n", title, r.Currency)
	fmt.Fprintln(w, "Summary")
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	row := func(k, v string) { fmt.Fprintf(tw, "  %s\t%s\n", k, v) }
	status := string(r.Status)
	switch r.Status {
	case plans.StatusFeasible:
		status += " (stopped early: the best plan found, not proven optimal)"
	case plans.StatusLimit:
		status += " (stopped before any plan was found)"
	}
	row("status", status)
	if r.CostMode {
		row("mode", "cost (no demand pays a tariff: every demand committed, present cost minimised)")
		if r.Objective != nil {
			row("plan present cost", money(-*r.Objective))
		}
		if r.BaselineNPV != nil {
			row("baseline present cost", money(-*r.BaselineNPV))
		}
		if r.IncrementalNPV != nil {
			row("saving against baseline", money(*r.IncrementalNPV))
		}
	} else {
		row("plan NPV", optMoney(r.Objective))
		row("baseline NPV", optMoney(r.BaselineNPV))
		row("incremental NPV", optMoney(r.IncrementalNPV))
	}
	if len(r.Shortfall) > 0 {
		gbpsYears, penalty := 0.0, 0.0
		for _, s := range r.Shortfall {
			gbpsYears += s.Shortfall
			penalty += s.Penalty
		}
		row("baseline shortfall", fmt.Sprintf("%s Gbps-years of committed traffic the existing network cannot carry (SLA penalty %s)",
			gbpsText(gbpsYears), money(penalty)))
	} else if r.BaselineNPV != nil {
		row("baseline shortfall", "none: the existing network carries all committed traffic")
	}
	if !r.CostMode {
		irr := "n/a (the incremental cash flows do not change sign exactly once)"
		payback := "n/a (the incremental cash never stays positive)"
		if len(r.Plan) == 0 {
			irr, payback = "n/a (nothing bought)", "n/a (nothing bought)"
		}
		if r.IRR != nil {
			irr = percent(*r.IRR)
		}
		row("IRR (incremental)", irr)
		if r.PaybackYear != nil {
			payback = fmt.Sprint(*r.PaybackYear)
			if r.PaybackInFirstYear() {
				payback += " (the cumulative incremental cash is never negative)"
			}
		}
		row("payback year", payback)
	}
	pi := "n/a (no capex)"
	if r.ProfitabilityIndex != nil {
		pi = fixed(*r.ProfitabilityIndex, 2)
	}
	row("profitability index", pi)
	row("total capex", money(r.TotalCapex))
	if len(r.VendorChoice) > 0 {
		row("vendor chosen", r.VendorChoiceText())
	}
	if r.Bound == nil && r.Status == plans.StatusFeasible {
		row("bound", "none: the search stopped before its first LP was solved")
	}
	if r.Bound != nil {
		bound := *r.Bound
		if r.CostMode {
			row("bound", "present cost ≥ "+money(-bound))
		} else {
			row("bound", "NPV ≤ "+money(bound))
		}
	}
	if r.Gap != nil {
		gap := fixed(100**r.Gap, 4) + " %"
		if amount, ok := r.GapAmount(); ok {
			left := money(amount)
			if r.CostMode {
				gap += " (no plan costs less than this one by more than " + left + ")"
			} else {
				gap += " (no plan beats this one by more than " + left + " of NPV)"
			}
		}
		row("gap", gap)
	}
	if !opts.hideEffort {
		st := r.Stats
		nodes := fmt.Sprintf("%d nodes", st.Nodes)
		if st.Nodes == 1 {
			nodes = "1 node" // a large case stopped at the root
		}
		row("solver", fmt.Sprintf("%d rows, %d columns (%d integer), %s, %d simplex iterations, %s s",
			st.Rows, st.Columns, st.Integers, nodes, st.Iterations, fixed(st.Seconds, 2)))
	}
	tw.Flush()
}

func writeInfeasibility(w io.Writer, r *plans.Result) {
	fmt.Fprintln(w, "\nWhy no plan exists")
	if len(r.Infeasibility) == 0 {
		fmt.Fprintln(w, "  (no explanation was found)")
		return
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "  what\tname\tyear\tamount\texplanation")
	for _, x := range r.Infeasibility {
		var amount string
		switch x.Unit {
		case plans.UnitGbps:
			amount = gbpsText(x.Amount) + " Gbps short"
		case plans.UnitSlots:
			amount = money(x.Amount) + " slots short"
		case plans.UnitGbpsMax:
			amount = gbpsText(x.Amount) + " Gbps at most"
		default: // a currency
			amount = x.Unit + " " + money(x.Amount) + " short"
		}
		year := "all years"
		if x.Year != 0 {
			year = strconv.Itoa(x.Year)
		}
		fmt.Fprintf(tw, "  %s\t%s\t%s\t%s\t%s\n", x.Kind, x.Name, year, amount, x.Message)
	}
	tw.Flush()
}

// stoppedBeforeBetterText says why a stopped search's plan buys nothing
// (plans.Result.StoppedBeforeBetter), in solve, compare and sweep alike;
// searchStoppedText is its first half, for a short note.
const (
	searchStoppedText       = "the search stopped before it found a plan better than the existing network"
	stoppedBeforeBetterText = searchStoppedText + ", which does not show that no upgrade pays"
)

func writePlanTable(w io.Writer, r *plans.Result) {
	fmt.Fprintln(w, "\nStaged plan by order year")
	if r.StoppedBeforeBetter() {
		fmt.Fprintf(w, "  nothing bought: %s; allow more time (--time-limit)\n", stoppedBeforeBetterText)
		return
	}
	if len(r.Plan) == 0 {
		fmt.Fprintln(w, "  nothing to buy: the existing network is the best plan")
		return
	}
	tw := newTable(w)
	fmt.Fprintln(tw, "order year\tin service\tlink\titem\tvendor\tunits\t+Gbps\tlist capex\tcapex\topex/year\t")
	prevYear := 0
	for _, p := range r.Plan {
		if prevYear != 0 && p.Year != prevYear {
			fmt.Fprintln(tw, "\t\t\t\t\t\t\t\t\t\t")
		}
		prevYear = p.Year
		item, vendor := p.Item, p.Vendor
		if p.Kind == plans.KindBuild {
			item, vendor = "(build link)", "-"
		} else if p.Kind == plans.KindLease {
			item += " (lease)"
		}
		fmt.Fprintf(tw, "%d\t%d\t%s\t%s\t%s\t%d\t%s\t%s\t%s\t%s\t\n",
			p.Year, p.InService, p.Link, item, vendor, p.Units, gbpsText(p.Gbps),
			money(p.ListCapex), money(p.Capex), money(p.Opex))
	}
	tw.Flush()
	if note := r.HorizonEndNote(); note != "" {
		writeWrapped(w, "  note: ", "        ", note)
	}
}

// noteWidth is the width at which writeWrapped breaks lines.
const noteWidth = 80

// writeWrapped prints text word by word in lines of at most noteWidth
// characters (a longer word gets a line of its own), the first line after
// first and the others after indent.
func writeWrapped(w io.Writer, first, indent, text string) {
	line := first
	fresh := true // nothing but the prefix on line yet
	for _, word := range strings.Fields(text) {
		if !fresh && utf8.RuneCountInString(line)+1+utf8.RuneCountInString(word) > noteWidth {
			fmt.Fprintln(w, line)
			line, fresh = indent, true
		}
		if !fresh {
			line += " "
		}
		line += word
		fresh = false
	}
	fmt.Fprintln(w, line)
}

func writeCashflowTable(w io.Writer, r *plans.Result) {
	fmt.Fprintln(w, "\nCash flow by year")
	tw := newTable(w)
	fmt.Fprintln(tw, "year\trevenue\topex\tcapex\tsalvage\ttax\tnet\tdiscount\tpresent value\tcumulative PV\tbudget\tbudget used\t")
	var tot plans.CashflowRow
	for _, c := range r.Cashflow {
		budget := "-"
		if c.Budget != nil {
			budget = money(*c.Budget)
		}
		fmt.Fprintf(tw, "%d\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t\n",
			c.Year, money(c.Revenue), money(c.Opex), money(c.Capex), money(c.Salvage),
			money(c.Tax), money(c.Net), fixed(c.DiscountFactor, 4), money(c.PV),
			money(c.CumulativePV), budget, money(c.BudgetUsed))
		tot.Revenue += c.Revenue
		tot.Opex += c.Opex
		tot.Capex += c.Capex
		tot.Salvage += c.Salvage
		tot.Tax += c.Tax
		tot.Net += c.Net
		tot.PV += c.PV
		tot.BudgetUsed += c.BudgetUsed
	}
	fmt.Fprintf(tw, "total\t%s\t%s\t%s\t%s\t%s\t%s\t\t%s\t\t\t%s\t\n",
		money(tot.Revenue), money(tot.Opex), money(tot.Capex), money(tot.Salvage),
		money(tot.Tax), money(tot.Net), money(tot.PV), money(tot.BudgetUsed))
	tw.Flush()
	fmt.Fprintln(w, "  (salvage, the book value left at the horizon, is discounted at the end of the last year)")
}

func writeLinksTable(w io.Writer, r *plans.Result) {
	fmt.Fprintln(w, "\nLinks by year (capacity per direction; utilisation of the busier direction)")
	tw := newTable(w)
	fmt.Fprintln(tw, "link\tyear\tGbps before\tutil before\tGbps after\tutil after\tceiling\t\tvalue of +1 Gbps\t")
	prev := ""
	for _, l := range r.Links {
		if prev != "" && l.Link != prev {
			fmt.Fprintln(tw, "\t\t\t\t\t\t\t\t\t")
		}
		prev = l.Link
		flag := ""
		switch {
		case l.Candidate && !l.Built:
			flag = "not built"
		case l.AtCeiling:
			flag = "at ceiling"
		}
		shadow := ""
		if l.ShadowValue != nil {
			shadow = money(*l.ShadowValue)
		}
		fmt.Fprintf(tw, "%s\t%d\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t\n",
			l.Link, l.Year, gbpsText(l.CapacityBefore), percent(l.UtilisationBefore),
			gbpsText(l.CapacityAfter), percent(l.UtilisationAfter), percent(l.Ceiling), flag, shadow)
	}
	tw.Flush()
	fmt.Fprintln(w, "  (value of +1 Gbps: present value the plan would gain from one more Gbps on a binding link, its routing LP's shadow price)")
}

func writeDemandsTable(w io.Writer, r *plans.Result) {
	fmt.Fprintln(w, "\nDemands by year (Gbps each direction)")
	tw := newTable(w)
	fmt.Fprintln(tw, "demand\tyear\tforecast\tserved\tcommitted\trevenue\tunserved\twhy\t")
	prev := ""
	for _, d := range r.Demands {
		if prev != "" && d.Demand != prev {
			fmt.Fprintln(tw, "\t\t\t\t\t\t\t\t")
		}
		prev = d.Demand
		why, unserved := "", ""
		if d.Reason != "" || d.Unserved > 0 {
			unserved = gbpsText(d.Unserved)
			why = reasonText(d.Reason)
		}
		fmt.Fprintf(tw, "%s\t%d\t%s\t%s\t%s\t%s\t%s\t%s\t\n",
			d.Demand, d.Year, gbpsText(d.Forecast), gbpsText(d.Served), gbpsText(d.Committed),
			money(d.Revenue), unserved, why)
	}
	tw.Flush()
}

// reasonText explains a DemandYear.Reason in words.
func reasonText(reason string) string {
	switch reason {
	case plans.ReasonCapacity:
		return "capacity: the network cannot carry more"
	case plans.ReasonNoProfit:
		return "no profit: the capacity it needs does not pay"
	case "":
		return ""
	}
	return reason
}

func writeShortfallTable(w io.Writer, r *plans.Result) {
	fmt.Fprintln(w, "\nBaseline shortfall (committed traffic the existing network cannot carry without the plan)")
	tw := newTable(w)
	fmt.Fprintln(tw, "demand\tyear\tcommitted\tcarried\tshortfall\tSLA penalty\trevenue at risk\t")
	for _, s := range r.Shortfall {
		fmt.Fprintf(tw, "%s\t%d\t%s\t%s\t%s\t%s\t%s\t\n",
			s.Demand, s.Year, gbpsText(s.Committed), gbpsText(s.Carried), gbpsText(s.Shortfall),
			money(s.Penalty), money(s.RevenueAtRisk))
	}
	tw.Flush()
}
