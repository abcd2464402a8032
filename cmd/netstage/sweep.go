package main

// The sweep command: a grid of scenarios around a case (growth, tariff,
// capex, discount rate, budget), with a tornado view, the budget frontier
// and the regret of the base plan; sharded runs for batch engines, and
// `sweep merge` to combine them.

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"runtime"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/spf13/cobra"

	"netstage/plans"
	"netstage/plans/scenario"
)

func init() { registerCommand(newSweepCmd) }

// sweepOptions are the sweep command's flags and argument.
type sweepOptions struct {
	casePath  string
	useDemo   bool
	vary      []string
	jobs      int
	shard     string
	json      bool
	out       string
	timeLimit string
	gap       float64
	noRegret  bool
	quiet     bool
	// maxScenarios caps the grid's size (the whole grid, not a shard's
	// share).
	maxScenarios int
}

func newSweepCmd(env *cmdEnv) *cobra.Command {
	opts := &sweepOptions{}
	cmd := &cobra.Command{
		Use:   "sweep CASE.toml | --demo --vary NAME=v1,v2,... [--vary ...]",
		Short: "Solve a grid of scenarios: sensitivity, budget frontier and regret",
		Long: `sweep solves the case under every combination of the values given with
--vary (the first --vary outermost, values in the order given) and prints a
table of scenario → NPV, capex and plan; a tornado view (each factor moved
alone from its lowest to its highest value, the others at base); with
--vary budget=..., the budget frontier (what the next million of cap buys);
and the regret of the base plan: its purchases fixed and re-evaluated by LP in
each scenario, with the budget not enforced, against the scenario's own
optimum. The base point is solved first, and each scenario's search starts
from the base plan where it fits the scenario's budget: with a time limit,
a scenario's plan is then never worse than the base plan there.

Factors: growth (multiplier on growth rates), tariff (multiplier on
tariffs), capex (multiplier on equipment prices), discount_rate (absolute
values, 0.08 = 8 %), budget (multiplier on every capex cap).

The grid has as many scenarios as the product of the value counts; one
over --max-scenarios (default 10,000) is refused before any solve.

--jobs N solves N scenarios at once. --shard i/n (i from 0) solves only the
scenarios j with j mod n = i and writes them as JSON lines, for a batch engine
(a Kubernetes indexed job, a Slurm array, GNU parallel) to spread a large
sweep over machines; "netstage sweep merge FILES..." combines the shares into
exactly what one unsharded run prints.

Exit codes: 0 done (scenarios without a plan are reported, not failures),
1 failure, 2 bad input or usage.`,
		Example: `  netstage sweep --demo --vary growth=0.5,1,1.5 --vary tariff=0.8,1,1.2
  netstage sweep case.toml --vary budget=0.5,0.75,1,1.25,1.5 --jobs 2
  netstage sweep case.toml --vary capex=0.8,1,1.2 --shard 0/4 --out part-0.jsonl
  netstage sweep merge part-*.jsonl --json`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if len(args) == 1 {
				opts.casePath = args[0]
			}
			if err := checkSearchFlags(opts.gap, opts.timeLimit); err != nil {
				return err
			}
			if opts.jobs < 0 {
				return withCode(exitBadInput, fmt.Errorf("--jobs must be ≥ 1 (0: one per CPU), got %d", opts.jobs))
			}
			if opts.maxScenarios < 1 {
				return withCode(exitBadInput, fmt.Errorf("--max-scenarios must be ≥ 1, got %d", opts.maxScenarios))
			}
			if len(opts.vary) == 0 {
				return withCode(exitBadInput, fmt.Errorf("give at least one --vary NAME=v1,v2,... (NAME one of %s)", strings.Join(scenario.FactorNames(), ", ")))
			}
			return runSweep(cmd.Context(), env, opts)
		},
	}
	f := cmd.Flags()
	f.BoolVar(&opts.useDemo, "demo", false, "use the embedded demo case")
	f.StringArrayVar(&opts.vary, "vary", nil, "vary a factor over values: `NAME=v1,v2,...` (repeatable)")
	f.IntVar(&opts.jobs, "jobs", 1, "solve this many scenarios at once (0: one per CPU)")
	f.StringVar(&opts.shard, "shard", "", "solve only share `i/n` of the scenarios (i from 0) and write JSON lines")
	f.BoolVar(&opts.json, "json", false, `print {"scenarios": [...]} as JSON instead of the tables`)
	f.StringVar(&opts.out, "out", "", "write the output to `FILE` instead of stdout")
	f.StringVar(&opts.timeLimit, "time-limit", "", "limit each solve to this `duration` (90s, 2m; a bare number is seconds)")
	f.Float64Var(&opts.gap, "gap", 0, "relative gap at which a plan counts as optimal (default 1e-4)")
	f.BoolVar(&opts.noRegret, "no-regret", false, "skip re-evaluating the base plan in each scenario")
	f.BoolVar(&opts.quiet, "quiet", false, "print nothing on stderr but errors")
	f.IntVar(&opts.maxScenarios, "max-scenarios", scenario.DefaultMaxScenarios, "refuse a grid of more than `N` scenarios (the whole grid, also when sharded)")
	cmd.AddCommand(newSweepMergeCmd(env))
	return cmd
}

// sweepSettings records the solve settings in a shard's header, so that
// shards solved differently are not merged.
func sweepSettings(opts *sweepOptions) string {
	limit := strings.TrimSpace(opts.timeLimit)
	if limit == "" {
		limit = "none"
	}
	gap := "default"
	if opts.gap > 0 {
		gap = strconv.FormatFloat(opts.gap, 'g', -1, 64)
	}
	s := fmt.Sprintf("gap=%s time_limit=%s", gap, limit)
	if opts.noRegret {
		s += " regret=off"
	}
	return s
}

func runSweep(ctx context.Context, env *cmdEnv, opts *sweepOptions) error {
	var factors []scenario.Factor
	for _, v := range opts.vary {
		f, err := scenario.ParseVary(v)
		if err != nil {
			return withCode(exitBadInput, err)
		}
		factors = append(factors, f)
	}
	grid, err := scenario.NewGrid(factors)
	if err != nil {
		return withCode(exitBadInput, err)
	}
	// Before the case is even read: a grid this size is a slip until the
	// user says otherwise.
	if err := grid.CheckSize(opts.maxScenarios); err != nil {
		return withCode(exitBadInput, err)
	}
	var shard scenario.Shard
	if opts.shard != "" {
		if shard, err = scenario.ParseShard(opts.shard); err != nil {
			return withCode(exitBadInput, err)
		}
		if opts.json {
			return withCode(exitBadInput, errors.New("--shard writes JSON lines; --json applies to the whole sweep (use it with sweep merge)"))
		}
	}
	c, warns, err := loadCase(opts.casePath, opts.useDemo)
	if !opts.quiet {
		printWarnings(env.stderr, warns)
	}
	if err != nil {
		return err
	}
	jobs := opts.jobs
	if jobs == 0 {
		jobs = runtime.NumCPU()
	}
	solve, solveFrom, err := solversWith(opts.timeLimit, opts.gap, jobs)
	if err != nil {
		return err
	}
	digest, err := caseDigest(c)
	if err != nil {
		return withCode(exitFailure, err)
	}
	ro := scenario.Options{Solve: solve, SolveFrom: solveFrom, Jobs: jobs, Shard: shard, Settings: sweepSettings(opts), CaseDigest: digest, MaxScenarios: opts.maxScenarios}
	if !opts.quiet && isTerminal(env.stderr) {
		ro.Progress = func(done, total int) {
			fmt.Fprintf(env.stderr, "\rsweep: %d/%d scenarios solved", done, total)
			if done == total {
				fmt.Fprintln(env.stderr)
			}
		}
	}
	if !opts.noRegret {
		ro.Evaluate = scenarioEvaluate
	}
	out, err := scenario.Run(ctx, c, grid, ro)
	if err != nil {
		if errors.Is(err, scenario.ErrBadScenario) {
			return withCode(exitBadInput, err)
		}
		return withCode(exitFailure, err)
	}
	var buf bytes.Buffer
	if opts.shard != "" {
		if err := scenario.WriteLines(&buf, out); err != nil {
			return withCode(exitFailure, err)
		}
		return writeOutput(env, opts.out, buf.Bytes())
	}
	rep, err := scenario.BuildReport(out)
	if err != nil {
		return withCode(exitFailure, err)
	}
	if err := writeSweep(&buf, rep, opts.json); err != nil {
		return withCode(exitFailure, err)
	}
	return writeOutput(env, opts.out, buf.Bytes())
}

// caseDigest identifies the content of a case: a SHA-256 of its case file
// and catalog files, or of the embedded demo's name and the netstage
// version for the demo.
func caseDigest(c *plans.Case) (string, error) {
	h := sha256.New()
	if c.File == "" {
		fmt.Fprintf(h, "embedded demo %q, netstage %s\n", c.Name, version)
	} else {
		paths := []string{c.File}
		for _, cf := range c.Catalogs {
			paths = append(paths, cf.Path)
		}
		for _, p := range paths {
			data, err := os.ReadFile(p)
			if err != nil {
				return "", fmt.Errorf("sweep: reading %s again for its digest: %w", p, err)
			}
			fmt.Fprintf(h, "%d\n", len(data))
			h.Write(data)
		}
	}
	return fmt.Sprintf("sha256:%x", h.Sum(nil)), nil
}

// sweepMergeOptions are the flags of sweep merge.
type sweepMergeOptions struct {
	files []string
	json  bool
	out   string
}

func newSweepMergeCmd(env *cmdEnv) *cobra.Command {
	opts := &sweepMergeOptions{}
	cmd := &cobra.Command{
		Use:   "merge FILES...",
		Short: "Combine the JSON lines of sharded sweep runs",
		Long: `merge reads the JSON lines that "sweep --shard i/n" wrote, checks that they
come from one sweep (same case, factors and solve settings) and cover every
scenario exactly once, and prints what the unsharded sweep would have printed
(the tables, or with --json the same JSON).`,
		Example: `  netstage sweep merge part-0.jsonl part-1.jsonl part-2.jsonl --json`,
		Args:    cobra.MinimumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			opts.files = args
			return runSweepMerge(env, opts)
		},
	}
	f := cmd.Flags()
	f.BoolVar(&opts.json, "json", false, `print {"scenarios": [...]} as JSON instead of the tables`)
	f.StringVar(&opts.out, "out", "", "write the output to `FILE` instead of stdout")
	return cmd
}

func runSweepMerge(env *cmdEnv, opts *sweepMergeOptions) error {
	var shards []*scenario.Output
	for _, name := range opts.files {
		f, err := os.Open(name)
		if err != nil {
			return withCode(exitBadInput, err)
		}
		out, err := scenario.ReadLines(f, name)
		f.Close()
		if err != nil {
			return withCode(exitBadInput, err)
		}
		shards = append(shards, out)
	}
	merged, err := scenario.Merge(shards)
	if err != nil {
		return withCode(exitBadInput, err)
	}
	rep, err := scenario.BuildReport(merged)
	if err != nil {
		return withCode(exitBadInput, err)
	}
	var buf bytes.Buffer
	if err := writeSweep(&buf, rep, opts.json); err != nil {
		return withCode(exitFailure, err)
	}
	return writeOutput(env, opts.out, buf.Bytes())
}

// writeSweep prints a sweep report as JSON or as terminal tables.
func writeSweep(w io.Writer, rep *scenario.Report, asJSON bool) error {
	if asJSON {
		data, err := json.MarshalIndent(rep, "", "  ")
		if err != nil {
			return err
		}
		_, err = w.Write(append(data, '\n'))
		return err
	}
	writeSweepText(w, rep)
	return nil
}

func optMoneyText(p *float64) string {
	if p == nil {
		return "–"
	}
	return money(*p)
}

func factorText(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

func writeSweepText(w io.Writer, rep *scenario.Report) {
	names := make([]string, len(rep.Vary))
	for i, f := range rep.Vary {
		names[i] = f.Name
	}
	fmt.Fprintf(w, "Sweep: %s — %d scenarios (%s; %s)\n", rep.Case, len(rep.Scenarios), strings.Join(names, " × "), rep.Settings)
	baseNote := ""
	if rep.Base.StoppedBeforeBetter() {
		baseNote = " (" + searchStoppedText + ")"
	}
	fmt.Fprintf(w, "Base: %s, NPV %s%s\n\n", rep.Base.Factors, optMoneyText(rep.Base.Objective), baseNote)

	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	head := []string{"#"}
	head = append(head, names...)
	head = append(head, "status", "NPV", "capex", "base plan NPV", "regret", "plan")
	fmt.Fprintln(tw, strings.Join(head, "\t"))
	var cannotCarry, overBudget []string
	stopped := 0
	for _, r := range rep.Scenarios {
		cells := []string{strconv.Itoa(r.Index)}
		for _, s := range r.Factors {
			cells = append(cells, factorText(s.Value))
		}
		capex := "–"
		if r.HasPlan() {
			capex = money(r.Capex)
		}
		baseNPV := "–"
		if r.BasePlan != nil {
			baseNPV = optMoneyText(r.BasePlan.Objective)
		}
		regret := "–"
		switch r.RegretStatus {
		case scenario.RegretOK:
			regret = money(*r.Regret)
		case scenario.RegretCannotCarry:
			regret = "cannot carry"
			cannotCarry = append(cannotCarry, r.Factors.String())
		case scenario.RegretOverBudget:
			regret = "over budget"
			overBudget = append(overBudget, r.Factors.String())
		case scenario.RegretInconsistent:
			regret = "inconsistent " + money(*r.Regret)
		}
		plan := r.Plan.String()
		if r.StoppedBeforeBetter() {
			plan = "none found (stopped)"
			stopped++
		}
		if !r.HasPlan() {
			plan = "no plan"
			if r.Error != "" {
				plan = "error: " + r.Error
			} else if len(r.Infeasibility) > 0 {
				plan = "no plan: " + r.Infeasibility[0]
			}
		}
		cells = append(cells, r.Status, optMoneyText(r.Objective), capex, baseNPV, regret, plan)
		fmt.Fprintln(tw, strings.Join(cells, "\t"))
	}
	tw.Flush()
	fmt.Fprintf(w, "\n%s.\n", strings.ToUpper(scenario.RegretNote[:1])+scenario.RegretNote[1:])
	if len(cannotCarry) > 0 {
		fmt.Fprintf(w, "The base plan cannot carry the committed demand in: %s.\n", strings.Join(cannotCarry, "; "))
	}
	if len(overBudget) > 0 {
		fmt.Fprintf(w, "The base plan breaks the budget (no regret reported) in: %s.\n", strings.Join(overBudget, "; "))
	}
	if stopped > 0 {
		fmt.Fprintf(w, "In %d of %d scenarios (\"none found (stopped)\") %s: their NPV is the do-nothing NPV and their regret measures nothing. Allow more time (--time-limit).\n",
			stopped, len(rep.Scenarios), stoppedBeforeBetterText)
	}

	if len(rep.Tornado) > 0 {
		fmt.Fprintf(w, "\nTornado: NPV with one factor at its lowest and highest value, the others at base (base NPV %s)\n", optMoneyText(rep.Base.Objective))
		writeTornado(w, rep)
	}
	if len(rep.BudgetFrontier) > 0 {
		fmt.Fprintln(w, "\nBudget frontier: NPV against the capex cap, the other factors at base")
		tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintln(tw, "budget ×\ttotal cap\tNPV\tcapex\tNPV per extra million of cap\t")
		for _, p := range rep.BudgetFrontier {
			capex := "–"
			if p.NPV != nil {
				capex = money(p.Capex)
			}
			cap := "uncapped"
			if p.Cap != nil {
				cap = money(*p.Cap)
			}
			fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t\n", factorText(p.Multiplier), cap, optMoneyText(p.NPV), capex, optMoneyText(p.PerMillion))
		}
		tw.Flush()
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, decisionSupportNote)
}

// tornadoWidth is the number of characters of each half of a tornado bar.
const tornadoWidth = 24

// writeTornado draws one bar per factor around the base NPV: '<' marks the
// NPV lost, '>' the NPV gained, each half scaled to the widest bar.
func writeTornado(w io.Writer, rep *scenario.Report) {
	base := 0.0
	if rep.Base.Objective != nil {
		base = *rep.Base.Objective
	}
	scale := 0.0
	for _, b := range rep.Tornado {
		for _, v := range []*float64{b.LowNPV, b.HighNPV} {
			if v != nil {
				scale = math.Max(scale, math.Abs(*v-base))
			}
		}
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "factor\tlow → high\tNPV at low\tNPV at high\tswing\tNPV below base < | > above base")
	for _, b := range rep.Tornado {
		swing := "no plan at one end"
		switch {
		case b.Swing != nil:
			swing = money(*b.Swing)
		case b.LowNPV == nil && b.HighNPV == nil:
			swing = fmt.Sprintf("no plan at either end (%s, %s)", b.LowStatus, b.HighStatus)
		case b.LowNPV == nil:
			swing = fmt.Sprintf("no plan at %s (%s)", factorText(b.Low), b.LowStatus)
		case b.HighNPV == nil:
			swing = fmt.Sprintf("no plan at %s (%s)", factorText(b.High), b.HighStatus)
		}
		fmt.Fprintf(tw, "%s\t%s → %s\t%s\t%s\t%s\t%s\n", b.Factor, factorText(b.Low), factorText(b.High),
			optMoneyText(b.LowNPV), optMoneyText(b.HighNPV), swing, tornadoBar(b, base, scale))
	}
	tw.Flush()
}

func tornadoBar(b scenario.TornadoBar, base, scale float64) string {
	lo, hi := 0.0, 0.0 // NPV below and above base
	for _, v := range []*float64{b.LowNPV, b.HighNPV} {
		if v == nil {
			lo = math.Inf(1)
			continue
		}
		d := *v - base
		if d < 0 {
			lo = math.Max(lo, -d)
		} else {
			hi = math.Max(hi, d)
		}
	}
	cells := func(x float64) int {
		if math.IsInf(x, 1) {
			return tornadoWidth
		}
		if scale <= 0 {
			return 0
		}
		return int(math.Round(x / scale * tornadoWidth))
	}
	left, right := cells(lo), cells(hi)
	return strings.Repeat(" ", tornadoWidth-left) + strings.Repeat("<", left) + "|" + strings.Repeat(">", right)
}
