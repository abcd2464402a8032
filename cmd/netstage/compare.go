package main

// The compare command: one solve per catalog alone and one with every
// catalog, side by side, with the break-even discount of each losing quote.

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"runtime"
	"strconv"
	"strings"
	"text/tabwriter"
	"unicode/utf8"

	"github.com/spf13/cobra"

	"netstage/plans"
	"netstage/plans/scenario"
)

func init() { registerCommand(newCompareCmd) }

// scenarioSolve is the solve behind compare and sweep (a variable so that
// tests can put a stand-in with a closed form behind the output formats).
var scenarioSolve = plans.Solve

// scenarioEvaluate values the base plan in each scenario of a sweep (its
// regret); tests with the stand-in solve put a matching stand-in here.
var scenarioEvaluate scenario.EvaluateFunc = plans.Evaluate

// compareOptions are the compare command's flags and argument.
type compareOptions struct {
	casePath    string
	useDemo     bool
	json        bool
	out         string
	timeLimit   string
	gap         float64
	noBreakEven bool
	jobs        int
	quiet       bool
}

func newCompareCmd(env *cmdEnv) *cobra.Command {
	opts := &compareOptions{}
	cmd := &cobra.Command{
		Use:   "compare CASE.toml | --demo",
		Short: "Compare vendor quotes: each catalog alone and all together",
		Long: `compare solves the case once with each catalog alone (the variant is named
after the catalog file) and once with every catalog allowed (variant "all"),
and prints them side by side: NPV, incremental NPV, IRR, payback, capex by
year, units bought per vendor, and the links and order years where the plans
differ. A variant that cannot carry the committed demand is shown as
infeasible, with why. The "all" variant is solved last, starting from the
best single catalog's plan: with a time limit it may stop short of its
optimum, but never below that catalog alone.

For each catalog that loses to the best single catalog, the break-even
discount is the uniform discount on its quote (module capex, lease fees and
spend-tier thresholds) at which it alone would match the winner's NPV, found
by bisection on a price multiplier to 0.5 %.

Exit codes: 0 at least one variant has a plan, 1 failure, 2 bad input or
usage, 3 no variant has a plan.`,
		Example: `  netstage compare --demo
  netstage compare case.toml --json
  netstage compare case.toml --gap 1e-9 --time-limit 2m`,
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
			return runCompare(cmd.Context(), env, opts)
		},
	}
	f := cmd.Flags()
	f.BoolVar(&opts.useDemo, "demo", false, "use the embedded demo case")
	f.BoolVar(&opts.json, "json", false, `print {"variants": [...]} as JSON instead of the table`)
	f.StringVar(&opts.out, "out", "", "write the output to `FILE` instead of stdout")
	f.StringVar(&opts.timeLimit, "time-limit", "", "limit each solve to this `duration` (90s, 2m; a bare number is seconds)")
	f.Float64Var(&opts.gap, "gap", 0, "relative gap at which a plan counts as optimal (default 1e-4)")
	f.BoolVar(&opts.noBreakEven, "no-break-even", false, "skip the break-even search (one solve per variant only)")
	f.IntVar(&opts.jobs, "jobs", 1, "run this many solves at once (0: one per CPU)")
	f.BoolVar(&opts.quiet, "quiet", false, "print nothing on stderr but errors")
	return cmd
}

// solversWith returns the solve functions of compare, sweep and report for
// the flags: from scratch, and from a start plan (compare's all-catalogs
// variant and break-even levels, sweep's scenarios and the report's
// tornado ends: the SolveFrom options of package scenario). jobs is how
// many solves run at once (only a lone solve may keep the second core
// busy, SolveOptions.SecondCore).
func solversWith(timeLimit string, gap float64, jobs int) (scenario.SolveFunc, scenario.SolveFromFunc, error) {
	limit, err := parseTimeLimit(timeLimit)
	if err != nil {
		return nil, nil, err
	}
	from := func(ctx context.Context, c *plans.Case, start []plans.PlanRow) (*plans.Result, error) {
		return scenarioSolve(ctx, c, plans.SolveOptions{TimeLimit: limit, Gap: gap, SecondCore: jobs == 1, StartPlan: start})
	}
	solve := func(ctx context.Context, c *plans.Case) (*plans.Result, error) { return from(ctx, c, nil) }
	return solve, from, nil
}

// writeOutput sends data to stdout, or to a file written through a
// temporary name when out is set.
func writeOutput(env *cmdEnv, out string, data []byte) error {
	if out == "" {
		_, err := env.stdout.Write(data)
		return err
	}
	if err := writeFileReplacing(out, data); err != nil {
		return withCode(exitFailure, err)
	}
	return nil
}

func runCompare(ctx context.Context, env *cmdEnv, opts *compareOptions) error {
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
	if len(c.Catalogs) == 0 {
		return withCode(exitBadInput, errors.New("compare: the case names no catalog"))
	}
	cmp, err := scenario.Compare(ctx, c, scenario.CompareOptions{Solve: solve, SolveFrom: solveFrom, NoBreakEven: opts.noBreakEven, Jobs: jobs})
	if err != nil {
		return withCode(exitFailure, err)
	}
	var buf strings.Builder
	if opts.json {
		data, err := json.MarshalIndent(cmp, "", "  ")
		if err != nil {
			return withCode(exitFailure, err)
		}
		buf.Write(data)
		buf.WriteByte('\n')
	} else {
		writeComparison(&buf, c, cmp, !opts.noBreakEven)
	}
	if err := writeOutput(env, opts.out, []byte(buf.String())); err != nil {
		return err
	}
	for _, v := range cmp.Variants {
		if v.Objective != nil {
			return nil
		}
	}
	return &silentExit{code: exitInfeasible}
}

// writeComparison prints the side-by-side table of a comparison.
func writeComparison(w io.Writer, c *plans.Case, cmp *scenario.Comparison, breakEven bool) {
	fmt.Fprintf(w, "Compare: %s (%s)\n\n", cmp.Case, cmp.Currency)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	// Labels are padded to one width so that they read left-aligned in a
	// right-aligned table.
	npvLabel := "NPV"
	if c.CostMode() {
		npvLabel = "NPV (−present cost)"
	}
	labelWidth := max(utf8.RuneCountInString(npvLabel), len("break-even discount"))
	for _, v := range c.Vendors {
		labelWidth = max(labelWidth, utf8.RuneCountInString("units "+v.ID))
	}
	row := func(label string, cell func(v *scenario.Variant) string) {
		fmt.Fprintf(tw, "%-*s\t", labelWidth, label)
		for i := range cmp.Variants {
			fmt.Fprint(tw, cell(&cmp.Variants[i]), "\t")
		}
		fmt.Fprintln(tw)
	}
	dash := "–"
	optMoney := func(p *float64) string {
		if p == nil {
			return dash
		}
		return money(*p)
	}
	row("variant", func(v *scenario.Variant) string {
		if v.Winner {
			return v.Name + " *"
		}
		return v.Name
	})
	row("status", func(v *scenario.Variant) string { return v.Status })
	row(npvLabel, func(v *scenario.Variant) string { return optMoney(v.Objective) })
	row("incremental NPV", func(v *scenario.Variant) string { return optMoney(v.IncrementalNPV) })
	row("IRR", func(v *scenario.Variant) string {
		if v.IRR == nil {
			return dash
		}
		return percent(*v.IRR)
	})
	row("payback year", func(v *scenario.Variant) string {
		if v.PaybackYear == nil {
			return dash
		}
		return strconv.Itoa(*v.PaybackYear)
	})
	for i := 0; i < c.Horizon; i++ {
		row(fmt.Sprintf("capex %d", c.Year(i)), func(v *scenario.Variant) string {
			if v.Objective == nil {
				return dash
			}
			return money(v.CapexByYear[i].Amount)
		})
	}
	row("capex total", func(v *scenario.Variant) string {
		if v.Objective == nil {
			return dash
		}
		return money(v.Capex)
	})
	for _, vendor := range c.Vendors {
		row("units "+vendor.ID, func(v *scenario.Variant) string {
			if v.Objective == nil {
				return dash
			}
			for _, u := range v.UnitsByVendor {
				if u.Vendor == vendor.ID {
					return strconv.Itoa(u.Units)
				}
			}
			return "0"
		})
	}
	if breakEven {
		row("break-even discount", func(v *scenario.Variant) string {
			switch {
			case v.Winner:
				return "winner"
			case v.BreakEvenDiscount != nil:
				return percent(*v.BreakEvenDiscount)
			}
			return dash
		})
	}
	tw.Flush()
	if cmp.Winner != "" {
		fmt.Fprintf(w, "\n* best single catalog: %s\n", cmp.Winner)
		if len(cmp.Tied) > 0 {
			verb := "reach"
			if len(cmp.Tied) == 1 {
				verb = "reaches"
			}
			fmt.Fprintf(w, "  tied: %s %s the same NPV; %s comes first only in catalog order\n",
				strings.Join(cmp.Tied, ", "), verb, cmp.Winner)
		}
		if len(cmp.Contenders) > 0 {
			fmt.Fprintf(w, "  not proven: the search stopped before ruling out that %s could do better (no bound yet, or one above the winner's NPV); a longer --time-limit may settle it\n",
				strings.Join(cmp.Contenders, ", "))
		}
		var idle []string
		for _, v := range cmp.Variants {
			if v.Result != nil && v.Result.StoppedBeforeBetter() {
				idle = append(idle, v.Name)
			}
		}
		if len(idle) > 0 {
			fmt.Fprintf(w, "  nothing bought by %s: %s; allow more time\n", strings.Join(idle, ", "), stoppedBeforeBetterText)
		}
	}

	if len(cmp.Differences) > 0 {
		fmt.Fprintln(w, "\nWhere the plans differ (link, order year):")
		tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		head := []string{"link", "year"}
		for _, v := range cmp.Variants {
			head = append(head, v.Name)
		}
		fmt.Fprintln(tw, strings.Join(head, "\t"))
		for _, d := range cmp.Differences {
			cells := []string{d.Link, strconv.Itoa(d.Year)}
			for i, b := range d.Buys {
				if cmp.Variants[i].Objective == nil {
					b = "(no plan)"
				} else if b == "" {
					b = dash
				}
				cells = append(cells, b)
			}
			fmt.Fprintln(tw, strings.Join(cells, "\t"))
		}
		tw.Flush()
	} else if len(cmp.Variants) > 1 {
		fmt.Fprintln(w, "\nThe variants with a plan buy the same things on every link and year.")
	}

	for _, v := range cmp.Variants {
		if v.Objective != nil {
			continue
		}
		fmt.Fprintf(w, "\n%s is %s", v.Name, v.Status)
		if len(v.Infeasibility) == 0 {
			fmt.Fprintln(w, ".")
			continue
		}
		fmt.Fprintln(w, ":")
		for _, why := range v.Infeasibility {
			fmt.Fprintf(w, "  - %s\n", why)
		}
	}
	if breakEven {
		fmt.Fprintln(w)
		var notes []string
		for _, v := range cmp.Variants {
			if v.Catalog < 0 || v.Winner {
				continue
			}
			switch {
			case v.BreakEvenDiscount != nil && *v.BreakEvenDiscount == 0:
				notes = append(notes, fmt.Sprintf("%s matches %s at its list price (NPV %s).", v.Name, cmp.Winner, money(*v.BreakEvenNPV)))
			case v.BreakEvenDiscount != nil:
				notes = append(notes, fmt.Sprintf("%s would match %s at %s off its quote (NPV %s).", v.Name, cmp.Winner, percent(*v.BreakEvenDiscount), money(*v.BreakEvenNPV)))
			case v.BreakEvenNote != "":
				notes = append(notes, fmt.Sprintf("%s %s.", v.Name, v.BreakEvenNote))
			}
		}
		for _, n := range notes {
			fmt.Fprintln(w, n)
		}
		fmt.Fprintln(w, "Break-even: the uniform discount on a quote (module capex, lease fees, spend-tier thresholds) at which that catalog alone matches the best single catalog, by bisection to 0.5 %.")
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, decisionSupportNote)
}
