package lp

// This file fixes the package's public contract, which mip and plans build
// on. Change a signature here only together with its callers.

import (
	"context"
	"math"
	"time"
)

// Inf is the bound value meaning "no bound". Use -Inf for a missing lower
// bound.
var Inf = math.Inf(1)

// Sense is the direction of optimisation.
type Sense int8

const (
	Minimize Sense = iota // the zero value
	Maximize
)

// Status is the outcome of a solve. Limits and infeasibility are statuses,
// not errors.
type Status int8

const (
	StatusUnknown    Status = iota // not solved yet
	Optimal                        // primal and dual feasible within tolerance
	Infeasible                     // no point satisfies rows and bounds
	Unbounded                      // the objective improves without limit (primal feasible)
	IterationLimit                 // Settings.MaxIterations reached
	TimeLimit                      // Settings.TimeLimit reached
	Cancelled                      // the context was cancelled
	ObjectiveCutoff                // dual simplex proved the objective is worse than Settings.ObjectiveCutoff
	NumericalTrouble               // the solver could not reach a trustworthy answer
)

func (s Status) String() string {
	switch s {
	case Optimal:
		return "optimal"
	case Infeasible:
		return "infeasible"
	case Unbounded:
		return "unbounded"
	case IterationLimit:
		return "iteration limit"
	case TimeLimit:
		return "time limit"
	case Cancelled:
		return "cancelled"
	case ObjectiveCutoff:
		return "objective cutoff"
	case NumericalTrouble:
		return "numerical trouble"
	}
	return "unknown"
}

// VarStatus is the basis status of one column or one row (the row's slack,
// whose value is the row activity a·x).
type VarStatus int8

const (
	Basic   VarStatus = iota
	AtLower           // nonbasic at its lower bound
	AtUpper           // nonbasic at its upper bound
	AtZero            // nonbasic free variable held at zero
	Fixed             // nonbasic with lower == upper
)

// Basis is a simplex basis: one status per column and one per row. Exactly
// NumRows entries over both slices are Basic in a valid basis.
type Basis struct {
	Cols []VarStatus
	Rows []VarStatus
}

// Clone returns a deep copy.
func (b Basis) Clone() Basis {
	return Basis{Cols: append([]VarStatus(nil), b.Cols...), Rows: append([]VarStatus(nil), b.Rows...)}
}

// Settings tune a solve. The zero value of every field means its default or
// "no limit".
type Settings struct {
	MaxIterations int           // 0: no limit
	TimeLimit     time.Duration // 0: no limit
	// FeasibilityTol is the largest bound or row violation accepted
	// (default 1e-7, in the scaled model).
	FeasibilityTol float64
	// OptimalityTol is the largest reduced-cost sign violation accepted
	// (default 1e-7).
	OptimalityTol float64
	// ObjectiveCutoff, when HasCutoff is set, lets the dual simplex stop
	// with status ObjectiveCutoff as soon as its objective (a bound on the
	// optimum) is worse than ObjectiveCutoff: above it for a minimisation,
	// below it for a maximisation; model units, constant included.
	// Branch-and-bound uses it to drop nodes early. It is honoured only by
	// warm re-solves, whose costs are not perturbed.
	ObjectiveCutoff float64
	HasCutoff       bool
	// NoScaling turns off geometric equilibration.
	NoScaling bool
	// NoPerturbation turns off the cost perturbation against degeneracy.
	NoPerturbation bool
	// Seed drives the perturbation; same seed, same path.
	Seed int64
	// SecondCore lets the dual simplex of an LP of asideMinRows rows or
	// more solve for its steepest-edge weights on a second goroutine,
	// beside the rest of each iteration: the same arithmetic and the same
	// path, sooner. That goroutine keeps a core busy while the LP solves
	// (one such goroutine at a time in the process), so leave it off where
	// other solves want the second core.
	SecondCore bool
}

// Result is the outcome of a solve, in the model's own (unscaled) units and
// sense.
type Result struct {
	Status Status
	// Objective is c·x + constant in the model's sense: the optimum when
	// Optimal; for ObjectiveCutoff, the dual bound that passed the cutoff
	// (X is then the infeasible basic point that attains it).
	Objective float64
	// X holds column values, RowActivity the row activities a·x.
	X           []float64
	RowActivity []float64
	// Dual holds one multiplier per row and ReducedCost one per column, with
	// the convention ReducedCost = c − Aᵀ·Dual in the model's own sense
	// (for a minimisation a column at its lower bound has ReducedCost ≥ 0;
	// a ≥ row that binds has Dual ≥ 0). Dual[i] is the change of the optimal
	// objective per unit increase of row i's active bound.
	Dual        []float64
	ReducedCost []float64
	Basis       Basis
	Iterations  int
	// ObjectiveIsBound, for a limit status (IterationLimit, TimeLimit,
	// Cancelled), says that the solve stopped in the dual simplex on the
	// true (unperturbed) costs with a dual feasible basis: Objective is
	// then that basis' dual objective, a bound on the optimum (no feasible
	// point is better, within the tolerances). Branch-and-bound keeps it
	// when a limit stops a re-solve after cuts.
	ObjectiveIsBound bool
	// Ray is a certificate when one was found (it may be nil). For
	// Infeasible it is y over the rows such that, for every x within the
	// column bounds and every s within the row bounds, yᵀA·x − yᵀs < 0:
	// no x gives A·x = s. For Unbounded it is a direction d over the
	// columns along which every row and bound stays satisfied (A·d moves
	// rows only towards their infinite side) and the objective improves.
	Ray []float64
}

// Solve solves the LP relaxation of m (integrality marks are ignored) from a
// cold start. It returns an error only for failures that are not outcomes,
// such as a malformed model; infeasible, unbounded and limits are statuses.
func Solve(ctx context.Context, m *Model, s Settings) (Result, error) {
	sv, err := NewSolver(m, s)
	if err != nil {
		return Result{}, err
	}
	return sv.Solve(ctx), nil
}

// The Solver type (solver.go) keeps a model, its scaled copy, the current
// basis and factorisation between solves, for branch-and-bound and cuts; see
// its methods there for the exact conventions (variable numbering, tableau
// rows, signs).

// Row is one constraint lower ≤ Σ Value[k]·x[Index[k]] ≤ upper.
type Row struct {
	Name  string
	Lower float64
	Upper float64
	Index []int
	Value []float64
}
