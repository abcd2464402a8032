package plans

import (
	"context"
	"math"
	"slices"
	"sort"
	"time"

	"netstage/lp"
	"netstage/mip"
)

// Limits of the plan improvement (improver).
const (
	// improveUpTrials is how many moves that raise units one pass tries,
	// and improveSwapTrials how many that swap items.
	improveUpTrials   = 50
	improveSwapTrials = 50
	// improveMaxTrials bounds the LP trials of one call.
	improveMaxTrials = 4000
	// improveShiftTrials bounds the shifts one pass tries (on the
	// synthetic 50-site case a pass ranks about 650; in a first version,
	// which tried failed shifts again, improving ones turned up as late as
	// the 586th).
	improveShiftTrials = 1000
	// improveShare is the share of the time left before the deadline that
	// one call may use.
	improveShare = 0.3
	// improveRelTol is the least relative gain of an accepted move.
	improveRelTol = 1e-9
	// replanTime caps one regional re-plan (replan), and replanMinTime is
	// the least time left before the deadline for one to start. On the
	// synthetic 50-site case a region's sub-MIP does 60 to 700 nodes in
	// 40 s; most of its better plans came within that.
	replanTime    = 40 * time.Second
	replanMinTime = time.Second
	// replanRelGap is the sub-MIP's relative gap.
	replanRelGap = 1e-5
)

// improver is a local search on a plan's unit counts. Starting from a
// feasible point of the MIP, it ranks every move of one unit — add a unit
// from an order year on, remove one, order one a year later or a year
// earlier, swap one for another item on the same link ordered the same
// year — by the reduced costs of the LP with the integer columns fixed (a
// first-order estimate of the move's effect on −NPV, optimistic), tries
// them in that order with the LP itself, and keeps each one that improves
// the NPV; after a pass that kept a move it ranks again. When a pass keeps
// none, it tries shifts (shiftMove: a unit leaves a link and one arrives on
// a neighbouring link in the same order year), which no single move can
// make when each half alone loses; it stops when no shift pays either.
// The LP re-routes the traffic around each change, so a move is judged
// with the network effects the rounding heuristic cannot see: a module
// bought on one link lets traffic leave a fractionally loaded neighbour,
// and a unit that carries little can go.
//
// The fixed LP is one solver kept across calls; each trial changes a few
// column bounds and re-solves by dual simplex from the last accepted basis,
// with the current NPV as cutoff.
type improver struct {
	m        *Model
	deadline time.Time // zero: none
	sv       *lp.Solver
	intCols  []int   // the model's integer columns
	byLink   [][]int // the options of each link
	cols     [][]int // cols[oi]: option oi's unit columns (orderCols)
	// step[oi][tau] is the position in cols[oi] of option oi's column of
	// order year tau (−1: none).
	step [][]int
	// fixed[j] is the value integer column j is fixed at in sv.
	fixed []float64
	// settled holds the integer values of the last point from which a
	// whole pass found no improving move (nil: none yet).
	settled []float64
	// neighbours[l] lists the links that share a site with link l.
	neighbours [][]int
	// noShifts turns the shifts off (for tests and measurements), and
	// shiftsKept counts the shifts kept.
	noShifts   bool
	shiftsKept int
	// regions holds regionNeighbourhoods (built on first use) and
	// nextRegion the site whose region replan tries next.
	regions    [][]int
	nextRegion int
	// onRegion, when set, is told the site whose region replan starts
	// on, and −1 when that region's sub-MIP has ended (the progress
	// reports show it).
	onRegion func(site int)
}

// newImprover returns an improver for m that stops at deadline (zero:
// none) or at the end of the context of its call.
func (m *Model) newImprover(deadline time.Time) *improver {
	im := &improver{m: m, deadline: deadline, byLink: m.optionsByLink(),
		cols: make([][]int, len(m.options)), step: make([][]int, len(m.options))}
	for oi := range m.options {
		im.cols[oi] = m.options[oi].orderCols()
		im.step[oi] = make([]int, len(m.options[oi].col))
		i := 0
		for tau, j := range m.options[oi].col {
			im.step[oi][tau] = -1
			if j >= 0 {
				im.step[oi][tau] = i
				i++
			}
		}
	}
	isStep := make([]bool, m.LP.NumCols())
	for _, st := range m.steps {
		isStep[st.col] = true
	}
	for j, isInt := range m.LP.Integer {
		// The step columns follow the units through their rows (and mip
		// completes a candidate with them free): fixing them would pin
		// the capacity every move changes.
		if isInt && !isStep[j] {
			im.intCols = append(im.intCols, j)
		}
	}
	links := m.Case.Links
	atSite := m.Case.linksAtSites()
	im.neighbours = make([][]int, len(links))
	for l := range links {
		for _, site := range []int{links[l].A, links[l].B} {
			for _, k := range atSite[site] {
				if k != l && !slices.Contains(im.neighbours[l], k) {
					im.neighbours[l] = append(im.neighbours[l], k)
				}
			}
		}
	}
	return im
}

// Kinds of unitMove.
const (
	moveAdd     = iota // one more unit from order step i on
	moveRemove         // one unit less from order step i on
	moveLater          // a unit ordered at step i moves to step i+1
	moveEarlier        // a unit ordered at step i+1 moves to step i
	moveSwap           // a unit of option oi ordered in year tau becomes one of option oj (same link)
)

// unitMove is one move of the local search on option oi's cumulative unit
// columns, at the i-th order step of the option (its i-th column).
type unitMove struct {
	oi, i, kind int
	estimate    float64 // first-order change of −NPV
	oj, tau     int     // moveSwap only
}

// improve returns a point better than x (a feasible point of the MIP) when
// it finds one, else nil. It makes passes over the ranked moves, keeping
// every move that improves the NPV as it goes, and ranks again after a
// pass that kept one.
func (im *improver) improve(ctx context.Context, x []float64, basis *lp.Basis) []float64 {
	if im.isSettled(x) {
		// mip offers the point this search returned: the moves are done
		// with it, the regions may not be.
		return im.replan(ctx, x)
	}
	start := time.Now()
	var stopAt time.Time
	if !im.deadline.IsZero() {
		stopAt = start.Add(time.Duration(improveShare * float64(time.Until(im.deadline))))
	}
	over := func() bool {
		return ctx.Err() != nil || (!stopAt.IsZero() && time.Now().After(stopAt))
	}
	set := lp.Settings{}
	if !stopAt.IsZero() {
		set.TimeLimit = time.Until(stopAt)
		if set.TimeLimit <= 0 {
			return nil
		}
	}
	if im.sv == nil {
		sv, err := lp.NewSolver(im.m.LP, set)
		if err != nil {
			return nil
		}
		im.sv = sv
		im.fixed = make([]float64, len(x))
		for j := range im.fixed {
			im.fixed[j] = math.NaN()
		}
	}
	if basis != nil {
		_ = im.sv.SetBasis(*basis)
	}
	y := append([]float64(nil), x...)
	im.fix(y)
	im.sv.SetSettings(set)
	r := im.sv.Solve(ctx)
	if r.Status != lp.Optimal {
		return nil
	}
	best := r
	improved := false
	trials := 0
	state := im.sv.SaveState() // of the point y
	z := append([]float64(nil), y...)
	// reset sets z's integer columns to y's (only they matter: the LP sets
	// the others) before a move is applied to it.
	reset := func() {
		for _, j := range im.intCols {
			z[j] = y[j]
		}
	}
	// try solves the LP at z, with the current NPV as cutoff. When z is
	// better it becomes the current point y and try reports true; else the
	// solver goes back to y. It reports stop when the time share is out.
	try := func() (kept, stop bool) {
		tol := improveRelTol * math.Max(1, math.Abs(best.Objective))
		set.HasCutoff, set.ObjectiveCutoff = true, best.Objective-tol
		if !stopAt.IsZero() {
			if set.TimeLimit = time.Until(stopAt); set.TimeLimit <= 0 {
				return false, true
			}
		}
		trials++
		im.fix(z)
		im.sv.SetSettings(set)
		t := im.sv.Solve(ctx)
		if t.Status == lp.Optimal && t.Objective < best.Objective-tol {
			y, z = z, y
			best, improved = t, true
			state = im.sv.SaveState()
			return true, false
		}
		im.sv.RestoreState(state)
		im.fix(y)
		return false, false
	}
	// A move that failed is not tried again in this call (unless a shift
	// is kept, see below): after other moves it might pay, but rarely, and
	// retrying every failure in every pass spent most trials on large
	// cases. The same holds for shifts.
	failed := map[unitMove]bool{}
	failedShifts := map[shiftMove]bool{}
	for trials < improveMaxTrials && !over() {
		accepted := false
		ups, swaps := 0, 0
		for _, mv := range im.moves(y, best.ReducedCost) {
			if trials >= improveMaxTrials || over() {
				break
			}
			key := mv
			key.estimate = 0
			if failed[key] {
				continue
			}
			raises := mv.kind == moveAdd || mv.kind == moveEarlier
			if raises && ups >= improveUpTrials {
				break // the raising moves come last
			}
			if mv.kind == moveSwap && swaps >= improveSwapTrials {
				continue
			}
			reset()
			if !im.apply(z, mv) {
				continue
			}
			if raises {
				ups++
			} else if mv.kind == moveSwap {
				swaps++
			}
			kept, stop := try()
			if stop {
				break
			}
			if kept {
				accepted = true
				continue
			}
			failed[key] = true
		}
		if !accepted && !im.noShifts {
			tried := 0
			for _, sh := range im.shifts(y, best.ReducedCost) {
				if trials >= improveMaxTrials || tried >= improveShiftTrials || over() {
					break
				}
				key := sh
				key.out.estimate, key.in.estimate = 0, 0
				if failedShifts[key] {
					continue
				}
				reset()
				if !im.apply(z, sh.out) || !im.apply(z, sh.in) {
					continue
				}
				tried++
				kept, stop := try()
				if stop {
					break
				}
				if kept {
					accepted = true
					im.shiftsKept++
					break
				}
				failedShifts[key] = true
			}
			if accepted {
				// The shift changed the neighbourhood of every move: single
				// moves that failed before may pay now.
				clear(failed)
				continue
			}
		}
		if !accepted {
			if !over() && trials < improveMaxTrials {
				im.settled = im.settled[:0]
				for _, j := range im.intCols {
					im.settled = append(im.settled, y[j])
				}
			}
			break
		}
	}
	if !improved {
		if im.isSettled(y) {
			return im.replan(ctx, x)
		}
		return nil
	}
	out := append([]float64(nil), best.X...)
	for _, j := range im.intCols {
		out[j] = y[j]
	}
	return out
}

// isSettled reports whether x has the integer values of the last point
// where a pass found no improving move.
func (im *improver) isSettled(x []float64) bool {
	if im.settled == nil {
		return false
	}
	for k, j := range im.intCols {
		if x[j] != im.settled[k] {
			return false
		}
	}
	return true
}

// fix sets the bounds of sv's integer columns to the values of y, touching
// only the columns whose value changed.
func (im *improver) fix(y []float64) {
	for _, j := range im.intCols {
		if y[j] != im.fixed[j] {
			im.sv.SetColBounds(j, y[j], y[j])
			im.fixed[j] = y[j]
		}
	}
}

// moves lists the unit moves whose first-order estimate (from the fixed
// LP's reduced costs d at the point y) improves −NPV: the moves that lower
// units first, best first, then the swaps, then those that raise units. The
// estimate is optimistic (the LP's value is convex in each fixed column),
// and far more so when units rise, since the duals price all the new
// capacity as if every Gbps of it carried traffic.
func (im *improver) moves(y, d []float64) []unitMove {
	m := im.m
	tail := im.tails(d)
	var down, up []unitMove
	for oi := range m.options {
		o := &m.options[oi]
		for tau := len(o.col) - 1; tau >= 0; tau-- {
			j := o.col[tau]
			if j < 0 {
				continue
			}
			i := im.step[oi][tau]
			if e := tail[oi][tau]; e < 0 {
				up = append(up, unitMove{oi: oi, i: i, kind: moveAdd, estimate: e})
			} else if e > 0 {
				down = append(down, unitMove{oi: oi, i: i, kind: moveRemove, estimate: -e})
			}
			if i+1 < len(im.cols[oi]) {
				if dj := d[j]; dj > 0 {
					down = append(down, unitMove{oi: oi, i: i, kind: moveLater, estimate: -dj})
				} else if dj < 0 {
					up = append(up, unitMove{oi: oi, i: i, kind: moveEarlier, estimate: dj})
				}
			}
		}
	}
	swaps := im.swaps(y, tail)
	byEstimate := func(ms []unitMove) {
		sort.SliceStable(ms, func(a, b int) bool { return ms[a].estimate < ms[b].estimate })
	}
	byEstimate(down)
	byEstimate(swaps)
	byEstimate(up)
	return append(append(down, swaps...), up...)
}

// tails returns tail[oi][tau], the sum of the reduced costs d over option
// oi's unit columns of order years ≥ tau (0 for tau = horizon): the
// first-order estimate of one more unit of oi ordered in year tau.
func (im *improver) tails(d []float64) [][]float64 {
	m := im.m
	T := m.Case.Horizon
	tail := make([][]float64, len(m.options))
	for oi := range m.options {
		tail[oi] = make([]float64, T+1)
		for tau := T - 1; tau >= 0; tau-- {
			tail[oi][tau] = tail[oi][tau+1]
			if j := m.options[oi].col[tau]; j >= 0 {
				tail[oi][tau] += d[j]
			}
		}
	}
	return tail
}

// swaps lists the moves that turn a unit of one item ordered in some year
// into a unit of another item on the same link ordered that year (a larger
// module, another vendor) whose estimate, from the tails of the reduced
// costs (see tails), improves −NPV.
func (im *improver) swaps(y []float64, tail [][]float64) []unitMove {
	m := im.m
	T := m.Case.Horizon
	var out []unitMove
	for _, opts := range im.byLink {
		for _, oi := range opts {
			for _, oj := range opts {
				if oi == oj {
					continue
				}
				for tau := 0; tau < T; tau++ {
					if m.options[oi].col[tau] < 0 || m.options[oj].col[tau] < 0 || !m.options[oi].orderedIn(y, tau) {
						continue
					}
					if e := tail[oj][tau] - tail[oi][tau]; e < 0 {
						out = append(out, unitMove{oi: oi, kind: moveSwap, estimate: e, oj: oj, tau: tau})
					}
				}
			}
		}
	}
	return out
}

// orderedIn reports whether y orders at least one unit of o in year tau
// (o must offer that year).
func (o *option) orderedIn(y []float64, tau int) bool {
	prev := 0.0
	for p := tau - 1; p >= 0; p-- {
		if o.col[p] >= 0 {
			prev = y[o.col[p]]
			break
		}
	}
	return y[o.col[tau]]-1 >= prev-heuristicIntTol
}

// orderCols returns o's cumulative unit columns in order-year order.
func (o *option) orderCols() []int {
	var cols []int
	for _, j := range o.col {
		if j >= 0 {
			cols = append(cols, j)
		}
	}
	return cols
}

// apply makes move mv on z when z allows it (units stay within bounds and
// non-decreasing), and sets the columns that follow from the units (builds
// of candidate links, tiers, vendor choices). It reports false when the
// move is not possible or breaks a link's slot limit or a one-vendor rule.
func (im *improver) apply(z []float64, mv unitMove) bool {
	m := im.m
	if mv.kind == moveSwap {
		return im.applySwap(z, mv)
	}
	cols := im.cols[mv.oi]
	i, n := mv.i, len(cols)
	prev := 0.0
	if i > 0 {
		prev = z[cols[i-1]]
	}
	switch mv.kind {
	case moveAdd:
		if z[cols[n-1]]+1 > m.LP.ColUpper[cols[n-1]]+heuristicIntTol {
			return false
		}
		for _, j := range cols[i:] {
			z[j]++
		}
	case moveRemove:
		if z[cols[i]]-1 < prev-heuristicIntTol {
			return false
		}
		for _, j := range cols[i:] {
			z[j]--
		}
	case moveLater:
		if z[cols[i]]-1 < prev-heuristicIntTol {
			return false
		}
		z[cols[i]]--
	case moveEarlier:
		if z[cols[i]]+1 > z[cols[i+1]]+heuristicIntTol {
			return false
		}
		z[cols[i]]++
	}
	return im.settle(z)
}

// applySwap makes the moveSwap mv on z (see apply).
func (im *improver) applySwap(z []float64, mv unitMove) bool {
	m := im.m
	from, to := &m.options[mv.oi], &m.options[mv.oj]
	if !from.orderedIn(z, mv.tau) || z[to.col[to.lastOrder]]+1 > m.LP.ColUpper[to.col[to.lastOrder]]+heuristicIntTol {
		return false
	}
	for tau := mv.tau; tau < len(from.col); tau++ {
		if j := from.col[tau]; j >= 0 {
			z[j]--
		}
		if j := to.col[tau]; j >= 0 {
			z[j]++
		}
	}
	return im.settle(z)
}

// settle sets the columns that follow from the units of z (builds of
// candidate links, tiers, vendor choices); it reports false when z breaks
// a link's slot limit or a one-vendor rule.
func (im *improver) settle(z []float64) bool {
	m := im.m
	if !m.slotsFit(z) {
		return false
	}
	m.gateBuilds(z)
	m.setTiers(z)
	return m.setVendorChoice(z)
}

// slotsFit reports whether the units of z fit every link's slot limit.
func (m *Model) slotsFit(z []float64) bool {
	c := m.Case
	used := make([]float64, len(c.Links))
	for oi := range m.options {
		o := &m.options[oi]
		if o.lastOrder < 0 {
			continue
		}
		used[o.link] += float64(c.Items[o.item].SlotsPerUnit) * z[o.col[o.lastOrder]]
	}
	for l := range c.Links {
		if s := c.Links[l].Slots; s != UnlimitedSlots && used[l] > float64(s)+heuristicIntTol {
			return false
		}
	}
	return true
}

// shiftMove takes a unit ordered in some year off one link (out, a
// moveRemove from that order step on) and adds one on a link that shares a
// site with it (in, a moveAdd of any of its items from the same order year
// on): traffic that crossed the first link can take the second. Measured
// against the single moves alone (one solve at a time, same build): the
// synthetic 50-site case ends its 60 s with an NPV of 8,283,141 to
// 8,299,199 (four runs; the local search's time share depends on timing)
// against 8,272,404, and its 120 s with 8,302,748; the 16 synthetic
// 10-site 7-year proofs take 53.4–56.0 s in all against 56.8–61.7 s
// (7,632 nodes against 7,933).
type shiftMove struct {
	out, in unitMove
}

// shifts lists the shift moves from y whose first-order estimate (the sum
// of its two halves', from the reduced costs d, see tails) improves −NPV,
// best first. Each half alone may lose: the pair is what a single move
// cannot make.
func (im *improver) shifts(y, d []float64) []shiftMove {
	m := im.m
	tail := im.tails(d)
	var out []shiftMove
	for oi := range m.options {
		o := &m.options[oi]
		for tau, j := range o.col {
			if j < 0 || !o.orderedIn(y, tau) {
				continue
			}
			rm := unitMove{oi: oi, i: im.step[oi][tau], kind: moveRemove, estimate: -tail[oi][tau]}
			for _, l := range im.neighbours[o.link] {
				for _, oj := range im.byLink[l] {
					if i := im.step[oj][tau]; i >= 0 {
						add := unitMove{oi: oj, i: i, kind: moveAdd, estimate: tail[oj][tau]}
						if rm.estimate+add.estimate < 0 {
							out = append(out, shiftMove{out: rm, in: add})
						}
					}
				}
			}
		}
	}
	sort.SliceStable(out, func(a, b int) bool {
		return out[a].out.estimate+out[a].in.estimate < out[b].out.estimate+out[b].in.estimate
	})
	return out
}

// replan searches the regions of regionNeighbourhoods in turn, from the
// one after the last it tried: for each, a sub-MIP (with the rounding
// heuristic and the cut-set separation) over the region's integer columns,
// the others fixed at x's values, for up to replanTime. It returns the
// first point better than x, or nil when the time runs out or a whole
// round of regions finds none. It runs only when the improver has a
// deadline: with a time limit mip does not wait for the improver at its
// call points, so the re-plans use time beside the search; without one
// they would hold the search up (and proofs and goldens keep their path).
// Measured on 2026-12-04 on the synthetic cases: the 50-site case at
// 600 s ended at plans of 8,301,728 and 8,301,745 and a gap of 2.30 %
// (two runs), against 8,288,791 (every 600 s run without) and 2.46 %; M
// (25 sites, 7 years) at 60 s at a gap of 0.45 % against 0.49 %, and 20
// sites over 10 years at 0.93 % against 1.02 and 1.17 % (one run with,
// two without). The 50-site case at 60 s is unchanged (2.69 %): its local
// search settles only near the end.
func (im *improver) replan(ctx context.Context, x []float64) []float64 {
	if im.deadline.IsZero() {
		return nil
	}
	m := im.m
	if im.regions == nil {
		im.regions = m.regionNeighbourhoods()
	}
	if len(im.regions) == 0 {
		return nil
	}
	obj, _ := m.LP.Evaluate(x)
	tol := improveRelTol * math.Max(1, math.Abs(obj))
	free := make([]bool, len(x))
	for range im.regions {
		left := time.Until(im.deadline)
		if left < replanMinTime || ctx.Err() != nil {
			return nil
		}
		region := im.regions[im.nextRegion]
		im.showReplanning(im.nextRegion)
		im.nextRegion = (im.nextRegion + 1) % len(im.regions)
		clear(free)
		for _, j := range region {
			free[j] = true
		}
		sub := m.LP.Clone()
		for _, j := range im.intCols {
			if !free[j] {
				sub.ColLower[j], sub.ColUpper[j] = x[j], x[j]
			}
		}
		// No separation at plunge starts: on the 15-site 10-year case at
		// 300 s, the re-plans with it ended at a plan 3,256 worse, in
		// two runs.
		set := mip.Settings{TimeLimit: min(replanTime, left), RelGap: replanRelGap, Start: x,
			Heuristic: m.roundUpHeuristic, Separate: m.separateCutSets, NoRINS: true, NoPlungeCuts: true}
		r, err := mipSolve(ctx, sub, set)
		im.showReplanning(-1)
		if err != nil || r.X == nil {
			continue
		}
		if o, _ := m.LP.Evaluate(r.X); o < obj-tol {
			return r.X
		}
	}
	return nil
}

// showReplanning passes site (−1: none) to onRegion when it is set.
func (im *improver) showReplanning(site int) {
	if im.onRegion != nil {
		im.onRegion(site)
	}
}

// regionNeighbourhoods returns, for each site, the integer columns of the
// plan in its region: the unit and build columns of every link with an
// end at the site or at one of its neighbours, and the integer columns
// that belong to no link (vendor tiers), which a change of purchases may
// move. The improver re-plans one region at a time with the rest of the
// plan fixed (improver.replan), and so finds changes of many units around
// a site that neither the rounding nor its own one- and two-unit moves
// reach.
func (m *Model) regionNeighbourhoods() [][]int {
	c := m.Case
	linkCols := make([][]int, len(c.Links))
	onLink := make([]bool, m.LP.NumCols())
	for oi := range m.options {
		o := &m.options[oi]
		for _, j := range o.col {
			if j >= 0 {
				linkCols[o.link] = append(linkCols[o.link], j)
				onLink[j] = true
			}
		}
	}
	for _, b := range m.builds {
		for _, j := range b.col {
			if j >= 0 {
				linkCols[b.link] = append(linkCols[b.link], j)
				onLink[j] = true
			}
		}
	}
	var shared []int
	for j, isInt := range m.LP.Integer {
		if isInt && !onLink[j] {
			shared = append(shared, j)
		}
	}
	atSite := c.linksAtSites()
	out := make([][]int, 0, len(c.Sites))
	for v := range c.Sites {
		near := map[int]bool{v: true}
		for _, l := range atSite[v] {
			near[c.Links[l].A], near[c.Links[l].B] = true, true
		}
		hood := append([]int(nil), shared...)
		for l, link := range c.Links {
			if near[link.A] || near[link.B] {
				hood = append(hood, linkCols[l]...)
			}
		}
		out = append(out, hood)
	}
	return out
}
