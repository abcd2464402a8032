package plans

import (
	"fmt"
	"math"
	"slices"
	"sort"

	"netstage/lp"
)

// maxCutDivisors caps the divisors tried per cut (the distinct
// ceiling·Gbps module sizes across the cut, largest first).
const maxCutDivisors = 3

// cutFracTol: a right-hand side within this of an integer multiple of the
// divisor gives no rounding gain, so no cut.
const cutFracTol = 1e-6

// addCutSets adds mixed-integer rounding (MIR) cut-set inequalities on link
// capacities (Magnanti, Mirchandani & Vachani 1993; Bienstock & Günlük
// 1996; Raack et al. 2011) for every single site, every pair of sites
// joined by a link and every site with the sites within one and within
// two links of it (when that is a new set that leaves at least two sites
// out), in every year. For a site set S, the traffic X of the
// demands with one end in S must leave S over the links crossing it, so
//
//	Σ_j a_j·y_j + s ≥ R,  a_j = ceiling·Gbps of option j, y_j its units in
//	service, R = F − Σ ceiling·base, s = F − X ≥ 0,
//
// with F the forecast of those demands. Divided by a module size δ
// (f0 = frac(R/δ) > 0, f_j = frac(a_j/δ)) its MIR is
//
//	Σ_j (⌊a_j/δ⌋ + min(1, f_j/f0))·y_j + s/(δ·f0) ≥ ⌈R/δ⌉,
//
// valid for integer y ≥ 0 and s ≥ 0, and not implied by the LP relaxation:
// with one module size it is the residual-capacity inequality
// X ≤ F − r·(⌈R/δ⌉ − y), r = δ·f0. The same rounding of committed traffic
// alone (s = 0, F = committed) gives a second cut with no flow term.
func (m *Model) addCutSets() {
	c := m.Case
	var sets [][]int
	for v := range c.Sites {
		sets = append(sets, []int{v})
	}
	seenPair := map[[2]int]bool{}
	for _, l := range c.Links {
		p := [2]int{min(l.A, l.B), max(l.A, l.B)}
		if !seenPair[p] && len(c.Sites) > 3 { // with 3 sites a pair's cut is a single site's
			seenPair[p] = true
			sets = append(sets, []int{p[0], p[1]})
		}
	}
	// Balls: each site with the sites within one link (its star) and
	// within two links, when that leaves at least two sites out. Measured
	// on the synthetic M case (25 sites, 7 years) they raise the root LP
	// bound by 0.29 % (stars) and 0.17 % more (two links) of the NPV, and
	// they take S (10 sites, 5 years) from 532 to 126 nodes; connected
	// triples gave 0.2 %, less than stars.
	seenSet := map[string]bool{}
	for v := range c.Sites {
		ball := []int{v}
		for radius := 1; radius <= 2; radius++ {
			inner := append([]int(nil), ball...)
			for _, l := range c.Links {
				if slices.Contains(inner, l.A) && !slices.Contains(ball, l.B) {
					ball = append(ball, l.B)
				} else if slices.Contains(inner, l.B) && !slices.Contains(ball, l.A) {
					ball = append(ball, l.A)
				}
			}
			if len(ball) < radius+2 || len(ball) > len(c.Sites)-2 {
				continue
			}
			key := slices.Sorted(slices.Values(ball))
			if k := fmt.Sprint(key); !seenSet[k] {
				seenSet[k] = true
				sets = append(sets, key)
			}
		}
	}
	in := make([]bool, len(c.Sites))
	for si, set := range sets {
		for _, v := range set {
			in[v] = true
		}
		for t := 0; t < c.Horizon; t++ {
			for _, row := range m.cutSetRows(fmt.Sprintf("cut_%d_%d", si, c.Year(t)), in, t) {
				m.cutRows = append(m.cutRows, m.LP.AddRow(row.Name, row.Lower, row.Upper, row.Index, row.Value))
			}
		}
		for _, v := range set {
			in[v] = false
		}
	}
}

// cutSetRows returns the MIR cut-set rows (see addCutSets) of the site set
// marked in in, for year t: on committed traffic, and on forecast traffic
// with the flow term when some traffic is optional.
func (m *Model) cutSetRows(name string, in []bool, t int) []lp.Row {
	cs := m.crossing(in, t)
	return m.crossingRows(name, &cs, nil)
}

// crossingRows returns the MIR cut-set rows of cs (see cutSetRows); with
// at set, only those the point at violates (see mirRows).
func (m *Model) crossingRows(name string, cs *crossing, at []float64) []lp.Row {
	if len(cs.cols) == 0 {
		return nil
	}
	rows := mirRows(name+"_c", cs, cs.committed-cs.base, nil, 0, at)
	if !m.costMode && cs.forecast > cs.committed {
		rows = append(rows, mirRows(name+"_f", cs, cs.forecast-cs.base, cs.xs, cs.forecast, at)...)
	}
	return rows
}

// subsetShares are the thresholds of the demand subsets of
// subsetCutSetRows: a demand joins the subset when the LP leaves at most
// this share of its forecast unserved. Root bound after the cut rounds on
// the synthetic M case (25 sites, 7 years; its best plans are near
// 3.03 M): 3,059,467 without subset rows, 3,055,809 with {0},
// 3,054,186 with {0, 0.25}, 3,052,613 with these three; on L (50 sites,
// 10 years) 8,547,324, then 8,513,688 with {0, 0.25} and 8,503,796 with
// these (when the rounds are not stopped by a time limit).
var subsetShares = []float64{1e-6, 0.25, 0.6}

// subsetCutSetRows returns the MIR cut-set rows of a site set's crossing
// cs in year t, written for a subset D of the demands crossing it: the
// capacity across must carry D's served traffic and the others' committed
// traffic, so
//
//	Σ_j a_j·y_j + (F_D − X_D) ≥ F_D + C_rest − base,
//
// and its MIR (mirRows) is valid as the all-demands row is. At an LP point
// x that serves some demands in full and leaves others short, the subset
// of the demands served (nearly) in full has a small flow term and a
// right-hand side whose rounding can bite where the all-demands row's does
// not. D is taken at x for each share of subsetShares.
func (m *Model) subsetCutSetRows(name string, cs *crossing, t int, x []float64) []lp.Row {
	if m.costMode || len(cs.cols) == 0 {
		return nil
	}
	var rows []lp.Row
	c := m.Case
	for si, share := range subsetShares {
		var fD, cRest float64
		var xs []int
		for _, k := range cs.demands {
			d := &c.Demands[k]
			j := m.served[k][t]
			if d.Forecast[t]-x[j] <= share*d.Forecast[t]+cutFracTol {
				fD += d.Forecast[t]
				xs = append(xs, j)
			} else {
				cRest += d.Committed[t]
			}
		}
		if len(xs) == 0 || len(xs) == len(cs.demands) {
			continue // empty, or the all-demands row
		}
		rows = append(rows, mirRows(fmt.Sprintf("%s_s%d", name, si), cs, fD+cRest-cs.base, xs, fD, x)...)
	}
	return rows
}

// crossing is what crosses the cut of a site set in one year: the demands
// with one end inside, their forecast and committed traffic and served
// columns, the base capacity (times the ceiling) of the links across, and
// the unit columns in service on them with their ceiling·Gbps. In a
// crossing made by flowCrossings, gs lists flow columns that stand in for
// the capacity of some of the links (those links' base and units are left
// out).
type crossing struct {
	demands             []int
	forecast, committed float64
	xs                  []int
	base                float64
	cols                []int
	coefs               []float64
	gs                  []int
	// links lists the links across, linkBase their ceiling·base capacity,
	// and colLink[k] the position in links of cols[k]'s link.
	links    []int
	linkBase []float64
	colLink  []int
}

func (m *Model) crossing(in []bool, t int) crossing {
	c := m.Case
	var cs crossing
	for k, d := range c.Demands {
		if in[d.A] == in[d.B] {
			continue
		}
		cs.demands = append(cs.demands, k)
		cs.forecast += d.Forecast[t]
		if m.costMode {
			cs.committed += d.Forecast[t]
		} else {
			cs.committed += d.Committed[t]
		}
		cs.xs = append(cs.xs, m.served[k][t])
	}
	pos := make([]int, len(c.Links)) // position in cs.links
	for l, link := range c.Links {
		if in[link.A] != in[link.B] {
			b := link.Ceiling * link.BaseCapacity[t]
			cs.base += b
			pos[l] = len(cs.links)
			cs.links = append(cs.links, l)
			cs.linkBase = append(cs.linkBase, b)
		}
	}
	for oi := range m.options {
		o := &m.options[oi]
		l := &c.Links[o.link]
		if in[l.A] == in[l.B] {
			continue
		}
		if j := o.unitsInService(t); j >= 0 {
			cs.cols = append(cs.cols, j)
			cs.coefs = append(cs.coefs, l.Ceiling*c.Items[o.item].Gbps)
			cs.colLink = append(cs.colLink, pos[o.link])
		}
	}
	return cs
}

// flowCrossings returns variants of the crossing cs of the site set marked
// in in, year t, in which the links across with spare capacity at the LP
// point (linkCap and arcFlow, see loadsAt) stand in by their flow instead
// of their capacity: one variant for the arcs that leave the set and one
// for those that enter it. The traffic of the demands across must leave
// the set over its links (the flow of each source inside, summed over the
// arcs out, is at least what it sends out) and, carried both ways, enter
// it too, so for either direction
//
//	Σ_{j on E1} a_j·y_j + Σ_{a of E2} f_a + s ≥ F − Σ_{E1} ceiling·base,
//
// with E2 the links that stand in by their flow f (all sources) and E1 the
// others: valid for every point of the model, and its MIR (the flow
// columns take the coefficient of s) bites where the cut's spare capacity
// sits on links whose traffic cannot use it, which the capacity-only row
// counts in full (the flow cut-set inequalities of Raack et al. 2011,
// cited at addCutSets). A variant is made only when some links keep their
// capacity term and some stand in.
func (m *Model) flowCrossings(cs *crossing, in []bool, t int, linkCap, arcFlow []float64) []crossing {
	c := m.Case
	if len(cs.links) < 2 || len(cs.cols) == 0 {
		return nil
	}
	var out []crossing
	for _, leaving := range []bool{true, false} {
		arcs := make([]int, len(cs.links))
		stand := make([]bool, len(cs.links))
		nStand := 0
		for i, l := range cs.links {
			a := 2 * l // A → B
			if in[c.Links[l].A] != leaving {
				a++
			}
			arcs[i] = a
			if arcFlow[a] < linkCap[l]-cutFracTol*(1+linkCap[l]) {
				stand[i] = true
				nStand++
			}
		}
		if nStand == 0 || nStand == len(cs.links) {
			continue
		}
		v := *cs
		v.cols, v.coefs, v.colLink, v.gs = nil, nil, nil, nil
		for k, j := range cs.cols {
			if !stand[cs.colLink[k]] {
				v.cols = append(v.cols, j)
				v.coefs = append(v.coefs, cs.coefs[k])
				v.colLink = append(v.colLink, cs.colLink[k])
			}
		}
		if len(v.cols) == 0 {
			continue
		}
		for i := range cs.links {
			if stand[i] {
				v.base -= cs.linkBase[i]
				for si := range m.sources {
					if j := m.flow[si][arcs[i]][t]; j >= 0 {
						v.gs = append(v.gs, j)
					}
				}
			}
		}
		out = append(out, v)
	}
	return out
}

// loadsAt sets linkCap[l] to link l's capacity times its ceiling and
// arcFlow[a] to the flow on arc a (all sources), in year t at the LP point
// x.
func (m *Model) loadsAt(x []float64, t int, linkCap, arcFlow []float64) {
	c := m.Case
	for li, l := range c.Links {
		linkCap[li] = l.Ceiling * l.BaseCapacity[t]
	}
	for oi := range m.options {
		o := &m.options[oi]
		if j := o.unitsInService(t); j >= 0 {
			l := &c.Links[o.link]
			linkCap[o.link] += l.Ceiling * c.Items[o.item].Gbps * x[j]
		}
	}
	for a := range arcFlow {
		arcFlow[a] = 0
		for si := range m.sources {
			if j := m.flow[si][a][t]; j >= 0 {
				arcFlow[a] += x[j]
			}
		}
	}
}

// mirRows returns the MIR cuts of Σ cs.coefs·y + s + Σ x[cs.gs] ≥ r for
// each divisor, where s = f − Σ x[xs] (no s when xs is nil) and cs.gs are
// flow columns (see flowCrossings). With at set it returns only the rows
// that the point at violates by more than minCutViolation (separation
// tests many sets, and most of their rows hold).
func mirRows(name string, cs *crossing, r float64, xs []int, f float64, at []float64) []lp.Row {
	if r <= cutFracTol {
		return nil
	}
	var rows []lp.Row
	divisors := append([]float64(nil), cs.coefs...)
	sort.Sort(sort.Reverse(sort.Float64Slice(divisors)))
	var distinct []float64
	for _, d := range divisors {
		if d > 0 && (len(distinct) == 0 || math.Abs(distinct[len(distinct)-1]-d) > cutFracTol*d) {
			distinct = append(distinct, d)
		}
	}
	if len(distinct) > maxCutDivisors {
		distinct = distinct[:maxCutDivisors]
	}
	// The continuous part at the point: Σ x[gs] − Σ x[xs].
	var cont float64
	if at != nil {
		for _, j := range cs.gs {
			cont += at[j]
		}
		for _, j := range xs {
			cont -= at[j]
		}
	}
	vals := make([]float64, len(cs.cols))
	for di, delta := range distinct {
		b := r / delta
		f0 := b - math.Floor(b)
		if f0 < cutFracTol || f0 > 1-cutFracTol {
			continue
		}
		for k, a := range cs.coefs {
			a /= delta
			fj := a - math.Floor(a)
			if fj > 1-cutFracTol {
				a, fj = math.Round(a), 0
			}
			vals[k] = math.Floor(a) + math.Min(1, fj/f0)
		}
		// s/(δ·f0) with s = f − Σ x moves f/(δ·f0) to the right; the flow
		// columns take the same weight.
		w := 1 / (delta * f0)
		lower := math.Ceil(b)
		if xs != nil {
			lower -= f * w
		}
		if at != nil {
			act := w * cont
			for k, j := range cs.cols {
				act += vals[k] * at[j]
			}
			if lower-act <= minCutViolation {
				continue
			}
		}
		n := len(cs.cols) + len(xs) + len(cs.gs)
		rc := append(make([]int, 0, n), cs.cols...)
		rv := append(make([]float64, 0, n), vals...)
		for _, j := range xs {
			rc, rv = append(rc, j), append(rv, -w)
		}
		for _, j := range cs.gs {
			rc, rv = append(rc, j), append(rv, w)
		}
		rows = append(rows, lp.Row{Name: fmt.Sprintf("%s_%d", name, di), Lower: lower, Upper: lp.Inf, Index: rc, Value: rv})
	}
	return rows
}

// Limits of the cut-set separation.
const (
	// maxSeparatedRows caps the rows one separation call returns (the
	// most violated first).
	maxSeparatedRows = 200
	// minCutViolation is the least violation (in the row's own units,
	// modules) of a separated row.
	minCutViolation = 1e-3
)

// separateCutSets returns MIR cut-set rows (see addCutSets) that the LP
// point x violates, over site sets the static rows do not cover. For each
// year, starting from each site and from the two ends of each link, it
// grows a connected set one neighbour at a time, always adding the site
// that leaves the least spare capacity across the cut at x (capacity
// across minus traffic served across: where that is small the rounding to
// whole modules bites), and tests the rows of every set on the way up to
// all but two sites. For every set on the way, the starting single site
// or pair included, it also tests the rows on subsets of the crossing
// demands (subsetCutSetRows), which bite where the LP serves some demands
// in full and leaves others short, and the rows in which the links with
// spare capacity at x count by their flow (flowCrossings). Cost per call
// O(years · (sites + links) · sites · (sites + demands + options + links ·
// sources)): the gains of the candidate sites are kept up to date as the
// set grows, and a row is built only when x violates it.
// BenchmarkSeparateCutSets: 8 ms on the synthetic M case, 23 ms on L (50
// sites, 10 years), before the subset rows; 20 and 64 ms with them,
// measured on a busier machine; 30 and 83 ms with the flow rows, alone on
// the machine (with a long solve beside it, 28 and 67 ms without them).
//
// What the flow rows buy, measured on 2026-12-04: the 16 synthetic
// 10-site 7-year cases (seeds 1–16) prove optimality with 4,683 nodes in
// all against 8,549, in 54.8 s against 64.6 s (alone on the machine); the
// rest was measured with a long solve beside (both builds alike). The
// root bound after the cut rounds falls on every case tried
// (10 sites, 7 years, seeds 1–3: 1,725,268 → 1,723,726, 1,609,554 →
// 1,604,748 and 1,332,267 → 1,330,856, optima 1,715,132, 1,598,939 and
// 1,328,801; 10 sites, 10 years: 2,160,397 → 2,158,778; 15 sites, 10
// years: 2,743,266 → 2,740,342; M: 3,051,998 → 3,051,780; L: 8,503,292 →
// 8,497,724). M's search does the same work per node (BenchmarkSolveNodes:
// 300 nodes in 30.6 s against 31.6 s). The embedded demo got worse: 134
// nodes against 70, on another path that stops, within the default gap,
// at a plan 75 of NPV below the one it stopped at before.
func (m *Model) separateCutSets(x []float64) []lp.Row {
	c := m.Case
	n := len(c.Sites)
	if n < 5 {
		return nil
	}
	// Spare capacity across a cut changes, when site u joins, by what
	// crosses between u and the rest: links and demands by end pair.
	adj := c.linksAtSites() // adj[u]: links at u
	type found struct {
		row  lp.Row
		viol float64
	}
	var out []found
	seen := map[string]bool{}
	in := make([]bool, n)
	frontier := make([]bool, n)
	gain := make([]float64, n)
	spare0 := make([]float64, n)
	memberBuf := make([]int, 0, n)
	linkCap := make([]float64, len(c.Links))
	arcFlow := make([]float64, 2*len(c.Links))
	pair := make([][]float64, n) // served traffic between two sites at x
	for u := range pair {
		pair[u] = make([]float64, n)
	}
	mask := make([]byte, (n+7)/8) // the set as a bit mask
	for t := 0; t < c.Horizon; t++ {
		clear(seen)
		m.loadsAt(x, t, linkCap, arcFlow)
		for u := range pair {
			clear(pair[u])
		}
		for k, d := range c.Demands {
			v := x[m.served[k][t]]
			pair[d.A][d.B] += v
			pair[d.B][d.A] += v
		}
		// spare0[u]: the spare capacity around u alone (capacity of its
		// links less the traffic served to and from it).
		for u := 0; u < n; u++ {
			g := 0.0
			for _, li := range adj[u] {
				g += linkCap[li]
			}
			for v := 0; v < n; v++ {
				g -= pair[u][v]
			}
			spare0[u] = g
		}
		// Seeds: every site, then both ends of every link.
		for seed := 0; seed < n+len(c.Links); seed++ {
			clear(in)
			clear(frontier)
			clear(mask)
			// gain[v]: the change of spare capacity across the cut when
			// v joins the set; join keeps it (and the frontier of sites
			// linked to the set) up to date in O(sites + degree).
			copy(gain, spare0)
			members := memberBuf[:0]
			join := func(u int) {
				in[u] = true
				mask[u/8] |= 1 << (u % 8)
				members = append(members, u)
				for v := 0; v < n; v++ {
					gain[v] += 2 * pair[v][u]
				}
				for _, li := range adj[u] {
					l := &c.Links[li]
					v := l.A + l.B - u
					gain[v] -= 2 * linkCap[li]
					frontier[v] = true
				}
			}
			// test adds the violated rows of the set as it stands.
			test := func() {
				cs := m.crossing(in, t)
				rows := m.subsetCutSetRows("sub", &cs, t, x)
				if len(members) >= 3 { // singles and pairs are static rows already
					rows = append(rows, m.crossingRows("sep", &cs, x)...)
				}
				for _, fc := range m.flowCrossings(&cs, in, t, linkCap, arcFlow) {
					rows = append(rows, m.crossingRows("flow", &fc, x)...)
					rows = append(rows, m.subsetCutSetRows("flowsub", &fc, t, x)...)
				}
				for _, row := range rows {
					if v := row.Lower - rowActivity(row, x); v > minCutViolation {
						out = append(out, found{row, v})
					}
				}
			}
			if seed < n {
				join(seed)
			} else {
				l := &c.Links[seed-n]
				join(l.A)
				join(l.B)
			}
			if key := string(mask); !seen[key] {
				seen[key] = true
				test()
			}
			for len(members) < n-2 {
				best, bestGain := -1, math.Inf(1)
				for v := 0; v < n; v++ {
					if frontier[v] && !in[v] && gain[v] < bestGain {
						best, bestGain = v, gain[v]
					}
				}
				if best < 0 {
					break
				}
				join(best)
				key := string(mask) // the set (the year is fixed in this loop)
				if seen[key] {
					continue
				}
				seen[key] = true
				test()
			}
		}
	}
	sort.SliceStable(out, func(a, b int) bool { return out[a].viol > out[b].viol })
	if len(out) > maxSeparatedRows {
		out = out[:maxSeparatedRows]
	}
	rows := make([]lp.Row, len(out))
	for k, f := range out {
		rows[k] = f.row
	}
	return rows
}

// rowActivity is Σ row.Value·x over the row's columns.
func rowActivity(row lp.Row, x []float64) float64 {
	a := 0.0
	for k, j := range row.Index {
		a += row.Value[k] * x[j]
	}
	return a
}
