package mip

import (
	"math"
	"sort"

	"netstage/lp"
)

// treeSearch explores the tree from root: it plunges depth-first into the
// preferred child while the child stays promising, and otherwise picks an
// open node by estimate, taking the best-bound node every bestBoundEvery
// picks so that the global bound keeps rising.
func (s *search) treeSearch(root *node) {
	var cur *node = root
	warm := false // the LP holds the parent's final basis
	picks := 0
	for {
		if cur == nil {
			if s.queue.Len() == 0 {
				return
			}
			picks++
			if s.incX != nil && picks%bestBoundEvery == 0 {
				cur = s.queue.popBest()
			} else {
				cur = s.queue.popEstimate()
			}
			warm = false
			if cur.bound >= s.pruneLimit() {
				s.notePruned(cur.bound)
				cur = nil
				continue
			}
		}
		if s.limitReached() {
			s.queue.push(cur)
			return
		}
		s.curBound = cur.bound
		kids, ok := s.processNode(cur, warm)
		s.curBound = inf
		if !ok {
			// Limit inside the LP: keep the node so the bound stays honest.
			s.queue.push(cur)
			return
		}
		// The node stays only as its children's ancestor: drop its basis.
		cur.basis = nil
		if len(kids) == 0 {
			cur = nil
			s.progress(false)
			continue
		}
		// kids[0] is the preferred child.
		next := kids[0]
		if s.plungeOn(next) {
			s.queue.push(kids[1])
			cur, warm = next, true
			s.curBound = cur.bound
		} else {
			s.queue.push(kids[0])
			s.queue.push(kids[1])
			cur = nil
		}
		s.progress(false)
	}
}

// plungeOn decides whether to continue depth-first into child c.
func (s *search) plungeOn(c *node) bool {
	if c.depth > maxPlungeDepth {
		return false
	}
	if s.incX == nil {
		return true
	}
	lb := math.Min(s.queue.minBound(), c.bound)
	lb = math.Min(lb, s.prunedMin)
	return c.bound <= lb+plungeGapFraction*(s.incObj-lb)
}

// processNode solves a node's LP and branches. It returns the children
// (preferred first) or none when the node is pruned or solved; ok is false
// when a limit stopped the LP before it finished.
func (s *search) processNode(nd *node, warm bool) (kids []*node, ok bool) {
	p := s.p
	if !s.loadDomain(nd) {
		return nil, true
	}
	changed := make([]int, 0, len(nd.delta))
	for _, c := range nd.delta {
		changed = append(changed, c.col)
	}
	if !s.prop.propagate(s.lo, s.up, changed, nil) {
		return nil, true
	}
	if !s.applyProofs() {
		s.notePruned(s.pruneLimit())
		return nil, true
	}
	s.syncBounds()
	if !warm && nd.basis != nil {
		_ = s.lps.SetBasis(nd.basis.unpack(s.lps.NumRows()))
	}
	first := true
	rowsAdded := false
	separated := false // the caller's cuts were separated at this node
	for round := 0; round < maxNodeResolves; round++ {
		limit := s.pruneLimit()
		if rowsAdded {
			// As at the root: no cutoff right after rows were added (see
			// rootCuts).
			limit, rowsAdded = inf, false
		}
		r := s.lpSolve(limit, 0)
		s.nodeLPIters += r.Iterations
		if first && !nd.solved {
			s.nodes++
			s.nodeIters += (float64(r.Iterations) - s.nodeIters) / float64(s.nodes)
		}
		switch r.Status {
		case lp.Optimal:
		case lp.Infeasible:
			s.learnProof(r)
			return nil, true
		case lp.ObjectiveCutoff:
			s.learnProof(r)
			s.notePruned(limit)
			return nil, true
		case lp.TimeLimit:
			s.stopped = TimeLimit
			return nil, false
		case lp.Cancelled:
			s.stopped = Cancelled
			return nil, false
		default:
			// Retry once from the slack basis.
			_ = s.lps.SetBasis(s.slackBasis())
			r = s.lpSolve(limit, 0)
			switch r.Status {
			case lp.Optimal:
			case lp.Infeasible:
				return nil, true
			case lp.ObjectiveCutoff:
				s.notePruned(limit)
				return nil, true
			default:
				return s.branchBlind(nd), true
			}
		}
		if first && nd.branchVar >= 0 {
			s.pc.update(nd.branchVar, nd.branchUp, nd.branchDist, r.Objective-nd.parentObj)
		}
		first = false
		bound := math.Max(p.roundBound(r.Objective), nd.bound)
		if bound >= s.pruneLimit() {
			s.learnProof(r)
			s.notePruned(bound)
			return nil, true
		}
		frac := s.fractional(r.X)
		if len(frac) > 0 && s.poolToLP(r.X) {
			rowsAdded = true
			continue // re-solve with the violated pool cuts
		}
		if len(frac) > 0 && !separated && nd.depth <= treeSeparateDepth && s.treeSeparate(r.X) {
			separated, rowsAdded = true, true
			continue // re-solve with the caller's new cuts
		}
		if len(frac) > 0 && !separated && !warm && nd.depth > treeSeparateDepth {
			separated = true // tried once per node, whatever it finds
			if s.plungeStartSeparate(r.X) {
				rowsAdded = true
				continue // re-solve with the new cuts
			}
		}
		if len(frac) == 0 {
			if !s.tryCandidate(r.X) && p.objective(p.snap(r.X)) < s.incObj-s.gapTol() {
				// Integral LP point the check rejects (tolerances): give the
				// node up honestly.
				s.lpLost = true
				s.notePruned(bound)
			}
			return nil, true
		}
		// Reduced-cost fixing inside the subtree.
		if s.incX != nil {
			if s.redCostFix(r.Objective, r.X, r.ReducedCost, s.lo, s.up) > 0 {
				s.syncBounds()
			}
		}
		if !s.set.NoHeuristics {
			s.simpleRounding(r.X, s.nodes%repairEvery == 0)
			if s.nodes%diveEvery == 0 {
				s.dive(r.X)
			}
		}
		if (s.set.Heuristic != nil || s.set.Improve != nil || s.rinsOn()) && (s.nodes <= earlyHeuristicNodes || s.nodes%s.set.HeuristicFreq == 0) {
			s.callHeuristic(r.X)
		}
		if bound >= s.pruneLimit() {
			s.notePruned(bound)
			return nil, true
		}
		br := s.chooseBranch(r, frac, bound)
		switch br.outcome {
		case branchPrune:
			s.notePruned(math.Max(bound, br.pruneBound))
			return nil, true
		case branchResolve:
			if !s.prop.propagate(s.lo, s.up, br.fixed, nil) {
				return nil, true
			}
			s.syncBounds()
			continue
		}
		return s.makeChildren(nd, r, bound, br), true
	}
	// Too many re-solves: branch on the most fractional column.
	r := s.lpSolve(s.pruneLimit(), 0)
	if r.Status != lp.Optimal {
		return s.branchBlind(nd), true
	}
	frac := s.fractional(r.X)
	if len(frac) == 0 {
		s.tryCandidate(r.X)
		return nil, true
	}
	br := branchChoice{col: s.topPriority(frac)[0], downGain: math.NaN(), upGain: math.NaN(), downBound: math.Inf(-1), upBound: math.Inf(-1)}
	return s.makeChildren(nd, r, math.Max(p.roundBound(r.Objective), nd.bound), br), true
}

// branchBlind splits a node whose LP failed on the unfixed integer column
// with the widest domain, keeping the parent's bound; when every integer
// column is fixed the node is given up and its bound kept in the result.
func (s *search) branchBlind(nd *node) []*node {
	best, width := -1, 0.0
	for j := 0; j < s.p.n; j++ {
		if s.p.isInt[j] && s.up[j]-s.lo[j] > width {
			best, width = j, s.up[j]-s.lo[j]
		}
	}
	if best < 0 || math.IsInf(width, 1) {
		s.lpLost = true
		s.notePruned(nd.bound)
		return nil
	}
	mid := math.Floor((s.lo[best] + s.up[best]) / 2)
	base := s.deltaSinceLoad(1)
	down := &node{id: s.nextID(), depth: nd.depth + 1, parent: nd, bound: nd.bound, estimate: nd.bound, branchVar: -1}
	down.delta = append(append([]boundChange(nil), base...), boundChange{best, s.lo[best], mid})
	up := &node{id: s.nextID(), depth: nd.depth + 1, parent: nd, bound: nd.bound, estimate: nd.bound, branchVar: -1}
	up.delta = append(base, boundChange{best, mid + 1, s.up[best]})
	return []*node{down, up}
}

type branchOutcome int8

const (
	branchOn      branchOutcome = iota // branch on col
	branchResolve                      // columns were fixed; re-solve the node
	branchPrune                        // both children of some column are empty
)

type branchChoice struct {
	outcome          branchOutcome
	col              int
	downGain, upGain float64 // strong-branching gains (NaN when unknown)
	// LP optima of the children when strong branching solved them to
	// optimality (−Inf otherwise): valid bounds for the children.
	downBound, upBound float64
	fixed              []int
	pruneBound         float64
}

// chooseBranch picks the branching column by reliability branching:
// pseudocost product scores, with strong branching on columns whose
// pseudocosts have too few observations.
func (s *search) chooseBranch(r lp.Result, frac []int, bound float64) branchChoice {
	x := r.X
	frac = s.topPriority(frac)
	type cand struct {
		j     int
		f     float64
		score float64
	}
	cands := make([]cand, len(frac))
	for k, j := range frac {
		f := x[j] - math.Floor(x[j])
		d, u := s.pc.get(j)
		cands[k] = cand{j, f, score(d*f, u*(1-f))}
	}
	sort.SliceStable(cands, func(a, b int) bool {
		if cands[a].score != cands[b].score {
			return cands[a].score > cands[b].score
		}
		return cands[a].j < cands[b].j
	})
	best := branchChoice{col: cands[0].j, downGain: math.NaN(), upGain: math.NaN(), downBound: math.Inf(-1), upBound: math.Inf(-1)}
	bestScore := -1.0
	if s.set.NoStrongBranching {
		best.col = cands[0].j
		return best
	}
	var state *lp.State
	sbDone, noImprove := 0, 0
	iterCap := int(math.Min(maxStrongIters, math.Max(minStrongIters, 2*s.nodeIters)))
	limit := s.pruneLimit()
	for _, c := range cands {
		sc := c.score
		dg, ug := math.NaN(), math.NaN()
		dBound, uBound := math.Inf(-1), math.Inf(-1)
		if !s.pc.reliable(c.j) && sbDone < maxStrongBranch && noImprove < strongLookahead && s.strongAllowed() {
			if state == nil {
				state = s.lps.SaveState()
			}
			sbDone++
			j := c.j
			lo, up := s.lpLo[j], s.lpUp[j]
			fl := math.Floor(x[j])
			// Down, then up. Between the two only the bound is put back:
			// the down child's basis stays dual feasible for the up child,
			// and keeping it saves a refactorisation.
			s.lps.SetColBounds(j, lo, fl)
			rd := s.lpSolve(limit, iterCap)
			s.lps.SetColBounds(j, fl+1, up)
			ru := s.lpSolve(limit, iterCap)
			s.sbIters += rd.Iterations + ru.Iterations
			s.lps.SetColBounds(j, lo, up)
			downDead := rd.Status == lp.Infeasible || rd.Status == lp.ObjectiveCutoff
			upDead := ru.Status == lp.Infeasible || ru.Status == lp.ObjectiveCutoff
			if downDead {
				s.learnChildProof(rd, j, lo, fl)
			}
			if upDead {
				s.learnChildProof(ru, j, fl+1, up)
			}
			if rd.Status == lp.TimeLimit || rd.Status == lp.Cancelled || ru.Status == lp.TimeLimit || ru.Status == lp.Cancelled {
				break
			}
			switch {
			case downDead && upDead:
				return branchChoice{outcome: branchPrune, pruneBound: limit}
			case downDead:
				s.lo[j] = fl + 1
				return branchChoice{outcome: branchResolve, fixed: []int{j}}
			case upDead:
				s.up[j] = fl
				return branchChoice{outcome: branchResolve, fixed: []int{j}}
			}
			if rd.Status == lp.Optimal {
				dBound = rd.Objective
			}
			if ru.Status == lp.Optimal {
				uBound = ru.Objective
			}
			if usable(rd) {
				dg = math.Max(rd.Objective-r.Objective, 0)
				s.pc.update(j, false, c.f, dg)
			}
			if usable(ru) {
				ug = math.Max(ru.Objective-r.Objective, 0)
				s.pc.update(j, true, 1-c.f, ug)
			}
			d, u := s.pc.get(j)
			gd, gu := d*c.f, u*(1-c.f)
			if !math.IsNaN(dg) {
				gd = dg
			}
			if !math.IsNaN(ug) {
				gu = ug
			}
			sc = score(gd, gu)
		}
		if sc > bestScore {
			bestScore = sc
			best = branchChoice{col: c.j, downGain: dg, upGain: ug, downBound: dBound, upBound: uBound}
			noImprove = 0
		} else {
			noImprove++
		}
		if sbDone >= maxStrongBranch || noImprove >= strongLookahead {
			// remaining candidates: pseudocost scores only, already sorted
			break
		}
	}
	if state != nil {
		// Back to the node's basis, so that the preferred child starts
		// next to it.
		s.lps.RestoreState(state)
	}
	return best
}

// topPriority returns the columns of frac (fractional integer columns, in
// column order) whose Settings.Priority is the highest among them, in
// the same order: frac itself when no priorities are set (or the slice
// has the wrong length, which NewSolver refuses) or all are equal.
func (s *search) topPriority(frac []int) []int {
	pr := s.set.Priority
	if len(pr) != s.p.n || len(frac) == 0 {
		return frac
	}
	// One pass for the top priority and how many columns have it; a copy
	// only when some column falls short (not the common case of a node
	// with no prioritised column fractional).
	top, n := pr[frac[0]], 0
	for _, j := range frac {
		switch {
		case pr[j] > top:
			top, n = pr[j], 1
		case pr[j] == top:
			n++
		}
	}
	if n == len(frac) {
		return frac
	}
	out := make([]int, 0, n)
	for _, j := range frac {
		if pr[j] == top {
			out = append(out, j)
		}
	}
	return out
}

// usable reports whether a limited LP solve gives an objective worth using
// as a branching estimate.
func usable(r lp.Result) bool {
	return (r.Status == lp.Optimal || r.Status == lp.IterationLimit) && !math.IsNaN(r.Objective) && !math.IsInf(r.Objective, 0)
}

// makeChildren creates the two children of a node branching on br.col, the
// preferred one first.
func (s *search) makeChildren(nd *node, r lp.Result, bound float64, br branchChoice) []*node {
	j := br.col
	x := r.X[j]
	f := x - math.Floor(x)
	pd, pu := s.pc.get(j)
	gd, gu := pd*f, pu*(1-f)
	if !math.IsNaN(br.downGain) {
		gd = br.downGain
	}
	if !math.IsNaN(br.upGain) {
		gu = br.upGain
	}
	// Estimate: bound plus the cheaper rounding of every fractional column.
	est := bound
	for _, k := range s.fractional(r.X) {
		fk := r.X[k] - math.Floor(r.X[k])
		d, u := s.pc.get(k)
		est += math.Min(d*fk, u*(1-fk))
	}
	est -= math.Min(gd, gu)
	base := s.deltaSinceLoad(1)
	b := packBasis(r.Basis)
	down := &node{id: s.nextID(), depth: nd.depth + 1, parent: nd, basis: b, branchVar: j, branchUp: false,
		branchDist: f, parentObj: r.Objective}
	down.delta = append(append([]boundChange(nil), base...), boundChange{j, s.lo[j], math.Floor(x)})
	down.bound = math.Max(bound, s.p.roundBound(br.downBound))
	down.estimate = est + gd
	up := &node{id: s.nextID(), depth: nd.depth + 1, parent: nd, basis: b, branchVar: j, branchUp: true,
		branchDist: 1 - f, parentObj: r.Objective}
	up.delta = append(base, boundChange{j, math.Ceil(x), s.up[j]})
	up.bound = math.Max(bound, s.p.roundBound(br.upBound))
	up.estimate = est + gu
	if gu < gd || (gu == gd && f >= 0.5) {
		return []*node{up, down}
	}
	return []*node{down, up}
}

// dive is a fractional diving heuristic: it repeatedly rounds the least
// fractional column to its nearest integer, propagates and re-solves the
// LP, until the LP point is integral, infeasible or no longer promising.
func (s *search) dive(x0 []float64) {
	p := s.p
	state := s.lps.SaveState()
	saveLo := append([]float64(nil), s.lo...)
	saveUp := append([]float64(nil), s.up...)
	saveLpLo := append([]float64(nil), s.lpLo...)
	saveLpUp := append([]float64(nil), s.lpUp...)
	x := x0
	defer func() {
		// One repaired rounding of the last LP point of the dive.
		s.simpleRounding(x, true)
		s.lps.RestoreState(state)
		copy(s.lo, saveLo)
		copy(s.up, saveUp)
		copy(s.lpLo, saveLpLo)
		copy(s.lpUp, saveLpUp)
	}()
	iterCap := int(math.Max(100, diveIterFactor*s.nodeIters))
	for depth := 0; depth < maxDiveDepth; depth++ {
		if s.limitReached() {
			return
		}
		frac := s.fractional(x)
		if len(frac) == 0 {
			s.tryCandidate(x)
			return
		}
		s.simpleRounding(x, false)
		best, bestDist := -1, 2.0
		for _, j := range frac {
			f := x[j] - math.Floor(x[j])
			d := math.Min(f, 1-f)
			// prefer columns that rounding in that direction cannot hurt
			if (f < 0.5 && s.downLocks[j] == 0) || (f >= 0.5 && s.upLocks[j] == 0) {
				d -= 1
			}
			if d < bestDist {
				best, bestDist = j, d
			}
		}
		j := best
		if x[j]-math.Floor(x[j]) < 0.5 {
			s.up[j] = math.Floor(x[j])
		} else {
			s.lo[j] = math.Ceil(x[j])
		}
		if !s.prop.propagate(s.lo, s.up, []int{j}, nil) {
			return
		}
		s.syncBounds()
		r := s.lpSolve(s.pruneLimit(), iterCap)
		if r.Status != lp.Optimal {
			return
		}
		if p.roundBound(r.Objective) >= s.pruneLimit() {
			return
		}
		x = r.X
	}
}

// strongAllowed keeps strong branching within a share of the node LP
// work: its iterations may not exceed strongShare times the node LP
// iterations plus strongOffset.
func (s *search) strongAllowed() bool {
	return float64(s.sbIters) < strongShare*float64(s.nodeLPIters)+strongOffset
}

// poolToLP adds the pool's cover, c-MIR and caller's cuts (all
// globally valid) that the node's LP point x violates, up to maxTreeCuts
// over the whole tree, and reports whether it added any. The caller's
// cuts are mostly ones the root rounds aged out of the LP; back where a
// node's LP point needs them, they took the synthetic 10-site 7-year case
// of seed 1 (in BenchmarkSolveHorizon) from 4,709 to 1,862 nodes and that
// of seed 2 from 11,245 to 3,569. Gomory cuts stay out: on the planning
// models they slowed the node LPs more than they pruned.
func (s *search) poolToLP(x []float64) bool {
	var back []*cut
	for _, c := range s.pool {
		if s.treeCuts+len(back) >= maxTreeCuts {
			break
		}
		if c.lpRow >= 0 || (c.kind != "cover" && c.kind != "caller" && c.kind != "cmir") || c.efficacy(x) <= minEfficacy {
			continue
		}
		back = append(back, c)
	}
	s.treeCuts += len(back)
	return s.cutsToLP(back, "pool")
}

// treeSeparate asks Settings.Separate for cuts at the node's LP point x
// and adds those x violates that are new, up to maxTreeSeparated over the
// whole tree, to the pool and the LP; it reports whether it added any.
// processNode calls it once per node down to treeSeparateDepth. The root
// rounds separate at the root's LP points only; at the first branches
// some columns are forced whole, the LP point moves, and so do the rows
// the caller finds violated. Measured on the synthetic planning cases
// (10 sites, 7 years, seeds 1 to 8, proved to 1e-4): 3,483 nodes in all
// against 5,093 without, though seed 1 alone took 816 against 619.
// Depth 2 took 3,710 nodes, depth 4 (cap 200) 3,942, depth 6 (cap 300)
// 3,496; at depth 3, caps of 50 and 300 took 3,504 and 3,483. On seeds 9
// to 16, not used to choose these values: 4,211 nodes against 5,394 (seed
// 14: 1,044 against 742), in the same time (46 s in all): the re-solves
// and the extra rows cost what the fewer nodes save. After 60 to 300 s
// on the 25-site and 10-year cases, run side by side with the build
// before, the bound was tighter in four of six pairs.
func (s *search) treeSeparate(x []float64) bool {
	if s.set.NoCuts || s.sepCuts >= maxTreeSeparated {
		return false
	}
	found := s.callerCuts(nil, x)
	if len(found) > maxTreeSeparated-s.sepCuts {
		// Past the cap they stay in the pool, from where poolToLP may
		// take them.
		found = found[:maxTreeSeparated-s.sepCuts]
	}
	s.sepCuts += len(found)
	return s.cutsToLP(found, "sep")
}

// plungeStartSeparate separates the caller's cuts, and c-MIR cuts when
// Settings.CMIR, at the LP point x of a node below treeSeparateDepth that
// was taken from the queue, where a plunge starts, and adds the
// maxStartSeparated most efficacious of those x violates that are new to
// the pool and the LP; it reports whether it added any. Over the tree it
// adds at most maxStartCuts and tries at most maxStartSeparations nodes
// (a case whose separators find little would otherwise pay for them at
// every plunge). Both separators work from the model's rows and the
// global bounds, so their cuts are globally valid. HiGHS, too, separates
// where it starts a dive and not along it; separating at every node of a
// plunge was not tried. Measured on the synthetic 10-site 10-year case
// of seed 1 (with c-MIR), one core each, side by side, without a time
// limit: the bound after 143 s was 2,141,839 against 2,142,668 without
// (12,000 nodes: 2,140,980 against 2,142,381); with at most 100 cuts it
// gained less, with 400 or 800 the larger LP made the first minutes slower,
// and ageing the rows out of the LP again, so that separation could go
// on, cost more re-solves than it gained. M from its best plan: 3,039,562
// after 3,000 nodes (457,122 simplex iterations) against 3,039,896 after
// 3,600 (453,242). The 16 proofs of 10 sites over 7 years: 2,282 nodes
// against 2,955, in the same time (37.7 s against 35.5 s). Under a time
// limit the gains are smaller and not on every case (DEVELOPERS.md).
func (s *search) plungeStartSeparate(x []float64) bool {
	if s.set.NoCuts || s.set.NoPlungeCuts || (!s.set.CMIR && s.set.Separate == nil) ||
		s.startCuts >= maxStartCuts || s.startSeparations >= maxStartSeparations {
		return false // nothing to separate with (RINS's sub-MIPs), or a cap reached
	}
	s.startSeparations++
	var found []*cut
	if s.set.CMIR {
		found = s.separateCMIR(found, x)
	}
	found = s.callerCuts(found, x)
	// Past the caps they stay in the pool, from where poolToLP may take
	// them.
	sortByEfficacy(found, x)
	n := min(len(found), maxStartSeparated, maxStartCuts-s.startCuts)
	s.startCuts += n
	return s.cutsToLP(found[:n], "sep")
}

// cutsToLP adds the cuts cs, which are in the pool but not in the LP, to
// the LP as rows named name (unaged), and reports whether there were any.
// The root rounds, poolToLP, treeSeparate and plungeStartSeparate all add
// cuts through it.
func (s *search) cutsToLP(cs []*cut, name string) bool {
	if len(cs) == 0 {
		return false
	}
	rows := make([]lp.Row, len(cs))
	for k, c := range cs {
		c.lpRow = s.lps.NumRows() + k
		c.age = 0
		rows[k] = c.row(name)
		s.rows = append(s.rows, lpRowInfo{idx: c.idx, val: c.val, lower: c.lower, upper: c.upper, intSlack: c.kind == "cover"})
	}
	s.lps.AddRows(rows)
	return true
}
