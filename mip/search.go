package mip

import (
	"context"
	"math"
	"time"

	"netstage/lp"
)

// Search parameters (common practice values, tuned on small benchmarks).
const (
	maxCutRounds   = 20 // root cutting-plane rounds
	cutStallRounds = 3  // rounds without bound progress before cutting stops
	cutStallRel    = 1e-4
	// a round also stalls when it adds less than this share of the bound
	// gained since the first root LP
	cutStallShare     = 0.005
	maxStrongBranch   = 10  // strong-branching candidates per node
	strongLookahead   = 4   // candidates without improvement before strong branching stops
	minStrongIters    = 10  // iteration cap of one strong-branching LP, at least …
	maxStrongIters    = 200 // … and at most
	bestBoundEvery    = 5   // every this many selections the best-bound node is taken
	plungeGapFraction = 0.5 // a plunge stops when the child's bound is this far into the gap
	maxPlungeDepth    = 1000
	maxDiveDepth      = 200
	diveEvery         = 200  // nodes between two dives
	repairEvery       = 10   // nodes between two roundings repaired by LP
	maxTreeCuts       = 100  // pool cuts that may re-enter the LP in the tree (40 pruned less on the 10-site 7-year cases, 300 and 1000 no more; 300 helped M at 600 s and hurt the 10-year case at 300 s)
	treeSeparateDepth = 3    // the caller's cuts are separated at nodes down to this depth (treeSeparate) …
	maxTreeSeparated  = 100  // … until this many have entered the LP
	diveIterFactor    = 4    // a dive's LP iteration cap, in mean iterations per node
	maxNodeResolves   = 20   // re-solves of one node after strong branching fixes a column
	strongShare       = 0.5  // strong-branching iterations allowed per node LP iteration …
	strongOffset      = 5000 // … plus this many (common practice: a half, plus an offset)
	// the caller's heuristic also runs at each of the first nodes: a large
	// model may not reach node HeuristicFreq before its time limit
	earlyHeuristicNodes = 5
)

// Below treeSeparateDepth, a node taken from the queue (where a plunge
// starts) is separated too, with c-MIR as well when Settings.CMIR, taking
// at most maxStartSeparated of the cuts it finds, most efficacious first,
// until maxStartCuts have entered the LP that way, and trying at most
// maxStartSeparations nodes (plungeStartSeparate).
const (
	maxStartSeparated   = 20
	maxStartCuts        = 200
	maxStartSeparations = 50
)

// run performs the whole search and returns the result.
func (s *search) run(starts [][]float64) Result {
	p, ok := newProblem(modelOf(s), s.set.IntTol)
	s.p = p
	s.queue = newNodeQueue()
	if !ok {
		return s.result(Infeasible)
	}
	lps, err := lp.NewSolver(p.work, s.lpSet)
	if err != nil {
		// NewSolver validated the model already; this is unexpected.
		s.stopped = LPFailure
		return s.result(Limit)
	}
	s.lps = lps
	if s.startBasis != nil {
		_ = lps.SetBasis(*s.startBasis)
	}
	n := p.n
	s.glo = append([]float64(nil), p.lower...)
	s.gup = append([]float64(nil), p.upper...)
	s.lo = append([]float64(nil), s.glo...)
	s.up = append([]float64(nil), s.gup...)
	s.nodeLo = append([]float64(nil), s.glo...)
	s.nodeUp = append([]float64(nil), s.gup...)
	s.lpLo = append([]float64(nil), p.work.ColLower...)
	s.lpUp = append([]float64(nil), p.work.ColUpper...)
	s.prop = newPropagator(p)
	s.pc = newPseudocosts(n)
	s.poolKeys = map[uint64]bool{}
	s.initRows()
	s.initLocks()

	// Root propagation on the global domain.
	if !s.prop.propagate(s.glo, s.gup, nil, nil) {
		return s.result(Infeasible)
	}
	// Through continuous columns too. Should it find the domain empty, the
	// root LP is left to say so: its tolerances are the continuous
	// columns' own.
	s.prop.impliedBounds(s.glo, s.gup)
	copy(s.lo, s.glo)
	copy(s.up, s.gup)
	s.syncBounds()

	for _, x := range starts {
		s.tryCandidate(x)
	}

	// Root LP.
	r := s.lpSolve(inf, 0)
	s.lpSolved = r.Status == lp.Optimal
	s.rootIters = s.iters
	s.nodes = 1
	s.lateStart()
	switch r.Status {
	case lp.Optimal:
	case lp.Infeasible:
		return s.result(Infeasible)
	case lp.Unbounded:
		return s.unboundedOrInfeasible()
	default:
		s.nodes = 0 // the root LP did not finish: no node LP was solved
		if s.limitReached() || r.Status == lp.TimeLimit || r.Status == lp.Cancelled {
			if r.Status == lp.TimeLimit {
				s.stopped = TimeLimit
			} else if r.Status == lp.Cancelled {
				s.stopped = Cancelled
			}
			return s.finish()
		}
		s.stopped = LPFailure
		return s.finish()
	}
	s.rootBound = p.roundBound(r.Objective)
	s.curBound = s.rootBound
	if !s.set.NoHeuristics {
		s.simpleRounding(r.X, true)
	}
	s.callHeuristic(r.X)
	if !s.set.NoCuts {
		r = s.rootCuts(r)
		if r.Status != lp.Optimal {
			return s.afterRootFailure(r)
		}
		s.rootBound = p.roundBound(r.Objective)
		s.curBound = s.rootBound
		if s.nCuts > 0 {
			// The cuts moved the LP point towards the integer hull: round
			// it again (on large models the tree may not reach the next
			// heuristic call before the time limit).
			if !s.set.NoHeuristics {
				s.simpleRounding(r.X, true)
			}
			s.callHeuristic(r.X)
		}
	}
	s.rootObj = r.Objective
	s.rootRedCst = append([]float64(nil), r.ReducedCost...)
	s.rootX = append([]float64(nil), r.X...)
	s.rootFixing()
	if !s.set.NoHeuristics {
		s.dive(r.X)
	}
	s.progress(false)

	root := &node{id: s.nextID(), branchVar: -1, bound: s.rootBound, estimate: s.rootBound, solved: true}
	root.basis = packBasis(s.lps.Basis())
	s.curBound = inf
	s.treeSearch(root)
	return s.finish()
}

// lateStart tries the point of Settings.LateStart (called once, right
// after the root LP).
func (s *search) lateStart() {
	if s.set.LateStart == nil {
		return
	}
	if x := s.set.LateStart(); x != nil {
		s.tryCandidate(x)
	}
}

// modelOf returns the model the search was built for.
func modelOf(s *search) *lp.Model { return s.model }

func (s *search) nextID() int { s.ids++; return s.ids }

// finish turns the search state into a Result.
func (s *search) finish() Result {
	if proofUseHook != nil {
		proofUseHook(s.proofPrunes, s.proofFixes)
	}
	s.joinHelper(s.stopped == TimeLimit || s.stopped == Cancelled)
	if s.stopped == Finished || s.stopped == LPFailure {
		if s.queue.Len() == 0 {
			if s.incX != nil {
				if s.lpLost && s.gapOpen() {
					s.stopped = LPFailure
					return s.result(Feasible)
				}
				s.stopped = Finished
				return s.result(Optimal)
			}
			if s.lpLost || s.stopped == LPFailure {
				s.stopped = LPFailure
				return s.result(Limit)
			}
			return s.result(Infeasible)
		}
	}
	if s.incX != nil {
		if !s.gapOpen() {
			s.stopped = Finished
			return s.result(Optimal)
		}
		return s.result(Feasible)
	}
	return s.result(Limit)
}

// gapOpen reports whether the proven bound is still further from the
// incumbent than the gap settings allow.
func (s *search) gapOpen() bool {
	b := s.globalBound()
	return s.incObj-b > s.gapTol()*(1+1e-9)
}

// afterRootFailure handles a root LP that stopped being optimal during
// cutting (limits, cutoff, numerical trouble).
func (s *search) afterRootFailure(r lp.Result) Result {
	switch r.Status {
	case lp.ObjectiveCutoff, lp.Infeasible:
		// Valid cuts and the cutoff exclude every better point.
		s.joinHelper(false)
		s.curBound = inf
		if s.incX != nil {
			s.notePruned(s.pruneLimit())
			return s.result(Optimal)
		}
		return s.result(Infeasible)
	case lp.TimeLimit:
		s.stopped = TimeLimit
	case lp.Cancelled:
		s.stopped = Cancelled
	default:
		s.stopped = LPFailure
	}
	return s.finish()
}

// unboundedOrInfeasible decides a MIP whose LP relaxation is unbounded: with
// rational data it is unbounded exactly when it has a feasible point, which
// a search with a zero objective finds.
func (s *search) unboundedOrInfeasible() Result {
	m := s.p.work.Clone()
	for j := range m.Obj {
		m.Obj[j] = 0
	}
	m.Constant = 0
	set := s.set
	set.Progress = nil
	set.Start = nil
	if !s.deadline.IsZero() {
		set.TimeLimit = time.Until(s.deadline)
		if set.TimeLimit <= 0 {
			set.TimeLimit = time.Nanosecond
		}
	}
	sub := newSearch(s.ctx, m, set)
	r := sub.run(nil)
	s.nodes += r.Nodes
	s.iters += r.LPIterations
	switch r.Status {
	case Optimal, Feasible:
		x := r.X
		s.incX = x
		s.incObj = s.p.objective(x)
		return s.result(Unbounded)
	case Infeasible:
		return s.result(Infeasible)
	}
	s.stopped = r.Stopped
	return s.result(Limit)
}

// initRows records the original rows for cut derivation.
func (s *search) initRows() {
	p := s.p
	s.rows = make([]lpRowInfo, p.m)
	for i := 0; i < p.m; i++ {
		idx := p.rows.Index[p.rows.Start[i]:p.rows.Start[i+1]]
		val := p.rows.Value[p.rows.Start[i]:p.rows.Start[i+1]]
		intSlack := true
		for k, j := range idx {
			if !p.isInt[j] || val[k] != math.Round(val[k]) {
				intSlack = false
				break
			}
		}
		s.rows[i] = lpRowInfo{idx: idx, val: val, lower: p.rowLower[i], upper: p.rowUpper[i], intSlack: intSlack}
	}
}

// initLocks counts, per column, the rows that may be violated by moving the
// column down or up (for rounding).
func (s *search) initLocks() {
	p := s.p
	s.downLocks = make([]int, p.n)
	s.upLocks = make([]int, p.n)
	for i := 0; i < p.m; i++ {
		hasLo, hasUp := !math.IsInf(p.rowLower[i], -1), !math.IsInf(p.rowUpper[i], 1)
		for q := p.rows.Start[i]; q < p.rows.Start[i+1]; q++ {
			j, a := p.rows.Index[q], p.rows.Value[q]
			if (a > 0 && hasLo) || (a < 0 && hasUp) {
				s.downLocks[j]++
			}
			if (a > 0 && hasUp) || (a < 0 && hasLo) {
				s.upLocks[j]++
			}
		}
	}
}

// fractional lists the integer columns of x that are not integral.
func (s *search) fractional(x []float64) []int {
	var out []int
	for j, v := range x {
		if s.p.isInt[j] && math.Abs(v-math.Round(v)) > s.set.IntTol {
			out = append(out, j)
		}
	}
	return out
}

// rootFixing applies reduced-cost fixing with the root LP to the global
// domain (valid for the whole tree). Called again whenever the incumbent
// improves.
func (s *search) rootFixing() {
	if s.rootRedCst == nil || math.IsInf(s.incObj, 1) {
		return
	}
	s.redCostFix(s.rootObj, s.rootX, s.rootRedCst, s.glo, s.gup)
}

// redCostFix tightens integer columns of lo/up: a column at a bound with
// reduced cost d would raise the LP objective z by |d| per unit moved, so it
// cannot move further than (limit − z)/|d|.
func (s *search) redCostFix(z float64, x, d []float64, lo, up []float64) int {
	limit := s.pruneLimit()
	if math.IsInf(limit, 1) {
		return 0
	}
	gap := limit - z
	if gap < 0 {
		gap = 0
	}
	fixed := 0
	for j, dj := range d {
		if !s.p.isInt[j] || lo[j] == up[j] || math.Abs(dj) < 1e-9 {
			continue
		}
		if dj > 0 && math.Abs(x[j]-lo[j]) <= 1e-9*math.Max(1, math.Abs(lo[j])) {
			nu := math.Floor(lo[j] + gap/dj + boundTol)
			if nu < up[j] {
				up[j] = math.Max(nu, lo[j])
				fixed++
			}
		} else if dj < 0 && math.Abs(x[j]-up[j]) <= 1e-9*math.Max(1, math.Abs(up[j])) {
			nl := math.Ceil(up[j] - gap/(-dj) - boundTol)
			if nl > lo[j] {
				lo[j] = math.Min(nl, up[j])
				fixed++
			}
		}
	}
	return fixed
}

// tryCandidate checks a proposed point and makes it the incumbent if it is
// feasible and better. A point that violates rows or bounds has its integer
// values fixed and the continuous columns re-optimised by LP. It reports
// whether the incumbent improved.
func (s *search) tryCandidate(x []float64) bool {
	p := s.p
	if len(x) != p.n {
		return false
	}
	y := p.snap(x)
	var basis *lp.Basis
	if !p.check(y, s.set.FeasTol, s.set.IntTol) {
		var ok bool
		y, basis, ok = s.complete(y)
		if !ok {
			return false
		}
	}
	obj := p.objective(y)
	if obj >= s.incObj-1e-9*math.Max(1, math.Abs(s.incObj)) {
		return false
	}
	s.incX = y
	s.incObj = obj
	s.incBasis = basis
	s.prop.cutoff = s.pruneLimit() - p.constant
	if s.queue != nil {
		if least := s.queue.prune(s.pruneLimit()); !math.IsInf(least, 1) {
			s.notePruned(least)
		}
	}
	s.rootFixing()
	s.progress(true)
	return true
}

// complete fixes the integer columns of y, except those an equality sets
// from the others (problem.implied), and solves the LP over the rest. It
// returns the completed point and the LP's optimal
// basis when the point is feasible.
func (s *search) complete(y []float64) ([]float64, *lp.Basis, bool) {
	p := s.p
	if p.nInt == p.n {
		return nil, nil, false
	}
	if s.completion == nil {
		c, err := lp.NewSolver(p.work, s.lpSet)
		if err != nil {
			return nil, nil, false
		}
		s.completion = c
		if s.lps != nil && s.lps.NumRows() == p.work.NumRows() && s.lpSolved {
			// Start from the relaxation's last basis (no cuts in it yet, so
			// it fits): fixing the integer columns keeps it dual feasible,
			// and the dual simplex repairs the rounding in a few pivots
			// where the slack basis would solve the whole LP again.
			_ = c.SetBasis(s.lps.Basis())
		}
	}
	for j := 0; j < p.n; j++ {
		if p.isInt[j] {
			if p.implied != nil && p.implied[j] {
				// Its row sets it from the others (findImplied).
				s.completion.SetColBounds(j, p.work.ColLower[j], p.work.ColUpper[j])
				continue
			}
			v := y[j]
			if v < p.work.ColLower[j] || v > p.work.ColUpper[j] {
				return nil, nil, false
			}
			s.completion.SetColBounds(j, v, v)
		}
	}
	set := s.lpSet
	if !s.deadline.IsZero() {
		set.TimeLimit = time.Until(s.deadline)
		if set.TimeLimit <= 0 {
			return nil, nil, false
		}
	}
	if lim := s.pruneLimit(); !math.IsInf(lim, 1) {
		// A completion that cannot beat the incumbent is of no use: the
		// dual simplex stops as soon as its bound passes the limit, which
		// on large models saves most of the LP of a poor rounding.
		set.ObjectiveCutoff, set.HasCutoff = lim, true
	}
	s.completion.SetSettings(set)
	r := s.completion.Solve(s.ctx)
	s.iters += r.Iterations
	if r.Status != lp.Optimal {
		return nil, nil, false
	}
	z := append([]float64(nil), r.X...)
	for j := 0; j < p.n; j++ {
		switch {
		case !p.isInt[j]:
		case p.implied != nil && p.implied[j]:
			z[j] = math.Round(z[j]) // whole, its row says, up to the LP's rounding
		default:
			z[j] = y[j]
		}
	}
	if !p.check(z, s.set.FeasTol, s.set.IntTol) {
		return nil, nil, false
	}
	return z, &r.Basis, true
}

// callHeuristic asks the caller's Heuristic for candidates, takes the
// answer of the helper goroutine started at the last call point (waiting
// for it, unless the search has a time limit: then only if it is ready),
// and starts a new one when none runs and there is work for it: Improve,
// when the incumbent changed since Improve last saw it, then the sub-MIP
// of the incumbent and x (rins.go), when prepareRINS offers one.
func (s *search) callHeuristic(x []float64) {
	if s.set.Heuristic != nil {
		for _, c := range s.set.Heuristic(append([]float64(nil), x...)) {
			s.tryCandidate(c)
		}
	}
	s.startHelper(x)
}

// startHelper takes the answer of the helper goroutine started at the
// last call point (see callHeuristic) and starts a new one when none runs
// and there is work for it. With a time limit the root cut rounds call it
// too, between rounds, once the helper has answered (rootCuts).
func (s *search) startHelper(x []float64) {
	if s.deadline.IsZero() {
		s.joinHelper(false)
	} else if s.pollHelper(); s.helper != nil {
		// With a time limit, where the search stops depends on timing
		// already: it does not wait for a helper still at work (the
		// caller's Improve may use the time left), and starts no other.
		return
	}
	if s.incX == nil || s.pastTime() {
		return
	}
	improve := s.set.Improve
	if s.incObj == s.improvedObj {
		improve = nil
	}
	job := s.prepareRINS(x)
	if improve == nil && job == nil {
		return
	}
	// The point Improve returns, once the incumbent, is offered again at
	// once: a caller that stopped early can go on from it.
	s.improvedObj = s.incObj
	ctx, stop := context.WithCancel(s.ctx)
	answer := make(chan helperAnswer, 2)
	inc, basis := append([]float64(nil), s.incX...), s.incBasis
	set, deadline := s.set, s.deadline
	go func() {
		var out helperAnswer
		if improve != nil {
			if y := improve(ctx, inc, basis); y != nil {
				out.points = append(out.points, y)
			}
		}
		if job != nil && ctx.Err() == nil {
			if len(out.points) > 0 {
				answer <- out // for pollHelper, while the sub-MIP runs
				out = helperAnswer{}
			}
			y, its := runRINS(ctx, job, set, deadline)
			out.rinsIters = its
			if y != nil {
				out.points = append(out.points, y)
			}
		}
		out.last = true
		answer <- out
	}()
	s.helper, s.stopHelper = answer, stop
}

// helperAnswer is what the goroutine started at a call point hands back:
// the points of Improve and of the sub-MIP, and the sub-MIP's iterations.
// When both run and Improve found a point, it comes first in an answer of
// its own; last marks the goroutine's final answer.
type helperAnswer struct {
	points    [][]float64
	rinsIters int
	last      bool
}

// joinHelper waits for the helper goroutine (Improve, then the sub-MIP),
// if one runs, and tries its answers. With stop its context is cancelled
// first (the search is ending at a time limit or by cancellation), and so
// it is when the search has a time limit (it is called then only at the
// search's end: a helper may use all the time left, see callHeuristic) or
// when the time limit passes while the search waits.
//
// The helper runs beside the search between two call points (on large
// models the root cut rounds, on others a stretch of nodes), but without a
// time limit its answers are taken only at the next call point or at the
// end, so the search's path does not depend on how long it takes (with
// one, pollHelper may take them earlier).
func (s *search) joinHelper(stop bool) {
	if s.helper == nil {
		return
	}
	if stop || !s.deadline.IsZero() {
		s.stopHelper()
	}
	var limit <-chan time.Time
	if !s.deadline.IsZero() {
		wait := time.NewTimer(time.Until(s.deadline))
		defer wait.Stop()
		limit = wait.C
	}
	for s.helper != nil {
		select {
		case y := <-s.helper:
			s.takeHelper(y)
		case <-limit:
			// The time limit holds while the search waits.
			s.stopHelper()
			limit = nil
		}
	}
}

// pollHelper takes the helper's answer if it is ready, without waiting,
// when the search has a time limit. The root cut rounds of a large model
// can run for most of the time limit with no call point, long after the
// helper has found a better plan: taken between rounds, that plan shows in
// the progress reports and closes the gap, which may end the rounds early.
// Without a time limit it does nothing: the search's path would depend on
// how long the helper takes (with one, where the search stops already
// does).
func (s *search) pollHelper() {
	if s.deadline.IsZero() {
		return
	}
	for s.helper != nil {
		select {
		case y := <-s.helper:
			s.takeHelper(y)
		default:
			return
		}
	}
}

// takeHelper tries the points of y, an answer of the helper goroutine, and
// forgets the goroutine after its last answer.
func (s *search) takeHelper(y helperAnswer) {
	if y.last {
		s.stopHelper()
		s.helper, s.stopHelper = nil, nil
	}
	s.rinsIters += y.rinsIters
	for _, c := range y.points {
		s.tryCandidate(c)
	}
}

// simpleRounding rounds each fractional column in a direction no row
// objects to (no locks), else to the nearest integer. With repair, a
// rounded point that violates rows has its continuous columns re-optimised
// by LP (one LP solve: used at the root, too costly at every node). Cost
// O(nonzeros) without repair.
func (s *search) simpleRounding(x []float64, repair bool) {
	p := s.p
	y := append([]float64(nil), x...)
	for j := range y {
		if !p.isInt[j] {
			continue
		}
		v := y[j]
		if math.Abs(v-math.Round(v)) <= s.set.IntTol {
			y[j] = math.Round(v)
			continue
		}
		switch {
		case s.downLocks[j] == 0:
			y[j] = math.Floor(v)
		case s.upLocks[j] == 0:
			y[j] = math.Ceil(v)
		default:
			y[j] = math.Round(v)
		}
	}
	if repair || p.check(p.snap(y), s.set.FeasTol, s.set.IntTol) {
		s.tryCandidate(y)
	}
}

// loadDomain sets the current domain to the global one with the changes of
// the node and its ancestors applied, and remembers it (nodeLo/nodeUp) so
// that the node's own changes can be listed later. It returns false when
// the result is empty. Cost O(n + depth + changes on the path).
func (s *search) loadDomain(nd *node) bool {
	copy(s.lo, s.glo)
	copy(s.up, s.gup)
	ok := true
	for a := nd; a != nil; a = a.parent {
		for _, c := range a.delta {
			if c.lo > s.lo[c.col] {
				s.lo[c.col] = c.lo
			}
			if c.up < s.up[c.col] {
				s.up[c.col] = c.up
			}
			if s.lo[c.col] > s.up[c.col] {
				ok = false
			}
		}
	}
	copy(s.nodeLo, s.lo)
	copy(s.nodeUp, s.up)
	return ok
}

// deltaSinceLoad lists the integer columns whose current domain differs
// from the one loadDomain produced, with room for extra more entries.
func (s *search) deltaSinceLoad(extra int) []boundChange {
	var out []boundChange
	for j := 0; j < s.p.n; j++ {
		if s.p.isInt[j] && (s.lo[j] != s.nodeLo[j] || s.up[j] != s.nodeUp[j]) {
			out = append(out, boundChange{col: j, lo: s.lo[j], up: s.up[j]})
		}
	}
	return append(make([]boundChange, 0, len(out)+extra), out...)
}

// slackBasis returns the basis with every row's slack basic and every
// column at a finite bound.
func (s *search) slackBasis() lp.Basis {
	b := lp.Basis{Cols: make([]lp.VarStatus, s.p.n), Rows: make([]lp.VarStatus, s.lps.NumRows())}
	for j := range b.Cols {
		switch {
		case s.lpLo[j] == s.lpUp[j]:
			b.Cols[j] = lp.Fixed
		case !math.IsInf(s.lpLo[j], -1):
			b.Cols[j] = lp.AtLower
		case !math.IsInf(s.lpUp[j], 1):
			b.Cols[j] = lp.AtUpper
		default:
			b.Cols[j] = lp.AtZero
		}
	}
	return b
}
