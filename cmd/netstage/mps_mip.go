package main

import (
	"context"
	"fmt"
	"math"
	"os"

	"netstage/lp"
	"netstage/mip"
)

// Wires package mip into `netstage mps` (see solveMIPFile in mps.go).
func init() { solveMIPFile = solveMIPWithBranchAndBound }

// solveMIPWithBranchAndBound solves m with mip, printing progress lines on
// stderr when it is a terminal.
func solveMIPWithBranchAndBound(ctx context.Context, m *lp.Model, opts mpsFileOptions) (mpsReport, error) {
	set := mip.Settings{TimeLimit: opts.TimeLimit, RelGap: opts.Gap}
	if isTerminal(os.Stderr) {
		set.Progress = func(p mip.Progress) {
			inc := "-"
			if p.HasIncumbent {
				inc = fmt.Sprintf("%.10g", p.Incumbent)
			}
			fmt.Fprintf(os.Stderr, "%8.1fs  nodes %-8d open %-7d incumbent %-16s bound %-16.10g gap %.3g%%\n",
				p.Elapsed.Seconds(), p.Nodes, p.OpenNodes, inc, p.Bound, 100*p.Gap)
		}
	}
	r, err := mip.Solve(ctx, m, set)
	if err != nil {
		return mpsReport{}, err
	}
	rep := mpsReport{Status: r.Status.String(), Nodes: r.Nodes, Iterations: r.LPIterations}
	if r.X != nil && r.Status != mip.Unbounded {
		obj := r.Objective
		rep.Objective = &obj
	}
	if r.Status != mip.Infeasible && r.Status != mip.Unbounded && !math.IsInf(r.Bound, 0) && !math.IsNaN(r.Bound) {
		b := r.Bound
		rep.Bound = &b
	}
	return rep, nil
}
