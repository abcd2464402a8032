package plans

import (
	"math"
)

// heuristicIntTol: an LP value within this of an integer counts as that
// integer when rounding up.
const heuristicIntTol = 1e-6

// roundingThresholds are the fractional parts from which the heuristic
// rounds a unit count up (0: always, as the capacity the LP routed needs;
// larger: round slivers down and let the LP serve less uncommitted
// traffic). Each gives one candidate. A finer grid than {0, 0.5, 0.8}
// costs little now that a candidate's completion LP starts from the
// relaxation's basis, and on the synthetic L case, whose search reaches
// few nodes, it raised the incumbent after the root from 7983998 to
// 8091325 (on M the 60 s result moved by −0.08 %, within the run-to-run
// spread of its search path).
var roundingThresholds = []float64{0, 0.2, 0.35, 0.5, 0.65, 0.8, 0.9}

// roundUpHeuristic is the primal heuristic handed to mip: from a node's LP
// point it rounds every link's cumulative module counts to whole units —
// up, so that every link has at least the capacity the LP routed over it,
// and also with the thresholds of roundingThresholds, since rounding a
// sliver of a large module up costs more than the traffic it carries earns
// — builds the candidate links those units need, repairs slots and budgets
// by rounding down where the LP was fractional, and sets the tier columns
// to the tier the purchases reach and the vendor-choice columns to the
// vendor bought from (dropping a candidate that buys from two vendors
// where [case] one_vendor allows one). Flows and served traffic are left as in
// the LP: mip re-optimises the continuous columns (and drops a candidate
// that cannot carry the committed traffic).
//
// A further candidate rounds each link's capacity instead: the LP's
// capacity on the link in each year is covered with whole units of the one
// item the LP used most there (when that item can serve in time).
// Cost O(columns + nonzeros of the purchases) per candidate.
func (m *Model) roundUpHeuristic(xlp []float64) [][]float64 {
	var out [][]float64
	add := func(theta float64, perLink bool) {
		x := append([]float64(nil), xlp...)
		round := func(v float64) float64 { return math.Floor(v + 1 - theta) }
		if theta == 0 {
			round = math.Ceil
		}
		for oi := range m.options {
			m.roundOption(x, xlp, oi, round)
		}
		if perLink {
			m.roundLinks(x, xlp)
		}
		m.repairSlots(x, xlp)
		m.gateBuilds(x)
		if !m.repairBudget(x, xlp) {
			return
		}
		m.setTiers(x)
		if !m.setVendorChoice(x) {
			return // buys from two vendors where [case] one_vendor allows one
		}
		out = append(out, x)
	}
	for _, theta := range roundingThresholds {
		add(theta, false)
	}
	add(0, true)
	return out
}

// roundOption rounds the cumulative columns of option oi with round
// (of the LP value), keeping them non-decreasing and within bounds.
func (m *Model) roundOption(x, xlp []float64, oi int, round func(float64) float64) {
	o := &m.options[oi]
	run := 0.0
	for _, j := range o.col {
		if j < 0 {
			continue
		}
		v := xlp[j]
		if math.Abs(v-math.Round(v)) <= heuristicIntTol {
			v = math.Round(v)
		}
		v = math.Max(round(v), run)
		v = math.Min(v, m.LP.ColUpper[j])
		x[j] = v
		run = v
	}
}

// roundLinks replaces, link by link, the rounded units of x by whole units
// of the item carrying most of the LP's added capacity on that link, enough
// in every year for the LP's capacity there. A link whose early capacity
// that item cannot serve in time keeps x as it is.
func (m *Model) roundLinks(x, xlp []float64) {
	c := m.Case
	byLink := m.optionsByLink()
	T := c.Horizon
	for _, opts := range byLink {
		if len(opts) < 2 {
			continue
		}
		need := make([]float64, T)
		best, bestGbps := -1, 0.0
		for _, oi := range opts {
			o := &m.options[oi]
			g := c.Items[o.item].Gbps
			for t := 0; t < T; t++ {
				if j := o.unitsInService(t); j >= 0 {
					need[t] += g * xlp[j]
				}
			}
			if j := o.unitsInService(T - 1); j >= 0 && g*xlp[j] > bestGbps {
				best, bestGbps = oi, g*xlp[j]
			}
		}
		if best < 0 {
			continue
		}
		o := &m.options[best]
		g := c.Items[o.item].Gbps
		units := make([]float64, T) // units of o needed in service by year t
		ok := true
		for t := 0; t < T; t++ {
			if need[t] <= heuristicIntTol {
				continue
			}
			if o.unitsInService(t) < 0 {
				ok = false
				break
			}
			units[t] = math.Ceil(need[t]/g - heuristicIntTol)
		}
		if !ok {
			continue
		}
		for _, oi := range opts {
			for _, j := range m.options[oi].col {
				if j >= 0 {
					x[j] = 0
				}
			}
		}
		run := 0.0
		for tau, j := range o.col {
			if j < 0 {
				continue
			}
			v := run
			for t := o.inService[tau]; t < T; t++ {
				if o.unitsInService(t) == j {
					v = math.Max(v, units[t])
				}
			}
			v = math.Min(v, m.LP.ColUpper[j])
			x[j], run = v, v
		}
	}
}

// optionsByLink returns the indices of the options of each link.
func (m *Model) optionsByLink() [][]int {
	out := make([][]int, len(m.Case.Links))
	for oi := range m.options {
		out[m.options[oi].link] = append(out[m.options[oi].link], oi)
	}
	return out
}

// repairSlots lowers units on links whose slots overflow, taking first the
// option that was rounded up the most, until the slots fit.
func (m *Model) repairSlots(x, xlp []float64) {
	c := m.Case
	for l := range c.Links {
		link := &c.Links[l]
		if link.Slots == UnlimitedSlots {
			continue
		}
		for guard := 0; guard < 10000; guard++ {
			used := 0.0
			best, bestExcess := -1, -math.MaxFloat64
			for oi := range m.options {
				o := &m.options[oi]
				if o.link != l {
					continue
				}
				j := o.col[o.lastOrder]
				used += float64(c.Items[o.item].SlotsPerUnit) * x[j]
				if x[j] >= 1 && c.Items[o.item].SlotsPerUnit > 0 && x[j]-xlp[j] > bestExcess {
					best, bestExcess = oi, x[j]-xlp[j]
				}
			}
			if used <= float64(link.Slots) || best < 0 {
				break
			}
			o := &m.options[best]
			top := x[o.col[o.lastOrder]] - 1
			for _, j := range o.col {
				if j >= 0 {
					x[j] = math.Min(x[j], top)
				}
			}
		}
	}
}

// gateBuilds sets the build columns: rounded up, non-decreasing, and on
// wherever a unit on the link is in service.
func (m *Model) gateBuilds(x []float64) {
	c := m.Case
	for bi := range m.builds {
		b := &m.builds[bi]
		need := make([]bool, c.Horizon) // need[t]: built by year t
		for oi := range m.options {
			o := &m.options[oi]
			if o.link != b.link {
				continue
			}
			for tau, j := range o.col {
				if j >= 0 && x[j] > 0.5 {
					need[o.inService[tau]] = true
				}
			}
		}
		run := 0.0
		for _, j := range b.col {
			if j < 0 {
				continue
			}
			v := math.Max(math.Ceil(x[j]-heuristicIntTol), run)
			x[j] = math.Min(v, 1)
			run = x[j]
		}
		// Turn the build on early enough for every year that needs it.
		for t, ok := range need {
			if !ok {
				continue
			}
			if j := b.builtBy(t); j >= 0 && x[j] < 0.5 {
				on := false
				for _, k := range b.col {
					if k == j {
						on = true
					}
					if on && k >= 0 {
						x[k] = 1
					}
				}
			}
		}
	}
}

// repairBudget rounds down, year by year, the options of years whose capex
// exceeds the yearly or cumulative cap. It reports whether the caps hold.
func (m *Model) repairBudget(x, xlp []float64) bool {
	c := m.Case
	over := func() (years []bool, any bool) {
		years = make([]bool, c.Horizon)
		capex := make([]float64, c.Horizon)
		total := 0.0
		for _, p := range m.purchases(x) {
			capex[p.tau] += p.capex
			total += p.capex
		}
		for t := range years {
			if v, ok := c.Budget.YearCap(t); ok && capex[t] > v*(1+budgetTolerance) {
				years[t], any = true, true
			}
		}
		if total > c.Budget.Cumulative*(1+budgetTolerance) {
			for t := range years {
				years[t] = true
			}
			any = true
		}
		return years, any
	}
	years, any := over()
	if !any {
		return true
	}
	for oi := range m.options {
		o := &m.options[oi]
		touches := false
		for tau, j := range o.col {
			if j >= 0 && years[tau] {
				touches = true
			}
		}
		if touches {
			m.roundOption(x, xlp, oi, math.Floor)
		}
	}
	m.gateBuilds(x)
	_, any = over()
	return !any
}

// budgetTolerance is the relative slack with which a heuristic plan still
// meets a budget (the MIP's own check decides in the end).
const budgetTolerance = 1e-9

// setTiers sets the tier columns of every vendor-year to the largest
// discount its purchases reach.
func (m *Model) setTiers(x []float64) {
	c := m.Case
	for _, vy := range m.tiers {
		groupSpend := make([]float64, len(vy.groups))
		units := 0.0
		for oi := range m.options {
			o := &m.options[oi]
			it := &c.Items[o.item]
			if it.Vendor != vy.vendor || it.Kind != Module || o.col[vy.year] < 0 {
				continue
			}
			n := x[o.col[vy.year]]
			for p := vy.year - 1; p >= 0; p-- {
				if o.col[p] >= 0 {
					n -= x[o.col[p]]
					break
				}
			}
			for g, grp := range vy.groups {
				if grp == (spendGroup{it.BookLife, o.inService[vy.year]}) {
					groupSpend[g] += n * it.Capex(vy.year, c.Links[o.link].KM) / moneyScale
				}
			}
			units += n
		}
		total := 0.0
		for _, s := range groupSpend {
			total += s
		}
		best := 0
		tiers := c.Vendors[vy.vendor].Tiers
		for k := 1; k < len(vy.choice); k++ {
			tr := tiers[k-1]
			v := total * moneyScale
			if tr.Basis == TierByUnits {
				v = units
			}
			if v >= tr.Threshold && tr.Discount > vy.discount[best] {
				best = k
			}
		}
		for k := range vy.choice {
			on := 0.0
			if k == best {
				on = 1
			}
			x[vy.choice[k]] = on
			for g := range vy.groups {
				x[vy.spend[g][k]] = on * groupSpend[g]
			}
			if vy.count != nil {
				x[vy.count[k]] = on * units
			}
		}
	}
}
