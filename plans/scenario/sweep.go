package scenario

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"
	"sync"

	"netstage/plans"
)

// SolveFunc solves one case. A sweep calls it from several goroutines at
// once (on distinct cases) when Options.Jobs > 1.
type SolveFunc func(ctx context.Context, c *plans.Case) (*plans.Result, error)

// SolveFromFunc solves one case starting from a plan (a plan of a related
// case, plans.SolveOptions.StartPlan): if the plan fits the case, the
// answer is never worse than it.
type SolveFromFunc func(ctx context.Context, c *plans.Case, start []plans.PlanRow) (*plans.Result, error)

// solveStarting solves c with from, starting from start, when both are
// given, else with solve.
func solveStarting(ctx context.Context, solve SolveFunc, from SolveFromFunc, c *plans.Case, start []plans.PlanRow) (*plans.Result, error) {
	if from != nil && len(start) > 0 {
		return from(ctx, c, start)
	}
	return solve(ctx, c)
}

// EvaluateFunc re-evaluates a plan's purchases, fixed, in case c by the
// routing LP, with the budget not enforced: the Result's Objective is the
// NPV of those purchases in c, and its status is infeasible when they cannot
// carry c's committed demand.
type EvaluateFunc func(ctx context.Context, c *plans.Case, purchases []plans.PlanRow) (*plans.Result, error)

// RegretNote says how regret is measured; reports print it beside the numbers.
const RegretNote = "regret: the base plan's purchases are fixed and re-evaluated by LP in each scenario, with the budget not enforced, against the scenario's own optimum"

// Tolerances of the regret and budget checks.
const (
	// budgetTolerance is the relative slack allowed when checking that a
	// plan's capex fits a cap (rounding of money sums).
	budgetTolerance = 1e-9
	// boundTolerance is the relative slack above a scenario's proven bound
	// before a re-evaluated base plan counts as inconsistent.
	boundTolerance = 1e-6
)

// Regret statuses of a Record.
const (
	RegretOK           = "ok"            // Regret holds the regret (≥ 0)
	RegretOverBudget   = "over_budget"   // the base plan breaks the scenario's budget
	RegretCannotCarry  = "cannot_carry"  // the base plan cannot carry the scenario's committed demand
	RegretNoPlan       = "no_plan"       // the scenario itself has no plan
	RegretNoBasePlan   = "no_base_plan"  // the base point has no plan
	RegretNotEvaluated = "not_evaluated" // no evaluator was given
	RegretInconsistent = "inconsistent"  // the base plan is valued above the scenario's proven bound
)

// ErrBadScenario is wrapped by Run's error when a grid point makes no case
// (bad input, found before any solve).
var ErrBadScenario = errors.New("scenario: a grid point makes no valid case")

// StatusError is the status of a scenario whose solve failed at run time.
const StatusError = "error"

// Record is the outcome of one scenario: one line of a shard's output.
type Record struct {
	// Index is the scenario's index: grid points first (0..GridSize−1, grid
	// order), then the reference points that are not on the grid.
	Index int `json:"index"`
	// Reference is true for a reference point that is not on the grid.
	Reference bool  `json:"reference"`
	Factors   Point `json:"factors"`
	// Status is a plans.Status, or StatusError when the solve failed.
	Status string `json:"status"`
	// Objective is the scenario's NPV (nil without a plan); Bound a proven
	// upper bound on it.
	Objective      *float64 `json:"objective"`
	Bound          *float64 `json:"bound"`
	IncrementalNPV *float64 `json:"incremental_npv"`
	// Capex is the plan's total capex, after volume discounts.
	Capex float64 `json:"capex"`
	// BudgetCap is the scenario's total capex cap over the horizon (nil
	// when uncapped).
	BudgetCap *float64    `json:"budget_cap"`
	Plan      PlanSummary `json:"plan"`
	// BasePlan is the base plan re-evaluated in this scenario (nil when
	// there was no base plan or no evaluator).
	BasePlan *BasePlan `json:"base_plan"`
	// Regret is the scenario's optimum minus the base plan's NPV in it;
	// set when RegretStatus is RegretOK (≥ 0) or RegretInconsistent (< 0).
	Regret       *float64 `json:"regret"`
	RegretStatus string   `json:"regret_status"`
	// Infeasibility lists why the scenario has no plan.
	Infeasibility []string `json:"infeasibility,omitempty"`
	// Error is the failure of a scenario with StatusError.
	Error string `json:"error,omitempty"`
}

// HasPlan reports whether the scenario found a plan.
func (r *Record) HasPlan() bool { return r.Objective != nil }

// StoppedBeforeBetter reports a scenario whose search a limit stopped
// before it found a plan better than the existing network (see
// plans.Result.StoppedBeforeBetter): its plan buys nothing, which is no
// finding that nothing pays, and its regret measures nothing.
func (r *Record) StoppedBeforeBetter() bool {
	return r.Status == string(plans.StatusFeasible) && r.HasPlan() && r.Plan.Orders == 0
}

// PlanSummary describes a plan in a few numbers.
type PlanSummary struct {
	Orders     int   `json:"orders"` // plan rows (item, link, order year)
	Units      int   `json:"units"`  // module and lease units
	Links      int   `json:"links"`  // distinct links with a purchase
	Builds     int   `json:"builds"` // candidate links built
	OrderYears []int `json:"order_years"`
}

// String formats s as "12 units on 4 links, 1 build, orders 2026–2028".
func (s PlanSummary) String() string {
	if s.Orders == 0 {
		return "no purchases"
	}
	parts := []string{plural(s.Units, "unit") + " on " + plural(s.Links, "link")}
	if s.Builds > 0 {
		parts = append(parts, plural(s.Builds, "build"))
	}
	if n := len(s.OrderYears); n == 1 {
		parts = append(parts, fmt.Sprintf("orders %d", s.OrderYears[0]))
	} else if n > 1 {
		parts = append(parts, fmt.Sprintf("orders %d–%d", s.OrderYears[0], s.OrderYears[n-1]))
	}
	return strings.Join(parts, ", ")
}

func plural(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return fmt.Sprintf("%d %ss", n, noun)
}

// Summarize returns the summary of a plan's rows.
func Summarize(rows []plans.PlanRow) PlanSummary {
	s := PlanSummary{OrderYears: []int{}}
	links := map[string]bool{}
	years := map[int]bool{}
	for _, r := range rows {
		s.Orders++
		links[r.Link] = true
		years[r.Year] = true
		if r.Kind == plans.KindBuild {
			s.Builds++
		} else {
			s.Units += r.Units
		}
	}
	s.Links = len(links)
	for y := range years {
		s.OrderYears = append(s.OrderYears, y)
	}
	sort.Ints(s.OrderYears)
	return s
}

// BasePlan is the base plan's purchases re-evaluated in one scenario.
type BasePlan struct {
	// Status is the status of the re-evaluation: optimal, or infeasible
	// when the purchases cannot carry the committed demand.
	Status    string   `json:"status"`
	Objective *float64 `json:"objective"`
	// Capex is the base plan's capex at the scenario's prices.
	Capex float64 `json:"capex"`
	// OverBudget is true when that capex breaks one of the scenario's caps
	// (the re-evaluation does not enforce them).
	OverBudget bool `json:"over_budget"`
}

// Header is the first line of a shard's output: which sweep it belongs to.
type Header struct {
	Case string   `json:"case"`
	Vary []Factor `json:"vary"`
	// Base is the base point (each factor at its base value).
	Base Point `json:"base"`
	// GridSize and References count the grid points and the extra
	// reference points; indices run over both.
	GridSize   int `json:"grid_size"`
	References int `json:"references"`
	Shard      int `json:"shard"`
	Shards     int `json:"shards"`
	// Settings records the solve settings (gap, time limit) so that shards
	// solved differently are not merged.
	Settings string `json:"settings"`
	// CaseDigest identifies the case's content (its files), so that shards
	// of different cases with the same name are not merged.
	CaseDigest string `json:"case_digest"`
}

// Options tune Run. The zero value of a field means its default.
type Options struct {
	// Solve solves one scenario (required).
	Solve SolveFunc
	// SolveFrom, when set, solves each scenario starting from the base
	// plan: where that plan fits the scenario (its budget above all), the
	// scenario's plan is then never worse than the base plan, even when a
	// time limit stops its search, and its regret is never negative.
	// Without it (or without a base plan), Solve solves every scenario.
	SolveFrom SolveFromFunc
	// Evaluate re-evaluates the base plan in each scenario (nil: no regret).
	Evaluate EvaluateFunc
	// Jobs is the number of scenarios solved at once (0 or 1: one at a time).
	Jobs int
	// Shard selects the share of the scenarios to run (zero: all).
	Shard Shard
	// Settings and CaseDigest are copied into the Header.
	Settings, CaseDigest string
	// MaxScenarios caps the grid's size (0: DefaultMaxScenarios); Run
	// refuses a larger grid before any solve (Grid.CheckSize).
	MaxScenarios int
	// Progress, when set, is called after each scenario with the number
	// done and the number this run solves (from several goroutines, one
	// call at a time).
	Progress func(done, total int)
}

// Output is what one run of a sweep (or one shard of it) produced.
type Output struct {
	Header  Header
	Records []Record // by index
}

// Run solves the base point and the scenarios that belong to opts.Shard.
// Records do not depend on Jobs or on the shard they were solved in.
func Run(ctx context.Context, c *plans.Case, grid Grid, opts Options) (*Output, error) {
	if opts.Solve == nil {
		panic("scenario: Run without a solve function")
	}
	if err := grid.CheckSize(opts.MaxScenarios); err != nil {
		return nil, err
	}
	baseValues := make([]float64, len(grid.Factors))
	for k, f := range grid.Factors {
		baseValues[k] = BaseValue(c, f.Name)
	}
	base := grid.base(baseValues)
	refs := grid.references(baseValues)
	n := grid.Size()
	points := make([]Point, 0, n+len(refs))
	for j := 0; j < n; j++ {
		points = append(points, grid.Point(j))
	}
	points = append(points, refs...)

	// Apply every point first: a value that makes no case is bad input,
	// found before any solve.
	cases := make([]*plans.Case, len(points))
	for j, p := range points {
		if !opts.Shard.Owns(j) {
			continue
		}
		cc, err := Apply(c, p)
		if err != nil {
			return nil, fmt.Errorf("%w: %w (scenario %s)", ErrBadScenario, err, p)
		}
		cases[j] = cc
	}
	baseCase, err := Apply(c, base)
	if err != nil {
		return nil, err
	}
	baseResult, err := opts.Solve(ctx, baseCase)
	if err != nil {
		return nil, fmt.Errorf("scenario: base point: %w", err)
	}
	var basePlan []plans.PlanRow
	hasBasePlan := baseResult.Objective != nil
	if hasBasePlan {
		basePlan = baseResult.Plan
	}

	out := &Output{Header: Header{
		Case:       c.Name,
		Vary:       grid.Factors,
		Base:       base,
		GridSize:   n,
		References: len(refs),
		Shard:      opts.Shard.Index,
		Shards:     max(opts.Shard.Of, 1),
		Settings:   opts.Settings,
		CaseDigest: opts.CaseDigest,
	}}
	var todo []int
	for j := range points {
		if opts.Shard.Owns(j) {
			todo = append(todo, j)
		}
	}
	records := make([]Record, len(todo))
	jobs := max(opts.Jobs, 1)
	var wg sync.WaitGroup
	next := make(chan int)
	errs := make([]error, len(todo))
	var progressMu sync.Mutex
	done := 0
	for w := 0; w < jobs; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for k := range next {
				j := todo[k]
				var res *plans.Result
				var err error
				if points[j].Equal(base) {
					res = baseResult
				} else {
					res, err = solveStarting(ctx, opts.Solve, opts.SolveFrom, cases[j], basePlan)
				}
				rec := newRecord(j, j >= n, points[j], cases[j], res, err)
				if err == nil && ctx.Err() == nil {
					errs[k] = regret(ctx, &rec, cases[j], res, basePlan, hasBasePlan, opts.Evaluate)
				}
				records[k] = rec
				if opts.Progress != nil {
					progressMu.Lock()
					done++
					opts.Progress(done, len(todo))
					progressMu.Unlock()
				}
			}
		}()
	}
	for k := range todo {
		if ctx.Err() != nil {
			break
		}
		next <- k
	}
	close(next)
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("scenario: sweep stopped: %w", err)
	}
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	out.Records = records
	return out, nil
}

// newRecord fills a Record from a scenario's solve.
func newRecord(j int, reference bool, p Point, c *plans.Case, res *plans.Result, err error) Record {
	rec := Record{Index: j, Reference: reference, Factors: p, Plan: Summarize(nil)}
	if cap, ok := BudgetCap(c); ok {
		rec.BudgetCap = &cap
	}
	if err != nil {
		rec.Status = StatusError
		rec.Error = err.Error()
		rec.RegretStatus = RegretNoPlan
		return rec
	}
	rec.Status = string(res.Status)
	rec.Objective = res.Objective
	rec.Bound = res.Bound
	rec.IncrementalNPV = res.IncrementalNPV
	if res.Objective != nil {
		rec.Capex = planCapex(res.Plan)
		rec.Plan = Summarize(res.Plan)
	}
	for _, row := range res.Infeasibility {
		rec.Infeasibility = append(rec.Infeasibility, row.Message)
	}
	return rec
}

func planCapex(rows []plans.PlanRow) float64 {
	s := 0.0
	for _, r := range rows {
		s += r.Capex
	}
	return s
}

// regret re-evaluates the base plan in the scenario of rec and sets the
// record's regret fields (see the package doc).
func regret(ctx context.Context, rec *Record, c *plans.Case, res *plans.Result, basePlan []plans.PlanRow, hasBasePlan bool, evaluate EvaluateFunc) error {
	switch {
	case !hasBasePlan:
		rec.RegretStatus = RegretNoBasePlan
		return nil
	case evaluate == nil:
		rec.RegretStatus = RegretNotEvaluated
		return nil
	}
	ev, err := evaluate(ctx, c, basePlan)
	if err != nil {
		return fmt.Errorf("scenario: re-evaluating the base plan in scenario %s: %w", rec.Factors, err)
	}
	bp := &BasePlan{Status: string(ev.Status), Objective: ev.Objective}
	yearly := make([]float64, c.Horizon)
	for _, row := range ev.Cashflow {
		if i := row.Year - c.FirstYear; i >= 0 && i < c.Horizon {
			yearly[i] += row.Capex
			bp.Capex += row.Capex
		}
	}
	bp.OverBudget = !FitsBudget(c, yearly)
	rec.BasePlan = bp
	switch {
	case ev.Objective == nil:
		rec.RegretStatus = RegretCannotCarry
	case bp.OverBudget:
		rec.RegretStatus = RegretOverBudget
	case res.Objective == nil:
		rec.RegretStatus = RegretNoPlan
	default:
		opt, val := *res.Objective, *ev.Objective
		bound := opt
		if res.Bound != nil {
			bound = math.Max(bound, *res.Bound)
		}
		r := opt - val
		switch {
		case val > bound+boundTolerance*math.Max(math.Abs(bound), 1):
			// The base plan is a feasible plan of the scenario worth more
			// than the scenario's proven bound: something is wrong.
			rec.RegretStatus = RegretInconsistent
		case r < 0:
			// The scenario solve stopped within its gap below the base
			// plan, which is then the best plan known for the scenario.
			r = 0
			rec.RegretStatus = RegretOK
		default:
			rec.RegretStatus = RegretOK
		}
		rec.Regret = &r
	}
	return nil
}

// FitsBudget reports whether capex paid per year index fits the case's
// yearly and cumulative caps.
func FitsBudget(c *plans.Case, capexByYear []float64) bool {
	total := 0.0
	for i, v := range capexByYear {
		total += v
		if i < len(c.Budget.Yearly) {
			if cap := c.Budget.Yearly[i]; v > cap+budgetTolerance*math.Max(cap, 1) {
				return false
			}
		}
	}
	cap := c.Budget.Cumulative
	return !(total > cap+budgetTolerance*math.Max(cap, 1))
}
