package plans

import (
	"context"
	"fmt"
	"testing"
	"time"

	"netstage/lp"
)

// benchTimeLimit caps each solve of the benchmarks: issue 5 asks for the
// time to proven optimality (gap 1e-4) or the gap reached in 60 s.
const benchTimeLimit = 60 * time.Second

// benchGap is the gap at which a benchmark solve counts as optimal.
const benchGap = 1e-4

// BenchmarkSolve solves the synthetic cases S (10 sites, 5 years), M (25,
// 7) and L (50, 10) of seed 1 to gap 1e-4 or 60 s. Besides time and
// allocations it reports the gap reached, the nodes and iterations searched
// and the model size. Run: go test -run '^$' -bench Solve -benchtime 1x ./plans
//
// Measured on 2026-12-04 (netstage solve --time-limit, same cases): L
// ends at 60 s with a gap of 2.5 to 2.7 % (the local search's share
// depends on timing) and at 600 s with 2.58 % (plan 8,288,791, bound
// 8,502,388); CBC 2.10.8 on L's exported MPS stopped after 1,500 s of CPU
// at 3.5 % (plan 8,231,483, found at 1,358 s; bound 8,522,099, its root's),
// and the npm WebAssembly build of HiGHS (package highs 1.15.3, HiGHS
// 1.15.1) aborted on it; on 2026-12-05 it ran (one thread, beside CBC):
// 7.06 % at 60 s (its first plan, 7,954,356), 3.12 % at 600 s, while CBC
// found no plan in 600 s. With the flow cut-set rows of the separation,
// the same day, L ends its 60 s at 2.68 and 2.72 % (two runs, alone on
// the machine): its root cut rounds are not done by then, and when they
// are, their bound is only 0.07 % lower (8,497,724 against 8,503,292). M
// reached 0.078 % after 3,025 s (193,464 nodes; other runs shared the
// machine for its first 15 minutes) against 0.074 % after 3,000 s before
// them. The same HiGHS build proved M optimal at its default gap (model
// status 7, optimal) in 1,817 s on its exported MPS, at 3,032,489.48,
// netstage's best M plan (2026-12-04, one core, alone on the machine but
// for idle shells; reproduced 2026-12-05 in 1,969 s and 25,689 nodes
// with CBC on the other core), and CBC 2.10.8 had 0.53 % after 1,800 s
// (0.52 % on 2026-12-05: plan 3,029,680, bound 3,045,332). With the
// capacity steps (model_steps.go, 2026-12-05, alone on the machine): S
// 0.32 s (5 nodes), M 0.32 % after 60 s (2,031 nodes; 0.43 % before), L
// 2.62 % (its root rounds unfinished, as before). Without a time limit,
// on one core (GOMAXPROCS=1) beside other work, netstage solve proved M
// optimal in 2,134 s and 169,823 nodes (NPV 3,032,448, bound
// 3,032,752); the build before the steps took 4,260 s and 315,831 nodes
// on the same terms.
func BenchmarkSolve(b *testing.B) {
	benchSolve(b, SyntheticSizes, SolveOptions{Gap: benchGap, TimeLimit: benchTimeLimit})
}

// BenchmarkSolveNodes solves the synthetic cases S and M of seed 1 with no
// time limit and a limit of benchNodes nodes (S usually proves optimality
// before). The search is deterministic, so two builds that take the same
// path do the same work, and their times compare fairly even on a shared
// machine whose load changes the 60 s results of BenchmarkSolve (compare
// the iterations reported: equal iterations mean the same path). Run:
// go test -run '^$' -bench SolveNodes -benchtime 1x ./plans
func BenchmarkSolveNodes(b *testing.B) {
	benchSolve(b, SyntheticSizes[:2], SolveOptions{Gap: benchGap, NodeLimit: benchNodes})
}

// BenchmarkSolveHorizon solves the synthetic 10-site case of seed 1 over
// 3, 5, 7 and 10 years, to gap 1e-4 or 60 s: the length of the horizon,
// more than the number of sites, is what makes these cases hard. Measured
// on 2026-12-03, alone on the machine, with the caller's cuts separated
// at the first tree nodes: over 3, 5 and 7 years it proves optimality in
// 0.08 s, 0.46 s (the S case, 9 nodes) and 6.4 s (816 nodes; 619 nodes
// and 5.3 s without that separation, though it saves nodes on seeds 2 to
// 8; 1,862 nodes and 15 s before the tier priorities and spend caps, and
// 4,709 nodes before the caller's cuts could re-enter the LP in the tree,
// on a slower day); over 10 years it stops at 0.74 % after 60 s, with a
// lower bound than the build before (2,149,536 against 2,150,242) but a
// plan found later (0.70 % for that build).
// On its exported MPS, CBC 2.10.8 had 0.63 % after 518 s, and HiGHS (npm
// highs) stopped at 600 s with a plan 0.26 % below our best now. (50
// sites over 3 years proves in 23 s; over 5 years it stops at 0.60 %
// after 180 s, before the tier changes.)
// Run: go test -run '^$' -bench SolveHorizon -benchtime 1x ./plans
func BenchmarkSolveHorizon(b *testing.B) {
	var sizes []SyntheticSize
	for _, years := range []int{3, 5, 7, 10} {
		sizes = append(sizes, SyntheticSize{fmt.Sprintf("10x%d", years), 10, years})
	}
	benchSolve(b, sizes, SolveOptions{Gap: benchGap, TimeLimit: benchTimeLimit})
}

// benchNodes is the node limit of BenchmarkSolveNodes.
const benchNodes = 300

// benchSolve solves the synthetic case of each size (seed 1) with opts and
// reports the gap, nodes, iterations and model size beside time and
// allocations.
func benchSolve(b *testing.B, sizes []SyntheticSize, opts SolveOptions) {
	cases := make([]benchCase, len(sizes))
	for k, sz := range sizes {
		cases[k] = benchCase{name: sz.Name, sites: sz.Sites, years: sz.Years, seed: 1}
	}
	benchSolveCases(b, cases, opts)
}

// benchCase is a synthetic case of a benchmark, with an optional edit
// applied after loading.
type benchCase struct {
	name         string
	sites, years int
	seed         int64
	edit         func(*Case)
}

// BenchmarkSolveTightBudget proves two synthetic 15-site 6-year cases
// (seeds 13 and 5) and the M case (25 sites, 7 years, seed 1) whose
// yearly capex budget is cut to 20,000, so that it binds: infeasible node
// LPs are common there, unlike in the other benchmark cases. Measured
// 2026-12-05, alone on the machine: 13 and 14 nodes, 0.35 to 0.38 and
// 0.41 to 0.44 s (three runs), since the root propagation follows the
// budget rows through the continuous spend columns to the unit columns
// (mip.propagator.impliedBounds); 194 and 199 nodes, 2.6 and 2.2 s before
// that, and 753 and 1,805 nodes, 9.1 and 14.4 s, before the search learnt
// proofs from pruned and infeasible nodes (mip/proofs.go; build ec01997).
// With the budget cut in case.toml instead (capex_per_year = 20000),
// netstage takes 13 nodes on each, 0.47 and 0.59 s (194 and 179 nodes
// before), and CBC 2.10.8 8 on each, 0.7 and 0.5 s (see DEVELOPERS.md).
// The 25-site case proves in 722 nodes, 20.7 s (CBC 2.10.8 on its
// exported MPS: 726 nodes, 19.5 s; HiGHS 1.15.1, npm WebAssembly: 23.5 s;
// same optimum); the build before the implied bounds, run with one core
// for 120 s beside another solve, had a gap of 0.40 % left (980 nodes)
// where this build proved it in 40 s. With the capacity steps
// (model_steps.go, 2026-12-05, alone): 7 and 8 nodes, 0.32 and 0.43 s,
// and 546 nodes, 20.7 s on the 25-site case.
// Run: go test -run '^$' -bench SolveTightBudget -benchtime 1x ./plans
func BenchmarkSolveTightBudget(b *testing.B) {
	tight := func(c *Case) {
		for i := range c.Budget.Yearly {
			c.Budget.Yearly[i] = 20000
		}
	}
	benchSolveCases(b, []benchCase{
		{name: "15x6-seed13", sites: 15, years: 6, seed: 13, edit: tight},
		{name: "15x6-seed5", sites: 15, years: 6, seed: 5, edit: tight},
		{name: "25x7-seed1", sites: 25, years: 7, seed: 1, edit: tight},
	}, SolveOptions{Gap: benchGap, TimeLimit: benchTimeLimit})
}

// benchSolveCases runs benchSolve's measurement on the given cases.
func benchSolveCases(b *testing.B, cases []benchCase, opts SolveOptions) {
	opts.SecondCore = true // as netstage solve runs
	for _, sz := range cases {
		b.Run(sz.name, func(b *testing.B) {
			c, _, err := Load(writeSynthetic(b, sz.sites, sz.years, sz.seed))
			if err != nil {
				b.Fatal(err)
			}
			if sz.edit != nil {
				sz.edit(c)
			}
			b.ReportAllocs()
			b.ResetTimer()
			var res *Result
			for i := 0; i < b.N; i++ {
				res, err = Solve(context.Background(), c, opts)
				if err != nil {
					b.Fatal(err)
				}
			}
			b.StopTimer()
			if res.Status != StatusOptimal && res.Status != StatusFeasible {
				b.Fatalf("%s: status %s", sz.name, res.Status)
			}
			if res.Gap != nil {
				b.ReportMetric(*res.Gap, "gap")
			}
			b.ReportMetric(float64(res.Stats.Nodes), "nodes")
			b.ReportMetric(float64(res.Stats.Iterations), "iters")
			b.ReportMetric(float64(res.Stats.Rows), "rows")
			b.ReportMetric(float64(res.Stats.Columns), "cols")
			b.ReportMetric(float64(res.Stats.Integers), "ints")
		})
	}
}

// BenchmarkRelaxation solves the LP relaxation of the synthetic cases S, M
// and L (seed 1) from scratch: the root LP of the search, the largest
// single LP of a solve. The path is deterministic, so equal iteration
// counts mean the same pivots and the times of two builds compare fairly.
// Run: go test -run '^$' -bench Relaxation -benchtime 1x ./plans
func BenchmarkRelaxation(b *testing.B) {
	for _, sz := range SyntheticSizes {
		b.Run(sz.Name, func(b *testing.B) {
			_, m := modelSynthetic(b, sz.Sites, sz.Years, 1)
			b.ReportAllocs()
			b.ResetTimer()
			var r lp.Result
			var err error
			for i := 0; i < b.N; i++ {
				if r, err = lp.Solve(context.Background(), m.LP, lp.Settings{SecondCore: true}); err != nil || r.Status != lp.Optimal {
					b.Fatalf("%s: %v %v", sz.Name, r.Status, err)
				}
			}
			b.ReportMetric(float64(r.Iterations), "iters")
			b.ReportMetric(float64(m.LP.NumRows()), "rows")
			b.ReportMetric(float64(m.LP.NumCols()), "cols")
		})
	}
}

// BenchmarkSynthetic measures the generator itself on the L size.
func BenchmarkSynthetic(b *testing.B) {
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := Synthetic(50, 10, int64(i)); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkSeparateCutSets times one call of the root separator on the LP
// relaxation's point of the synthetic M and L cases (seed 1), and reports
// how many violated rows it finds. Run:
// go test -run '^$' -bench SeparateCutSets -benchtime 5x ./plans
func BenchmarkSeparateCutSets(b *testing.B) {
	for _, sz := range SyntheticSizes[1:] {
		b.Run(sz.Name, func(b *testing.B) {
			_, m, relax := relaxSynthetic(b, sz.Sites, sz.Years, 1)
			b.ReportAllocs()
			b.ResetTimer()
			var rows []lp.Row
			for i := 0; i < b.N; i++ {
				rows = m.separateCutSets(relax.X)
			}
			b.ReportMetric(float64(len(rows)), "rows")
		})
	}
}
