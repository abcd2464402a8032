package report

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"

	"netstage/plans"
)

// view is everything a report shows, already formatted for people, so that
// the HTML and the Markdown print the same numbers.
type view struct {
	Title    string
	Case     string
	Currency string
	Years    string // "2026–2035"
	Status   string
	HasPlan  bool
	CostMode bool

	Decision string
	Key      []keyFigure

	// Charts is filled only for HTML (Markdown shows the data as tables).
	Charts  []chart
	MapNote string // why there is no map ("" when there is one)

	UtilYears []string    // column heads of the utilisation grid
	UtilRows  []utilRowMD // Markdown utilisation grid

	Stages        []stage
	PlanTotal     string
	HorizonNote   string // Result.HorizonEndNote
	Cash          []cashRow
	CashTotal     cashRow
	HasPenalty    bool
	Why           []why
	Tornado       *tornadoView // nil: the case asks for no tornado
	Assumptions   []pair
	Budgets       []budgetRow
	Demands       []demandRow
	Vendors       []vendorRow
	Items         []itemRow
	Solver        []pair
	Infeasibility []infeasibleRow
	Warnings      []string
	Caution       string
}

type keyFigure struct{ Label, Value, Note string }

type pair struct{ Label, Value string }

type stage struct {
	Year   string
	Rows   []planRow
	Capex  string
	Budget string
}

type planRow struct {
	Link, Item, Vendor, Units, Gbps, Capex, InService, OrderBy string
}

type cashRow struct {
	Year, Revenue, Opex, Capex, Tax, Penalty, Salvage, Net, DF, PV, CumPV, Budget, Incremental string
}

type why struct {
	Link      string
	Purchases []string
	Text      []string
}

type budgetRow struct{ Year, Cap, Used string }

type demandRow struct {
	ID, From, To, Forecast, Growth, Committed, Tariff, Erosion string
}

type vendorRow struct {
	Vendor, Catalog, Quote, ValidUntil, Currency, Tiers string
}

type itemRow struct {
	Item, Vendor, Kind, Gbps, Capex, PerKM, Opex, Lead, Life, Erosion, Orderable string
}

type infeasibleRow struct{ Kind, Name, Year, Amount, Message string }

type utilRowMD struct {
	Link  string
	Cells []string
}

// chart is one figure of the HTML report.
type chart struct {
	ID      string
	Title   string
	Caption string
	SVG     string
}

// buildView formats c and r for a report.
func buildView(c *plans.Case, r *plans.Result) (*view, error) {
	if c == nil || r == nil {
		return nil, fmt.Errorf("report: case and result are both required")
	}
	v := &view{
		Case:     r.Case,
		Currency: r.Currency,
		Status:   string(r.Status),
		HasPlan:  r.Objective != nil,
		CostMode: r.CostMode,
	}
	if v.Case == "" {
		v.Case = c.Name
	}
	if v.Currency == "" {
		v.Currency = c.Currency
	}
	v.Title = "Capacity plan: " + v.Case
	v.Years = fmt.Sprintf("%d–%d", c.FirstYear, c.FirstYear+c.Horizon-1)
	v.Decision = decision(c, r)
	v.Key = keyFigures(r)
	v.Stages, v.PlanTotal = stages(c, r)
	v.Cash, v.CashTotal, v.HasPenalty = cashRows(r)
	v.Why = whys(c, r)
	v.UtilYears, v.UtilRows = utilGrid(c, r)
	v.Assumptions = assumptions(c)
	if t := r.VendorChoiceText(); t != "" {
		v.Assumptions = append(v.Assumptions, pair{"Vendor chosen", t})
	}
	v.Budgets = budgets(c, r)
	v.Demands = demands(c)
	v.Vendors, v.Items = catalogs(c)
	v.Solver = solver(r)
	for _, x := range r.Infeasibility {
		var amount string
		switch x.Kind {
		case plans.InfeasibleBudget:
			amount = moneyCur(x.Amount, v.Currency)
		case plans.InfeasibleDemand:
			amount = gbps(x.Amount)
		default:
			// A link can have to give Gbps or slots; the message says which.
			amount = trimZero(formatFixed(x.Amount, 1))
		}
		year := "all years"
		if x.Year != 0 {
			year = strconv.Itoa(x.Year)
		}
		v.Infeasibility = append(v.Infeasibility, infeasibleRow{
			Kind: x.Kind, Name: x.Name, Year: year, Amount: amount, Message: x.Message,
		})
	}
	v.Warnings = append(v.Warnings, r.Warnings...)
	v.HorizonNote = r.HorizonEndNote()
	v.MapNote = mapNote(c)
	v.Caution = "This plan is decision support, not a decision. It rests on a traffic " +
		"forecast, tariffs and vendor prices that will turn out differently, and on " +
		"the assumptions listed above. Before any order is placed, finance and " +
		"engineering should review it under the operator's own investment, risk and " +
		"procurement policies and local rules, and re-run it when the forecast or the quotes change."
	return v, nil
}

// decision writes the one-paragraph decision.
func decision(c *plans.Case, r *plans.Result) string {
	cur := r.Currency
	if cur == "" {
		cur = c.Currency
	}
	first := c.FirstYear
	var b strings.Builder
	if r.Objective == nil {
		switch r.Status {
		case plans.StatusInfeasible:
			b.WriteString("There is no plan: no set of purchases meets the committed demands within the unit limits and budgets of this case. ")
			if len(r.Infeasibility) > 0 {
				b.WriteString("The main obstacle: " + strings.TrimSuffix(r.Infeasibility[0].Message, ".") + ". ")
			}
			b.WriteString("The section on what blocks a plan lists what would have to give.")
		case plans.StatusUnbounded:
			b.WriteString("There is no plan: the model has no finite optimum, which points to an error in the case (for example a demand that pays without needing capacity).")
		default:
			b.WriteString("There is no plan: the solver stopped at its limit before finding one. Run it again with a longer time limit.")
		}
		return b.String()
	}

	// What to order this year.
	var now []plans.PlanRow
	nextYear := 0
	for _, p := range r.Plan {
		if p.Year == first {
			now = append(now, p)
		} else if nextYear == 0 || p.Year < nextYear {
			nextYear = p.Year
		}
	}
	switch {
	case r.StoppedBeforeBetter():
		b.WriteString("No upgrade was found in the time given: the solver stopped before it found a plan better than doing nothing, so this is no finding that nothing pays. Solve the case again with a longer time limit. ")
	case len(r.Plan) == 0:
		fmt.Fprintf(&b, "Order nothing in %d: no upgrade earns its cost over %d–%d at the case's assumptions. ", first, first, first+c.Horizon-1)
	case len(now) == 0:
		var next []string
		var rows []plans.PlanRow
		for _, p := range r.Plan {
			if p.Year == nextYear {
				next = append(next, purchaseText(p)+", order by "+orderBy(c, p))
				rows = append(rows, p)
			}
		}
		orders := "orders fall"
		if len(next) == 1 {
			orders = "order falls"
		}
		fmt.Fprintf(&b, "Order nothing in %d. The first %s in %d: %s, for %s. ",
			first, orders, nextYear, joinAnd(next), costText(rows, cur, nil))
	default:
		items := make([]string, 0, len(now))
		for _, p := range now {
			items = append(items, purchaseText(p))
		}
		var budget *float64
		if cf := cashYear(r.Cashflow, first); cf != nil {
			budget = cf.Budget
		}
		fmt.Fprintf(&b, "In %d, order %s, for %s. ", first, joinAnd(items), costText(now, cur, budget))
		if reason := whyNow(r, now); reason != "" {
			b.WriteString(reason)
		}
	}

	// Value against doing nothing.
	last := first + c.Horizon - 1
	if r.CostMode {
		fmt.Fprintf(&b, "Over %d–%d the plan's present cost is %s", first, last, moneyCur(-*r.Objective, cur))
		if r.BaselineNPV != nil {
			fmt.Fprintf(&b, ", against %s for doing nothing", moneyCur(-*r.BaselineNPV, cur))
			if short := shortfallGbps(r); short > 0 {
				fmt.Fprintf(&b, " (which leaves up to %s of committed traffic uncarried)", gbps(short))
			}
		}
		b.WriteString(". ")
	} else {
		fmt.Fprintf(&b, "Over %d–%d the plan has an NPV of %s", first, last, moneyCur(*r.Objective, cur))
		if r.BaselineNPV != nil && r.IncrementalNPV != nil {
			fmt.Fprintf(&b, ", against %s for doing nothing: %s %s", moneyCur(*r.BaselineNPV, cur),
				moneyCur(math.Abs(*r.IncrementalNPV), cur), moreOrLess(*r.IncrementalNPV))
		}
		b.WriteString(". ")
		// Without purchases the incremental flows are rounding noise: an
		// IRR or payback of them means nothing, and there are no upgrades
		// to speak of.
		if len(r.Plan) > 0 {
			var parts []string
			if r.IRR != nil {
				parts = append(parts, "an IRR of "+percent(*r.IRR))
			}
			switch {
			case r.PaybackInFirstYear():
				parts = append(parts, "a cumulative cash flow never below that of doing nothing")
			case r.PaybackYear != nil:
				parts = append(parts, "payback in "+strconv.Itoa(*r.PaybackYear))
			default:
				parts = append(parts, "no payback within the horizon")
			}
			b.WriteString("The upgrades have " + joinAnd(parts) + ". ")
			if gain := revenueGain(r); gain >= zeroMoney {
				fmt.Fprintf(&b, "They let the network carry more paying traffic: %s more revenue over the horizon than doing nothing. ", moneyCur(gain, cur))
			}
		}
	}
	if len(r.Plan) > 0 {
		fmt.Fprintf(&b, "Total capex is %s", moneyCur(r.TotalCapex, cur))
		b.WriteString(budgetSentence(c, r))
		b.WriteString(".")
	}
	if r.Status == plans.StatusFeasible && r.Gap != nil {
		within := percent(*r.Gap)
		if amount, ok := r.GapAmount(); ok {
			within += " (" + moneyCur(amount, cur) + ")"
		}
		best := "the best possible NPV"
		if r.CostMode {
			best = "the least possible present cost"
		}
		fmt.Fprintf(&b, " The solver stopped at its limit: this plan is within %s of %s, not proven optimal.", within, best)
	} else if r.Status == plans.StatusFeasible {
		b.WriteString(" The solver stopped at its limit before it had a bound: how far this plan is from the best is not known.")
	}
	return strings.TrimSpace(b.String())
}

// revenueGain is the plan's undiscounted revenue over the horizon minus the
// do-nothing network's.
func revenueGain(r *plans.Result) float64 {
	if len(r.BaselineCashflow) == 0 {
		return 0
	}
	g := 0.0
	for _, cf := range r.Cashflow {
		g += cf.Revenue
	}
	for _, cf := range r.BaselineCashflow {
		g -= cf.Revenue
	}
	return g
}

func moreOrLess(inc float64) string {
	if inc < 0 {
		return "less"
	}
	return "more"
}

// budgetSentence says how the plan's capex sits against the budgets.
func budgetSentence(c *plans.Case, r *plans.Result) string {
	capped, tight := 0, 0
	var over []string
	for _, cf := range r.Cashflow {
		if cf.Budget == nil {
			continue
		}
		capped++
		switch {
		case cf.Capex > *cf.Budget+zeroMoney:
			// Never in a plan the solver accepts; said plainly if it happens.
			over = append(over, strconv.Itoa(cf.Year))
		case cf.Capex >= *cf.Budget-zeroMoney && cf.Capex > 0:
			tight++
		}
	}
	cur := r.Currency
	var s string
	switch {
	case len(over) > 0:
		s = ", above the yearly budget in " + joinAnd(over)
	case capped == 0:
		s = ", with no yearly budget cap"
	case tight == 0:
		s = ", within the yearly budget in every capped year"
	default:
		s = fmt.Sprintf(", within the yearly budget; the budget is fully used in %d of %d capped years", tight, capped)
	}
	if !math.IsInf(c.Budget.Cumulative, 1) && c.Budget.Cumulative > 0 {
		s += fmt.Sprintf(" (%s of the cumulative cap of %s)", percent(r.TotalCapex/c.Budget.Cumulative), moneyCur(c.Budget.Cumulative, cur))
	}
	return s
}

// whyNow gives the main reason for this year's orders: the links they
// relieve and what the do-nothing network leaves uncarried.
func whyNow(r *plans.Result, now []plans.PlanRow) string {
	var links []string
	seen := map[string]bool{}
	for _, p := range now {
		if !seen[p.Link] {
			seen[p.Link] = true
			links = append(links, p.Link)
		}
	}
	var hits []string
	var hitYears []int
	var hitLinks []string
	for _, l := range links {
		if y, ok := firstAtCeilingBefore(r, l); ok {
			hits = append(hits, fmt.Sprintf("%s in %d", l, y))
			hitYears = append(hitYears, y)
			hitLinks = append(hitLinks, l)
		}
	}
	var b strings.Builder
	if len(hits) > 0 {
		if len(hits) == 1 {
			fmt.Fprintf(&b, "Without them link %s reaches its utilisation ceiling in %d", hitLinks[0], hitYears[0])
		} else {
			fmt.Fprintf(&b, "Without them links reach their utilisation ceilings (%s)", strings.Join(hits, ", "))
		}
		risk, firstShort := 0.0, 0
		for _, s := range r.Shortfall {
			risk += s.RevenueAtRisk
			if firstShort == 0 || s.Year < firstShort {
				firstShort = s.Year
			}
		}
		if risk > 0 {
			fmt.Fprintf(&b, ", and the do-nothing network leaves committed traffic uncarried from %d, putting %s of revenue at risk over the horizon",
				firstShort, moneyCur(risk, r.Currency))
		}
		b.WriteString(". ")
	}
	return b.String()
}

// firstAtCeilingBefore returns the first year in which link l is at its
// ceiling without the plan.
func firstAtCeilingBefore(r *plans.Result, l string) (int, bool) {
	for _, ly := range r.Links {
		if ly.Link == l && ly.CapacityBefore > 0 && plans.AtCeiling(ly.UtilisationBefore, ly.Ceiling) {
			return ly.Year, true
		}
	}
	return 0, false
}

func shortfallGbps(r *plans.Result) float64 {
	m := 0.0
	byYear := map[int]float64{}
	for _, s := range r.Shortfall {
		byYear[s.Year] += s.Shortfall
	}
	for _, v := range byYear {
		m = math.Max(m, v)
	}
	return m
}

func cashYear(rows []plans.CashflowRow, year int) *plans.CashflowRow {
	for i := range rows {
		if rows[i].Year == year {
			return &rows[i]
		}
	}
	return nil
}

// purchaseText describes one plan row in words: "2 × 100G-LR on link A-B
// from Vendor (200 Gbps)".
func purchaseText(p plans.PlanRow) string {
	switch p.Kind {
	case plans.KindBuild:
		return "the build of link " + p.Link
	case plans.KindLease:
		return fmt.Sprintf("%d × %s lease on link %s from %s (%s)", p.Units, p.Item, p.Link, p.Vendor, gbps(p.Gbps))
	}
	return fmt.Sprintf("%d × %s on link %s from %s (%s)", p.Units, p.Item, p.Link, p.Vendor, gbps(p.Gbps))
}

func joinAnd(s []string) string {
	switch len(s) {
	case 0:
		return ""
	case 1:
		return s[0]
	}
	return strings.Join(s[:len(s)-1], ", ") + " and " + s[len(s)-1]
}

// keyFigures are the headline numbers.
func keyFigures(r *plans.Result) []keyFigure {
	cur := r.Currency
	opt := func(p *float64, f func(float64) string, none string) string {
		if p == nil {
			return none
		}
		return f(*p)
	}
	m := func(v float64) string { return moneyCur(v, cur) }
	var k []keyFigure
	if r.Objective == nil {
		return []keyFigure{{Label: "Status", Value: string(r.Status)}}
	}
	irr, payback := r.IRR, r.PaybackYear
	if len(r.Plan) == 0 {
		irr, payback = nil, nil // no purchases: nothing to pay back
	}
	if r.CostMode {
		k = append(k,
			keyFigure{"Present cost of the plan", m(-*r.Objective), "all committed traffic carried"},
			keyFigure{"Present cost of doing nothing", opt(r.BaselineNPV, func(v float64) string { return m(-v) }, "n/a"), "with SLA penalties on shortfall"},
			keyFigure{"Saving against doing nothing", opt(r.IncrementalNPV, m, "n/a"), "present value"},
		)
	} else {
		k = append(k,
			keyFigure{"NPV of the plan", m(*r.Objective), ""},
			keyFigure{"NPV of doing nothing", opt(r.BaselineNPV, m, "n/a"), "baseline"},
			keyFigure{"Incremental NPV", opt(r.IncrementalNPV, m, "n/a"), "plan − baseline"},
			keyFigure{"IRR", opt(irr, percent, "n/a"), "of the incremental cash flow"},
			keyFigure{"Payback year", optInt(payback), paybackNote(r, payback != nil)},
		)
	}
	k = append(k,
		keyFigure{"Profitability index", opt(r.ProfitabilityIndex, func(v float64) string { return formatFixed(v, 2) }, "n/a"), "1 + incremental NPV / PV of capex"},
		keyFigure{"Total capex", m(r.TotalCapex), "undiscounted, after volume discounts"},
	)
	return k
}

func optInt(p *int) string {
	if p == nil {
		return "n/a"
	}
	return strconv.Itoa(*p)
}

// stages groups the plan rows by order year.
func stages(c *plans.Case, r *plans.Result) ([]stage, string) {
	var out []stage
	total := 0.0
	for _, p := range r.Plan {
		if len(out) == 0 || out[len(out)-1].Year != strconv.Itoa(p.Year) {
			out = append(out, stage{Year: strconv.Itoa(p.Year)})
		}
		s := &out[len(out)-1]
		item, vendor := p.Item, p.Vendor
		if p.Kind == plans.KindBuild {
			item, vendor = "new link build", "—"
		} else if p.Kind == plans.KindLease {
			item += " (lease)"
		}
		s.Rows = append(s.Rows, planRow{
			Link: p.Link, Item: item, Vendor: vendor, Units: count(p.Units), Gbps: gbps(p.Gbps),
			Capex: money(p.Capex), InService: strconv.Itoa(p.InService), OrderBy: orderBy(c, p),
		})
		total += p.Capex
	}
	for i := range out {
		y, _ := strconv.Atoi(out[i].Year)
		sum := 0.0
		for _, p := range r.Plan {
			if p.Year == y {
				sum += p.Capex
			}
		}
		out[i].Capex = money(sum)
		out[i].Budget = "no cap"
		if cf := cashYear(r.Cashflow, y); cf != nil && cf.Budget != nil {
			out[i].Budget = money(*cf.Budget)
		}
	}
	return out, money(total)
}

var monthNames = [...]string{"Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"}

// orderBy is the latest month in which to place an order so that it is in
// service by the case's ready-by month of its in-service year: an order
// placed at the start of month m0 with a lead time of L months is live at
// the end of month m0+L−1, which must not be after ReadyByMonth (the
// DESIGN.md §2 lead-time rule, read month by month). Never earlier than
// January of the order year.
func orderBy(c *plans.Case, p plans.PlanRow) string {
	lead, ok := leadMonths(c, p)
	if !ok {
		return strconv.Itoa(p.Year)
	}
	ready := c.ReadyByMonth
	if ready < 1 || ready > 12 {
		ready = 9 // the case default (DESIGN.md §2)
	}
	abs := p.InService*12 + ready - lead // 0-based month count of the latest order month
	if abs < p.Year*12 {
		abs = p.Year * 12
	}
	return monthNames[abs%12] + " " + strconv.Itoa(abs/12)
}

// quoteExpiry warns when the quote behind purchase p runs out before the
// order year ends (the model places orders at the start of the year, so the
// price holds only if the order goes out before the quote's last day).
func quoteExpiry(c *plans.Case, p plans.PlanRow) string {
	if p.Kind == plans.KindBuild {
		return ""
	}
	for _, it := range c.Items {
		if it.ID != p.Item || it.Vendor < 0 || it.Vendor >= len(c.Vendors) {
			continue
		}
		vd := c.Vendors[it.Vendor]
		if vd.ID != p.Vendor && vd.Name != p.Vendor {
			continue
		}
		if vd.ValidUntil.IsZero() || vd.ValidUntil.Year() > p.Year {
			return ""
		}
		if c.PricesRollForward && vd.ValidUntil.Year() < p.Year {
			return "the quote expired on " + vd.ValidUntil.Format("2006-01-02") + ": its prices were rolled forward, so re-quote before ordering"
		}
		return "the quote is valid until " + vd.ValidUntil.Format("2006-01-02") + ": order by then or re-quote"
	}
	return ""
}

// leadMonths finds the lead time of the purchase p in the case.
func leadMonths(c *plans.Case, p plans.PlanRow) (int, bool) {
	if p.Kind == plans.KindBuild {
		if i := c.LinkIndex(p.Link); i >= 0 && c.Links[i].Candidate != nil {
			return c.Links[i].Candidate.LeadMonths, true
		}
		return 0, false
	}
	for _, it := range c.Items {
		if it.ID != p.Item {
			continue
		}
		if it.Vendor >= 0 && it.Vendor < len(c.Vendors) {
			vd := c.Vendors[it.Vendor]
			if vd.ID != p.Vendor && vd.Name != p.Vendor {
				continue
			}
		}
		return it.LeadMonths, true
	}
	return 0, false
}

// cashRows formats the cash flow with a total row.
func cashRows(r *plans.Result) ([]cashRow, cashRow, bool) {
	var rows []cashRow
	var t plans.CashflowRow
	penalty := false
	for _, cf := range r.Cashflow {
		budget := "no cap"
		if cf.Budget != nil {
			budget = money(*cf.Budget)
		}
		rows = append(rows, cashRow{
			Year: strconv.Itoa(cf.Year), Revenue: money(cf.Revenue), Opex: money(cf.Opex), Capex: money(cf.Capex),
			Tax: money(cf.Tax), Penalty: money(cf.Penalty), Salvage: money(cf.Salvage), Net: money(cf.Net),
			DF: factor(cf.DiscountFactor), PV: money(cf.PV), CumPV: money(cf.CumulativePV), Budget: budget,
			Incremental: money(cf.Incremental),
		})
		t.Revenue += cf.Revenue
		t.Opex += cf.Opex
		t.Capex += cf.Capex
		t.Tax += cf.Tax
		t.Penalty += cf.Penalty
		t.Salvage += cf.Salvage
		t.Net += cf.Net
		t.PV += cf.PV
		t.Incremental += cf.Incremental
		if cf.Penalty != 0 {
			penalty = true
		}
	}
	total := cashRow{
		Year: "Total", Revenue: money(t.Revenue), Opex: money(t.Opex), Capex: money(t.Capex), Tax: money(t.Tax),
		Penalty: money(t.Penalty), Salvage: money(t.Salvage), Net: money(t.Net), PV: money(t.PV),
		Incremental: money(t.Incremental),
	}
	return rows, total, penalty
}

// whys explains each upgraded link.
func whys(c *plans.Case, r *plans.Result) []why {
	var out []why
	index := map[string]int{}
	for _, p := range r.Plan {
		i, ok := index[p.Link]
		if !ok {
			i = len(out)
			index[p.Link] = i
			out = append(out, why{Link: p.Link})
		}
		line := fmt.Sprintf("%d: %s", p.Year, purchaseText(p))
		if p.Capex > 0 {
			line += ", capex " + moneyCur(p.Capex, r.Currency)
		}
		if p.Opex > 0 {
			line += fmt.Sprintf(", then %s a year from %d", moneyCur(p.Opex, r.Currency), p.InService)
		}
		if v := quoteExpiry(c, p); v != "" {
			line += "; " + v
		}
		out[i].Purchases = append(out[i].Purchases, line)
	}
	for i := range out {
		w := &out[i]
		w.Text = linkReasons(c, r, w.Link)
	}
	return out
}

// linkReasons gives the facts behind the upgrades of one link.
func linkReasons(c *plans.Case, r *plans.Result, link string) []string {
	cur := r.Currency
	var text []string
	var ceilingYear int
	peakAfter, peakYear := 0.0, 0
	bestShadow, shadowYear := 0.0, 0
	var ceil float64
	inService := 0
	for _, p := range r.Plan {
		if p.Link == link && (inService == 0 || p.InService < inService) {
			inService = p.InService
		}
	}
	for _, ly := range r.Links {
		if ly.Link != link {
			continue
		}
		ceil = ly.Ceiling
		if ceilingYear == 0 && ly.CapacityBefore > 0 && plans.AtCeiling(ly.UtilisationBefore, ly.Ceiling) {
			ceilingYear = ly.Year
		}
		if ly.Year >= inService && ly.UtilisationAfter > peakAfter {
			peakAfter, peakYear = ly.UtilisationAfter, ly.Year
		}
		if ly.ShadowValue != nil && *ly.ShadowValue > bestShadow {
			bestShadow, shadowYear = *ly.ShadowValue, ly.Year
		}
	}
	switch {
	case ceilingYear != 0:
		text = append(text, fmt.Sprintf("Without the plan the link is at its %s utilisation ceiling from %d.", percent(ceil), ceilingYear))
	default:
		text = append(text, fmt.Sprintf("Without the plan the link stays below its %s utilisation ceiling; the upgrade lets the network carry more paying traffic or route it more cheaply.", percent(ceil)))
	}
	if peakYear != 0 {
		text = append(text, fmt.Sprintf("Once the new capacity is in service (%d), the link's highest peak utilisation is %s (in %d).", inService, percent(peakAfter), peakYear))
	}
	if shadowYear != 0 {
		text = append(text, fmt.Sprintf("With the plan in place, one more Gbps on this link would add up to %s of NPV (in %d, its most constrained year).", moneyCur(bestShadow, cur), shadowYear))
	} else {
		text = append(text, "After the plan one more Gbps on this link adds no NPV: its capacity no longer limits the plan.")
	}
	// The demands the plan's routing sends over the link in its busiest
	// year after the upgrade (the last year when it never gets busy).
	year := peakYear
	if year == 0 {
		year = c.FirstYear + c.Horizon - 1
	}
	var parts []string
	for _, dl := range routedOver(r, link, year) {
		parts = append(parts, dl.Demand+" "+gbps(dl.Gbps))
	}
	if len(parts) > 0 {
		text = append(text, fmt.Sprintf("In %d the plan routes over this link: %s.", year, strings.Join(parts, ", ")))
	}
	// The demands it carries in any year from the upgrade on.
	var carried []string
	for _, rt := range r.Routes {
		if rt.Year >= inService && !slices.Contains(carried, rt.Demand) && slices.Contains(rt.Links, link) {
			carried = append(carried, rt.Demand)
		}
	}
	// At risk without the plan: baseline shortfall of those demands.
	on := map[string]bool{}
	for _, d := range carried {
		on[d] = true
	}
	risk, penalty, peak := 0.0, 0.0, 0.0
	var names []string
	seen := map[string]bool{}
	for _, s := range r.Shortfall {
		if !on[s.Demand] {
			continue
		}
		risk += s.RevenueAtRisk
		penalty += s.Penalty
		peak = math.Max(peak, s.Shortfall)
		if !seen[s.Demand] {
			seen[s.Demand] = true
			names = append(names, s.Demand)
		}
	}
	if len(names) > 0 {
		t := fmt.Sprintf("If the upgrade is skipped, the do-nothing network leaves committed traffic of %s uncarried (up to %s in a year), putting %s of revenue at risk over the horizon",
			joinAnd(names), gbps(peak), moneyCur(risk, cur))
		if penalty > 0 {
			t += fmt.Sprintf(" and incurring %s of SLA penalties", moneyCur(penalty, cur))
		}
		text = append(text, t+".")
	} else if len(carried) > 0 {
		text = append(text, "The do-nothing network still carries the committed traffic of these demands; the upgrade pays through traffic above the commitments.")
	}
	return text
}

// routedOver returns the demands the solved routing sends over link in
// year (Result.Routes: each demand's traffic from its From to its To site),
// with their Gbps, widest first.
func routedOver(r *plans.Result, link string, year int) []demandLoad {
	load := map[string]float64{}
	for _, rt := range r.Routes {
		if rt.Year != year {
			continue
		}
		for _, l := range rt.Links {
			if l == link {
				load[rt.Demand] += rt.Gbps
				break
			}
		}
	}
	out := make([]demandLoad, 0, len(load))
	for d, g := range load {
		out = append(out, demandLoad{Demand: d, Gbps: g})
	}
	sort.Slice(out, func(a, b int) bool {
		if out[a].Gbps != out[b].Gbps {
			return out[a].Gbps > out[b].Gbps
		}
		return out[a].Demand < out[b].Demand
	})
	return out
}

// demandLoad is a demand's traffic over one link in one year.
type demandLoad struct {
	Demand string
	Gbps   float64
}

// utilGrid is the Markdown form of the utilisation chart: "before → after".
func utilGrid(c *plans.Case, r *plans.Result) ([]string, []utilRowMD) {
	var years []string
	for i := 0; i < c.Horizon; i++ {
		years = append(years, strconv.Itoa(c.Year(i)))
	}
	var rows []utilRowMD
	index := map[string]int{}
	for _, ly := range r.Links {
		i, ok := index[ly.Link]
		if !ok {
			i = len(rows)
			index[ly.Link] = i
			rows = append(rows, utilRowMD{Link: ly.Link, Cells: make([]string, c.Horizon)})
		}
		y := ly.Year - c.FirstYear
		if y < 0 || y >= c.Horizon {
			continue
		}
		rows[i].Cells[y] = utilCell(ly.CapacityBefore, ly.UtilisationBefore, ly.Ceiling) + " → " +
			utilCell(ly.CapacityAfter, ly.UtilisationAfter, ly.Ceiling)
		if ly.CapacityAfter > ly.CapacityBefore {
			rows[i].Cells[y] += " ▲"
		}
	}
	return years, rows
}

func utilCell(capacity, u, ceiling float64) string {
	if capacity <= 0 {
		return "—"
	}
	s := percent(u)
	if plans.AtCeiling(u, ceiling) {
		s = "**" + s + "**"
	}
	return s
}

func assumptions(c *plans.Case) []pair {
	disc := "end of year"
	if c.MidYear {
		disc = "mid-year"
	}
	p := []pair{
		{"Horizon", fmt.Sprintf("%d–%d (%d years)", c.FirstYear, c.FirstYear+c.Horizon-1, c.Horizon)},
		{"Currency", c.Currency},
		{"Discount rate", percent(c.DiscountRate) + " a year, " + disc + " discounting (salvage at the end of the horizon)"},
		{"Utilisation ceiling", percent(c.Ceiling) + " of capacity in each direction" + classCeilings(c)},
		{"Capacity needed by", monthNames[clampMonth(c.ReadyByMonth)-1] + " of each year (ready-by month)"},
		{"SLA penalty", moneyCur(c.SLAPenalty, c.Currency) + " per Gbps-month of committed traffic not carried"},
		{"Tax rate", percent(c.Finance.TaxRate)},
		{"Salvage", salvageText(c.Finance.Salvage)},
		{"Budget", budgetText(c)},
	}
	if len(c.ExchangeRates) > 0 {
		keys := make([]string, 0, len(c.ExchangeRates))
		for k := range c.ExchangeRates {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		var s []string
		for _, k := range keys {
			s = append(s, fmt.Sprintf("1 %s = %s %s", k, trimZero(formatFixed(c.ExchangeRates[k], 4)), c.Currency))
		}
		p = append(p, pair{"Exchange rates", strings.Join(s, "; ")})
	}
	if c.PricesRollForward {
		p = append(p, pair{"Expired quotes", "used anyway, prices rolled forward (check with the vendors)"})
	}
	if v := c.VendorPolicy(); v != "" {
		p = append(p, pair{"Vendor restriction", v})
	}
	return p
}

// orderableYears says in which years an item may be ordered (its quote's
// validity): "all years", "2027–2029", or "none".
func orderableYears(c *plans.Case, it *plans.Item) string {
	if len(it.Orderable) == 0 {
		return "all years"
	}
	var runs []string
	start := -1
	all := true
	for i := 0; i <= len(it.Orderable); i++ {
		ok := i < len(it.Orderable) && it.Orderable[i]
		if !ok && i < len(it.Orderable) {
			all = false
		}
		switch {
		case ok && start < 0:
			start = i
		case !ok && start >= 0:
			if start == i-1 {
				runs = append(runs, strconv.Itoa(c.Year(start)))
			} else {
				runs = append(runs, fmt.Sprintf("%d–%d", c.Year(start), c.Year(i-1)))
			}
			start = -1
		}
	}
	switch {
	case all:
		return "all years"
	case len(runs) == 0:
		return "none (quote expired)"
	}
	return strings.Join(runs, ", ")
}

func clampMonth(m int) int {
	if m < 1 || m > 12 {
		return 9
	}
	return m
}

func classCeilings(c *plans.Case) string {
	if len(c.ClassCeiling) == 0 {
		return ""
	}
	keys := make([]string, 0, len(c.ClassCeiling))
	for k := range c.ClassCeiling {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	var s []string
	for _, k := range keys {
		s = append(s, k+" "+percent(c.ClassCeiling[k]))
	}
	return "; by link class: " + strings.Join(s, ", ")
}

func salvageText(m plans.SalvageMethod) string {
	if m == plans.SalvageNone {
		return "none: equipment is worth nothing at the horizon"
	}
	return "straight-line book value at the end of the horizon"
}

func budgetText(c *plans.Case) string {
	capped := 0
	for i := range c.Budget.Yearly {
		if _, ok := c.Budget.YearCap(i); ok {
			capped++
		}
	}
	s := "no yearly cap"
	if capped > 0 {
		s = fmt.Sprintf("yearly caps in %d of %d years (see the table)", capped, c.Horizon)
	}
	if !math.IsInf(c.Budget.Cumulative, 1) && c.Budget.Cumulative > 0 {
		s += "; cumulative cap " + moneyCur(c.Budget.Cumulative, c.Currency)
	}
	return s
}

func budgets(c *plans.Case, r *plans.Result) []budgetRow {
	var out []budgetRow
	for i := range c.Budget.Yearly {
		cap := "no cap"
		if v, ok := c.Budget.YearCap(i); ok {
			cap = money(v)
		}
		used := "—"
		if cf := cashYear(r.Cashflow, c.Year(i)); cf != nil {
			used = money(cf.Capex)
		}
		out = append(out, budgetRow{Year: strconv.Itoa(c.Year(i)), Cap: cap, Used: used})
	}
	return out
}

func demands(c *plans.Case) []demandRow {
	var out []demandRow
	for _, d := range c.Demands {
		growth := "explicit forecast"
		if !math.IsNaN(d.Growth) {
			growth = percent(d.Growth) + " a year"
		}
		row := demandRow{
			ID:      d.ID,
			Growth:  growth,
			Erosion: percent(d.Erosion) + " a year",
		}
		if d.A >= 0 && d.A < len(c.Sites) {
			row.From = c.Sites[d.A].Name
		}
		if d.B >= 0 && d.B < len(c.Sites) {
			row.To = c.Sites[d.B].Name
		}
		if len(d.Forecast) > 0 {
			row.Forecast = gbps(d.Forecast[0]) + " → " + gbps(d.Forecast[len(d.Forecast)-1])
		}
		if len(d.Committed) > 0 {
			row.Committed = gbps(d.Committed[0])
		}
		if len(d.Tariff) > 0 {
			row.Tariff = money(d.Tariff[0])
		}
		out = append(out, row)
	}
	return out
}

func catalogs(c *plans.Case) ([]vendorRow, []itemRow) {
	var vs []vendorRow
	for _, v := range c.Vendors {
		cat := ""
		if v.Catalog >= 0 && v.Catalog < len(c.Catalogs) {
			cat = c.Catalogs[v.Catalog].Name
		}
		valid := "not given"
		if !v.ValidUntil.IsZero() {
			valid = v.ValidUntil.Format("2006-01-02")
		}
		curr := v.Currency
		if curr != "" && curr != c.Currency {
			curr += fmt.Sprintf(" (1 = %s %s)", trimZero(formatFixed(v.Rate, 4)), c.Currency)
		}
		var tiers []string
		for _, t := range v.Tiers {
			th := money(t.Threshold) + " units"
			if t.Basis == plans.TierBySpend {
				th = moneyCur(t.Threshold, c.Currency) + " spend"
			}
			tiers = append(tiers, fmt.Sprintf("%s off from %s a year", percent(t.Discount), th))
		}
		tier := "none"
		if len(tiers) > 0 {
			tier = strings.Join(tiers, "; ")
		}
		name := v.Name
		if name == "" {
			name = v.ID
		}
		quote := v.Quote
		if quote == "" {
			quote = "not given"
		}
		vs = append(vs, vendorRow{Vendor: name, Catalog: cat, Quote: quote, ValidUntil: valid, Currency: curr, Tiers: tier})
	}
	var is []itemRow
	for i := range c.Items {
		it := &c.Items[i]
		vendor := ""
		if it.Vendor >= 0 && it.Vendor < len(c.Vendors) {
			vendor = c.Vendors[it.Vendor].ID
		}
		life := "—"
		if it.BookLife > 0 {
			life = fmt.Sprintf("%d years", it.BookLife)
		}
		is = append(is, itemRow{
			Item: it.ID, Vendor: vendor, Kind: it.Kind.String(), Gbps: gbps(it.Gbps),
			Capex: money(it.CapexPerUnit), PerKM: money(it.CapexPerKM), Opex: money(it.Opex),
			Lead: fmt.Sprintf("%d months", it.LeadMonths), Life: life, Erosion: percent(it.Erosion) + " a year",
			Orderable: orderableYears(c, it),
		})
	}
	return vs, is
}

func solver(r *plans.Result) []pair {
	opt := func(p *float64, f func(float64) string) string {
		if p == nil {
			return "n/a"
		}
		return f(*p)
	}
	m := func(v float64) string { return moneyCur(v, r.Currency) }
	gap := func(v float64) string { return trimZero(formatFixed(100*v, 4)) + "%" }
	return []pair{
		{"Status", statusText(r.Status)},
		{"Objective (NPV of the plan)", opt(r.Objective, m)},
		{"Bound (no plan can beat)", opt(r.Bound, m)},
		{"Gap", opt(r.Gap, gap)},
	}
}

func statusText(s plans.Status) string {
	switch s {
	case plans.StatusOptimal:
		return "optimal (proven within the gap asked for)"
	case plans.StatusFeasible:
		return "feasible (best plan found within the limits, not proven optimal)"
	case plans.StatusInfeasible:
		return "infeasible (no plan meets the commitments and budgets)"
	case plans.StatusUnbounded:
		return "unbounded (the case has an error)"
	case plans.StatusLimit:
		return "limit (stopped before any plan was found)"
	}
	return string(s)
}

// mapNote says why the report has no map, or "" when it can draw one.
func mapNote(c *plans.Case) string {
	if len(c.Sites) == 0 {
		return "The case has no sites, so there is no map."
	}
	ll, xy := 0, 0
	for _, s := range c.Sites {
		if s.HasLatLon {
			ll++
		}
		if s.HasXY {
			xy++
		}
	}
	n := len(c.Sites)
	if ll == n || xy == n {
		return ""
	}
	if ll == 0 && xy == 0 {
		return "The case gives no site coordinates, so the report has no network map."
	}
	return fmt.Sprintf("The case gives coordinates for only some sites (%d of %d), so the report has no network map.", max(ll, xy), n)
}

// paybackNote is the note under the payback year (shown when shown is
// true): a payback in the first year says the cumulative incremental cash
// is never negative.
func paybackNote(r *plans.Result, shown bool) string {
	if shown && r.PaybackInFirstYear() {
		return "undiscounted, incremental: never below zero"
	}
	return "undiscounted, incremental"
}

// costText is what orders cost: their capex (against budget, when given:
// the year's cap, which caps capex only), and the yearly fees of the
// leases among them (a lease has no capex: "a capex of EUR 0" alone would
// hide its cost).
func costText(rows []plans.PlanRow, cur string, budget *float64) string {
	capex, fees := 0.0, 0.0
	for _, p := range rows {
		capex += p.Capex
		if p.Kind == plans.KindLease {
			fees += p.Opex
		}
	}
	text := "a capex of " + moneyCur(capex, cur)
	if budget != nil {
		text += " against a budget of " + moneyCur(*budget, cur)
	}
	switch {
	case fees == 0:
		return text
	case capex == 0:
		return "lease fees of " + moneyCur(fees, cur) + " a year"
	default:
		return text + ", and lease fees of " + moneyCur(fees, cur) + " a year"
	}
}
