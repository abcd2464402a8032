package plans

import (
	"context"
	"fmt"
	"sort"
	"time"

	"netstage/mip"
	"netstage/plans/numfmt"
)

// explainInfeasible solves elastic versions of c's model and lists every
// limit that had to give: first with committed demand kept and budgets and
// slots allowed to grow (a plan that more money or slots would make
// possible); when even that has no solution, with committed demand allowed
// to fall short while money is nearly free, adding the links that are full
// at their largest possible capacity in the years where demand falls short.
// limit bounds the elastic searches together.
func explainInfeasible(ctx context.Context, c *Case, limit time.Duration) ([]InfeasibilityRow, error) {
	// Stage 1: committed demand hard; can more budget or slots make it
	// feasible? Stage 2 (when not): demand gives, money is nearly free.
	var m *Model
	var mr mip.Result
	for _, demandSoft := range []bool{false, true} {
		var err error
		m, err = BuildModel(c, BuildOptions{elastic: true, elasticDemand: demandSoft})
		if err != nil {
			return nil, err
		}
		mr, err = mipSolve(ctx, m.LP, mip.Settings{TimeLimit: limit / 2})
		if err != nil {
			return nil, fmt.Errorf("plans: %w", err)
		}
		if mr.X != nil {
			break
		}
	}
	if mr.X == nil {
		return []InfeasibilityRow{{Message: "no plan meets the committed demands, unit limits and budgets; the elastic model found no explanation within its limit (" + mr.Status.String() + ")"}}, nil
	}
	x := mr.X
	var rows []InfeasibilityRow
	short := make([]bool, c.Horizon)
	for _, s := range m.elastic {
		v := x[s.col] * s.perUnit
		if x[s.col] <= valueTol {
			continue
		}
		r := InfeasibilityRow{Kind: s.kind, Name: s.name, Amount: v, Unit: UnitGbps}
		if s.year >= 0 {
			r.Year = c.Year(s.year)
		}
		if s.kind != InfeasibleDemand && s.kind != InfeasibleLink && x[s.col]*s.perUnit < explainMoneyTol {
			continue
		}
		switch s.kind {
		case InfeasibleDemand:
			short[s.year] = true
			r.Message = fmt.Sprintf("committed demand %s cannot be carried in %d: %s Gbps short", s.name, r.Year, numfmt.Grouped(v, 1, "-"))
		case InfeasibleBudget:
			r.Unit = c.Currency
			if s.name == "cumulative" {
				r.Message = fmt.Sprintf("the cumulative capex budget would have to grow by %s %s", c.Currency, numfmt.Money(v))
			} else {
				r.Message = fmt.Sprintf("the %s capex budget would have to grow by %s %s", s.name, c.Currency, numfmt.Money(v))
			}
		case InfeasibleLink:
			r.Unit = UnitSlots
			r.Message = fmt.Sprintf("link %s would need %s more slots", s.name, numfmt.Grouped(v, 0, "-"))
		}
		rows = append(rows, r)
	}
	// Links full at their largest capacity where demand falls short.
	load := arcLoads(m, x)
	for l := range c.Links {
		link := &c.Links[l]
		for t := 0; t < c.Horizon; t++ {
			if !short[t] {
				continue
			}
			most := m.maxCapacity(l, t)
			peak := max(load[2*l][t], load[2*l+1][t])
			if peak >= link.Ceiling*most-valueTol {
				rows = append(rows, InfeasibleLinkRow(link.ID, c.Year(t), most, link.Ceiling))
			}
		}
	}
	order := map[string]int{InfeasibleDemand: 0, InfeasibleLink: 1, InfeasibleBudget: 2}
	sort.SliceStable(rows, func(a, b int) bool {
		ra, rb := rows[a], rows[b]
		if order[ra.Kind] != order[rb.Kind] {
			return order[ra.Kind] < order[rb.Kind]
		}
		if ra.Year != rb.Year {
			return ra.Year < rb.Year
		}
		return ra.Name < rb.Name
	})
	if len(rows) == 0 {
		rows = append(rows, InfeasibilityRow{Message: "no plan meets the committed demands, unit limits and budgets, but no single limit could be named"})
	}
	return rows, nil
}

// explainMoneyTol: budget slacks under one currency unit are noise.
const explainMoneyTol = 1

// InfeasibleLinkRow describes a link that is full at its largest possible
// capacity (Gbps per direction) in a year.
func InfeasibleLinkRow(link string, year int, capacity, ceiling float64) InfeasibilityRow {
	return InfeasibilityRow{
		Kind: InfeasibleLink, Name: link, Year: year, Amount: capacity, Unit: UnitGbpsMax,
		Message: fmt.Sprintf("link %s is full in %d at its largest possible capacity, %s Gbps at a %.0f %% ceiling (unit limits, slots or lead times)", link, year, numfmt.Grouped(capacity, 1, "-"), 100*ceiling),
	}
}

// maxCapacity returns the largest capacity link l can have in year t: its
// base capacity plus every fitting item at its unit bound, counting only
// orders that serve by t.
func (m *Model) maxCapacity(l, t int) float64 {
	c := m.Case
	most := c.Links[l].BaseCapacity[t]
	for oi := range m.options {
		o := &m.options[oi]
		if o.link != l {
			continue
		}
		if j := o.unitsInService(t); j >= 0 {
			most += m.LP.ColUpper[j] * c.Items[o.item].Gbps
		}
	}
	return most
}
