package mip

import (
	"math"
	"sort"

	"netstage/lp"
)

// rootCuts runs rounds of cover, Gomory and caller's cut separation at the root,
// re-solving the LP after each round, until no violated cut is found or
// the bound stalls. Cuts that stay slack are aged out of the LP into the
// pool, from which they come back when violated. It returns the last LP
// result (which may be non-optimal when a limit or the cutoff stopped it).
func (s *search) rootCuts(r lp.Result) lp.Result {
	p := s.p
	stall := 0
	lastObj := r.Objective
	firstObj := r.Objective
	buf := make([]float64, 0)
	for round := 0; round < maxCutRounds; round++ {
		if s.limitReached() {
			break
		}
		x := r.X
		var found []*cut
		// Pool cuts not in the LP.
		for _, c := range s.pool {
			if c.lpRow < 0 && c.efficacy(x) > minEfficacy {
				found = append(found, c)
			}
		}
		// Covers on the model's rows, and on the caller's rows where
		// coefficient tightening changed them (their covers differ).
		for i := 0; i < p.m; i++ {
			ri := s.rows[i]
			for _, c := range separateCover(p, ri.idx, ri.val, ri.lower, ri.upper, s.lpLo, s.lpUp, x) {
				found = s.addFound(found, c, x)
			}
		}
		if p.work != p.orig && p.work.NumRows() == p.orig.NumRows() {
			or := p.orig.Rows()
			for i := 0; i < p.m; i++ {
				idx := or.Index[or.Start[i]:or.Start[i+1]]
				val := or.Value[or.Start[i]:or.Start[i+1]]
				for _, c := range separateCover(p, idx, val, p.orig.RowLower[i], p.orig.RowUpper[i], s.lpLo, s.lpUp, x) {
					found = s.addFound(found, c, x)
				}
			}
		}
		// Gomory mixed-integer cuts from tableau rows of fractional integer
		// basic columns, most fractional first.
		heads := s.lps.BasicVars()
		type gpos struct {
			pos  int
			dist float64
		}
		var gps []gpos
		for pos, v := range heads {
			if v < p.n && p.isInt[v] {
				f := x[v] - math.Floor(x[v])
				if f > minGomoryFrac && f < 1-minGomoryFrac {
					gps = append(gps, gpos{pos, math.Abs(f - 0.5)})
				}
			}
		}
		sort.SliceStable(gps, func(a, b int) bool { return gps[a].dist < gps[b].dist })
		if len(gps) > maxGomoryRows {
			gps = gps[:maxGomoryRows]
		}
		if len(gps) > 0 {
			basis := s.lps.Basis()
			width := p.n + s.lps.NumRows()
			if cap(buf) < width {
				buf = make([]float64, width)
			}
			buf = buf[:width]
			var sp *tableauSpace // built at the first row that needs it
			for _, g := range gps {
				for k := range buf {
					buf[k] = 0
				}
				basic, value := s.lps.TableauRow(g.pos, buf)
				if basic >= p.n || math.IsNaN(value) {
					continue
				}
				if c := gomoryFromRow(p, buf, basic, value, basis, s.lpLo, s.lpUp, s.rows); c != nil {
					found = s.addFound(found, c, x)
				} else if s.set.CMIR {
					// The same row's MIR, often sparser (tableauMIR).
					if sp == nil {
						sp = newTableauSpace(p, s.lpLo, s.lpUp, x, s.rows)
					}
					if c, _ := tableauMIR(p, buf, sp, s.rows); c != nil {
						found = s.addFound(found, c, x)
						s.tableauMIRs++
					}
				}
			}
		}
		if s.set.CMIR {
			found = s.separateCMIR(found, x)
		}
		found = s.callerCuts(found, x)
		if len(found) == 0 {
			break
		}
		sortByEfficacy(found, x)
		if len(found) > maxCutsPerRound {
			found = found[:maxCutsPerRound]
		}
		fresh := make([]*cut, 0, len(found))
		for _, c := range found {
			if c.lpRow < 0 {
				fresh = append(fresh, c)
			}
		}
		before := s.lps.NumRows()
		s.cutsToLP(fresh, "cut")
		s.nCuts += len(fresh)
		// No cutoff right after a change of rows: lp (version of 2026-12)
		// may stop with a false ObjectiveCutoff on the repaired basis.
		r = s.lpSolve(inf, 0)
		if r.Status == lp.NumericalTrouble {
			// Cuts are optional: when this round's rows leave the LP
			// without a trustworthy answer (dense Gomory rows piled up
			// over many rounds can), take them out of the LP and the
			// pool, stop cutting, and go on from the last round's LP.
			s.dropRound(before)
			r = s.lpSolve(inf, 0)
			break
		}
		if r.Status != lp.Optimal {
			if r.ObjectiveIsBound {
				// A limit stopped the re-solve on a dual feasible basis:
				// its objective still bounds the optimum with these cuts.
				s.rootBound = math.Max(s.rootBound, p.roundBound(r.Objective))
				s.curBound = s.rootBound
			}
			return r
		}
		// Every round's optimum is a valid bound: keep it, in case a
		// later round is stopped by a limit.
		s.rootBound = math.Max(s.rootBound, p.roundBound(r.Objective))
		s.curBound = s.rootBound
		// On large models a round takes seconds: let the caller see the
		// bound move, and the plan the helper found meanwhile.
		s.pollHelper()
		if !s.deadline.IsZero() && s.helper == nil {
			// The helper has answered: give it work again (what a call
			// point would start: Improve on the new incumbent, or the
			// sub-MIP) rather than leave it idle until the rounds end.
			// On the 50-site 10-year case at 60 s, the plans of three
			// runs went from 8,264,902–8,285,992 to 8,288,699–8,294,965
			// (gap 2.49–2.61 % against 2.58–2.88 %); M was even.
			s.startHelper(r.X)
		}
		s.progress(false)
		s.ageCuts(false)
		if !s.set.NoHeuristics {
			s.simpleRounding(r.X, true)
		}
		closed := r.Objective - firstObj
		if r.Objective-lastObj <= cutStallRel*math.Max(1, math.Abs(r.Objective)) || r.Objective-lastObj <= cutStallShare*closed {
			stall++
			if stall >= cutStallRounds {
				break
			}
		} else {
			stall = 0
		}
		lastObj = r.Objective
	}
	// Leave only binding cuts in the LP for the tree.
	if r.Status == lp.Optimal {
		s.ageCuts(true)
		r = s.lpSolve(inf, 0)
	}
	return r
}

// callerCuts appends to found the rows of Settings.Separate at x that x
// violates enough and that are new (entering the pool as "caller" cuts).
func (s *search) callerCuts(found []*cut, x []float64) []*cut {
	if s.set.Separate == nil {
		return found
	}
	for _, row := range s.set.Separate(append([]float64(nil), x...)) {
		if len(row.Index) != len(row.Value) {
			continue
		}
		c := &cut{idx: row.Index, val: row.Value, lower: row.Lower, upper: row.Upper, kind: "caller"}
		found = s.addFound(found, c, x)
	}
	return found
}

// addFound appends c to found when it is violated enough and new.
func (s *search) addFound(found []*cut, c *cut, x []float64) []*cut {
	if c.efficacy(x) <= minEfficacy || !c.numericallySafe() {
		return found
	}
	k := c.key()
	if s.poolKeys[k] {
		return found
	}
	s.poolKeys[k] = true
	c.lpRow = -1
	s.pool = append(s.pool, c)
	return append(found, c)
}

// ageCuts increases the age of cuts whose slack is basic and removes those
// past cutAgeLimit (all slack ones when final) from the LP. Pool entries
// stay for later rounds.
func (s *search) ageCuts(final bool) {
	// The LP's own basis: rows may have been renumbered since the last
	// solve.
	basis := s.lps.Basis()
	var drop []int
	for _, c := range s.pool {
		if c.lpRow < 0 {
			continue
		}
		if basis.Rows[c.lpRow] == lp.Basic {
			c.age++
		} else {
			c.age = 0
		}
		if c.age > cutAgeLimit || (final && c.age > 0) {
			drop = append(drop, c.lpRow)
		}
	}
	// Removing rows costs a rebuild of the LP: wait until enough are old.
	if len(drop) == 0 || (!final && len(drop) < minCutsToAgeOut && 10*len(drop) < s.lps.NumRows()) {
		return
	}
	s.removeCutRows(drop)
}

// dropRound removes the cuts in LP rows from first on (the last round's)
// from the LP and from the pool.
func (s *search) dropRound(first int) {
	var drop []int
	kept := s.pool[:0]
	for _, c := range s.pool {
		if c.lpRow >= first {
			drop = append(drop, c.lpRow)
			continue
		}
		kept = append(kept, c)
	}
	clear(s.pool[len(kept):])
	s.pool = kept
	s.removeCutRows(drop)
}

// removeCutRows removes the listed LP rows, which hold cuts, and renumbers
// the cuts' rows and s.rows to match.
func (s *search) removeCutRows(drop []int) {
	if len(drop) == 0 {
		return
	}
	sort.Ints(drop)
	s.lps.RemoveRows(drop)
	removed := make(map[int]bool, len(drop))
	for _, i := range drop {
		removed[i] = true
	}
	// Renumber the rows that stay.
	newIndex := make([]int, len(s.rows))
	var kept []lpRowInfo
	for i := range s.rows {
		if removed[i] {
			newIndex[i] = -1
			continue
		}
		newIndex[i] = len(kept)
		kept = append(kept, s.rows[i])
	}
	s.rows = kept
	for _, c := range s.pool {
		if c.lpRow >= 0 {
			c.lpRow = newIndex[c.lpRow]
		}
	}
}
