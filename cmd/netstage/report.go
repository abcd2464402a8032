package main

import (
	"bytes"
	"context"
	"fmt"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"netstage/plans/report"
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
written to a temporary file and renamed into place.`,
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
			return runReport(cmd.Context(), env, opts)
		},
	}
	f := cmd.Flags()
	f.BoolVar(&opts.useDemo, "demo", false, "report on the embedded demo case")
	f.StringVarP(&opts.out, "out", "o", "", "write the report to this `file` (default: stdout)")
	f.StringVar(&opts.format, "format", "", "report `format`: html or md (default: from the --out extension, else html)")
	f.StringVar(&opts.timeLimit, "time-limit", "", "stop the search after this `duration` (90s, 2m; a bare number is seconds) and report the best plan")
	f.Float64Var(&opts.gap, "gap", 0, "relative gap at which a plan counts as optimal (default 1e-4)")
	f.BoolVarP(&opts.quiet, "quiet", "q", false, "print no warnings or progress on stderr")
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
	// A case without a plan still gets its report: it explains why.
	var buf bytes.Buffer
	var inputWarnings []string
	for _, w := range warns {
		inputWarnings = append(inputWarnings, fmt.Sprint(w))
	}
	if err := report.WriteWith(&buf, c, res, format, report.Options{InputWarnings: inputWarnings}); err != nil {
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
