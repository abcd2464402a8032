package main

// The export command: write the exact model solve solves as MPS, for other
// solvers to check.

import (
	"bytes"
	"context"
	"errors"

	"github.com/spf13/cobra"

	"netstage/lp"
	"netstage/plans"
)

func init() { registerCommand(newExportCmd) }

// exportOptions are the export command's flags and argument.
type exportOptions struct {
	casePath string
	useDemo  bool
	mpsPath  string // "-" writes to stdout
}

func newExportCmd(env *cmdEnv) *cobra.Command {
	opts := &exportOptions{}
	cmd := &cobra.Command{
		Use:   "export CASE.toml | --demo --mps FILE",
		Short: "Write the planning model that solve solves as an MPS file",
		Long: `export builds the same mixed-integer model that solve solves for the case and
writes it in MPS format: a minimisation of minus the NPV in case currency,
every integer column with explicit bounds, and the terms that depend on no
decision in the objective row's constant (its RHS is minus the constant, as
CLP and HiGHS read it). Another solver's optimum on the file equals
solve --json's mps_objective.

The file is written to a temporary name and renamed into place; --mps - writes
to stdout.`,
		Example: `  netstage export case.toml --mps plan.mps
  netstage export --demo --mps - | head`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if len(args) == 1 {
				opts.casePath = args[0]
			}
			if opts.mpsPath == "" {
				return withCode(exitBadInput, errors.New("name the output file with --mps FILE"))
			}
			return runExport(cmd.Context(), env, opts)
		},
	}
	f := cmd.Flags()
	f.BoolVar(&opts.useDemo, "demo", false, "use the embedded demo case")
	f.StringVar(&opts.mpsPath, "mps", "", "write the model to `FILE` in MPS format (- for stdout)")
	return cmd
}

func runExport(_ context.Context, env *cmdEnv, opts *exportOptions) error {
	c, warns, err := loadCase(opts.casePath, opts.useDemo)
	if err != nil {
		return err
	}
	printWarnings(env.stderr, warns)
	// The zero BuildOptions are the model Solve solves.
	m, err := plans.Export(c, plans.BuildOptions{})
	if err != nil {
		return withCode(exitFailure, err)
	}
	var buf bytes.Buffer
	if err := lp.WriteMPS(&buf, m); err != nil {
		return withCode(exitFailure, err)
	}
	if opts.mpsPath == "-" {
		_, err := env.stdout.Write(buf.Bytes())
		return withCode(exitFailure, err)
	}
	if err := writeFileReplacing(opts.mpsPath, buf.Bytes()); err != nil {
		return withCode(exitFailure, err)
	}
	return nil
}
