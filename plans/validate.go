package plans

import (
	"container/heap"
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"
	"time"

	"netstage/catalog"
	"netstage/plans/numfmt"
)

// horizonOK reports whether the first year and horizon decoded, so that
// per-year vectors can be built.
func (c *Case) horizonOK() bool {
	return c.Horizon >= 1 && c.Horizon <= MaxHorizon && c.FirstYear != 0
}

// resolveCatalogs merges the decoded catalogs into the case: vendors and
// items converted to case currency, per-year prices derived, tiers sorted,
// items matched to links. It returns the errors found in the catalog files
// (currency, expiry, duplicate vendors, items that fit no link) and records
// case-file errors (unknown classes) in d.src.
func (d *decoder) resolveCatalogs(c *Case, cats []*catalog.Catalog) ErrorList {
	var errs ErrorList
	at := func(file string, p catalog.Position, key string, err error) {
		errs = append(errs, &Error{File: file, Line: p.Line, Col: p.Col, Key: key, Err: err})
	}
	linkClasses := map[string]bool{}
	classesKnown := true // false when a link's class is missing (already an error)
	for _, l := range c.Links {
		if l.Class != "" {
			linkClasses[l.Class] = true
		} else {
			classesKnown = false
		}
	}
	classList := sortedKeys(linkClasses)

	// Class ceilings and class vendor restrictions must name classes that
	// links use.
	unknownClasses := func(at map[string]catalog.Position, key string) {
		for _, k := range sortedKeys(at) {
			if !linkClasses[k] && classesKnown {
				hint := ""
				if s := catalog.Suggest(k, classList); s != "" {
					hint = fmt.Sprintf(" (did you mean %q?)", s)
				}
				d.src.ErrorAt(at[k], key, fmt.Errorf("%w: no link has class %q%s", catalog.ErrReference, k, hint))
			}
		}
	}
	unknownClasses(d.classAt, "case.class_ceiling")
	unknownClasses(d.classVendorAt, "case.class_vendor")
	for i := range c.Links {
		l := &c.Links[i]
		l.Ceiling = c.Ceiling
		if v, ok := c.ClassCeiling[l.Class]; ok {
			l.Ceiling = v
		}
	}

	start := time.Date(c.FirstYear, time.January, 1, 0, 0, 0, 0, time.UTC)
	vendorAt := map[string]int{}
	for ci, cat := range cats {
		first := len(c.Vendors)
		for _, v := range cat.Vendors {
			if _, dup := vendorAt[v.ID]; dup {
				at(cat.File, v.Pos, "vendors.id", fmt.Errorf("%w: vendor %q is also defined in another catalog", catalog.ErrDuplicate, v.ID))
				continue
			}
			rate := 1.0
			if v.Currency != c.Currency {
				r, ok := c.ExchangeRates[v.Currency]
				if !ok && c.Currency != "" { // no case currency is already an error
					at(cat.File, v.CurrencyAt, "vendors.currency", fmt.Errorf("%w: the quote is in %s but the case (in %s) gives no exchange rate for it; add %s = ... to [case.exchange_rates]",
						catalog.ErrCurrency, v.Currency, c.Currency, v.Currency))
				}
				rate = r
			}
			if !v.ValidUntil.IsZero() && v.ValidUntil.Before(start) {
				msg := fmt.Sprintf("quote %q of vendor %q expired on %s, before the first year %d", v.Quote, v.ID, v.ValidUntil.Format(time.DateOnly), c.FirstYear)
				if c.PricesRollForward {
					d.src.Warns = append(d.src.Warns, Warning{File: cat.File, Line: v.ValidAt.Line, Col: v.ValidAt.Col, Key: "vendors.valid_until",
						Msg: msg + "; its prices are rolled forward (prices_roll_forward = true)"})
				} else {
					at(cat.File, v.ValidAt, "vendors.valid_until", fmt.Errorf("%w: %s; renew the quote or set prices_roll_forward = true in [case]", catalog.ErrExpired, msg))
				}
			}
			last := start.AddDate(c.Horizon-1, 0, 0) // 1 January of the last year
			if !v.ValidUntil.IsZero() && !v.ValidUntil.Before(start) && v.ValidUntil.Before(last) {
				msg := fmt.Sprintf("quote %q of vendor %q is valid until %s", v.Quote, v.ID, v.ValidUntil.Format(time.DateOnly))
				from := v.ValidUntil.Year() + 1
				if c.PricesRollForward {
					msg += fmt.Sprintf(": orders from %d on use its prices rolled forward (prices_roll_forward = true)", from)
				} else {
					msg += fmt.Sprintf(": its items cannot be ordered from %d on; renew the quote or set prices_roll_forward = true in [case]", from)
				}
				d.src.Warns = append(d.src.Warns, Warning{File: cat.File, Line: v.ValidAt.Line, Col: v.ValidAt.Col, Key: "vendors.valid_until", Msg: msg})
			}
			vendorAt[v.ID] = len(c.Vendors)
			c.Vendors = append(c.Vendors, Vendor{ID: v.ID, Name: v.Name, Quote: v.Quote, ValidUntil: v.ValidUntil,
				Currency: v.Currency, Rate: rate, Catalog: ci})
		}
		for _, r := range cat.Tiers {
			vi, ok := vendorAt[r.Vendor]
			if !ok || vi < first {
				continue
			}
			v := &c.Vendors[vi]
			t := Tier{Threshold: r.Threshold, Discount: r.Discount, Basis: TierByUnits}
			if r.Basis == catalog.BasisSpend {
				t.Basis = TierBySpend
				t.Threshold *= v.Rate
			}
			v.Tiers = append(v.Tiers, t)
		}
		for _, ci := range cat.Items {
			vi, ok := vendorAt[ci.Vendor]
			if !ok || vi < first {
				continue
			}
			it := d.item(c, ci, vi)
			fits := false
			for _, cl := range it.Classes {
				fits = fits || linkClasses[cl]
			}
			if !fits && classesKnown {
				at(cat.File, ci.Pos, "items.classes", fmt.Errorf("%w: item %q fits no link: no link has class %s (link classes: %s)",
					catalog.ErrUnused, ci.ID, quoteList(it.Classes), strings.Join(classList, ", ")))
			}
			c.Items = append(c.Items, it)
			d.itemAt = append(d.itemAt, filePos{cat.File, ci.Pos})
		}
	}
	for i := range c.Vendors {
		tiers := c.Vendors[i].Tiers
		sort.SliceStable(tiers, func(a, b int) bool {
			if tiers[a].Basis != tiers[b].Basis {
				return tiers[a].Basis < tiers[b].Basis
			}
			return tiers[a].Threshold < tiers[b].Threshold
		})
	}
	d.checkVendorRestriction(c, vendorAt)
	for li := range c.Links {
		l := &c.Links[li]
		only := c.VendorFor(l.Class)
		l.Items = nil
		for ii := range c.Items {
			it := &c.Items[ii]
			if it.Fits(l.Class) && (only == "" || c.Vendors[it.Vendor].ID == only) {
				l.Items = append(l.Items, ii)
			}
		}
	}
	return errs
}

// checkVendorRestriction records an error for each vendor id in [case]
// vendor or [case.class_vendor] that no catalog defines. It says nothing
// when a catalog could not be read or decoded: the vendor may be in it.
func (d *decoder) checkVendorRestriction(c *Case, vendorAt map[string]int) {
	if !d.allCatalogs {
		return
	}
	known := sortedKeys(vendorAt)
	check := func(p catalog.Position, key, id string) {
		if _, ok := vendorAt[id]; ok {
			return
		}
		hint := ""
		if s := catalog.Suggest(id, known); s != "" {
			hint = fmt.Sprintf(" (did you mean %q?)", s)
		}
		d.src.ErrorAt(p, key, fmt.Errorf("%w: vendor %q is in no catalog of the case%s", catalog.ErrReference, id, hint))
	}
	if c.VendorOnly != "" {
		check(d.vendorAt, "case.vendor", c.VendorOnly)
	}
	for _, k := range sortedKeys(d.classVendorAt) {
		check(d.classVendorAt[k], "case.class_vendor", c.ClassVendor[k])
	}
}

// item converts one catalog item into the case and derives its per-year
// prices, the years it may be ordered in and its in-service years.
func (d *decoder) item(c *Case, ci catalog.Item, vendor int) Item {
	rate := c.Vendors[vendor].Rate
	it := Item{
		ID: ci.ID, Vendor: vendor, Classes: ci.Classes, Gbps: ci.Gbps,
		CapexPerUnit: ci.Capex * rate, CapexPerKM: ci.CapexPerKM * rate, Opex: ci.Opex * rate,
		LeadMonths: ci.LeadMonths, BookLife: ci.BookLife, SlotsPerUnit: ci.SlotsPerUnit,
		MaxUnits: ci.MaxUnits, Erosion: ci.Erosion,
	}
	if ci.Kind == catalog.KindLease {
		it.Kind = Lease
	}
	T := c.Horizon
	it.PriceFactor = make([]float64, T)
	it.UnitCapex = make([]float64, T)
	it.KMCapex = make([]float64, T)
	it.OrderOpex = make([]float64, T)
	it.InService = make([]int, T)
	it.Orderable = make([]bool, T)
	validUntil := c.Vendors[vendor].ValidUntil
	for i := range T {
		f := math.Pow(1-ci.Erosion, float64(i))
		it.PriceFactor[i] = f
		it.UnitCapex[i] = it.CapexPerUnit * f
		it.KMCapex[i] = it.CapexPerKM * f
		it.OrderOpex[i] = it.Opex
		if it.Kind == Lease {
			it.OrderOpex[i] = it.Opex * f
		}
		// Orders are placed on 1 January of their year (DESIGN.md §2).
		yearStart := time.Date(c.Year(i), time.January, 1, 0, 0, 0, 0, time.UTC)
		it.Orderable[i] = validUntil.IsZero() || c.PricesRollForward || !validUntil.Before(yearStart)
		it.InService[i] = c.InService(i, it.LeadMonths)
		if !it.Orderable[i] {
			it.InService[i] = T // the model creates no order column
		}
	}
	return it
}

func sortedKeys[V any](m map[string]V) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

func quoteList(s []string) string {
	q := make([]string, len(s))
	for i, x := range s {
		q[i] = fmt.Sprintf("%q", x)
	}
	return strings.Join(q, ", ")
}

// checkNetwork reports demands whose two sites are not connected by any
// link, not even through candidate links.
func (d *decoder) checkNetwork(c *Case) {
	parent := make([]int, len(c.Sites))
	for i := range parent {
		parent[i] = i
	}
	var find func(int) int
	find = func(i int) int {
		for parent[i] != i {
			parent[i] = parent[parent[i]]
			i = parent[i]
		}
		return i
	}
	for _, l := range c.Links {
		if l.A < 0 || l.B < 0 {
			return // a bad site reference: connectivity would be misleading
		}
		parent[find(l.A)] = find(l.B)
	}
	for i, dm := range c.Demands {
		if dm.A < 0 || dm.B < 0 || dm.A == dm.B {
			continue
		}
		if find(dm.A) != find(dm.B) {
			d.src.ErrorAt(d.demandAt[i], "demands", fmt.Errorf("%w: between %s and %s, not even through candidate links",
				catalog.ErrNoPath, c.Sites[dm.A].ID, c.Sites[dm.B].ID))
		}
	}
}

// warnings records the suspicious values of a checked case: links that no
// allowed catalog item fits, a mix of paying and non-paying demands, and
// links already above their utilisation ceiling in the first year.
func (d *decoder) warnings(c *Case) {
	d.vendorChoiceWarnings(c)
	onLink := make([]bool, len(c.Items)) // item allowed on at least one link
	for i, l := range c.Links {
		for _, ii := range l.Items {
			onLink[ii] = true
		}
		if len(l.Items) == 0 {
			msg := fmt.Sprintf("no catalog item fits link %q (class %q): it cannot be upgraded", l.ID, l.Class)
			if only := c.VendorFor(l.Class); only != "" {
				msg = fmt.Sprintf("no item of vendor %q fits link %q (class %q), the only vendor the case allows there: it cannot be upgraded", only, l.ID, l.Class)
			}
			d.src.WarnAt(d.linkAt[i], "links.class", msg)
		}
		if l.Candidate != nil && len(l.Items) == 0 {
			d.src.WarnAt(d.linkAt[i], "links.candidate", fmt.Sprintf("candidate link %q could never carry traffic: no item fits it", l.ID))
		}
	}
	for i, l := range c.Links {
		if l.Candidate != nil && l.Candidate.InService[0] >= c.Horizon {
			d.src.WarnAt(d.linkAt[i], "links.lead_months", fmt.Sprintf("candidate link %q takes %d months: even built in %d it would not serve within the horizon",
				l.ID, l.Candidate.LeadMonths, c.FirstYear))
		} else if most, ok := c.buildBudget(l.Candidate); ok && l.Candidate.BuildCost > most {
			d.src.WarnAt(d.linkAt[i], "links.build_cost", fmt.Sprintf("candidate link %q costs %s %s to build, more than the capex budget of any year it could be ordered in (at most %s): no plan within the budget can build it",
				l.ID, c.Currency, numfmt.Money(l.Candidate.BuildCost), numfmt.Money(most)))
		}
	}
	for ii, it := range c.Items {
		v := c.Vendors[it.Vendor]
		at := d.itemAt[ii]
		warn := func(key, msg string) {
			d.src.Warns = append(d.src.Warns, Warning{File: at.file, Line: at.pos.Line, Col: at.pos.Col, Key: key, Msg: msg})
		}
		if !onLink[ii] {
			continue // left out by the vendor restriction: nothing to say
		}
		if c.InService(0, it.LeadMonths) >= c.Horizon {
			warn("items.lead_months", fmt.Sprintf("item %q of vendor %q takes %d months: even ordered in %d it would not serve within the horizon",
				it.ID, v.ID, it.LeadMonths, c.FirstYear))
		}
		room := false
		for _, l := range c.Links {
			for _, li := range l.Items {
				room = room || li == ii && (l.Slots == UnlimitedSlots || l.Slots >= it.SlotsPerUnit)
			}
		}
		if !room {
			warn("items.slots", fmt.Sprintf("item %q of vendor %q needs %d slots per unit, more than any link it fits has free",
				it.ID, v.ID, it.SlotsPerUnit))
		}
		if tau, price, over := c.unitOverBudget(ii); over {
			warn("items.capex", fmt.Sprintf("one unit of item %q of vendor %q costs more than the capex budget of any year it could be ordered in, even on its shortest link and after the vendor's largest volume discount (closest: %s %s in %d against a budget of %s): no plan within the budget buys it",
				it.ID, v.ID, c.Currency, numfmt.Money(price), c.Year(tau), numfmt.Money(c.Budget.limit(tau))))
		}
	}
	var free []int
	paying := 0
	for i, dm := range c.Demands {
		pays := false
		for _, p := range dm.Tariff {
			pays = pays || p != 0
		}
		if pays {
			paying++
		} else {
			free = append(free, i)
		}
	}
	if paying > 0 && len(free) > 0 {
		ids := make([]string, 0, len(free))
		for _, i := range free {
			ids = append(ids, c.Demands[i].ID)
		}
		d.src.WarnAt(d.demandAt[free[0]], "demands.tariff", fmt.Sprintf("%d of %d demands pay no tariff while the others do (%s): they earn nothing, so only their committed traffic is sure to be carried",
			len(free), len(c.Demands), strings.Join(ids, ", ")))
	}
	util := c.FirstYearUtilisation()
	for i, l := range c.Links {
		if u := util[i]; u > l.Ceiling {
			d.src.WarnAt(d.linkAt[i], "links", fmt.Sprintf("link %q is already at %.0f %% utilisation in %d on shortest-path routing, above its ceiling of %.0f %%",
				l.ID, 100*u, c.FirstYear, 100*l.Ceiling))
		}
	}
}

// buildBudget returns the largest capex the budget allows in any year in
// which the candidate link cand could be ordered and still serve within
// the horizon (Budget.limit), and false when some such year is uncapped or
// there is none. A build is paid in full in its order year, so one that
// costs more than this can never be part of a plan within the budget.
func (c *Case) buildBudget(cand *Candidate) (float64, bool) {
	if cand == nil {
		return 0, false
	}
	most, found := 0.0, false
	for tau, s := range cand.InService {
		if s < c.Horizon {
			most, found = math.Max(most, c.Budget.limit(tau)), true
		}
	}
	return most, found && !math.IsInf(most, 1)
}

// unitOverBudget reports whether one unit of module item ii costs more
// than the capex budget in every year it could be ordered in and still
// serve within the horizon, on every link it fits, even after its
// vendor's largest volume discount (volume discounts apply to all units,
// so no unit is cheaper than that); such an item is never bought within
// the budget. It also returns the year index and the unit price, on the
// cheapest such link, where the price comes closest to the budget.
func (c *Case) unitOverBudget(ii int) (closest int, price float64, over bool) {
	it := &c.Items[ii]
	if it.Kind != Module {
		return 0, 0, false
	}
	maxDiscount := 0.0
	for _, tr := range c.Vendors[it.Vendor].Tiers {
		maxDiscount = math.Max(maxDiscount, tr.Discount)
	}
	minKM := math.Inf(1)
	for _, l := range c.Links {
		if slices.Contains(l.Items, ii) {
			minKM = math.Min(minKM, l.KM)
		}
	}
	if math.IsInf(minKM, 1) {
		return 0, 0, false // fits no link (loading refuses such an item)
	}
	closest, margin := -1, math.Inf(1)
	for tau, s := range it.InService {
		if s >= c.Horizon {
			continue
		}
		p := (1 - maxDiscount) * it.Capex(tau, minKM)
		limit := c.Budget.limit(tau)
		if p <= limit {
			return 0, 0, false
		}
		if p-limit < margin {
			closest, price, margin = tau, p, p-limit
		}
	}
	return closest, price, closest >= 0
}

// FirstYearUtilisation estimates each link's busy-hour utilisation in the
// first year before any purchase: every demand's forecast is routed, in
// each direction, on the shortest path by km over links with base capacity
// (ties to the lower link index); the result is the busier direction's load
// over the base capacity (+Inf for a loaded link with none, 0 when unused).
// This is a rough screen, not the plan's routing. Cost: O(D·(L + S)·log S)
// for D demands, L links, S sites.
func (c *Case) FirstYearUtilisation() []float64 {
	load := make([][2]float64, len(c.Links)) // [0]: A→B, [1]: B→A
	for _, dm := range c.Demands {
		if dm.Forecast[0] == 0 {
			continue
		}
		for _, dir := range [2][2]int{{dm.A, dm.B}, {dm.B, dm.A}} {
			for _, step := range c.shortestPath(dir[0], dir[1]) {
				load[step.link][step.dir] += dm.Forecast[0]
			}
		}
	}
	util := make([]float64, len(c.Links))
	for i, l := range c.Links {
		peak := max(load[i][0], load[i][1])
		switch {
		case peak == 0:
		case l.BaseCapacity[0] == 0:
			util[i] = math.Inf(1)
		default:
			util[i] = peak / l.BaseCapacity[0]
		}
	}
	return util
}

type pathStep struct{ link, dir int }

// shortestPath returns the links of a shortest path by km from site s to
// site t over links with first-year base capacity, or nil.
func (c *Case) shortestPath(s, t int) []pathStep {
	n := len(c.Sites)
	dist := make([]float64, n)
	prev := make([]pathStep, n)
	for i := range dist {
		dist[i] = math.Inf(1)
		prev[i] = pathStep{-1, 0}
	}
	dist[s] = 0
	q := &siteQueue{{s, 0}}
	for q.Len() > 0 {
		top := heap.Pop(q).(siteDist)
		if top.d > dist[top.site] {
			continue
		}
		for li, l := range c.Links {
			if l.BaseCapacity[0] <= 0 {
				continue
			}
			var next, dir int
			switch top.site {
			case l.A:
				next, dir = l.B, 0
			case l.B:
				next, dir = l.A, 1
			default:
				continue
			}
			if nd := top.d + l.KM; nd < dist[next] {
				dist[next] = nd
				prev[next] = pathStep{li, dir}
				heap.Push(q, siteDist{next, nd})
			}
		}
	}
	if math.IsInf(dist[t], 1) {
		return nil
	}
	var path []pathStep
	for v := t; v != s; {
		st := prev[v]
		path = append(path, st)
		if st.dir == 0 {
			v = c.Links[st.link].A
		} else {
			v = c.Links[st.link].B
		}
	}
	return path
}

type siteDist struct {
	site int
	d    float64
}

type siteQueue []siteDist

func (q siteQueue) Len() int { return len(q) }
func (q siteQueue) Less(i, j int) bool {
	if q[i].d != q[j].d {
		return q[i].d < q[j].d
	}
	return q[i].site < q[j].site
}
func (q siteQueue) Swap(i, j int) { q[i], q[j] = q[j], q[i] }
func (q *siteQueue) Push(x any)   { *q = append(*q, x.(siteDist)) }
func (q *siteQueue) Pop() any {
	old := *q
	x := old[len(old)-1]
	*q = old[:len(old)-1]
	return x
}

// vendorChoiceWarnings warns when [case] one_vendor leaves nothing to
// choose: a vendor is named for the whole network, or no group of links
// has items of two vendors.
func (d *decoder) vendorChoiceWarnings(c *Case) {
	if c.OneVendor == "" {
		return
	}
	if c.VendorOnly != "" {
		d.src.WarnAt(d.oneVendorAt, "case.one_vendor", fmt.Sprintf("one_vendor has no effect: vendor = %q already names the only vendor", c.VendorOnly))
		return
	}
	vendors := map[string]map[int]bool{}
	for _, l := range c.Links {
		g, ok := c.VendorChoiceGroup(l.Class)
		if !ok {
			continue
		}
		if vendors[g] == nil {
			vendors[g] = map[int]bool{}
		}
		for _, ii := range l.Items {
			vendors[g][c.Items[ii].Vendor] = true
		}
	}
	for _, vs := range vendors {
		if len(vs) > 1 {
			return
		}
	}
	d.src.WarnAt(d.oneVendorAt, "case.one_vendor", "one_vendor has no effect: no link class it applies to has items of more than one vendor")
}
