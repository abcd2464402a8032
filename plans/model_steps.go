package plans

import (
	"fmt"
	"math"
)

// addSteps adds, for each link and year in which units of two or more
// (item, order year) columns can be in service, an integer column that
// counts the capacity they add in steps of g, the greatest common divisor
// of the Gbps of the items that fit the link, and the row that defines it:
//
//	k[l,t] − Σ_o (Gbps_o / g)·y[o, in service by t] = 0.
//
// The column changes no plan and not the LP relaxation (the row makes it
// a whole number once the units are whole; only the cut rounds may find
// other cuts), but it gives the search something to branch on that the
// units alone do not: the capacity of a link in a year. Branched on a
// unit column, the relaxation can move to another item or order year of
// the same link at almost no cost; "k ≤ s or k ≥ s + 1" moves the
// capacity itself one step either way. branchPriority puts these columns
// right after the tier choices. Measured on 2026-12-05 (node counts
// without a time limit, so the paths compare exactly): the 16 synthetic
// 10-site 7-year cases proved in 2,955 nodes in all against 3,654 (60.6 s
// against 92.1 s, each beside a long solve on the other core), and on
// the M case (25 sites, 7 years) with its best plan known as the start,
// the bound after 3,000 nodes was 3,040,166 against 3,043,357 (optimum
// 3,032,489), in 397,863 simplex iterations against 565,478. As columns
// the search may branch on but not first, they took 2,921 nodes and
// 3,042,608.
//
// Links whose items have fractional Gbps, and years with a single unit
// column in service (the column would repeat it), get none.
func (m *Model) addSteps() {
	c := m.Case
	ofLink := make([][]int, len(c.Links)) // options of each link
	for oi := range m.options {
		ofLink[m.options[oi].link] = append(ofLink[m.options[oi].link], oi)
	}
	for l, opts := range ofLink {
		g := 0
		for _, oi := range opts {
			v := c.Items[m.options[oi].item].Gbps
			if v <= 0 || v != math.Round(v) || v > 1e9 {
				g = 0
				break
			}
			g = gcdInt(g, int(v))
		}
		if g == 0 {
			continue
		}
		for t := 0; t < c.Horizon; t++ {
			st := step{link: l, year: t}
			most := 0.0
			for _, oi := range opts {
				o := &m.options[oi]
				if j := o.unitsInService(t); j >= 0 {
					w := c.Items[o.item].Gbps / float64(g)
					st.units, st.weights = append(st.units, j), append(st.weights, w)
					most += w * m.LP.ColUpper[j]
				}
			}
			if len(st.units) < 2 {
				continue
			}
			st.col = m.LP.AddIntCol(fmt.Sprintf("k_%s_%d", c.Links[l].ID, c.Year(t)), 0, 0, most)
			m.steps = append(m.steps, st)
			cols := append(append([]int(nil), st.units...), st.col)
			vals := make([]float64, 0, len(cols))
			for _, w := range st.weights {
				vals = append(vals, -w)
			}
			vals = append(vals, 1)
			m.LP.AddRow(fmt.Sprintf("steps_%s_%d", c.Links[l].ID, c.Year(t)), 0, 0, cols, vals)
		}
	}
}

// step is the capacity step column of a link and year: col =
// Σ weights·x[units], each weight a unit's Gbps over the link's step.
type step struct {
	col, link, year int
	units           []int
	weights         []float64
}

func gcdInt(a, b int) int {
	for b != 0 {
		a, b = b, a%b
	}
	return a
}
