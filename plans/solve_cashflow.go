package plans

import (
	"math"
	"sort"
)

// This file turns decisions (purchases and served traffic) into money, year
// by year, from the case data alone: it does not read the model's objective
// coefficients, so comparing its present value with the MIP objective
// checks the formulation.

// purchase is one order of the plan: units of an option ordered in year
// tau, or the build of a candidate link (item −1).
type purchase struct {
	link, item, tau, inService int
	units                      int
	gbps                       float64 // capacity added per direction
	list, capex                float64 // list capex and capex after discount
	opex                       float64 // yearly, from inService to the horizon
	life                       int     // book life (0: nothing to depreciate)
}

// tierTolerance: a vendor-year reaches a tier threshold when its spend or
// units are at least threshold·(1 − tierTolerance) − tierAbsTolerance, so
// that a solution at the threshold within the LP's feasibility tolerance
// still gets its discount.
const (
	tierTolerance    = 1e-7
	tierAbsTolerance = 1e-3
)

// purchases reads the orders of a solution: ordered units per option and
// year are differences of the rounded cumulative columns.
func (m *Model) purchases(x []float64) []purchase {
	c := m.Case
	var out []purchase
	for _, b := range m.builds {
		prev := 0.0
		for tau, j := range b.col {
			if j < 0 {
				continue
			}
			v := math.Round(x[j])
			if v-prev > 0.5 {
				cand := c.Links[b.link].Candidate
				out = append(out, purchase{
					link: b.link, item: -1, tau: tau, inService: b.inService[tau], units: 1,
					list: cand.BuildCost, capex: cand.BuildCost, opex: cand.Opex, life: cand.BookLife,
				})
			}
			prev = v
		}
	}
	for _, o := range m.options {
		it := &c.Items[o.item]
		prev := 0.0
		for tau, j := range o.col {
			if j < 0 {
				continue
			}
			v := math.Round(x[j])
			if n := int(v - prev); n > 0 {
				p := purchase{
					link: o.link, item: o.item, tau: tau, inService: o.inService[tau], units: n,
					gbps: float64(n) * it.Gbps, opex: float64(n) * it.OrderOpex[tau],
				}
				if it.Kind == Module {
					p.list = float64(n) * it.Capex(tau, c.Links[o.link].KM)
					p.capex = p.list
					p.life = max(it.BookLife, 1)
				}
				out = append(out, p)
			}
			prev = v
		}
	}
	applyTiers(c, out)
	sort.SliceStable(out, func(a, b int) bool {
		pa, pb := out[a], out[b]
		if pa.tau != pb.tau {
			return pa.tau < pb.tau
		}
		if pa.link != pb.link {
			return c.Links[pa.link].ID < c.Links[pb.link].ID
		}
		return pa.item < pb.item
	})
	return out
}

// applyTiers sets each module purchase's capex to its list capex less the
// largest discount its vendor's order year reaches (DESIGN.md §2: all-units,
// over all links and items of the vendor in that year; lease units do not
// count, being no purchase).
func applyTiers(c *Case, ps []purchase) {
	type key struct{ vendor, tau int }
	spend := map[key]float64{}
	units := map[key]float64{}
	for _, p := range ps {
		if p.item < 0 || c.Items[p.item].Kind != Module {
			continue
		}
		k := key{c.Items[p.item].Vendor, p.tau}
		spend[k] += p.list
		units[k] += float64(p.units)
	}
	for i := range ps {
		p := &ps[i]
		if p.item < 0 || c.Items[p.item].Kind != Module {
			continue
		}
		k := key{c.Items[p.item].Vendor, p.tau}
		d := bestDiscount(c.Vendors[k.vendor].Tiers, spend[k], units[k])
		p.capex = p.list * (1 - d)
	}
}

// bestDiscount returns the largest discount among the tiers reached.
func bestDiscount(tiers []Tier, spend, units float64) float64 {
	d := 0.0
	for _, t := range tiers {
		v := spend
		if t.Basis == TierByUnits {
			v = units
		}
		if v >= t.Threshold*(1-tierTolerance)-tierAbsTolerance {
			d = math.Max(d, t.Discount)
		}
	}
	return d
}

// cashflowOf returns one cash-flow row per year for the purchases and the
// served traffic (served[k][t], Gbps each direction), with the SLA penalty
// of the shortfall rows (baseline only). Depreciation is straight line from
// the in-service year over the book life; salvage is the book value left at
// the end of the horizon (DESIGN.md §2).
func cashflowOf(c *Case, ps []purchase, served [][]float64, short []ShortfallRow) []CashflowRow {
	T := c.Horizon
	rows := make([]CashflowRow, T)
	for t := range rows {
		rows[t].Year = c.Year(t)
		rows[t].DiscountFactor = c.DiscountFactor(t)
		if v, ok := c.Budget.YearCap(t); ok {
			v := v
			rows[t].Budget = &v
		}
	}
	for k, d := range c.Demands {
		for t := 0; t < T; t++ {
			rows[t].Revenue += 12 * d.Tariff[t] * served[k][t]
		}
	}
	for _, s := range short {
		rows[s.Year-c.FirstYear].Penalty += s.Penalty
	}
	for _, p := range ps {
		rows[p.tau].Capex += p.capex
		for t := p.inService; t < T; t++ {
			rows[t].Opex += p.opex
		}
		if p.capex == 0 {
			continue
		}
		life := max(p.life, 1)
		for t := p.inService; t < min(p.inService+life, T); t++ {
			rows[t].Depreciation += p.capex / float64(life)
		}
		if c.Finance.Salvage == SalvageStraightLine {
			used := T - p.inService
			if used < life {
				rows[T-1].Salvage += p.capex * (1 - float64(used)/float64(life))
			}
		}
	}
	cum := 0.0
	for t := range rows {
		r := &rows[t]
		r.BudgetUsed = r.Capex
		r.Tax = c.Finance.TaxRate * (r.Revenue - r.Opex - r.Depreciation)
		r.Net = r.Revenue - r.Opex - r.Capex - r.Tax - r.Penalty + r.Salvage
		r.PV = r.DiscountFactor*(r.Net-r.Salvage) + c.SalvageDiscountFactor()*r.Salvage
		cum += r.PV
		r.CumulativePV = cum
	}
	return rows
}
