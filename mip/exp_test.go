package mip

import (
	"context"
	"testing"
)

func TestExperiment(t *testing.T) {
	for _, tc := range miplibCases {
		m := readSample(t, tc.name)
		for k, set := range []Settings{{}, {NoStrongBranching: true}, {NoHeuristics: true}} {
			r, _ := Solve(context.Background(), m, set)
			t.Logf("%s v%d: %v %v nodes %d iters %d cuts %d root %v time %v", tc.name, k, r.Status, r.Objective, r.Nodes, r.LPIterations, r.Cuts, r.RootBound, r.Time)
		}
	}
}
