package plans

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"

	"netstage/lp"
)

// moneyScale is the unit, in case currency, of the money rows (budgets and
// vendor spend): they are written in thousands so that their coefficients
// sit near the Gbps-sized ones. The objective stays in case currency so that
// the exported model's optimum is −NPV itself (DESIGN.md §4 mps_objective).
const moneyScale = 1000

// Model is the planning MIP of one case (DESIGN.md §2) with the maps from
// case entities to its columns and rows. LP is the exact model that Solve
// solves and Export writes: a minimisation of −NPV (case currency).
//
// Columns, with S the sites that are an end of some demand, A = 2·|links|
// arcs, T years, K the demands, O the (link, item) pairs where the item fits
// the link, B the candidate links, and for each vendor with tiers and each
// order year its G groups (book life, in-service year) and its tiers plus
// the no-discount choice:
//
//	flow    f[s,a,t] ≥ 0            |S|·(A − arcs into s)·T   continuous, Gbps
//	served  x[k,t]                 K·T                       continuous, committed ≤ x ≤ forecast
//	units   y[o,τ] ∈ {0..max}      Σ_o (order years of o)     integer, cumulative units ordered by τ
//	build   b[l,τ] ∈ {0,1}         Σ_B (order years)          integer, built (ordered) by τ
//	tier    z[v,τ,k] ∈ {0,1}       per vendor-year: tiers+1   integer, the tier that applies
//	spend   S[v,τ,g,k] ≥ 0         per vendor-year: G·(tiers+1) continuous, list spend in thousands
//	count   N[v,τ,k] ≥ 0           per vendor-year: tiers+1   continuous, units (unit-based tiers only)
//	vendor  w[g,v] ∈ {0,1}         per one-vendor group: its vendors  integer, g's chosen vendor ([case] one_vendor)
//	steps   k[l,t] ∈ ℤ             ≤ |links|·T                integer, capacity in service in steps (addSteps)
//
// Rows:
//
//	conservation  one per source s, site v ≠ s, year t       |S|·(|sites|−1)·T
//	capacity      one per arc and year                        A·T
//	monotone      y[o,τ] − y[o,τ−1] ≥ 0, b likewise          one per order year after the first
//	slots         Σ_i slots_i·y[o,last] ≤ slots(l)            one per link with a slot limit
//	gating        y[o,τ] ≤ max·b[l,τ′] on candidate links     one per order year of their items
//	tiers         Σ_k z = 1; list spend and unit count split  per vendor-year: 1 + G + 1 + 2·(tiers+1)
//	              by tier; threshold·z_k ≤ part_k ≤ max·z_k (z_k fixed
//	              at 0 where the discounted threshold exceeds the budget)
//	budget        capex of year τ ≤ cap; Σ_τ capex ≤ cumulative cap  one per capped year (+1)
//	one vendor    Σ_v w[g,v] ≤ 1; y[o,last] ≤ max·w[g,vendor(o)]     per one-vendor group: 1 + its options
//	cut-set       MIR roundings of site, linked-pair and ball cuts ≤ 6·(3·|sites| + |links|)·T
//	              (see addCutSets)
//	steps         k[l,t] − Σ_o (Gbps_o/g_l)·y[o, in service by t] = 0   one per step column
//
// So a case with n sites, m links, K demands and T years has about
// 2·n·m·T flow columns and n²·T conservation rows: polynomial, never one
// column per path.
type Model struct {
	Case *Case
	LP   *lp.Model

	opts BuildOptions
	// costMode caches Case.CostMode (no demand pays a tariff), which scans
	// every tariff and is read in loops.
	costMode bool

	// sources lists the site indices that are an end of a demand;
	// flow[si][a][t] is the flow column (−1 when absent) of source
	// sources[si] on arc a (link a/2, from A to B when a is even) in year t.
	sources []int
	flow    [][][]int
	// served[k][t] is the served column of demand k in year t.
	served [][]int
	// capRow[a][t] is the capacity row of arc a in year t.
	capRow [][]int
	// consRow[si][v][t] is the conservation row (−1 for v = source).
	consRow [][][]int

	options []option
	builds  []build
	tiers   []vendorYear

	// budgetRow[τ] is the budget row of order year τ (−1 when uncapped);
	// cumRow the cumulative cap's row (−1 when none).
	budgetRow []int
	cumRow    int

	// shortfall[k][t] is the baseline's shortfall column (baseline models
	// only, −1 otherwise); elastic holds the elastic model's slack columns.
	shortfall [][]int
	elastic   []elasticSlack

	// steps lists the capacity step columns (model_steps.go).
	steps []step
	// cutRows lists the cut-set rows.
	cutRows []int
	// vendorChoices holds the one-vendor choices ([case] one_vendor).
	vendorChoices []vendorChoice
}

// option is one catalog item on one link: cumulative unit columns per order
// year (col[τ] = −1 when an order in year τ is not offered).
type option struct {
	link, item int
	col        []int
	// inService[τ] is the year an order of year τ serves from.
	inService []int
	// lastOrder is the last order year with a column (−1: none).
	lastOrder int
}

// unitsInService returns the column whose value is the number of units of o
// in service in year t (the cumulative units of the last order year whose
// in-service year is ≤ t), or −1.
func (o *option) unitsInService(t int) int {
	best := -1
	for tau, j := range o.col {
		if j >= 0 && o.inService[tau] <= t {
			best = j
		}
	}
	return best
}

// build is the build decision of a candidate link.
type build struct {
	link      int
	col       []int // cumulative "ordered by τ" columns, −1 when not offered
	inService []int
}

// builtBy returns the column meaning "in service by year t", or −1.
func (b *build) builtBy(t int) int {
	best := -1
	for tau, j := range b.col {
		if j >= 0 && b.inService[tau] <= t {
			best = j
		}
	}
	return best
}

// vendorYear holds the tier formulation of one vendor in one order year.
type vendorYear struct {
	vendor, year int
	// choice[k] is z for k = 0 (no discount) and tier k (Vendor.Tiers[k−1]).
	choice []int
	// discount[k] is the discount of choice k (0 for k = 0).
	discount []float64
	groups   []spendGroup
	// spend[g][k] is the list spend (thousands) of group g in choice k.
	spend [][]int
	// count[k] is the unit count in choice k (−1 without unit tiers).
	count []int
}

// spendGroup gathers a vendor-year's purchases with one book life and one
// in-service year: they share a present-value coefficient per unit of capex.
type spendGroup struct {
	life, inService int
}

type elasticSlack struct {
	col  int
	kind string
	name string
	year int
	// perUnit converts the slack column's value into the reported Amount.
	perUnit float64
}

// BuildOptions select variants of the model. The zero value is the model
// Solve solves.
type BuildOptions struct {
	// NoCutSets leaves out the cut-set inequalities (valid inequalities:
	// the optimum is the same, the search usually longer).
	NoCutSets bool
	// NoSteps leaves out the capacity step columns (model_steps.go: an
	// exact reformulation, so the optimum is the same; the search usually
	// longer).
	NoSteps bool

	// baseline builds the do-nothing LP: no purchases, committed traffic
	// that cannot be carried becomes shortfall charged the SLA penalty.
	baseline bool
	// elastic adds slacks to budget and slot rows (and, with
	// elasticDemand, to committed demand) and minimises their weighted sum
	// (infeasibility explanation).
	elastic, elasticDemand bool
	// freeBudgets leaves the budget rows without bounds (valuing a fixed
	// plan whatever it spends, Evaluate).
	freeBudgets bool
}

// Elastic slack weights (per Gbps of committed demand, per thousand of
// budget, per slot). In the first elastic stage committed demand is hard
// and budgets and slots give; in the second, demand gives and budgets and
// slots are nearly free, so what is left short is what no money can buy.
const (
	elasticDemandWeight = 1.0
	elasticLimitWeight  = 1.0
	elasticFreeWeight   = 1e-6
)

// BuildModel builds the planning MIP of c (see Model for its rows and
// columns). Cost O(|sources|·|arcs|·T + items·links·T + nonzeros).
func BuildModel(c *Case, opts BuildOptions) (*Model, error) {
	if c == nil {
		return nil, errors.New("plans: nil case")
	}
	if c.Horizon < 1 {
		return nil, fmt.Errorf("plans: horizon %d is not positive", c.Horizon)
	}
	m := &Model{Case: c, LP: lp.NewModel(c.Name), opts: opts, cumRow: -1, costMode: c.CostMode()}
	m.LP.ObjName = "npv"
	T := c.Horizon
	tax := c.Finance.TaxRate
	costMode := m.costMode

	// Served traffic: revenue (1−τ)·DF_t·12·tariff per Gbps.
	m.served = make([][]int, len(c.Demands))
	for k, d := range c.Demands {
		m.served[k] = make([]int, T)
		for t := 0; t < T; t++ {
			lo, hi := d.Committed[t], d.Forecast[t]
			if costMode {
				lo = hi
			}
			if opts.baseline {
				lo = 0
			}
			rev := (1 - tax) * c.DiscountFactor(t) * 12 * d.Tariff[t]
			m.served[k][t] = m.LP.AddCol(fmt.Sprintf("x_%s_%d", d.ID, c.Year(t)), -rev, lo, hi)
		}
	}

	// Flows: one commodity per source site. Arc 2l goes A→B, 2l+1 B→A.
	isSource := make([]bool, len(c.Sites))
	for _, d := range c.Demands {
		isSource[d.A], isSource[d.B] = true, true
	}
	for s, ok := range isSource {
		if ok {
			m.sources = append(m.sources, s)
		}
	}
	nArcs := 2 * len(c.Links)
	m.flow = make([][][]int, len(m.sources))
	for si, s := range m.sources {
		m.flow[si] = make([][]int, nArcs)
		for a := 0; a < nArcs; a++ {
			m.flow[si][a] = make([]int, T)
			_, to := m.arcEnds(a)
			for t := 0; t < T; t++ {
				if to == s { // a commodity never needs to re-enter its source
					m.flow[si][a][t] = -1
					continue
				}
				m.flow[si][a][t] = m.LP.AddCol(fmt.Sprintf("f_%s_%s_%d", c.Sites[s].ID, m.arcName(a), c.Year(t)), 0, 0, lp.Inf)
			}
		}
	}
	// Conservation: inflow − outflow at v of commodity s = Σ served of the
	// demands between s and v.
	m.consRow = make([][][]int, len(m.sources))
	for si, s := range m.sources {
		m.consRow[si] = make([][]int, len(c.Sites))
		for v := range c.Sites {
			m.consRow[si][v] = make([]int, T)
			for t := 0; t < T; t++ {
				m.consRow[si][v][t] = -1
				if v == s {
					continue
				}
				var cols []int
				var vals []float64
				for a := 0; a < nArcs; a++ {
					j := m.flow[si][a][t]
					if j < 0 {
						continue
					}
					from, to := m.arcEnds(a)
					if to == v {
						cols, vals = append(cols, j), append(vals, 1)
					} else if from == v {
						cols, vals = append(cols, j), append(vals, -1)
					}
				}
				for k, d := range c.Demands {
					if (d.A == s && d.B == v) || (d.B == s && d.A == v) {
						cols, vals = append(cols, m.served[k][t]), append(vals, -1)
					}
				}
				m.consRow[si][v][t] = m.LP.AddRow(fmt.Sprintf("c_%s_%s_%d", c.Sites[s].ID, c.Sites[v].ID, c.Year(t)), 0, 0, cols, vals)
			}
		}
	}

	// Capacity rows (purchase terms are added below).
	m.capRow = make([][]int, nArcs)
	for a := 0; a < nArcs; a++ {
		l := &c.Links[a/2]
		m.capRow[a] = make([]int, T)
		for t := 0; t < T; t++ {
			var cols []int
			var vals []float64
			for si := range m.sources {
				if j := m.flow[si][a][t]; j >= 0 {
					cols, vals = append(cols, j), append(vals, 1)
				}
			}
			m.capRow[a][t] = m.LP.AddRow(fmt.Sprintf("cap_%s_%d", m.arcName(a), c.Year(t)), -lp.Inf, l.Ceiling*l.BaseCapacity[t], cols, vals)
		}
	}

	m.budgetRow = make([]int, T)
	for t := 0; t < T; t++ {
		m.budgetRow[t] = -1
	}
	if !opts.baseline {
		m.addPurchases()
	}
	if opts.baseline {
		m.addShortfall()
	}
	if opts.elastic {
		m.addElastic()
	}
	if !opts.NoCutSets && !opts.baseline && !opts.elastic {
		m.addCutSets()
	}
	if !opts.NoSteps && !opts.baseline {
		m.addSteps()
	}
	uniqueNames(m.LP.ColName)
	uniqueNames(m.LP.RowName)
	return m, nil
}

// uniqueNames makes names distinct (ids joined by "_" could collide) by
// suffixing a repeated name with its index, as MPS readers need.
func uniqueNames(names []string) {
	seen := make(map[string]bool, len(names))
	for i, n := range names {
		if seen[n] {
			n = fmt.Sprintf("%s#%d", n, i)
			names[i] = n
		}
		seen[n] = true
	}
}

// arcEnds returns the sites an arc leaves and enters.
func (m *Model) arcEnds(a int) (from, to int) {
	l := &m.Case.Links[a/2]
	if a%2 == 0 {
		return l.A, l.B
	}
	return l.B, l.A
}

func (m *Model) arcName(a int) string {
	from, to := m.arcEnds(a)
	return fmt.Sprintf("%s_%s_%s", m.Case.Links[a/2].ID, m.Case.Sites[from].ID, m.Case.Sites[to].ID)
}

// capexPV returns the change of NPV per unit of capex paid in order year
// tau for an asset in service from year s with a book life of life years:
// −DF_τ + τ_tax·Σ DF_t/life over its depreciation years inside the horizon
// + DF_T·(straight-line book value left at the horizon).
func (m *Model) capexPV(tau, s, life int) float64 {
	c := m.Case
	if life < 1 {
		life = 1 // a zero book life is written off in the in-service year
	}
	v := -c.DiscountFactor(tau)
	end := min(s+life, c.Horizon)
	for t := s; t < end; t++ {
		v += c.Finance.TaxRate * c.DiscountFactor(t) / float64(life)
	}
	if c.Finance.Salvage == SalvageStraightLine {
		used := c.Horizon - s
		if used < life {
			v += c.SalvageDiscountFactor() * (1 - float64(used)/float64(life))
		}
	}
	return v
}

// opexPV returns the change of NPV per unit of yearly opex paid from year s
// to the horizon: −(1−τ)·Σ_{t≥s} DF_t.
func (m *Model) opexPV(s int) float64 {
	c := m.Case
	v := 0.0
	for t := s; t < c.Horizon; t++ {
		v -= (1 - c.Finance.TaxRate) * c.DiscountFactor(t)
	}
	return v
}

// addPurchases adds unit, build and tier columns and the rows that use them.
func (m *Model) addPurchases() {
	c := m.Case
	T := c.Horizon
	// capexTerms[τ] collects the budget row entries (thousands).
	capexCols := make([][]int, T)
	capexVals := make([][]float64, T)
	addCapex := func(tau, j int, v float64) {
		capexCols[tau] = append(capexCols[tau], j)
		capexVals[tau] = append(capexVals[tau], v/moneyScale)
	}

	// Builds of candidate links.
	buildOf := make([]int, len(c.Links))
	for l := range c.Links {
		buildOf[l] = -1
		cand := c.Links[l].Candidate
		if cand == nil {
			continue
		}
		b := build{link: l, col: make([]int, T), inService: make([]int, T)}
		coef := make([]float64, T) // NPV per "ordered in τ"
		prev := -1
		for tau := 0; tau < T; tau++ {
			s := c.InService(tau, cand.LeadMonths)
			if len(cand.InService) == T {
				s = cand.InService[tau]
			}
			b.inService[tau] = s
			b.col[tau] = -1
			if s >= T {
				continue
			}
			coef[tau] = cand.BuildCost*m.capexPV(tau, s, cand.BookLife) + cand.Opex*m.opexPV(s)
			j := m.LP.AddIntCol(fmt.Sprintf("b_%s_%d", c.Links[l].ID, c.Year(tau)), 0, 0, 1)
			b.col[tau] = j
			if prev >= 0 {
				m.LP.AddRow(fmt.Sprintf("mb_%s_%d", c.Links[l].ID, c.Year(tau)), 0, lp.Inf, []int{j, prev}, []float64{1, -1})
			}
			prev = j
		}
		// Objective and capex in cumulative form: ordered(τ) = b_τ − b_prev.
		m.telescope(b.col, coef, func(tau, j int, sign float64) {
			addCapex(tau, j, sign*cand.BuildCost)
		})
		buildOf[l] = len(m.builds)
		m.builds = append(m.builds, b)
	}

	// Unit options.
	type vyKey struct{ vendor, year int }
	type purchase struct {
		opt, tau int
		price    float64 // list capex per unit
	}
	vendorBuys := map[vyKey][]purchase{}
	for l := range c.Links {
		link := &c.Links[l]
		for _, i := range link.Items {
			it := &c.Items[i]
			o := option{link: l, item: i, col: make([]int, T), inService: make([]int, T), lastOrder: -1}
			maxUnits := it.MaxUnits
			if link.Slots != UnlimitedSlots && it.SlotsPerUnit > 0 && !m.opts.elastic {
				maxUnits = min(maxUnits, link.Slots/it.SlotsPerUnit)
			}
			coef := make([]float64, T)
			prev := -1
			for tau := 0; tau < T; tau++ {
				s := it.InService[tau]
				o.inService[tau] = s
				o.col[tau] = -1
				if s >= T || maxUnits <= 0 {
					continue
				}
				up := float64(maxUnits)
				if bi := buildOf[l]; bi >= 0 && m.builds[bi].builtBy(s) < 0 {
					continue // the link cannot be in service when these units are
				}
				j := m.LP.AddIntCol(fmt.Sprintf("y_%s_%s_%d", link.ID, it.ID, c.Year(tau)), 0, 0, up)
				o.col[tau] = j
				o.lastOrder = tau
				if prev >= 0 {
					m.LP.AddRow(fmt.Sprintf("my_%s_%s_%d", link.ID, it.ID, c.Year(tau)), 0, lp.Inf, []int{j, prev}, []float64{1, -1})
				}
				prev = j
				coef[tau] = it.OrderOpex[tau] * m.opexPV(s)
				if it.Kind == Module {
					price := it.Capex(tau, link.KM)
					if len(c.Vendors[it.Vendor].Tiers) == 0 {
						coef[tau] += price * m.capexPV(tau, s, it.BookLife)
					} else {
						key := vyKey{it.Vendor, tau}
						vendorBuys[key] = append(vendorBuys[key], purchase{opt: len(m.options), tau: tau, price: price})
					}
				}
				// Gating by the link's build.
				if bi := buildOf[l]; bi >= 0 {
					bj := m.builds[bi].builtBy(s)
					m.LP.AddRow(fmt.Sprintf("g_%s_%s_%d", link.ID, it.ID, c.Year(tau)), -lp.Inf, 0, []int{j, bj}, []float64{1, -up})
				}
			}
			if o.lastOrder < 0 {
				continue
			}
			vendorTiers := len(c.Vendors[it.Vendor].Tiers) > 0
			m.telescope(o.col, coef, func(tau, j int, sign float64) {
				if it.Kind == Module && !vendorTiers {
					addCapex(tau, j, sign*it.Capex(tau, link.KM))
				}
			})
			// Capacity: ceiling·Gbps per unit in service, both directions.
			for t := 0; t < T; t++ {
				if j := o.unitsInService(t); j >= 0 {
					for dir := 0; dir < 2; dir++ {
						m.LP.SetCoef(m.capRow[2*l+dir][t], j, -link.Ceiling*it.Gbps)
					}
				}
			}
			m.options = append(m.options, o)
		}
	}

	m.addVendorChoice()

	// Slots: the last cumulative count is the total bought.
	for l := range c.Links {
		link := &c.Links[l]
		if link.Slots == UnlimitedSlots {
			continue
		}
		var cols []int
		var vals []float64
		for oi := range m.options {
			o := &m.options[oi]
			it := &c.Items[o.item]
			if o.link == l && it.SlotsPerUnit > 0 {
				cols, vals = append(cols, o.col[o.lastOrder]), append(vals, float64(it.SlotsPerUnit))
			}
		}
		// A single item is already capped by its bound, except in the
		// elastic model, whose bounds ignore slots so that they can give.
		if len(cols) > 1 || (m.opts.elastic && len(cols) == 1) {
			m.LP.AddRow(fmt.Sprintf("slots_%s", link.ID), -lp.Inf, float64(link.Slots), cols, vals)
		}
	}

	// Volume tiers, per vendor and order year, disaggregated by tier.
	keys := make([]vyKey, 0, len(vendorBuys))
	for k := range vendorBuys {
		keys = append(keys, k)
	}
	sort.Slice(keys, func(a, b int) bool {
		if keys[a].vendor != keys[b].vendor {
			return keys[a].vendor < keys[b].vendor
		}
		return keys[a].year < keys[b].year
	})
	for _, key := range keys {
		buys := vendorBuys[key]
		v := &c.Vendors[key.vendor]
		tau := key.year
		vy := vendorYear{vendor: key.vendor, year: tau}
		vy.discount = []float64{0}
		hasUnits := false
		for _, tr := range v.Tiers {
			vy.discount = append(vy.discount, tr.Discount)
			if tr.Basis == TierByUnits {
				hasUnits = true
			}
		}
		nk := len(vy.discount)
		name := fmt.Sprintf("%s_%d", v.ID, c.Year(tau))
		var zc []int
		var ones []float64
		for k := 0; k < nk; k++ {
			j := m.LP.AddIntCol(fmt.Sprintf("z_%s_%d", name, k), 0, 0, 1)
			vy.choice = append(vy.choice, j)
			zc, ones = append(zc, j), append(ones, 1)
		}
		m.LP.AddRow("tier_"+name, 1, 1, zc, ones)
		// Groups by (book life, in-service year).
		groupOf := map[spendGroup]int{}
		maxSpend, maxUnits := 0.0, 0.0
		for _, p := range buys {
			o := &m.options[p.opt]
			it := &c.Items[o.item]
			g := spendGroup{life: it.BookLife, inService: o.inService[tau]}
			if _, ok := groupOf[g]; !ok {
				groupOf[g] = len(vy.groups)
				vy.groups = append(vy.groups, g)
			}
			up := m.LP.ColUpper[o.col[tau]]
			maxSpend += p.price * up / moneyScale
			maxUnits += up
		}
		vy.spend = make([][]int, len(vy.groups))
		for g, grp := range vy.groups {
			pv := m.capexPV(tau, grp.inService, grp.life)
			for k := 0; k < nk; k++ {
				// Objective: −NPV per thousand of list spend in choice k.
				j := m.LP.AddCol(fmt.Sprintf("s_%s_%d_%d", name, g, k), -(1-vy.discount[k])*pv*moneyScale, 0, lp.Inf)
				vy.spend[g] = append(vy.spend[g], j)
				capexCols[tau] = append(capexCols[tau], j)
				capexVals[tau] = append(capexVals[tau], 1-vy.discount[k])
			}
			// Σ_k spend[g][k] = list spend of the group (in thousands).
			cols := append([]int(nil), vy.spend[g]...)
			vals := make([]float64, len(cols))
			for k := range vals {
				vals[k] = 1
			}
			for _, p := range buys {
				o := &m.options[p.opt]
				it := &c.Items[o.item]
				if (spendGroup{it.BookLife, o.inService[tau]}) != grp {
					continue
				}
				cols, vals = appendOrdered(cols, vals, o, tau, -p.price/moneyScale)
			}
			m.LP.AddRow(fmt.Sprintf("spend_%s_%d", name, g), 0, 0, cols, vals)
		}
		if hasUnits {
			cols, vals := []int(nil), []float64(nil)
			for k := 0; k < nk; k++ {
				j := m.LP.AddCol(fmt.Sprintf("n_%s_%d", name, k), 0, 0, lp.Inf)
				vy.count = append(vy.count, j)
				cols, vals = append(cols, j), append(vals, 1)
			}
			for _, p := range buys {
				cols, vals = appendOrdered(cols, vals, &m.options[p.opt], tau, -1)
			}
			m.LP.AddRow("units_"+name, 0, 0, cols, vals)
		}
		// Per choice: threshold·z ≤ part ≤ max·z, where max is the list
		// spend of every unit the bounds allow, or what the budget can pay
		// at the choice's discount when that is less.
		spendCap := m.yearLimit(tau) / moneyScale
		for k := 0; k < nk; k++ {
			cols := []int{vy.choice[k]}
			vals := []float64{-math.Min(maxSpend, spendCap/(1-vy.discount[k]))}
			for g := range vy.groups {
				cols, vals = append(cols, vy.spend[g][k]), append(vals, 1)
			}
			m.LP.AddRow(fmt.Sprintf("smax_%s_%d", name, k), -lp.Inf, 0, cols, vals)
			if hasUnits {
				m.LP.AddRow(fmt.Sprintf("nmax_%s_%d", name, k), -lp.Inf, 0, []int{vy.count[k], vy.choice[k]}, []float64{1, -maxUnits})
			}
			if k == 0 {
				continue
			}
			tr := v.Tiers[k-1]
			if tr.Basis == TierBySpend {
				cols[0], vals[0] = vy.choice[k], -tr.Threshold/moneyScale
				m.LP.AddRow(fmt.Sprintf("smin_%s_%d", name, k), 0, lp.Inf, cols, vals)
			} else {
				m.LP.AddRow(fmt.Sprintf("nmin_%s_%d", name, k), 0, lp.Inf, []int{vy.count[k], vy.choice[k]}, []float64{1, -tr.Threshold})
			}
		}
		minPrice := math.Inf(1)
		for _, p := range buys {
			minPrice = math.Min(minPrice, p.price)
		}
		m.fixUnreachableTiers(&vy, tau, minPrice)
		m.tiers = append(m.tiers, vy)
	}

	// Budgets.
	for tau := 0; tau < T; tau++ {
		cap, ok := c.Budget.YearCap(tau)
		if !ok || len(capexCols[tau]) == 0 {
			continue
		}
		m.budgetRow[tau] = m.LP.AddRow(fmt.Sprintf("budget_%d", c.Year(tau)), -lp.Inf, m.budgetUpper(cap), capexCols[tau], capexVals[tau])
	}
	if cum := c.Budget.Cumulative; !math.IsInf(cum, 1) {
		var cols []int
		var vals []float64
		for tau := 0; tau < T; tau++ {
			cols = append(cols, capexCols[tau]...)
			vals = append(vals, capexVals[tau]...)
		}
		if len(cols) > 0 {
			m.cumRow = m.LP.AddRow("budget_total", -lp.Inf, m.budgetUpper(cum), cols, vals)
		}
	}
}

// appendOrdered appends coef·(units of o ordered in year tau) =
// coef·(y[tau] − y[previous order year]) to a row.
func appendOrdered(cols []int, vals []float64, o *option, tau int, coef float64) ([]int, []float64) {
	cols, vals = append(cols, o.col[tau]), append(vals, coef)
	for p := tau - 1; p >= 0; p-- {
		if o.col[p] >= 0 {
			cols, vals = append(cols, o.col[p]), append(vals, -coef)
			break
		}
	}
	return cols, vals
}

// telescope turns per-order-year NPV coefficients on "ordered in τ" =
// col[τ] − col[previous] into objective coefficients on the cumulative
// columns, and calls capex(τ, j, ±1) for each column entering the amount
// ordered in τ, with its sign.
func (m *Model) telescope(col []int, coef []float64, capex func(tau, j int, sign float64)) {
	prevTau := -1
	for tau, j := range col {
		if j < 0 {
			continue
		}
		m.LP.Obj[j] -= coef[tau]
		capex(tau, j, 1)
		if prevTau >= 0 {
			m.LP.Obj[col[prevTau]] += coef[tau]
			capex(tau, col[prevTau], -1)
		}
		prevTau = tau
	}
}

// addShortfall gives the baseline model a shortfall column per demand and
// year: served + shortfall ≥ committed, charged the SLA penalty per
// Gbps-month (not a tax deduction; DESIGN.md §2 lists the tax base).
func (m *Model) addShortfall() {
	c := m.Case
	costMode := m.costMode
	m.shortfall = make([][]int, len(c.Demands))
	for k, d := range c.Demands {
		m.shortfall[k] = make([]int, c.Horizon)
		for t := 0; t < c.Horizon; t++ {
			need := d.Committed[t]
			if costMode {
				need = d.Forecast[t]
			}
			m.shortfall[k][t] = -1
			if need <= 0 {
				continue
			}
			pen := c.DiscountFactor(t) * 12 * c.SLAPenalty
			j := m.LP.AddCol(fmt.Sprintf("short_%s_%d", d.ID, c.Year(t)), pen, 0, need)
			m.shortfall[k][t] = j
			m.LP.AddRow(fmt.Sprintf("commit_%s_%d", d.ID, c.Year(t)), need, lp.Inf, []int{m.served[k][t], j}, []float64{1, 1})
		}
	}
}

// addElastic turns the model into a feasibility problem with slacks on
// budgets and slots and, with elasticDemand, on committed demand,
// minimising their weighted sum.
func (m *Model) addElastic() {
	c := m.Case
	for j := range m.LP.Obj {
		m.LP.Obj[j] = 0
	}
	limitWeight := elasticLimitWeight
	if m.opts.elasticDemand {
		limitWeight = elasticFreeWeight
		for k, d := range c.Demands {
			for t := 0; t < c.Horizon; t++ {
				j := m.served[k][t]
				need := m.LP.ColLower[j]
				if need <= 0 {
					continue
				}
				m.LP.ColLower[j] = 0
				s := m.LP.AddCol(fmt.Sprintf("es_%s_%d", d.ID, c.Year(t)), elasticDemandWeight, 0, need)
				m.LP.AddRow(fmt.Sprintf("ecommit_%s_%d", d.ID, c.Year(t)), need, lp.Inf, []int{j, s}, []float64{1, 1})
				m.elastic = append(m.elastic, elasticSlack{col: s, kind: InfeasibleDemand, name: d.ID, year: t, perUnit: 1})
			}
		}
	}
	for tau, r := range m.budgetRow {
		if r < 0 {
			continue
		}
		s := m.LP.AddCol(fmt.Sprintf("eb_%d", c.Year(tau)), limitWeight, 0, lp.Inf)
		m.LP.SetCoef(r, s, -1)
		m.elastic = append(m.elastic, elasticSlack{col: s, kind: InfeasibleBudget, name: fmt.Sprintf("%d", c.Year(tau)), year: tau, perUnit: moneyScale})
	}
	if r := m.cumRow; r >= 0 {
		s := m.LP.AddCol("eb_total", limitWeight, 0, lp.Inf)
		m.LP.SetCoef(r, s, -1)
		m.elastic = append(m.elastic, elasticSlack{col: s, kind: InfeasibleBudget, name: "cumulative", year: -1, perUnit: moneyScale})
	}
	for i, name := range m.LP.RowName {
		if strings.HasPrefix(name, "slots_") {
			s := m.LP.AddCol("e"+name, limitWeight, 0, lp.Inf)
			m.LP.SetCoef(i, s, -1)
			m.elastic = append(m.elastic, elasticSlack{col: s, kind: InfeasibleLink, name: name[len("slots_"):], year: -1, perUnit: 1})
		}
	}
}

// branchPriority returns the branching priorities of the model's columns
// (mip Settings.Priority): 2 for the tier choices z, 1 for the capacity
// steps (addSteps), 0 for the rest. The
// relaxation takes a tier at a fractional z and so earns its discount on
// any spend, which no plan below the threshold gets; branching on z first
// removes that gain where the plan does not reach the tier. Measured with
// the budget caps on tier spend (addPurchases) on 2026-12-03: the
// synthetic 10-site 7-year cases of seeds 1 to 8 took 5,093 nodes and
// 30.7 s to proof in all, against 6,739 nodes and 43.1 s without the
// priorities (and 8,032 nodes, 46.7 s with neither); the M case reached
// a bound of 3,043,951 after 3,000 nodes, against 3,044,818 without them.
func (m *Model) branchPriority() []int {
	pr := make([]int, m.LP.NumCols())
	for _, vy := range m.tiers {
		for _, j := range vy.choice {
			pr[j] = 2
		}
	}
	for _, st := range m.steps {
		pr[st.col] = 1
	}
	return pr
}

// budgetUpper is the upper bound of a budget row for a budget of limit
// (in case currency): in thousands, or none with freeBudgets.
func (m *Model) budgetUpper(limit float64) float64 {
	if m.opts.freeBudgets {
		return lp.Inf
	}
	return limit / moneyScale
}

// yearLimit is the most the capex of order year tau may be: the case's
// Budget.limit, or +Inf in the elastic and free-budget models, whose
// budgets give. Rows and bounds that rest on the budgets use it.
func (m *Model) yearLimit(tau int) float64 {
	if m.opts.elastic || m.opts.freeBudgets {
		return math.Inf(1)
	}
	return m.Case.Budget.limit(tau)
}

// fixUnreachableTiers fixes at 0 the choice of each tier of vy that the
// capex budget of order year tau, or the cumulative cap, can never pay
// for: a spend tier whose threshold, less its discount, is above the
// limit, or a unit tier whose threshold in units of the vendor's cheapest
// item of that year (minPrice, list), less its discount, is. The integer
// points are the same; the relaxation is tighter, because it would
// otherwise take the tier at z = spend/threshold and so earn its discount
// on any spend (the spend caps of addPurchases, which rest on the same
// budgets, now rule such a tier out too; the fix spares the search the
// column). Nothing is fixed in the elastic and free-budget models, whose
// budgets give (yearLimit).
func (m *Model) fixUnreachableTiers(vy *vendorYear, tau int, minPrice float64) {
	limit := m.yearLimit(tau)
	for k, tr := range m.Case.Vendors[vy.vendor].Tiers {
		least := tr.Threshold // the tier's least list spend
		if tr.Basis == TierByUnits {
			least = tr.Threshold * minPrice
		}
		if (1-tr.Discount)*least > limit*(1+1e-9) {
			m.LP.ColUpper[vy.choice[k+1]] = 0
		}
	}
}
