package plans

import "time"

// SolveOptions tune Solve. The zero value of every field means its default
// or "no limit".
type SolveOptions struct {
	// TimeLimit bounds the whole solve, approximately (0: no limit): the
	// baseline LP, the search and the LPs that decode the plan (see Solve).
	// When it is hit, Solve returns the best plan found with status
	// feasible and its gap.
	TimeLimit time.Duration
	// NodeLimit stops the search after this many nodes (0: no limit), for
	// benchmarks that compare work rather than time.
	NodeLimit int
	// Gap is the relative gap at which a plan counts as optimal
	// (0: the default 1e-4; checks against other solvers use 1e-9).
	Gap float64
	// Progress, when set, is called from time to time during the search.
	Progress func(Progress)
	// NoHeuristic turns off the plan's rounding heuristic (for measuring
	// what it buys).
	NoHeuristic bool
	// NoCutSets turns off the cut-set inequalities on link capacities
	// (the model's rows and those separated in the search).
	NoCutSets bool
	// NoImprove turns off the local search on the incumbent's unit counts
	// (solve_improve.go).
	NoImprove bool
	// NoRINS turns off the search's sub-MIP heuristic (mip/rins.go).
	NoRINS bool
	// NoSeparation keeps the model's cut-set rows but does not separate
	// further ones in the search (for measuring what separation buys).
	NoSeparation bool
	// NoBaselineStart does not hand the do-nothing plan to the search as
	// its first incumbent (for measuring what it buys).
	NoBaselineStart bool
	// StartPlan, when set, is a plan the search starts from (its purchases
	// as PlanRow gives them; the money fields are ignored), for example the
	// best plan of a case with fewer choices: when it fits this case (items
	// offered, budgets kept, committed demand carried), the answer is never
	// worse than it, even when a limit stops the search early. A plan that
	// does not fit is ignored.
	StartPlan []PlanRow
	// SecondCore lets the search's LPs keep a second core busy with part
	// of their work (lp.Settings.SecondCore): the same plan, sooner, for a
	// process that runs one solve at a time. Leave it off when several
	// solves run at once (netstage compare and sweep with --jobs above 1).
	SecondCore bool
}

// Progress is a snapshot of a running solve. Objective and Bound are in NPV
// terms (case currency); HasIncumbent is false until a plan is known.
type Progress struct {
	Objective    float64
	Bound        float64
	Gap          float64
	HasIncumbent bool
	Nodes        int
	Elapsed      time.Duration
	// Replanning names the site around which the plan is being re-planned
	// (under a time limit, once the local search has settled), "" when
	// none is.
	Replanning string
}
