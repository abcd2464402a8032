package main

// The solve command: plan a case and print the staged plan with its NPV
// breakdown (terminal report, --json, --csv DIR).

import (
	"context"
	"fmt"
	"io"
	"math"
	"os"
	"sync"
	"time"

	"github.com/spf13/cobra"

	"netstage/plans"
)

func init() { registerCommand(newSolveCmd) }

// solveOptions are the solve command's flags and argument.
type solveOptions struct {
	casePath  string
	useDemo   bool
	json      bool   // print the JSON object instead of the report
	csvDir    string // also write plan.csv, cashflow.csv, links.csv, demands.csv here
	timeLimit string // Go duration or bare seconds; "" no limit
	gap       float64
	quiet     bool // nothing on stderr but errors
	// hideEffort leaves solve time, nodes and iterations out of the
	// outputs (golden tests).
	hideEffort bool
	// forceProgress shows progress even when stderr is not a terminal
	// (tests).
	forceProgress bool
}

func newSolveCmd(env *cmdEnv) *cobra.Command {
	opts := &solveOptions{}
	cmd := &cobra.Command{
		Use:   "solve CASE.toml | --demo",
		Short: "Plan a case: the staged upgrade plan with its NPV breakdown",
		Long: `solve reads a case and its catalogs, chooses the link upgrades to buy in each
year so that the network's NPV is as high as possible (or, when no demand pays
a tariff, its present cost as low as possible), and prints the plan read top
to bottom: summary, staged plan by order year, cash flow by year, links by
year and demands by year.

Results go to stdout, diagnostics and progress to stderr (progress only when
stderr is a terminal). Ctrl-C or --time-limit stops the search and prints the
best plan found with its gap (status feasible).

Exit codes: 0 a plan (optimal or feasible), 1 failure or no plan within the
limits, 2 bad input or usage, 3 infeasible or unbounded case (explained).`,
		Example: `  netstage solve --demo
  netstage solve case.toml --time-limit 2m --gap 1e-3
  netstage solve case.toml --json > plan.json
  netstage solve case.toml --csv out/`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if len(args) == 1 {
				opts.casePath = args[0]
			}
			if err := checkSearchFlags(opts.gap, opts.timeLimit); err != nil {
				return err
			}
			return runSolve(cmd.Context(), env, opts)
		},
	}
	f := cmd.Flags()
	f.BoolVar(&opts.useDemo, "demo", false, "use the embedded demo case")
	f.BoolVar(&opts.json, "json", false, "print one JSON object instead of the report")
	f.StringVar(&opts.csvDir, "csv", "", "also write plan.csv, cashflow.csv, links.csv and demands.csv into `DIR`")
	f.StringVar(&opts.timeLimit, "time-limit", "", "limit the whole solve to about this `duration` (90s, 2m; a bare number is seconds) and report the best plan found")
	f.Float64Var(&opts.gap, "gap", 0, "relative gap at which a plan counts as optimal (default 1e-4)")
	f.BoolVar(&opts.quiet, "quiet", false, "print nothing on stderr but errors (no progress, no warnings)")
	return cmd
}

// caseSolve says which case to solve and how; solve and report share it.
type caseSolve struct {
	casePath      string
	useDemo       bool
	timeLimit     string
	gap           float64
	quiet         bool // no warnings, no progress on stderr
	forceProgress bool // progress even when stderr is not a terminal (tests)
}

// loadAndSolve loads the case, prints its load warnings and solves it, with
// progress on stderr when it is a terminal. Errors carry their exit codes.
func loadAndSolve(ctx context.Context, env *cmdEnv, cs caseSolve) (*plans.Case, []plans.Warning, *plans.Result, error) {
	limit, err := parseTimeLimit(cs.timeLimit)
	if err != nil {
		return nil, nil, nil, err
	}
	c, warns, err := loadCase(cs.casePath, cs.useDemo)
	if err != nil {
		return nil, nil, nil, err
	}
	if !cs.quiet {
		printWarnings(env.stderr, warns)
	}
	so := plans.SolveOptions{TimeLimit: limit, Gap: cs.gap, SecondCore: true}
	if !cs.quiet && (cs.forceProgress || isTerminal(env.stderr)) {
		progress := &progressPrinter{w: env.stderr, costMode: c.CostMode()}
		so.Progress = progress.update
	}
	res, err := plans.Solve(ctx, c, so)
	if err != nil {
		return nil, nil, nil, withCode(exitFailure, err)
	}
	return c, warns, res, nil
}

func runSolve(ctx context.Context, env *cmdEnv, opts *solveOptions) error {
	_, _, res, err := loadAndSolve(ctx, env, caseSolve{
		casePath: opts.casePath, useDemo: opts.useDemo, timeLimit: opts.timeLimit,
		gap: opts.gap, quiet: opts.quiet, forceProgress: opts.forceProgress,
	})
	if err != nil {
		return err
	}
	// The solve's own warnings are part of the result: the report and the
	// JSON carry them, so they are not repeated on stderr.
	if opts.json {
		err = writeJSON(env.stdout, res, jsonOptions{hideEffort: opts.hideEffort})
	} else {
		err = writeText(env.stdout, res, textOptions{hideEffort: opts.hideEffort})
	}
	if err != nil {
		return withCode(exitFailure, err)
	}
	if opts.csvDir != "" && res.Objective != nil {
		if err := writeCSVDir(opts.csvDir, res); err != nil {
			return withCode(exitFailure, err)
		}
	}
	return solveExit(env.stderr, res, opts.csvDir)
}

// solveExit turns the result's status into the command's outcome
// (DESIGN.md §4 exit codes), with a one-line diagnostic on stderr.
func solveExit(stderr io.Writer, res *plans.Result, csvDir string) error {
	switch res.Status {
	case plans.StatusOptimal, plans.StatusFeasible:
		return nil
	case plans.StatusInfeasible:
		msg := "the case is infeasible"
		if len(res.Infeasibility) > 0 {
			msg += ": " + res.Infeasibility[0].Message
			if n := len(res.Infeasibility) - 1; n > 0 {
				msg += fmt.Sprintf(" (and %d more cause(s), listed in the output)", n)
			}
		}
		fmt.Fprintln(stderr, "netstage:", msg)
		if csvDir != "" {
			fmt.Fprintln(stderr, "netstage: no CSV files written: there is no plan")
		}
		return &silentExit{code: exitInfeasible}
	case plans.StatusUnbounded:
		fmt.Fprintln(stderr, "netstage: the model is unbounded: NPV can grow without limit, which no real case allows; check prices and tariffs")
		return &silentExit{code: exitInfeasible}
	}
	fmt.Fprintln(stderr, "netstage: no plan found within the limits; allow more time (--time-limit)")
	return &silentExit{code: exitFailure}
}

// isTerminal reports whether w is a character device (a terminal).
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}

// progressInterval is the least time between two progress lines.
const progressInterval = time.Second

// progressPrinter prints the solver's progress on stderr, at most once per
// progressInterval, one line each.
type progressPrinter struct {
	mu       sync.Mutex
	w        io.Writer
	costMode bool
	last     time.Time
	printed  bool
}

func (p *progressPrinter) update(pr plans.Progress) {
	p.mu.Lock()
	defer p.mu.Unlock()
	now := time.Now()
	if p.printed && now.Sub(p.last) < progressInterval {
		return
	}
	p.last, p.printed = now, true
	inc := "no plan yet"
	name, sign := "NPV", 1.0
	if p.costMode {
		name, sign = "present cost", -1
	}
	if pr.HasIncumbent {
		inc = fmt.Sprintf("%s %s", name, money(sign*pr.Objective))
	}
	bound, gap := money(sign*pr.Bound), "-"
	if math.IsInf(pr.Bound, 0) || math.IsNaN(pr.Bound) {
		// A large case spends its first minutes in the root LP.
		bound = "not yet known (first LP running)"
	} else if pr.HasIncumbent {
		gap = fixed(100*pr.Gap, 3) + " %"
	}
	more := ""
	if pr.Replanning != "" {
		more = "  re-planning around " + pr.Replanning
	}
	fmt.Fprintf(p.w, "  %7.1fs  %s  bound %s  gap %s  nodes %d%s\n",
		pr.Elapsed.Seconds(), inc, bound, gap, pr.Nodes, more)
}
