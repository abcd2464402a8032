package plans

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"math"
	"sync"
	"sync/atomic"
	"time"

	"netstage/lp"
	"netstage/mip"
)

// Tolerances of the solve pipeline.
const (
	// holdObjectiveTol is how far (relative to max(|optimum|, 1)) a
	// follow-up LP may let the previous objective slip when it picks, among
	// equally good solutions, the one with the fewest Gbps·km.
	holdObjectiveTol = 1e-9
	// valueTol: flows, served traffic and shortfalls below this many Gbps
	// are reported as zero.
	valueTol = 1e-6
	// shadowTol: shadow values smaller than this (case currency per Gbps)
	// are reported as nil (the link does not bind).
	shadowTol = 1e-6
	// explainTimeLimit bounds the elastic searches that explain an
	// infeasible case (the time limit, when shorter, bounds them instead).
	explainTimeLimit = 30 * time.Second
	// consistencyTol is the relative difference between the NPV
	// recomputed from the plan and the MIP's objective above which Solve
	// warns.
	consistencyTol = 1e-6
)

// withinRel reports whether |a − b| ≤ rel·max(|a|, |b|, 1).
func withinRel(a, b, rel float64) bool {
	return math.Abs(a-b) <= rel*math.Max(1, math.Max(math.Abs(a), math.Abs(b)))
}

// mipSolve is the branch-and-bound used by Solve (a variable so that tests
// can compare it with brute-force enumeration on tiny cases).
var mipSolve = mip.Solve

// Export returns the exact model Solve solves for c with these options (a
// minimisation of −NPV in case currency, integer columns with explicit
// bounds, cut-set rows included), for writing as MPS.
func Export(c *Case, opts BuildOptions) (*lp.Model, error) {
	m, err := BuildModel(c, opts)
	if err != nil {
		return nil, err
	}
	return m.LP, nil
}

// Solve builds the planning MIP of c, solves it with package mip, and
// decodes the best plan found into a Result with its NPV breakdown, the
// do-nothing baseline and the incremental figures. Limits, infeasibility
// and unboundedness are statuses of the Result; errors are failures only.
//
// Pipeline: MIP (with the rounding heuristic and cut-sets unless turned
// off) → LP with the integer decisions fixed (capacity duals give the value
// of one more Gbps) → LP holding that NPV and minimising Gbps·km (no
// detours; equal-length routings stay ties) → cash flows recomputed from
// the decisions alone. An infeasible case is explained by an elastic model
// (explain.go).
//
// The do-nothing baseline LP runs on its own goroutine, alongside the
// search's root LP, and gives the search its start plan when that LP ends.
//
// SolveOptions.TimeLimit bounds the whole solve, approximately: the search
// stops at the limit less a reserve for the LPs that decode the plan
// afterwards (estimated from the baseline LP's own time, see searchLimit;
// until the baseline is done, the limit itself). Those LPs run to their end,
// even after ctx is cancelled, so that the best plan is reported; a solve
// may therefore overrun its limit by the difference between the reserve and
// their real time.
func Solve(ctx context.Context, c *Case, opts SolveOptions) (*Result, error) {
	start := time.Now()
	m, err := BuildModel(c, BuildOptions{NoCutSets: opts.NoCutSets})
	if err != nil {
		return nil, err
	}
	res := &Result{
		Case:     c.Name,
		Currency: c.Currency,
		CostMode: c.CostMode(),
		Stats: SolverStats{
			Rows:     m.LP.NumRows(),
			Columns:  m.LP.NumCols(),
			Integers: countTrue(m.LP.Integer),
		},
	}
	set := searchSettings(m, opts)
	if len(opts.StartPlan) > 0 {
		set.Start = m.startFromPlan(ctx, opts.StartPlan, time.Duration(maxStartShare*float64(opts.TimeLimit)))
	}
	// The site whose region the local search is re-planning (−1: none),
	// written by the improver's goroutine, read by the progress reports.
	var replanning atomic.Int32
	replanning.Store(-1)
	if opts.Progress != nil {
		set.Progress = func(p mip.Progress) {
			pr := Progress{
				Objective: -p.Incumbent, Bound: -p.Bound, Gap: p.Gap,
				HasIncumbent: p.HasIncumbent, Nodes: p.Nodes, Elapsed: p.Elapsed,
			}
			if v := replanning.Load(); v >= 0 {
				pr.Replanning = c.Sites[v].Name
			}
			opts.Progress(pr)
		}
	}
	// The baseline LP runs concurrently with the search's root LP, which
	// does not need it. The search takes the baseline's plan as its start
	// right after that LP (mip Settings.LateStart: the same path as a start
	// given up front), and once the baseline's time is known the search is
	// stopped at the time limit less the reserve for decoding (searchLimit).
	searchCtx, stopSearch := context.WithCancel(ctx)
	defer stopSearch()
	if opts.TimeLimit > 0 {
		set.TimeLimit = max(opts.TimeLimit-time.Since(start), minSearchTime) // a backstop; stopSearch ends the search earlier
	}
	baseDone := make(chan baselineRun, 1)
	go func() {
		baseStart := time.Now()
		var br baselineRun
		br.base, br.err = solveBaseline(ctx, c)
		if br.err != nil {
			stopSearch() // Solve fails with this error: no use searching on
		} else if opts.TimeLimit > 0 {
			br.deadline = start.Add(searchLimit(opts.TimeLimit, baseStart.Sub(start), time.Since(baseStart), br.base != nil))
			br.timer = time.AfterFunc(time.Until(br.deadline), stopSearch)
		}
		baseDone <- br
	}()
	waitBaseline := sync.OnceValue(func() baselineRun { return <-baseDone })
	var im *improver
	if !opts.NoHeuristic && !opts.NoImprove {
		im = m.newImprover(time.Time{})
		im.onRegion = func(site int) { replanning.Store(int32(site)) }
		set.Improve = im.improve
	}
	set.LateStart = func() []float64 {
		br := waitBaseline()
		if im != nil {
			im.deadline = br.deadline // Improve is first called after this
		}
		if br.base == nil || opts.NoBaselineStart {
			return nil
		}
		return m.startFromBaseline(br.base)
	}
	mr, err := mipSolve(searchCtx, m.LP, set)
	br := waitBaseline()
	if br.timer != nil {
		br.timer.Stop()
	}
	if br.err != nil {
		return nil, br.err
	}
	if err != nil {
		return nil, fmt.Errorf("plans: %w", err)
	}
	base := br.base
	res.setBaseline(base)
	res.Stats.Nodes, res.Stats.Iterations = mr.Nodes, mr.LPIterations
	res.mipObjective = mr.Objective

	switch mr.Status {
	case mip.Optimal:
		res.Status = StatusOptimal
	case mip.Feasible:
		res.Status = StatusFeasible
	case mip.Infeasible:
		res.Status = StatusInfeasible
		limit := explainTimeLimit
		if opts.TimeLimit > 0 {
			limit = min(limit, opts.TimeLimit)
		}
		res.Infeasibility, err = explainInfeasible(ctx, c, limit)
		if err != nil {
			return nil, err
		}
		res.Stats.Seconds = time.Since(start).Seconds()
		return res, nil
	case mip.Unbounded:
		res.Status = StatusUnbounded
		res.Stats.Seconds = time.Since(start).Seconds()
		return res, nil
	default:
		res.Status = StatusLimit
		res.Stats.Seconds = time.Since(start).Seconds()
		return res, nil
	}

	res.model = m
	// Decoding the plan takes a few LPs; they run even after Ctrl-C or the
	// time limit stopped the search, so that the best plan is reported.
	// The shortest-routing stage of decoding only breaks ties: it stops at
	// the time limit.
	var tieBreakBy time.Time
	if opts.TimeLimit > 0 {
		tieBreakBy = start.Add(opts.TimeLimit)
	}
	if err := m.decode(context.WithoutCancel(ctx), res, mr.X, base, tieBreakBy); err != nil {
		return nil, err
	}
	if !withinRel(*res.Objective, -mr.Objective, consistencyTol) {
		res.Warnings = append(res.Warnings, fmt.Sprintf("the NPV recomputed from the plan (%.2f) differs from the solver's objective (%.2f): numerical trouble, check the plan", *res.Objective, -mr.Objective))
	}
	// A search stopped before its first LP has no bound: Bound and Gap stay
	// nil (JSON null) rather than infinite.
	if bound := -mr.Bound; !math.IsInf(bound, 0) && !math.IsNaN(bound) {
		if res.Status == StatusOptimal && bound < *res.Objective {
			bound = *res.Objective // the fixed LP may add a rounding-size gain
		}
		res.Bound = &bound
		gap := math.Abs(bound-*res.Objective) / math.Max(math.Abs(*res.Objective), 1)
		if target := cmp.Or(opts.Gap, mip.DefaultRelGap); res.Status == StatusOptimal && gap > target && gap-target <= consistencyTol {
			// The search proved its own objective within the target; the
			// NPV recomputed from the plan differs from it by rounding
			// (a fraction of a cent on the demo), which must not make a
			// proven plan read as just outside its gap.
			gap = target
		}
		res.Gap = &gap
	}
	res.Stats.Seconds = time.Since(start).Seconds()
	return res, nil
}

// Budget of a time-limited solve.
const (
	// maxDecodeShare caps the reserve kept back from the search for the
	// LPs that decode the plan, as a share of the time limit.
	maxDecodeShare = 0.25
	// decodePerBaseline estimates the decode LPs' time as a multiple of the
	// baseline LP's.
	decodePerBaseline = 2
	// maxStartShare caps the time spent computing the start from
	// SolveOptions.StartPlan, as a share of the time limit.
	maxStartShare = 0.25
	// noBaselineDecodeShare is the reserve when the baseline LP failed and
	// gives no estimate.
	noBaselineDecodeShare = 0.1
	// minSearchTime is the least time the search gets even when the
	// baseline used up the limit: enough to check the start plan.
	minSearchTime = time.Millisecond
	// cmirMinHorizon: cases of this many years or more are solved with
	// mip's c-MIR cuts (mip.Settings.CMIR). Measured on the synthetic
	// cases of seed 1, each search on one core (GOMAXPROCS=1) with
	// another search on the other (2026-12-05): after 300 s, 10, 15 and
	// 25 sites over 10 years were at gaps of 0.317 %, 0.70 % and 1.19 %
	// with them against 0.397 %, 0.82 % and 1.54 % without; L (50 sites,
	// 10 years) at 3.55 % against 4.05 % after 60 s. Alone on both cores,
	// L after 60 s: bound 8,498,547 against 8,500,663, but plan 8,277,254
	// against 8,293,276 (gap 2.67 % against 2.50 %): at that size the plan
	// found in time moves more than the cuts do. On M (25 sites, 7 years)
	// they cost: 1,321 nodes in 120 s against 2,137, and a looser bound
	// (3,042,153 against 3,041,386). The 16 cases of 10 sites over 7
	// years took 1,968 nodes against 2,955 (34.0 s against 35.6 s).
	cmirMinHorizon = 10
)

// minTieBreak is the least time the shortest-routing stage of decoding gets
// when the time limit has passed (on the synthetic 50-site cases it needs
// 1.3–2.2 s). A variable so that a test can take it away.
var minTieBreak = time.Second

// baselineRun is the outcome of the baseline LP run concurrently with the
// search: the baseline, and the search's deadline (zero without a time
// limit) with the timer that stops the search then.
type baselineRun struct {
	base     *baselineSolution
	err      error
	deadline time.Time
	timer    *time.Timer
}

// searchLimit returns the time limit of the search in a solve limited to
// limit, of which elapsed has passed, the baseline LP having taken
// baseline (solved says whether it succeeded). The decode LPs (the plan's
// routing with its decisions fixed, then the shortest routing) are a little
// larger than the baseline LP's stages and, like them, start from scratch:
// on the synthetic L case they took from 0.9 to 2.5 times the baseline's
// time in runs under different machine loads. So the reserve is
// decodePerBaseline times the baseline's time, capped at maxDecodeShare of
// the limit.
func searchLimit(limit, elapsed, baseline time.Duration, solved bool) time.Duration {
	reserve := time.Duration(noBaselineDecodeShare * float64(limit))
	if solved {
		reserve = min(decodePerBaseline*baseline, time.Duration(maxDecodeShare*float64(limit)))
	}
	return max(limit-elapsed-reserve, minSearchTime)
}

func countTrue(b []bool) int {
	n := 0
	for _, v := range b {
		if v {
			n++
		}
	}
	return n
}

func sumPV(rows []CashflowRow) float64 {
	s := 0.0
	for _, r := range rows {
		s += r.PV
	}
	return s
}

// lexResult is the outcome of a lexicographic LP: the point of the last
// stage and the row duals of the first. tieBreakCut says that a later
// stage was stopped by its deadline (x is then the previous stage's).
type lexResult struct {
	x           []float64
	firstDual   []float64
	firstObj    float64
	tieBreakCut bool
}

// solveLex solves model with its own objective, then, for each further
// objective in turn, holds the previous optimum (within holdObjectiveTol)
// and optimises the next one. The further stages only break ties: when
// tieBreakBy is not zero they stop then (but get at least minTieBreak).
// It returns nil with no error when the first LP is not optimal
// (infeasible or limit).
func solveLex(ctx context.Context, model *lp.Model, tieBreakBy time.Time, next ...[]float64) (*lexResult, error) {
	sv, err := lp.NewSolver(model, lp.Settings{})
	if err != nil {
		return nil, fmt.Errorf("plans: %w", err)
	}
	r := sv.Solve(ctx)
	if r.Status != lp.Optimal {
		return nil, nil
	}
	out := &lexResult{x: r.X, firstDual: r.Dual, firstObj: r.Objective}
	if !tieBreakBy.IsZero() {
		var cancel context.CancelFunc
		ctx, cancel = context.WithDeadline(ctx, latest(tieBreakBy, time.Now().Add(minTieBreak)))
		defer cancel()
	}
	cur := append([]float64(nil), model.Obj...)
	curObj := r.Objective
	for _, obj := range next {
		row := lp.Row{Name: "hold"}
		for j, v := range cur {
			if v != 0 {
				row.Index = append(row.Index, j)
				row.Value = append(row.Value, v)
			}
		}
		row.Lower = -lp.Inf
		row.Upper = curObj - model.Constant + holdObjectiveTol*math.Max(math.Abs(curObj), 1)
		sv.AddRows([]lp.Row{row})
		sv.SetObjective(obj)
		r = sv.Solve(ctx)
		if r.Status != lp.Optimal {
			// Keep the previous stage's point: it is optimal for what
			// matters; only the tie-break failed.
			out.tieBreakCut = r.Status == lp.Cancelled || r.Status == lp.TimeLimit
			break
		}
		out.x = r.X
		cur, curObj = append([]float64(nil), obj...), r.Objective
	}
	return out, nil
}

// startFromBaseline returns the do-nothing plan as a point of m: no
// purchases, "no discount" chosen for every vendor-year, and the baseline's
// routing and served traffic. When the baseline carries every committed
// Gbps it is feasible, so the search has an incumbent before its first LP
// (a large case may hit its time limit before finding a better one).
func (m *Model) startFromBaseline(base *baselineSolution) []float64 {
	x := make([]float64, m.LP.NumCols())
	bm := base.m
	for k := range m.served {
		for t, j := range m.served[k] {
			x[j] = base.x[bm.served[k][t]]
		}
	}
	for si := range m.flow {
		for a := range m.flow[si] {
			for t, j := range m.flow[si][a] {
				if j >= 0 && bm.flow[si][a][t] >= 0 {
					x[j] = base.x[bm.flow[si][a][t]]
				}
			}
		}
	}
	for _, vy := range m.tiers {
		x[vy.choice[0]] = 1
	}
	return x
}

// kmObjective returns the objective Σ km·flow over all flow columns.
func (m *Model) kmObjective() []float64 {
	obj := make([]float64, m.LP.NumCols())
	for si := range m.flow {
		for a, ys := range m.flow[si] {
			km := m.Case.Links[a/2].KM
			for _, j := range ys {
				if j >= 0 {
					obj[j] = math.Max(km, 0)
				}
			}
		}
	}
	return obj
}

// fixIntegers returns a copy of m.LP with every integer column fixed at
// the rounded value in x.
func (m *Model) fixIntegers(x []float64) *lp.Model {
	fixed := m.LP.Clone()
	for j, isInt := range fixed.Integer {
		if isInt {
			v := math.Round(x[j])
			v = math.Max(fixed.ColLower[j], math.Min(fixed.ColUpper[j], v))
			fixed.ColLower[j], fixed.ColUpper[j] = v, v
			fixed.Integer[j] = false
		}
	}
	// The step columns follow the units through their rows: fixing them
	// at a value x did not update would make the LP infeasible.
	for _, st := range m.steps {
		fixed.ColLower[st.col], fixed.ColUpper[st.col] = m.LP.ColLower[st.col], m.LP.ColUpper[st.col]
		fixed.Integer[st.col] = false
	}
	// With the units fixed the cut-set rows are redundant (valid for every
	// integer point, so for this one), but a redundant row that happens to
	// be tight takes a share of the duals: freeing them keeps the value of
	// one more Gbps on the capacity rows, where the plan reads it.
	for _, r := range m.cutRows {
		fixed.RowLower[r], fixed.RowUpper[r] = -lp.Inf, lp.Inf
	}
	return fixed
}

// baselineSolution is the do-nothing plan.
type baselineSolution struct {
	m *Model
	x []float64
	// dual holds the row duals of the first stage (best NPV), from which
	// a plan that buys nothing takes its values of one more Gbps.
	dual      []float64
	cashflow  []CashflowRow
	shortfall []ShortfallRow
}

// solveBaseline solves the do-nothing LP in three stages: best NPV (revenue
// less SLA penalty), then the least committed shortfall at that NPV, then
// the fewest Gbps·km, so that what is reported does not depend on where
// the first LP happened to stop (up to ties of equal Gbps·km).
func solveBaseline(ctx context.Context, c *Case) (*baselineSolution, error) {
	m, err := BuildModel(c, BuildOptions{baseline: true})
	if err != nil {
		return nil, err
	}
	short := make([]float64, m.LP.NumCols())
	for _, ks := range m.shortfall {
		for _, j := range ks {
			if j >= 0 {
				short[j] = 1
			}
		}
	}
	lr, err := solveLex(ctx, m.LP, time.Time{}, short, m.kmObjective())
	if err != nil || lr == nil {
		return nil, err
	}
	b := &baselineSolution{m: m, x: lr.x, dual: lr.firstDual}
	served := m.servedValues(lr.x)
	b.cashflow = cashflowOf(c, nil, served, nil)
	// Shortfall and its penalty, from served traffic alone.
	costMode := c.CostMode()
	for k, d := range c.Demands {
		for t := 0; t < c.Horizon; t++ {
			need := d.Committed[t]
			if costMode {
				need = d.Forecast[t]
			}
			gap := need - served[k][t]
			if gap <= valueTol {
				continue
			}
			row := ShortfallRow{
				Demand: d.ID, From: c.Sites[d.A].ID, To: c.Sites[d.B].ID, Year: c.Year(t),
				Committed: need, Carried: served[k][t], Shortfall: gap,
				Penalty:       12 * c.SLAPenalty * gap,
				RevenueAtRisk: 12 * d.Tariff[t] * gap,
			}
			b.shortfall = append(b.shortfall, row)
		}
	}
	b.cashflow = cashflowOf(c, nil, served, b.shortfall)
	return b, nil
}

// servedValues returns served[k][t] from a solution (values below valueTol
// above the lower bound snapped to it).
func (m *Model) servedValues(x []float64) [][]float64 {
	out := make([][]float64, len(m.served))
	for k, cols := range m.served {
		out[k] = make([]float64, len(cols))
		for t, j := range cols {
			out[k][t] = snap(x[j], m.LP.ColLower[j], m.LP.ColUpper[j])
		}
	}
	return out
}

// snap clamps v into [lo, hi] and moves it onto a bound within valueTol.
func snap(v, lo, hi float64) float64 {
	switch {
	case v <= lo+valueTol:
		return lo
	case v >= hi-valueTol:
		return hi
	}
	return v
}

// errNoFixedLP reports that the LP with the MIP's integer decisions fixed
// could not be solved, which should not happen for a point mip accepted.
var errNoFixedLP = errors.New("plans: the routing LP with the plan's decisions fixed has no optimum")

// latest returns the later of two times.
func latest(a, b time.Time) time.Time {
	if a.After(b) {
		return a
	}
	return b
}

// searchSettings returns the mip settings of the search over m that
// depend only on its case and the options: limits, c-MIR cuts for
// horizons of cmirMinHorizon years or more, branching priorities, and
// the rounding and cut-set separation unless the options turn them off.
func searchSettings(m *Model, opts SolveOptions) mip.Settings {
	set := mip.Settings{TimeLimit: opts.TimeLimit, RelGap: opts.Gap, NodeLimit: opts.NodeLimit, NoRINS: opts.NoRINS, SecondCore: opts.SecondCore,
		CMIR: m.Case.Horizon >= cmirMinHorizon}
	if len(m.tiers) > 0 || len(m.steps) > 0 {
		set.Priority = m.branchPriority()
	}
	if !opts.NoHeuristic {
		set.Heuristic = m.roundUpHeuristic
	}
	if !opts.NoCutSets && !opts.NoSeparation {
		set.Separate = m.separateCutSets
	}
	return set
}
