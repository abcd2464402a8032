package mip

import (
	"context"
	"math"
	"time"

	"netstage/lp"
)

// Relaxation-induced neighbourhood search (RINS; Danna, Rothberg and Le
// Pape, "Exploring relaxation induced neighborhoods to improve MIP
// solutions", Math. Programming 102(1), 2005): the integer columns on
// which the incumbent and an LP solution agree are fixed at that value,
// and the much smaller MIP over the rest is searched, with a node limit,
// for a better point. Where the rounding and the local moves of the
// caller's Improve look at one unit at a time, the sub-search can move
// many at once, in the region the LP points to.
const (
	// rinsMinFixed is the least share of the integer columns the
	// agreement must fix; with fewer, the sub-MIP is about as hard as the
	// whole (common practice: 0.3 to 0.5).
	rinsMinFixed = 0.3
	// rinsNodes is the node limit of one sub-search.
	rinsNodes = 500
	// The sub-searches together may use rinsIterShare of the search's own
	// simplex iterations, plus as many as it took up to the end of its
	// first root LP (on large models the first sub-search runs beside the
	// root cut rounds, which leave the second core idle): a work
	// budget, not a time share, so that the search's path does not depend
	// on the machine. The search waits for a sub-search at its next call
	// point; on two cores the budget keeps that wait short. With a quarter
	// the search waited for about 8 % of its time on the synthetic 10-site
	// 7-year proofs (4.2 s of 49.8 s over seeds 1, 2, 10, 12, 14 and 16).
	// Seeds 1-16 in all, one solve at a time, on a machine whose speed
	// drifted by some 8 % within the hour: a quarter 60.5-62.1 s, a tenth
	// 57.8-62.4 s, a twentieth 56.0-57.3 s, no sub-search 55.2-55.4 s. At
	// 60 s a twentieth gave the 25-site cases (seeds 1, 2) better plans
	// than a quarter (NPV 3,031,913 and 3,338,789 against 3,031,580 and
	// 3,338,526) and tighter bounds (3,044,275 and 3,353,033 against
	// 3,044,657 and 3,353,100); the 50-site case is unchanged.
	rinsIterShare = 0.05
	// rinsMinIters: a sub-search is not started with less budget.
	rinsMinIters = 1000
)

// rinsJob is a sub-MIP prepared on the search goroutine and solved on
// another: the search's LP model with the agreeing integer columns fixed,
// the LP basis it starts from, and the incumbent it must beat.
type rinsJob struct {
	model     *lp.Model
	basis     lp.Basis
	start     []float64
	iterLimit int
}

// prepareRINS returns the sub-MIP of the incumbent and the LP point x (in
// the columns of the search's LP), or nil when there is no incumbent, the
// iteration budget is spent, too few columns agree, or the same columns
// agreed at the same values for an earlier sub-MIP. The model is the LP's
// (its cuts included, valid for every integer point) with the global
// domain, not the node's. Cost O(columns) when it refuses, O(nonzeros)
// when it accepts.
func (s *search) prepareRINS(x []float64) *rinsJob {
	p := s.p
	if !s.rinsOn() || s.incX == nil || p.nInt == 0 || len(x) != p.n {
		return nil
	}
	budget := int(rinsIterShare*float64(s.iters)) + s.rootIters - s.rinsIters
	if budget < rinsMinIters {
		return nil
	}
	agree := func(j int) bool { return p.isInt[j] && math.Abs(x[j]-s.incX[j]) <= s.set.IntTol }
	h := newFNV()
	fixed := 0
	for j := 0; j < p.n; j++ {
		if !agree(j) {
			continue
		}
		fixed++
		h.mix(uint64(j))
		h.mix(math.Float64bits(s.incX[j]))
	}
	if float64(fixed) < rinsMinFixed*float64(p.nInt) || fixed == p.nInt {
		return nil
	}
	key := uint64(h)
	if s.rinsDone[key] {
		return nil
	}
	if s.rinsDone == nil {
		s.rinsDone = map[uint64]bool{}
	}
	s.rinsDone[key] = true
	m := s.lps.Model().Clone()
	for j := 0; j < p.n; j++ {
		m.ColLower[j], m.ColUpper[j] = s.glo[j], s.gup[j]
		if agree(j) {
			m.ColLower[j], m.ColUpper[j] = s.incX[j], s.incX[j]
		}
	}
	return &rinsJob{model: m, basis: s.lps.Basis(), start: append([]float64(nil), s.incX...), iterLimit: budget}
}

// rinsOn reports whether the settings allow the sub-MIP heuristic.
func (s *search) rinsOn() bool { return !s.set.NoRINS && !s.set.NoHeuristics }

// runRINS searches the sub-MIP of job until its node or iteration limit,
// the deadline (zero: none) or the end of ctx. It returns a point better
// than the job's start, or nil, and the simplex iterations spent.
func runRINS(ctx context.Context, job *rinsJob, parent Settings, deadline time.Time) ([]float64, int) {
	set := Settings{
		NodeLimit:         rinsNodes,
		RelGap:            parent.RelGap,
		AbsGap:            parent.AbsGap,
		IntTol:            parent.IntTol,
		FeasTol:           parent.FeasTol,
		Seed:              parent.Seed,
		NoRINS:            true,
		NoStrongBranching: parent.NoStrongBranching,
		Priority:          parent.Priority, // the sub-MIP keeps the columns
	}
	if !deadline.IsZero() {
		left := time.Until(deadline)
		if left <= 0 {
			return nil, 0
		}
		set.TimeLimit = left
	}
	startObj, _ := job.model.Evaluate(job.start)
	sub := newSearch(ctx, job.model, set.withDefaults())
	sub.startBasis = &job.basis
	sub.iterLimit = job.iterLimit
	r := sub.run([][]float64{job.start})
	if r.X == nil || !(r.Objective < startObj-1e-9*math.Max(1, math.Abs(startObj))) {
		return nil, r.LPIterations
	}
	return r.X, r.LPIterations
}
