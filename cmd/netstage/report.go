package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"runtime"
	"strings"

	"github.com/spf13/cobra"

	"netstage/plans"
	"netstage/plans/report"
	"netstage/plans/scenario"
)

func init() { registerCommand(newReportCmd) }

// reportOptions are the flags and arguments of `netstage report`.
type reportOptions struct {
	casePath  string
	useDemo   bool
	out       string // "" writes to stdout
	format    string // "" picks from --out's extension, else html
	timeLimit string // Go duration or bare seconds; "" no limit
	gap       float64
	quiet     bool
	jobs      int // tornado solves at once (0: one per CPU)
}

func newReportCmd(env *cmdEnv) *cobra.Command {
	opts := &reportOptions{}
	cmd := &cobra.Command{
		Use:   "report CASE.toml | --demo",
		Short: "Write the plan as a capex report for leadership (HTML or Markdown)",
		Long: `Solve the case as 'solve' does and write a report that people who do not
read terminal tables can check: the decision in one paragraph, charts
(capex against budget, cash flow, utilisation before and after, a network
map when the sites have coordinates), the staged plan, the cash flow, why
each upgrade, the assumptions and the solver's status.

HTML (the default) is one self-contained file with inline CSS and SVG: it
opens offline and prints on A4 and Letter. Markdown (--format md) suits
wikis and email. Without --out the report goes to stdout; with --out it is
written to a temporary file and renamed into place.

When the case has a [report.tornado] table (factor = [low, high]), the
report also solves the case with each of those factors alone at its low and
its high value, the others at the case's values (two more solves per factor,
each with the same --gap and --time-limit; --jobs N runs N at once), and
charts how far the NPV moves.`,
		Example: `  netstage report --demo --out demo-report.html
  netstage report case.toml --format md > plan.md
  netstage report case.toml --out plan.html --time-limit 2m`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if len(args) == 1 {
				opts.casePath = args[0]
			}
			if err := checkSearchFlags(opts.gap, opts.timeLimit); err != nil {
				return err
			}
			if _, err := reportFormat(opts); err != nil {
				return err
			}
			if opts.jobs < 0 {
				return withCode(exitBadInput, fmt.Errorf("--jobs must be ≥ 1 (0: one per CPU), got %d", opts.jobs))
			}
			return runReport(cmd.Context(), env, opts)
		},
	}
	f := cmd.Flags()
	f.BoolVar(&opts.useDemo, "demo", false, "report on the embedded demo case")
	f.StringVarP(&opts.out, "out", "o", "", "write the report to this `file` (default: stdout)")
	f.StringVar(&opts.format, "format", "", "report `format`: html or md (default: from the --out extension, else html)")
	f.StringVar(&opts.timeLimit, "time-limit", "", "limit the whole solve to about this `duration` (90s, 2m; a bare number is seconds) and report the best plan found")
	f.Float64Var(&opts.gap, "gap", 0, "relative gap at which a plan counts as optimal (default 1e-4)")
	f.BoolVarP(&opts.quiet, "quiet", "q", false, "print no warnings or progress on stderr")
	f.IntVar(&opts.jobs, "jobs", 1, "solve this many tornado cases at once (0: one per CPU)")
	return cmd
}

// reportFormat resolves --format, or the format named by --out's extension.
func reportFormat(opts *reportOptions) (report.Format, error) {
	if opts.format == "" {
		switch strings.ToLower(filepath.Ext(opts.out)) {
		case ".md", ".markdown":
			return report.Markdown, nil
		}
		return report.HTML, nil
	}
	f, err := report.ParseFormat(opts.format)
	if err != nil {
		return 0, withCode(exitBadInput, fmt.Errorf("--format %q: use html or md", opts.format))
	}
	return f, nil
}

func runReport(ctx context.Context, env *cmdEnv, opts *reportOptions) error {
	format, err := reportFormat(opts)
	if err != nil {
		return err
	}
	c, warns, res, err := loadAndSolve(ctx, env, caseSolve{
		casePath: opts.casePath, useDemo: opts.useDemo, timeLimit: opts.timeLimit,
		gap: opts.gap, quiet: opts.quiet,
	})
	if err != nil {
		return err
	}
	if !opts.quiet {
		for _, w := range res.Warnings {
			fmt.Fprintln(env.stderr, "warning:", w)
		}
	}
	ro := report.Options{}
	for _, w := range warns {
		ro.InputWarnings = append(ro.InputWarnings, fmt.Sprint(w))
	}
	if len(c.Tornado) > 0 {
		bars, err := reportTornado(ctx, env, opts, c, res)
		switch {
		case err == nil:
			ro.Tornado = bars
		case ctx.Err() != nil:
			// Stopped (Ctrl-C): the plan is still reported, as after a
			// stopped main solve, and the report says what it lacks.
			note := "the tornado chart of [report.tornado] is missing: its solves were stopped before they finished"
			if !opts.quiet {
				fmt.Fprintln(env.stderr, "warning:", note)
			}
			ro.InputWarnings = append(ro.InputWarnings, note)
		default:
			return err
		}
	}
	// A case without a plan still gets its report: it explains why.
	var buf bytes.Buffer
	if err := report.WriteWith(&buf, c, res, format, ro); err != nil {
		return withCode(exitFailure, err)
	}
	if opts.out == "" {
		if _, err := env.stdout.Write(buf.Bytes()); err != nil {
			return withCode(exitFailure, err)
		}
	} else if err := writeFileReplacing(opts.out, buf.Bytes()); err != nil {
		return withCode(exitFailure, err)
	}
	return solveExit(env.stderr, res, "")
}

// reportTornado runs the one-factor-at-a-time solves of [report.tornado]
// around the solved case res, with progress lines on stderr unless --quiet.
// A case without a plan gets no tornado (there is no base NPV to move).
func reportTornado(ctx context.Context, env *cmdEnv, opts *reportOptions, c *plans.Case, res *plans.Result) ([]scenario.TornadoBar, error) {
	names := make([]string, len(c.Tornado))
	for i, f := range c.Tornado {
		names[i] = f.Name
	}
	if res.Objective == nil {
		if !opts.quiet {
			fmt.Fprintf(env.stderr, "tornado: skipped (%s): the case has no plan to compare with\n", strings.Join(names, ", "))
		}
		return nil, nil
	}
	jobs := opts.jobs
	if jobs == 0 {
		jobs = runtime.NumCPU()
	}
	solve, solveFrom, err := solversWith(opts.timeLimit, opts.gap, jobs)
	if err != nil {
		return nil, err
	}
	to := scenario.TornadoOptions{Solve: solve, SolveFrom: solveFrom, Base: res, Jobs: jobs}
	if !opts.quiet {
		fmt.Fprintf(env.stderr, "tornado: %d solves, each of %s alone at its low and high value\n", 2*len(c.Tornado), strings.Join(names, ", "))
		to.Progress = func(s scenario.Setting, r *scenario.Record, done, total int) {
			outcome := r.Status
			if r.Objective != nil {
				outcome = "NPV " + money(*r.Objective)
			}
			fmt.Fprintf(env.stderr, "tornado: %d/%d %s=%s: %s\n", done, total, s.Name, factorText(s.Value), outcome)
		}
	}
	bars, _, err := scenario.Tornado(ctx, c, c.Tornado, to)
	if err != nil {
		if errors.Is(err, scenario.ErrBadScenario) {
			return nil, withCode(exitBadInput, err)
		}
		return nil, withCode(exitFailure, err)
	}
	return bars, nil
}
