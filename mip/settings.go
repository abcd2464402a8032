package mip

import (
	"context"
	"fmt"
	"time"

	"netstage/lp"
)

// Default values used when a Settings field is zero.
const (
	// DefaultRelGap is the relative gap |bound − objective| / max(|objective|, 1)
	// at which the search stops and reports the incumbent as optimal.
	DefaultRelGap = 1e-4
	// DefaultAbsGap is the absolute gap |bound − objective| at which the search
	// stops.
	DefaultAbsGap = 1e-6
	// DefaultIntTol is the largest distance to an integer accepted for a
	// column marked Integer.
	DefaultIntTol = 1e-6
	// DefaultFeasTol is the largest bound or row violation of an incumbent in
	// the original model.
	DefaultFeasTol = 1e-6
	// DefaultProgressInterval is the time between two progress reports.
	DefaultProgressInterval = time.Second
	// DefaultHeuristicFreq is the number of nodes between two calls of the
	// Heuristic callback (it is always called at the root).
	DefaultHeuristicFreq = 50
)

// Status is the outcome of a branch-and-bound search.
type Status int8

const (
	StatusUnknown Status = iota // not solved
	Optimal                     // incumbent proven optimal within the gap settings
	Feasible                    // incumbent found; stopped at a limit or by cancellation before the proof
	Infeasible                  // no point satisfies rows, bounds and integrality
	Unbounded                   // a feasible point exists and the objective improves without limit
	Limit                       // stopped at a limit or by cancellation with no incumbent
)

func (s Status) String() string {
	switch s {
	case Optimal:
		return "optimal"
	case Feasible:
		return "feasible"
	case Infeasible:
		return "infeasible"
	case Unbounded:
		return "unbounded"
	case Limit:
		return "limit"
	}
	return "unknown"
}

// StopReason says why a search ended before its proof was complete.
type StopReason int8

const (
	Finished  StopReason = iota // the search ran to its end (the zero value)
	TimeLimit                   // Settings.TimeLimit reached
	NodeLimit                   // Settings.NodeLimit reached
	Cancelled                   // the context was cancelled
	LPFailure                   // a node LP could not be solved reliably; the bound is kept but not proven
)

func (r StopReason) String() string {
	switch r {
	case Finished:
		return "finished"
	case TimeLimit:
		return "time limit"
	case NodeLimit:
		return "node limit"
	case Cancelled:
		return "cancelled"
	case LPFailure:
		return "lp failure"
	}
	return fmt.Sprintf("StopReason(%d)", int8(r))
}

// Progress is a snapshot of the search handed to Settings.Progress. Values
// are in the model's own sense: for a maximisation Bound ≥ Incumbent.
type Progress struct {
	HasIncumbent bool
	Incumbent    float64 // objective of the best solution found; meaningful when HasIncumbent
	Bound        float64 // proven bound on the optimum
	Gap          float64 // |Bound − Incumbent| / max(|Incumbent|, 1); +Inf without incumbent
	Nodes        int     // nodes whose LP was solved
	OpenNodes    int     // nodes waiting in the queue
	LPIterations int
	Elapsed      time.Duration
	// NewIncumbent is set when this report is sent because the incumbent
	// improved (rather than because the interval passed).
	NewIncumbent bool
}

// Settings tune a search. The zero value of every field means its default
// or "no limit".
type Settings struct {
	TimeLimit time.Duration // 0: no limit
	NodeLimit int           // 0: no limit
	// RelGap is the relative gap |bound − objective| / max(|objective|, 1) at
	// which the search stops (0: DefaultRelGap). Values down to 1e-9 are
	// honoured; a negative value means 0 (prove to AbsGap only).
	RelGap float64
	// AbsGap is the absolute gap at which the search stops (0: DefaultAbsGap;
	// negative: 0).
	AbsGap float64
	// IntTol is the integrality tolerance (0: DefaultIntTol).
	IntTol float64
	// FeasTol is the largest row or bound violation accepted for a solution
	// in the original model (0: DefaultFeasTol).
	FeasTol float64
	// Seed makes the LP perturbation and tie-breaking reproducible: the same
	// model, settings and seed give the same search and the same answer.
	Seed int64
	// SecondCore is lp.Settings.SecondCore for the search's own LPs (not
	// the sub-MIP's): on two cores they solve sooner, on the same path.
	SecondCore bool

	// Start is an optional starting solution (one value per column). It is
	// checked against the model; if it violates rows or bounds it is used
	// only as a hint: its integer values are fixed and the continuous columns
	// re-optimised. An unusable start is ignored.
	Start []float64
	// LateStart, when set, is called once, from the solving goroutine, as
	// soon as the root LP has ended (solved or stopped by a limit); the
	// point it returns (nil: none) is tried like Start. It lets a caller
	// compute its start concurrently with the root LP, which does not
	// depend on the incumbent: with a point that satisfies the model, the
	// search takes the same path as with that point as Start (one that
	// needs completing by LP is completed from the root LP's basis). A
	// search that proves the model infeasible before its root LP does not
	// call it.
	LateStart func() []float64

	// Progress, when set, is called from the solving goroutine every
	// ProgressInterval and whenever the incumbent improves.
	Progress func(Progress)
	// ProgressInterval is the time between two reports (0: DefaultProgressInterval).
	ProgressInterval time.Duration

	// Heuristic, when set, lets the caller propose solutions. It is called at
	// the root (before and after the root cuts), at each of the first 5 nodes
	// and every HeuristicFreq nodes with the node's LP solution (one value
	// per column, in the model's own columns) and returns candidate
	// points, or nil. Each candidate is checked like Start: a candidate that
	// violates rows or bounds has its integer values fixed and its continuous
	// columns re-optimised by LP.
	Heuristic func(lpSolution []float64) [][]float64
	// HeuristicFreq is the node interval for Heuristic (0: DefaultHeuristicFreq).
	HeuristicFreq int
	// Improve, when set, lets the caller improve the incumbent: at each
	// Heuristic call point, when the incumbent has changed since Improve
	// last got it, Improve is started with the incumbent (model columns)
	// and returns a better point, or nil. It runs on its own goroutine,
	// beside the search, and its answer is taken at the next call point
	// (the search waits for it there) or when the search ends: the path
	// does not depend on how long it takes. With a time limit (where the
	// search stops depends on timing already), the search does not wait:
	// it takes the answer at the first call point, or between two root
	// cut rounds, after it is ready (on large models the rounds may
	// outlast it by most of the limit), and until then starts no other
	// Improve or sub-MIP; where it takes the answer between rounds, it
	// starts the next one there too. An Improve may use the time left,
	// and its context is cancelled when the search ends. The answer is
	// checked like a Heuristic candidate; when it becomes the incumbent,
	// Improve gets it again at once (a caller that stopped short can go
	// on; one that finished should answer nil at once). One Improve runs
	// at a time, but beside the other callbacks (Heuristic, Separate,
	// Progress): state it shares with them must be safe for that. ctx is
	// cancelled when the search stops at its time limit or is cancelled
	// (or, with a time limit, ends); an answer found by then is still
	// taken.
	// basis, when not nil, is an optimal basis of the model's LP with the
	// integer columns fixed at the incumbent's values (a warm start for
	// the caller's own LPs).
	Improve func(ctx context.Context, incumbent []float64, basis *lp.Basis) []float64

	// Separate, when set, lets the caller add cutting planes it knows from
	// the model's structure. It is called in each round of root cuts, and
	// once at each tree node of depth 3 or less until 100 of its cuts have
	// entered the LP there, with the LP solution (model columns), and
	// returns rows in the model's columns that every feasible integer
	// point satisfies (the caller's promise: an invalid row cuts off
	// solutions). Rows violated by the point enter the cut pool with the
	// built-in cuts; the search keeps their Index and Value slices, so the
	// callback must not reuse them.
	Separate func(lpSolution []float64) []lp.Row

	// NoCuts turns off cutting planes (the root rounds, and Separate in
	// the tree); NoStrongBranching turns off strong branching (pseudocosts
	// alone); NoHeuristics turns off the built-in rounding, diving and
	// sub-MIPs. For experiments and cross-checks.
	NoCuts            bool
	NoStrongBranching bool
	NoHeuristics      bool
	// NoRINS turns off the sub-MIP heuristic (rins.go).
	NoRINS bool
	// CMIR turns on c-MIR cuts (cmir.go) in the root rounds, on
	// aggregated rows and on the tableau rows whose Gomory cut is dropped
	// (tableauMIR); the aggregated ones that bind at the root's end stay
	// in the LP, and the nodes take them back from the pool like covers.
	// Off by default: on the synthetic planning cases they pay on 10-year
	// horizons and cost time on the 25-site 7-year one (DEVELOPERS.md has
	// the numbers).
	CMIR bool
	// NoProofs turns off the proofs learnt from nodes pruned by their
	// bound or infeasible (proofs.go).
	NoProofs bool
	// NoPlungeCuts turns off the separation at the nodes below depth 3
	// where plunges start (doc.go, Nodes). A short sub-search under a
	// time limit, such as a caller's re-plan of part of a plan, may spend
	// its time better on nodes.
	NoPlungeCuts bool

	// Priority, when set (one value per column), orders the integer
	// columns for branching: a node branches on a fractional column of the
	// highest priority among its fractional columns, chosen as usual
	// among those; columns of lower priority wait until every column above
	// them is integral at the node. nil: all columns alike (NewSolver
	// refuses a slice of another length). A caller sets
	// it for columns that switch others' terms on, such as the choice of
	// a discount tier, whose fractional values the LP exploits and whose
	// branches settle much of the rest.
	Priority []int
}

func (s Settings) withDefaults() Settings {
	if s.RelGap == 0 {
		s.RelGap = DefaultRelGap
	} else if s.RelGap < 0 {
		s.RelGap = 0
	}
	if s.AbsGap == 0 {
		s.AbsGap = DefaultAbsGap
	} else if s.AbsGap < 0 {
		s.AbsGap = 0
	}
	if s.IntTol <= 0 {
		s.IntTol = DefaultIntTol
	}
	if s.FeasTol <= 0 {
		s.FeasTol = DefaultFeasTol
	}
	if s.ProgressInterval <= 0 {
		s.ProgressInterval = DefaultProgressInterval
	}
	if s.HeuristicFreq <= 0 {
		s.HeuristicFreq = DefaultHeuristicFreq
	}
	return s
}

// Result is the outcome of a search, in the model's own sense and columns.
type Result struct {
	Status  Status
	Stopped StopReason // why the search ended (Finished for a completed proof)
	// X is the best solution found (nil when there is none). For Unbounded it
	// is a feasible point.
	X         []float64
	Objective float64 // c·x + constant at X; meaningful when X != nil
	// Bound is a proven bound on the optimum: a lower bound for a
	// minimisation, an upper bound for a maximisation. ±Inf when nothing is
	// known (or for Unbounded).
	Bound float64
	// Gap is |Bound − Objective| / max(|Objective|, 1); +Inf without X.
	Gap          float64
	Nodes        int // nodes whose LP was solved (the root counts)
	LPIterations int // simplex iterations over all LPs
	Time         time.Duration
	RootBound    float64 // the LP bound after root cuts, in the model's sense
	Cuts         int     // cuts added at the root
}
