package mip

import (
	"context"
	"errors"
	"math"
	"time"

	"netstage/lp"
)

var inf = math.Inf(1)

// Solve solves the mixed-integer program m (columns marked in m.Integer must
// take integer values) by branch-and-bound over its LP relaxation. It
// returns an error only for a malformed model; infeasible, unbounded and
// limits are statuses. m is not modified. Cancelling ctx stops the search
// and returns the best solution found (Status Feasible, Stopped Cancelled).
func Solve(ctx context.Context, m *lp.Model, s Settings) (Result, error) {
	sv, err := NewSolver(m, s)
	if err != nil {
		return Result{}, err
	}
	return sv.Solve(ctx)
}

// Solver is a branch-and-bound search prepared for one model. Use it when
// candidate solutions are to be added before the search (AddSolution), or
// to change settings between searches of the same model. A Solver is not
// safe for concurrent use.
type Solver struct {
	model *lp.Model
	set   Settings
	extra [][]float64
}

// NewSolver checks m and returns a Solver for it. The model is cloned, so
// later changes to m do not reach the solver. Cost O(nonzeros).
func NewSolver(m *lp.Model, s Settings) (*Solver, error) {
	if m == nil {
		return nil, errors.New("mip: nil model")
	}
	n := m.NumCols()
	if len(m.Integer) != n || len(m.ColLower) != n || len(m.ColUpper) != n {
		return nil, errors.New("mip: model column vectors differ in length")
	}
	if s.Start != nil && len(s.Start) != n {
		return nil, errors.New("mip: start solution has the wrong length")
	}
	if s.Priority != nil && len(s.Priority) != n {
		return nil, errors.New("mip: branching priorities have the wrong length")
	}
	// Validate through lp's own checks (bounds, NaN).
	if _, err := lp.NewSolver(m, lp.Settings{}); err != nil {
		return nil, errors.Join(errors.New("mip: invalid model"), err)
	}
	return &Solver{model: m.Clone(), set: s}, nil
}

// SetSettings replaces the settings for the next Solve.
func (sv *Solver) SetSettings(s Settings) { sv.set = s }

// AddSolution adds a candidate solution (one value per column) tried before
// the search, like Settings.Start. It panics on a wrong length.
func (sv *Solver) AddSolution(x []float64) {
	if len(x) != sv.model.NumCols() {
		panic("mip: AddSolution: wrong length")
	}
	sv.extra = append(sv.extra, append([]float64(nil), x...))
}

// Solve runs the search. See the package function Solve.
func (sv *Solver) Solve(ctx context.Context) (Result, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	set := sv.set.withDefaults()
	s := newSearch(ctx, sv.model, set)
	starts := sv.extra
	if set.Start != nil {
		starts = append([][]float64{set.Start}, starts...)
	}
	return s.run(starts), nil
}

// search is the state of one branch-and-bound run. Everything inside is a
// minimisation (problem.work).
type search struct {
	model    *lp.Model
	ctx      context.Context
	set      Settings
	p        *problem
	lps      *lp.Solver
	lpSet    lp.Settings
	started  time.Time
	deadline time.Time // zero: none

	prop  *propagator
	pc    *pseudocosts
	queue *nodeQueue
	ids   int

	incX []float64 // best solution, original columns
	// incBasis is the optimal basis of the LP that completed incX (its
	// integer columns fixed), or nil when incX needed no completion.
	incBasis *lp.Basis
	incObj   float64 // its internal objective; +Inf when none
	// improvedObj is incObj when Settings.Improve last saw the incumbent.
	improvedObj float64
	// helper receives the answers of the running helper goroutine
	// (Improve, then the sub-MIP; nil: none running); stopHelper cancels
	// its context.
	helper     chan helperAnswer
	stopHelper context.CancelFunc
	// rinsDone holds the keys of the sub-MIPs searched (rins.go) and
	// rinsIters the simplex iterations they took; rootIters counts the
	// search's iterations up to the end of its first root LP. For a
	// sub-MIP, startBasis is the basis its root LP starts from and
	// iterLimit its work limit (0: none; reached, the search stops as at
	// its node limit).
	rinsDone   map[uint64]bool
	rinsIters  int
	rootIters  int
	startBasis *lp.Basis
	iterLimit  int

	prunedMin float64 // least bound of nodes pruned by the gap rule or lost to LP failure
	lpLost    bool    // some subproblem was given up after LP failure

	nodes, iters int
	nodeLPIters  int // iterations of node LP solves (not strong branching or dives)
	sbIters      int // iterations of strong branching
	stopped      StopReason

	glo, gup   []float64 // global domain
	lo, up     []float64 // current node domain
	nodeLo     []float64 // the node's domain as loaded, before its own changes
	nodeUp     []float64
	lpLo, lpUp []float64 // bounds loaded into the LP

	rows     []lpRowInfo // every LP row, original then cuts
	pool     []*cut
	poolKeys map[uint64]bool
	nCuts    int
	// tableauMIRs counts the MIRs of tableau rows found in the root rounds
	// where the row's Gomory cut was dropped (Settings.CMIR); they compete
	// with the round's other cuts for the LP.
	tableauMIRs int
	treeCuts    int // pool cuts put back into the LP during the tree search
	sepCuts     int // the caller's cuts separated at tree nodes (treeSeparate)
	// cuts separated where plunges start, and the nodes tried there
	// (plungeStartSeparate)
	startCuts, startSeparations int

	downLocks, upLocks []int

	proofs      []proof // learnt from pruned and infeasible nodes (proofs.go)
	proofNZ     int
	proofD      []float64 // scratch for learnProof
	proofPrunes int       // nodes pruned by a proof before their LP
	proofFixes  int       // bounds tightened by proofs

	rootObj    float64
	rootRedCst []float64 // root reduced costs, for global fixing when the incumbent improves
	rootX      []float64
	rootBound  float64

	curBound     float64 // bound of the node being processed (+Inf when none)
	lastProgress time.Time
	nodeIters    float64 // running mean of LP iterations per node

	completion *lp.Solver // LP over the continuous columns, for candidate completion
	lpSolved   bool       // the root LP was solved to optimality (its basis is worth reusing)
}

func newSearch(ctx context.Context, m *lp.Model, set Settings) *search {
	s := &search{model: m, ctx: ctx, set: set, started: time.Now(), incObj: inf, improvedObj: inf, prunedMin: inf, curBound: math.Inf(-1)}
	if set.TimeLimit > 0 {
		s.deadline = s.started.Add(set.TimeLimit)
	}
	s.lpSet = lp.Settings{Seed: set.Seed, SecondCore: set.SecondCore}
	return s
}

func (s *search) elapsed() time.Duration { return time.Since(s.started) }

// timeStop returns Cancelled when the search's context has ended,
// TimeLimit when it is past its time limit, and Finished otherwise.
func (s *search) timeStop() StopReason {
	switch {
	case s.ctx.Err() != nil:
		return Cancelled
	case !s.deadline.IsZero() && time.Now().After(s.deadline):
		return TimeLimit
	}
	return Finished
}

// pastTime reports whether the search is cancelled or past its time limit.
func (s *search) pastTime() bool { return s.timeStop() != Finished }

// limitReached checks time, nodes and cancellation, and records why.
func (s *search) limitReached() bool {
	if s.stopped != Finished && s.stopped != LPFailure {
		return true
	}
	if r := s.timeStop(); r != Finished {
		s.stopped = r
		return true
	}
	if (s.set.NodeLimit > 0 && s.nodes >= s.set.NodeLimit) || (s.iterLimit > 0 && s.iters >= s.iterLimit) {
		s.stopped = NodeLimit
		return true
	}
	return false
}

// gapTol is the absolute amount by which a node must promise to beat the
// incumbent to be worth exploring.
func (s *search) gapTol() float64 {
	if math.IsInf(s.incObj, 1) {
		return 0
	}
	return math.Max(s.set.AbsGap, s.set.RelGap*math.Max(math.Abs(s.incObj), 1))
}

// pruneLimit is the objective value at or above which a node is pruned.
func (s *search) pruneLimit() float64 {
	if math.IsInf(s.incObj, 1) {
		return inf
	}
	lim := s.incObj - s.gapTol()
	if s.p.objStep > 0 {
		// Only points on the lattice below the incumbent are better.
		lim = math.Max(lim, s.incObj-s.p.objStep*(1-objLatticeTol))
	}
	return lim
}

// notePruned records the bound of a node dropped because it cannot beat the
// incumbent by more than the gap.
func (s *search) notePruned(bound float64) {
	b := s.p.roundBound(bound)
	if b < s.prunedMin {
		s.prunedMin = b
	}
}

// globalBound is the best proven lower bound (internal sense).
func (s *search) globalBound() float64 {
	b := math.Min(s.queue.minBound(), s.curBound)
	b = math.Min(b, s.prunedMin)
	return math.Min(b, s.incObj)
}

func (s *search) lpSolve(cutoff float64, maxIter int) lp.Result {
	set := s.lpSet
	set.MaxIterations = maxIter
	if !math.IsInf(cutoff, 1) {
		set.ObjectiveCutoff = cutoff
		set.HasCutoff = true
	}
	if !s.deadline.IsZero() {
		rem := time.Until(s.deadline)
		if rem <= 0 {
			rem = time.Nanosecond
		}
		set.TimeLimit = rem
	}
	s.lps.SetSettings(set)
	r := s.lps.Solve(s.ctx)
	s.iters += r.Iterations
	return r
}

// syncBounds loads the current domain into the LP where it differs.
func (s *search) syncBounds() {
	for j := 0; j < s.p.n; j++ {
		if s.lo[j] != s.lpLo[j] || s.up[j] != s.lpUp[j] {
			s.lps.SetColBounds(j, s.lo[j], s.up[j])
			s.lpLo[j], s.lpUp[j] = s.lo[j], s.up[j]
		}
	}
}

// result assembles the caller's Result.
func (s *search) result(status Status) Result {
	// Every path joins Improve before it decides the status; this only
	// makes sure no Improve outlives the search.
	s.joinHelper(true)
	p := s.p
	r := Result{Status: status, Stopped: s.stopped, Nodes: s.nodes, LPIterations: s.iters, Time: s.elapsed(), Cuts: s.nCuts}
	if status == Infeasible {
		r.Stopped = Finished
	}
	r.RootBound = p.sign * s.rootBound
	if s.incX != nil {
		r.X = make([]float64, len(s.incX))
		copy(r.X, s.incX)
		r.Objective, _ = p.orig.Evaluate(r.X)
	}
	switch status {
	case Unbounded:
		r.Bound = -p.sign * inf
		r.Gap = inf
		return r
	case Infeasible:
		r.Bound = p.sign * inf
		r.Gap = inf
		return r
	}
	b := s.globalBound()
	if status == Optimal && s.incX != nil {
		b = math.Min(b, s.incObj)
	}
	r.Bound = p.sign * b
	if r.X != nil {
		r.Gap = math.Abs(r.Bound-r.Objective) / math.Max(math.Abs(r.Objective), 1)
	} else {
		r.Gap = inf
	}
	return r
}

// progress sends a report when due (or at once for a new incumbent).
func (s *search) progress(newInc bool) {
	if s.set.Progress == nil {
		return
	}
	now := time.Now()
	if !newInc && now.Sub(s.lastProgress) < s.set.ProgressInterval {
		return
	}
	s.lastProgress = now
	p := s.p
	pr := Progress{Nodes: s.nodes, OpenNodes: s.queue.Len(), LPIterations: s.iters, Elapsed: s.elapsed(), NewIncumbent: newInc}
	b := s.globalBound()
	pr.Bound = p.sign * b
	pr.Gap = inf
	if s.incX != nil {
		pr.HasIncumbent = true
		pr.Incumbent = p.sign * s.incObj
		pr.Gap = math.Abs(pr.Bound-pr.Incumbent) / math.Max(math.Abs(pr.Incumbent), 1)
	}
	s.set.Progress(pr)
}
