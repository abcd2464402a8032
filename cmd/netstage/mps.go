package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"strconv"
	"time"

	"github.com/spf13/cobra"

	"netstage/lp"
)

// mpsOptions are the flags of `netstage mps`.
type mpsOptions struct {
	path      string
	relax     bool
	json      bool
	timeLimit string
	gap       float64
}

// mpsFileOptions is what a MIP solve of an MPS file gets from the command
// line.
type mpsFileOptions struct {
	TimeLimit time.Duration // 0: no limit
	Gap       float64       // relative gap; 0: the solver's default
}

// mpsReport is the result printed by `netstage mps` (DESIGN.md §4), in the
// file's own objective sense, constant included. Objective and Bound are nil
// when there is none (infeasible, unbounded, stopped without a solution).
type mpsReport struct {
	Status     string   `json:"status"` // optimal, feasible, infeasible, unbounded, limit
	Objective  *float64 `json:"objective"`
	Bound      *float64 `json:"bound"`
	Nodes      int      `json:"nodes"`
	Iterations int      `json:"iterations"`
	Seconds    float64  `json:"seconds"`
}

// solveMIPFile solves an MPS model with its integrality marks. It is nil
// until package mip is wired in: set it from an init function in a new file
// (for example mps_mip.go) and `netstage mps` without --relax uses it.
var solveMIPFile func(ctx context.Context, m *lp.Model, opts mpsFileOptions) (mpsReport, error)

func init() { registerCommand(newMPSCmd) }

func newMPSCmd(env *cmdEnv) *cobra.Command {
	opts := &mpsOptions{}
	cmd := &cobra.Command{
		Use:   "mps FILE.mps",
		Short: "Solve any MPS file with netstage's own solver",
		Long: `mps reads a linear or mixed-integer program in MPS format (fixed or free)
and solves it with netstage's own solver. It prints status, objective, bound,
nodes, iterations and seconds, in the file's own objective sense, with the
objective constant read as minus the RHS of the objective row.

Exit codes: 0 optimal, 1 stopped by a limit (or a solver failure), 2 bad
file or usage, 3 infeasible or unbounded.`,
		Example: `  netstage mps afiro.mps --relax
  netstage mps p0033.mps --time-limit 60 --json`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			opts.path = args[0]
			if err := checkSearchFlags(opts.gap, opts.timeLimit); err != nil {
				return err
			}
			return runMPS(cmd.Context(), env, opts)
		},
	}
	f := cmd.Flags()
	f.BoolVar(&opts.relax, "relax", false, "solve the LP relaxation (ignore integrality)")
	f.BoolVar(&opts.json, "json", false, "print one JSON object")
	f.StringVar(&opts.timeLimit, "time-limit", "", "stop after this `duration` (90s, 2m; a bare number is seconds)")
	f.Float64Var(&opts.gap, "gap", 0, "relative gap at which a MIP solution counts as optimal (default 1e-4)")
	return cmd
}

func runMPS(ctx context.Context, env *cmdEnv, opts *mpsOptions) error {
	start := time.Now()
	limit, err := parseTimeLimit(opts.timeLimit)
	if err != nil {
		return err
	}
	m, err := lp.ReadMPSFile(opts.path)
	if err != nil {
		return withCode(exitBadInput, err)
	}
	var rep mpsReport
	if opts.relax {
		rep, err = solveLPFile(ctx, m, limit)
	} else {
		if solveMIPFile == nil {
			return withCode(exitFailure, errors.New("MIP solving is not wired into `netstage mps` yet; use --relax for the LP relaxation"))
		}
		rep, err = solveMIPFile(ctx, m, mpsFileOptions{TimeLimit: limit, Gap: opts.gap})
	}
	if err != nil {
		var ce *codedError
		if errors.As(err, &ce) {
			return err
		}
		return withCode(exitFailure, err)
	}
	rep.Seconds = math.Round(time.Since(start).Seconds()*1e3) / 1e3
	if err := printMPSReport(env, rep, opts.json); err != nil {
		return withCode(exitFailure, err)
	}
	switch rep.Status {
	case "optimal", "feasible":
		// A solution found at a limit is still success (DESIGN.md §4);
		// its status and gap say it is not proven optimal.
		return nil
	case "infeasible", "unbounded":
		return &silentExit{code: exitInfeasible}
	}
	return &silentExit{code: exitFailure}
}

// solveLPFile solves the LP relaxation of m.
func solveLPFile(ctx context.Context, m *lp.Model, limit time.Duration) (mpsReport, error) {
	r, err := lp.Solve(ctx, m, lp.Settings{TimeLimit: limit})
	if err != nil {
		// The file read but describes no valid model (crossed bounds).
		return mpsReport{}, withCode(exitBadInput, err)
	}
	rep := mpsReport{Iterations: r.Iterations}
	switch r.Status {
	case lp.Optimal:
		rep.Status = "optimal"
		obj := r.Objective
		rep.Objective, rep.Bound = &obj, &obj
	case lp.Infeasible:
		rep.Status = "infeasible"
	case lp.Unbounded:
		rep.Status = "unbounded"
	case lp.TimeLimit, lp.IterationLimit, lp.Cancelled:
		rep.Status = "limit"
	default:
		return mpsReport{}, fmt.Errorf("the LP solver stopped with status %q", r.Status)
	}
	return rep, nil
}

func printMPSReport(env *cmdEnv, rep mpsReport, asJSON bool) error {
	if asJSON {
		b, err := json.Marshal(rep)
		if err != nil {
			return err
		}
		_, err = fmt.Fprintf(env.stdout, "%s\n", b)
		return err
	}
	num := func(v *float64) string {
		if v == nil {
			return "none"
		}
		return strconv.FormatFloat(*v, 'g', 12, 64)
	}
	_, err := fmt.Fprintf(env.stdout, "status      %s\nobjective   %s\nbound       %s\nnodes       %d\niterations  %d\nseconds     %.3f\n",
		rep.Status, num(rep.Objective), num(rep.Bound), rep.Nodes, rep.Iterations, rep.Seconds)
	return err
}
