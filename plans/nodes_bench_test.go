package plans

import (
	"context"
	"testing"
)

// benchNodes is the node limit of BenchmarkSolveNodes.
const benchNodes = 300

// BenchmarkSolveNodes solves the synthetic cases S and M of seed 1 with no
// time limit and a limit of benchNodes nodes (S usually proves optimality
// before). The search is deterministic, so two builds that take the same
// path do the same work, and their times compare fairly even on a shared
// machine whose load changes the 60 s results of BenchmarkSolve (compare
// the iterations reported: equal iterations mean the same path). Run:
// go test -run '^$' -bench SolveNodes -benchtime 1x ./plans
func BenchmarkSolveNodes(b *testing.B) {
	for _, sz := range SyntheticSizes[:2] {
		b.Run(sz.Name, func(b *testing.B) {
			c, _, err := Load(writeSynthetic(b, sz.Sites, sz.Years, 1))
			if err != nil {
				b.Fatal(err)
			}
			b.ReportAllocs()
			b.ResetTimer()
			var res *Result
			for i := 0; i < b.N; i++ {
				res, err = Solve(context.Background(), c, SolveOptions{Gap: benchGap, NodeLimit: benchNodes})
				if err != nil {
					b.Fatal(err)
				}
			}
			b.StopTimer()
			if res.Status != StatusOptimal && res.Status != StatusFeasible {
				b.Fatalf("%s: status %s", sz.Name, res.Status)
			}
			if res.Gap != nil {
				b.ReportMetric(*res.Gap, "gap")
			}
			b.ReportMetric(float64(res.Stats.Nodes), "nodes")
			b.ReportMetric(float64(res.Stats.Iterations), "iters")
		})
	}
}
