package mip

import (
	"context"
	"fmt"
	"math"
	"math/rand"
	"slices"
	"testing"
	"time"

	"netstage/lp"
)

// hardKnapsack is a multi-dimensional 0/1 knapsack (maximise) with n items
// and k capacity rows at half the total weight: easy to find good points,
// slow to prove optimal for n ≈ 80.
func hardKnapsack(n, k int, seed int64) *lp.Model {
	rng := rand.New(rand.NewSource(seed))
	m := lp.NewModel("knapsack")
	m.Sense = lp.Maximize
	for j := 0; j < n; j++ {
		m.AddIntCol(fmt.Sprintf("x%d", j), float64(50+rng.Intn(50)), 0, 1)
	}
	for i := 0; i < k; i++ {
		cols := make([]int, n)
		vals := make([]float64, n)
		sum := 0.0
		for j := 0; j < n; j++ {
			cols[j] = j
			vals[j] = float64(20 + rng.Intn(80))
			sum += vals[j]
		}
		m.AddRow(fmt.Sprintf("cap%d", i), math.Inf(-1), math.Floor(sum/2), cols, vals)
	}
	return m
}

func TestTimeLimitHonoured(t *testing.T) {
	m := hardKnapsack(80, 10, 7)
	limit := 200 * time.Millisecond
	start := time.Now()
	r, err := Solve(context.Background(), m, Settings{TimeLimit: limit, RelGap: 1e-9})
	took := time.Since(start)
	if err != nil {
		t.Fatal(err)
	}
	// A small margin for the last LP solve and the result assembly.
	if took > limit+time.Second {
		t.Errorf("search took %v with a time limit of %v", took, limit)
	}
	if r.Status != Feasible {
		t.Fatalf("status %v, want feasible (stopped at the limit with a point)", r.Status)
	}
	if r.Stopped != TimeLimit {
		t.Errorf("stopped %v, want time limit", r.Stopped)
	}
	checkIncumbent(t, m, r)
	if !(r.Bound >= r.Objective) || r.Gap <= 1e-9 || math.IsInf(r.Gap, 0) {
		t.Errorf("bound %v objective %v gap %v: want a finite open gap with bound ≥ objective", r.Bound, r.Objective, r.Gap)
	}
	want := math.Abs(r.Bound-r.Objective) / math.Max(math.Abs(r.Objective), 1)
	if math.Abs(r.Gap-want) > 1e-12 {
		t.Errorf("gap %v, want %v", r.Gap, want)
	}
}

func TestNodeLimit(t *testing.T) {
	m := hardKnapsack(80, 10, 8)
	r, err := Solve(context.Background(), m, Settings{NodeLimit: 50, RelGap: 1e-9})
	if err != nil {
		t.Fatal(err)
	}
	if r.Status != Feasible || r.Stopped != NodeLimit {
		t.Fatalf("status %v stopped %v, want feasible at the node limit", r.Status, r.Stopped)
	}
	if r.Nodes > 50 {
		t.Errorf("%d nodes, limit 50", r.Nodes)
	}
	checkIncumbent(t, m, r)
}

func TestCancelReturnsBest(t *testing.T) {
	m := hardKnapsack(80, 10, 9)
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	incumbents := 0
	r, err := Solve(ctx, m, Settings{RelGap: 1e-9, Progress: func(p Progress) {
		if p.NewIncumbent {
			incumbents++
			cancel()
		}
	}})
	if err != nil {
		t.Fatal(err)
	}
	if incumbents == 0 {
		t.Fatal("no incumbent reported through Progress")
	}
	if r.Status != Feasible || r.Stopped != Cancelled {
		t.Fatalf("status %v stopped %v, want feasible and cancelled", r.Status, r.Stopped)
	}
	checkIncumbent(t, m, r)
}

// TestStoppedBeforeRootLP: a search stopped before its root LP finished
// (cancelled here, a time limit on a large model) returns its start with
// no bound and counts no node: Nodes counts node LPs solved, and a
// planner reading "1 node" would take the root as done.
func TestStoppedBeforeRootLP(t *testing.T) {
	m := hardKnapsack(80, 10, 9)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	r, err := Solve(ctx, m, Settings{Start: make([]float64, m.NumCols())})
	if err != nil {
		t.Fatal(err)
	}
	if r.Status != Feasible || r.Stopped != Cancelled || r.Nodes != 0 || !math.IsInf(r.Bound, 0) {
		t.Errorf("status %v, stopped %v, %d nodes, bound %v; want feasible, cancelled, 0 nodes and no bound", r.Status, r.Stopped, r.Nodes, r.Bound)
	}
}

func TestProgressReports(t *testing.T) {
	m := readSample(t, "p0033")
	var last Progress
	calls := 0
	r, err := Solve(context.Background(), m, Settings{ProgressInterval: time.Nanosecond, Progress: func(p Progress) {
		calls++
		if p.HasIncumbent && p.Bound > p.Incumbent+1e-9 {
			t.Errorf("minimisation: bound %v above incumbent %v", p.Bound, p.Incumbent)
		}
		if p.Bound < last.Bound-1e-9 {
			t.Errorf("bound fell from %v to %v", last.Bound, p.Bound)
		}
		last = p
	}})
	if err != nil {
		t.Fatal(err)
	}
	if calls == 0 || !last.HasIncumbent {
		t.Fatalf("%d progress calls, last %+v", calls, last)
	}
	if last.Incumbent < r.Objective-1e-9 {
		t.Errorf("progress incumbent %v better than the result %v", last.Incumbent, r.Objective)
	}
}

// TestProgressInRootRounds: each root cut round reports its bound (on
// large models a round takes seconds, and without these reports the
// caller saw nothing between the root LP and the first nodes). The
// Separate callback, asked once per round, marks the rounds; with the
// heuristics off no new incumbent causes a report, and every round after
// the first must have been reported before the next one starts.
func TestProgressInRootRounds(t *testing.T) {
	m := hardKnapsack(16, 3, 1)
	var reports []Progress
	var atRound []int // reports so far when each round separated
	set := Settings{NoHeuristics: true, NodeLimit: 2, ProgressInterval: time.Nanosecond}
	set.Progress = func(p Progress) { reports = append(reports, p) }
	set.Separate = func([]float64) []lp.Row {
		atRound = append(atRound, len(reports))
		return nil
	}
	r, err := Solve(context.Background(), m, set)
	if err != nil {
		t.Fatal(err)
	}
	if len(atRound) < 3 {
		t.Fatalf("%d root rounds; the test needs at least 3", len(atRound))
	}
	for k := 1; k < len(atRound); k++ {
		if atRound[k] <= atRound[k-1] {
			t.Errorf("no progress report between root rounds %d and %d (reports at each: %v)", k-1, k, atRound)
		}
	}
	for k := 1; k < len(reports); k++ {
		if reports[k].Bound > reports[k-1].Bound+1e-9 {
			t.Errorf("maximisation: bound rose from %v to %v", reports[k-1].Bound, reports[k].Bound)
		}
	}
	if len(reports) == 0 || reports[len(reports)-1].Bound < r.Bound-1e-9 {
		t.Errorf("last report's bound below the result's %v: %v", r.Bound, reports)
	}
}

func TestDeterministic(t *testing.T) {
	name := "lseu"
	if testing.Short() {
		name = "p0033"
	}
	m := readSample(t, name)
	a, _ := Solve(context.Background(), m, Settings{Seed: 3})
	b, _ := Solve(context.Background(), m, Settings{Seed: 3})
	if a.Nodes != b.Nodes || a.LPIterations != b.LPIterations || a.Objective != b.Objective {
		t.Fatalf("two runs differ: %d/%d nodes, %d/%d iterations, %v/%v", a.Nodes, b.Nodes, a.LPIterations, b.LPIterations, a.Objective, b.Objective)
	}
	for j := range a.X {
		if a.X[j] != b.X[j] {
			t.Fatalf("x[%d] differs: %v and %v", j, a.X[j], b.X[j])
		}
	}
}

func TestStartAndHeuristic(t *testing.T) {
	m := readSample(t, "p0033")
	full, err := Solve(context.Background(), m, Settings{})
	if err != nil || full.Status != Optimal {
		t.Fatalf("reference solve: %v %v", full.Status, err)
	}
	// With the optimum as the start and a one-node limit, the result is
	// the start itself.
	r, _ := Solve(context.Background(), m, Settings{Start: full.X, NodeLimit: 1, NoHeuristics: true, NoCuts: true})
	if r.X == nil || r.Objective != full.Objective {
		t.Errorf("with start: objective %v, want %v", r.Objective, full.Objective)
	}
	// An infeasible start (every column at 1 violates rows of p0033) is
	// ignored, not returned.
	bad := make([]float64, m.NumCols())
	for j := range bad {
		bad[j] = 1
	}
	if viol, _ := m.MaxViolation(bad, DefaultIntTol); viol <= DefaultFeasTol {
		t.Skip("the all-ones point is feasible; pick another bad start")
	}
	r, _ = Solve(context.Background(), m, Settings{Start: bad, NodeLimit: 1, NoHeuristics: true, NoCuts: true})
	if r.X != nil {
		checkIncumbent(t, m, r)
	}
	// The caller's heuristic proposes the optimum at the root.
	called := 0
	r, _ = Solve(context.Background(), m, Settings{NodeLimit: 1, NoHeuristics: true, NoCuts: true,
		Heuristic: func(x []float64) [][]float64 {
			called++
			if len(x) != m.NumCols() {
				t.Errorf("heuristic got %d values, want %d", len(x), m.NumCols())
			}
			return [][]float64{full.X}
		}})
	if called == 0 || r.Objective != full.Objective {
		t.Errorf("heuristic called %d times, objective %v, want %v", called, r.Objective, full.Objective)
	}
	checkIncumbent(t, m, r)
}

// TestCompletion checks that a candidate whose continuous part is wrong is
// repaired by re-optimising the continuous columns.
func TestCompletion(t *testing.T) {
	// minimise 3y + 2z with y ≥ 1.5·x, z ≥ 4 − y, x integer in [0, 3].
	// By construction: x = 1 gives y = 1.5, z = 2.5, objective 9.5.
	m := lp.NewModel("completion")
	x := m.AddIntCol("x", 0, 0, 3)
	y := m.AddCol("y", 3, 0, lp.Inf)
	z := m.AddCol("z", 2, 0, lp.Inf)
	m.AddRow("link", 0, lp.Inf, []int{y, x}, []float64{1, -1.5})
	m.AddRow("cover", 4, lp.Inf, []int{z, y}, []float64{1, 1})
	r, err := Solve(context.Background(), m, Settings{NodeLimit: 1, NoHeuristics: true, NoCuts: true,
		Start: []float64{1, 0, 0}})
	if err != nil {
		t.Fatal(err)
	}
	checkIncumbent(t, m, r)
	// The optimum (x = 0, y = 0, z = 4, objective 8) may be found by the
	// root LP itself; the completed start must at least be no worse than 9.5.
	if r.Objective > 9.5+1e-9 {
		t.Errorf("objective %v, want ≤ 9.5 (completed start)", r.Objective)
	}
}

// TestUnboundedInteger covers unbounded relaxations decided by a
// feasibility search (values by construction).
func TestUnboundedInteger(t *testing.T) {
	cases := []struct {
		name  string
		build func() *lp.Model
		want  Status
	}{
		{"ray in integers", func() *lp.Model {
			// maximise x + y with x − y = 0, x, y ≥ 0 integer: unbounded.
			m := lp.NewModel("ray")
			m.Sense = lp.Maximize
			x := m.AddIntCol("x", 1, 0, lp.Inf)
			y := m.AddIntCol("y", 1, 0, lp.Inf)
			m.AddRow("eq", 0, 0, []int{x, y}, []float64{1, -1})
			return m
		}, Unbounded},
		{"no integer point", func() *lp.Model {
			// minimise −y with 2x = 1 (no integer x), y ≥ 0 free above.
			m := lp.NewModel("odd")
			x := m.AddIntCol("x", 0, 0, 10)
			y := m.AddCol("y", -1, 0, lp.Inf)
			m.AddRow("odd", 1, 1, []int{x}, []float64{2})
			m.AddRow("y", 0, lp.Inf, []int{y}, []float64{1})
			return m
		}, Infeasible},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			m := tc.build()
			r, err := Solve(context.Background(), m, Settings{})
			if err != nil {
				t.Fatal(err)
			}
			if r.Status != tc.want {
				t.Fatalf("status %v, want %v", r.Status, tc.want)
			}
			if tc.want == Unbounded {
				checkIncumbent(t, m, r)
			}
		})
	}
}

func TestBadInput(t *testing.T) {
	m := lp.NewModel("bad")
	m.AddIntCol("x", 1, 2, 1)
	if _, err := Solve(context.Background(), m, Settings{}); err == nil {
		t.Error("lower > upper: no error")
	}
	m2 := lp.NewModel("ok")
	m2.AddIntCol("x", 1, 0, 1)
	if _, err := Solve(context.Background(), m2, Settings{Start: []float64{1, 2}}); err == nil {
		t.Error("start of the wrong length: no error")
	}
	if _, err := Solve(context.Background(), nil, Settings{}); err == nil {
		t.Error("nil model: no error")
	}
	if _, err := Solve(context.Background(), m2, Settings{Priority: []int{1, 0}}); err == nil {
		t.Error("priorities of the wrong length: no error")
	}
}

// TestTopPriority checks the branching candidates that priorities leave:
// the fractional columns of the highest priority among the fractional
// ones, in order, and all of them without priorities or when all tie.
func TestTopPriority(t *testing.T) {
	s := &search{p: &problem{n: 6}}
	frac := []int{0, 2, 3, 5}
	if got := s.topPriority(frac); !slices.Equal(got, frac) {
		t.Errorf("no priorities: %v, want %v", got, frac)
	}
	s.set.Priority = []int{0, 9, 1, 0, 0, 1} // column 1, the highest, is not fractional
	if got, want := s.topPriority(frac), []int{2, 5}; !slices.Equal(got, want) {
		t.Errorf("priorities %v: %v, want %v", s.set.Priority, got, want)
	}
	s.set.Priority = []int{2, 0, 2, 2, 0, 2}
	if got := s.topPriority(frac); !slices.Equal(got, frac) {
		t.Errorf("tied priorities: %v, want %v", got, frac)
	}
	s.set.Priority = []int{1, 1, 1}
	if got := s.topPriority(frac); !slices.Equal(got, frac) {
		t.Errorf("priorities of the wrong length: %v, want them ignored", got)
	}
}

// TestSmallCases checks corner cases whose answers follow from the
// construction.
func TestSmallCases(t *testing.T) {
	cases := []struct {
		name  string
		build func() *lp.Model
		want  Status
		obj   float64
		x     []float64
	}{
		{"no rows", func() *lp.Model {
			// minimise −x + y, x integer in [0, 3.5], y in [−2, 4]: x = 3, y = −2.
			m := lp.NewModel("no rows")
			m.AddIntCol("x", -1, 0, 3.5)
			m.AddCol("y", 1, -2, 4)
			return m
		}, Optimal, -5, []float64{3, -2}},
		{"no columns", func() *lp.Model {
			m := lp.NewModel("empty")
			m.Constant = 7
			return m
		}, Optimal, 7, []float64{}},
		{"fixed column, maximise", func() *lp.Model {
			m := lp.NewModel("fixed")
			m.Sense = lp.Maximize
			x := m.AddIntCol("x", 2, 1, 1)
			m.AddRow("r", 0, 5, []int{x}, []float64{3})
			return m
		}, Optimal, 2, []float64{1}},
		{"integer bounds cross", func() *lp.Model {
			// x integer in [0.2, 0.8]: no integer inside.
			m := lp.NewModel("cross")
			m.AddIntCol("x", 1, 0.2, 0.8)
			return m
		}, Infeasible, 0, nil},
		{"negative domain, maximise", func() *lp.Model {
			// maximise x + y with x + y ≤ −3.5, x, y integer in [−5, 5]: −4.
			m := lp.NewModel("negative")
			m.Sense = lp.Maximize
			x := m.AddIntCol("x", 1, -5, 5)
			y := m.AddIntCol("y", 1, -5, 5)
			m.AddRow("r", math.Inf(-1), -3.5, []int{x, y}, []float64{1, 1})
			return m
		}, Optimal, -4, nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			m := tc.build()
			r, err := Solve(context.Background(), m, Settings{})
			if err != nil {
				t.Fatal(err)
			}
			if r.Status != tc.want {
				t.Fatalf("status %v, want %v", r.Status, tc.want)
			}
			if tc.want != Optimal {
				return
			}
			checkIncumbent(t, m, r)
			if r.Objective != tc.obj || r.Bound != tc.obj || r.Gap != 0 {
				t.Errorf("objective %v bound %v gap %v, want %v, %v, 0", r.Objective, r.Bound, r.Gap, tc.obj, tc.obj)
			}
			if tc.x != nil && fmt.Sprint(r.X) != fmt.Sprint(tc.x) {
				t.Errorf("x = %v, want %v", r.X, tc.x)
			}
			if r.Nodes != 1 {
				t.Errorf("%d nodes, want 1 (the root)", r.Nodes)
			}
		})
	}
}

// TestSeparateCallback: the caller's cutting planes enter the root LP. The
// model is the odd cycle max x + 1.1y + 1.2z with x+y, y+z, x+z ≤ 1 over
// binaries (weights unequal so that the bound is not rounded to a lattice):
// its LP optimum is 1.65 (every column at 0.5) and its integer optimum 1.2,
// and the clique row x+y+z ≤ 1 holds at every integer point (two ones
// break a pair row). With that row from the callback the root bound is the
// optimum.
func TestSeparateCallback(t *testing.T) {
	m, x, y, z := oddCycle()
	set := Settings{NoHeuristics: true, NoStrongBranching: true}
	plain, err := Solve(context.Background(), m, set)
	if err != nil {
		t.Fatal(err)
	}
	calls := 0
	set.Separate = func(pt []float64) []lp.Row {
		calls++
		if len(pt) != m.NumCols() {
			t.Errorf("separator got %d values, want %d", len(pt), m.NumCols())
		}
		return []lp.Row{{Name: "clique", Lower: -lp.Inf, Upper: 1, Index: []int{x, y, z}, Value: []float64{1, 1, 1}}}
	}
	r, err := Solve(context.Background(), m, set)
	if err != nil {
		t.Fatal(err)
	}
	if calls == 0 {
		t.Fatalf("the separator was never called: %+v", r)
	}
	if math.Abs(r.RootBound-1.2) > 1e-9 || r.Status != Optimal || math.Abs(r.Objective-1.2) > 1e-9 {
		t.Fatalf("with the clique row: root bound %v, status %v, objective %v; want 1.2, optimal, 1.2 (without it the root bound is %v)",
			r.RootBound, r.Status, r.Objective, plain.RootBound)
	}
	// The built-in cuts may close this small gap on their own, so the
	// rows' effect is shown with a row that is not valid: z ≤ 0, violated
	// at the LP point, cuts off the optimum, as the documentation warns,
	// and the best plan left is y alone (1.1).
	set.Separate = func(pt []float64) []lp.Row {
		return []lp.Row{{Name: "not valid", Lower: -lp.Inf, Upper: 0, Index: []int{z}, Value: []float64{1}}}
	}
	bad, err := Solve(context.Background(), m, set)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(bad.Objective-1.1) > 1e-9 {
		t.Fatalf("with the row z ≤ 0: objective %v, want 1.1 (the row did not enter the LP); without rows %v", bad.Objective, plain.Objective)
	}
}

// TestPoolToLP: at a node, the pool's cover cuts and the caller's cuts
// that the LP point violates re-enter the LP; Gomory cuts, cuts already in
// the LP and cuts the point satisfies stay out, and nothing enters once
// maxTreeCuts have. The model is the odd cycle of TestSeparateCallback
// after a root-only search; the pool gets the clique row x+y+z ≤ 1 (valid
// at every integer point) as each kind, and the point is its LP optimum,
// every column at 0.5, which breaks the clique row by 0.5.
func TestPoolToLP(t *testing.T) {
	m, x, y, z := oddCycle()
	set := Settings{NoHeuristics: true, NoCuts: true, NoStrongBranching: true, NodeLimit: 1}.withDefaults()
	s := newSearch(context.Background(), m, set)
	s.run(nil)
	clique := func(kind string) *cut {
		return &cut{idx: []int{x, y, z}, val: []float64{1, 1, 1}, lower: math.Inf(-1), upper: 1, kind: kind, lpRow: -1}
	}
	slack := &cut{idx: []int{x}, val: []float64{1}, lower: math.Inf(-1), upper: 1, kind: "caller", lpRow: -1}
	gomory, cover, caller := clique("gomory"), clique("cover"), clique("caller")
	s.pool = []*cut{gomory, slack, cover, caller}
	rows := s.lps.NumRows()
	pt := []float64{0.5, 0.5, 0.5}
	if !s.poolToLP(pt) {
		t.Fatal("no pool cut entered the LP")
	}
	if cover.lpRow != rows || caller.lpRow != rows+1 || s.lps.NumRows() != rows+2 || len(s.rows) != rows+2 {
		t.Errorf("cover in row %d, caller's cut in row %d, LP rows %d, row infos %d; want %d, %d, %d, %d",
			cover.lpRow, caller.lpRow, s.lps.NumRows(), len(s.rows), rows, rows+1, rows+2, rows+2)
	}
	if gomory.lpRow != -1 || slack.lpRow != -1 {
		t.Errorf("the Gomory cut (row %d) or the satisfied cut (row %d) entered the LP", gomory.lpRow, slack.lpRow)
	}
	if s.poolToLP(pt) {
		t.Error("cuts entered twice")
	}
	again := clique("caller")
	again.val = []float64{1, 1, 2} // another row, broken at pt
	s.pool = append(s.pool, again)
	s.treeCuts = maxTreeCuts
	if s.poolToLP(pt) || again.lpRow != -1 {
		t.Errorf("a cut entered past maxTreeCuts (row %d)", again.lpRow)
	}
}

// oddCycle returns the model max x + 1.1y + 1.2z with x+y, y+z, x+z ≤ 1
// over binaries, and its columns x, y, z: its LP optimum is 1.65 (every
// column at 0.5), its integer optimum 1.2.
func oddCycle() (m *lp.Model, x, y, z int) {
	m = lp.NewModel("triangle")
	m.Sense = lp.Maximize
	x = m.AddIntCol("x", 1, 0, 1)
	y = m.AddIntCol("y", 1.1, 0, 1)
	z = m.AddIntCol("z", 1.2, 0, 1)
	for _, p := range [][2]int{{x, y}, {y, z}, {x, z}} {
		m.AddRow("pair", -lp.Inf, 1, p[:], []float64{1, 1})
	}
	return m, x, y, z
}

// TestImproveCallback checks the plumbing of Settings.Improve on a small
// knapsack whose root LP is fractional: with the node limit at the root and
// the built-in heuristics and cuts off, the search keeps its start point
// unless the callback's better point is taken. The start breaks the row of
// the continuous column, so it is completed by LP and the callback gets
// that LP's basis; a point the callback returns that breaks a row is
// refused.
func TestImproveCallback(t *testing.T) {
	m := linkedKnapsack()
	c, s := 2, 3 // columns a, b, c, s
	set := Settings{NoHeuristics: true, NoCuts: true, NoStrongBranching: true, NodeLimit: 1, Start: []float64{0, 0, 1, 1}}
	plain, err := Solve(context.Background(), m, set)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(plain.Objective-3.05) > 1e-9 {
		t.Fatalf("without the callback: objective %v, want the completed start 3.05", plain.Objective)
	}
	var got [][]float64
	var bases []*lp.Basis
	set.Improve = func(_ context.Context, inc []float64, basis *lp.Basis) []float64 {
		got, bases = append(got, inc), append(bases, basis)
		return []float64{1, 0, 1, 1} // 5 + 3 + 0.1: the optimum
	}
	r, err := Solve(context.Background(), m, set)
	if err != nil {
		t.Fatal(err)
	}
	if len(got) == 0 || math.Abs(got[0][c]-1) > 1e-9 || math.Abs(got[0][s]-0.5) > 1e-9 {
		t.Fatalf("callback calls %v, want the completed start (0, 0, 1, 0.5) first", got)
	}
	if bases[0] == nil || len(bases[0].Cols) != m.NumCols() || len(bases[0].Rows) != m.NumRows() {
		t.Fatalf("callback got basis %v, want the completion LP's", bases[0])
	}
	if math.Abs(r.Objective-8.1) > 1e-9 {
		t.Fatalf("with the callback: objective %v, want 8.1", r.Objective)
	}
	set.Improve = func(_ context.Context, inc []float64, basis *lp.Basis) []float64 {
		return []float64{1, 1, 1, 1} // weight 6 > 4.5
	}
	bad, err := Solve(context.Background(), m, set)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(bad.Objective-3.05) > 1e-9 {
		t.Fatalf("with an infeasible improvement: objective %v, want 3.05", bad.Objective)
	}
}

// greedyAdd returns a copy of x (a 0/1 point of a hardKnapsack model) with
// every item that still fits added, in column order, or nil when none fits.
func greedyAdd(m *lp.Model, x []float64) []float64 {
	y := append([]float64(nil), x...)
	_, load := m.Evaluate(y)
	cols := m.Columns()
	added := false
	for j := range y {
		if y[j] > 0.5 {
			continue
		}
		fits := true
		for k := cols.Start[j]; k < cols.Start[j+1]; k++ {
			if i := cols.Index[k]; load[i]+cols.Value[k] > m.RowUpper[i] {
				fits = false
			}
		}
		if !fits {
			continue
		}
		y[j], added = 1, true
		for k := cols.Start[j]; k < cols.Start[j+1]; k++ {
			load[cols.Index[k]] += cols.Value[k]
		}
	}
	if !added {
		return nil
	}
	return y
}

// TestImproveTimingIndependent checks that the search takes Improve's
// answer at fixed points, whatever the time Improve takes: with answers
// that arrive at once and answers that arrive 30 ms late (Improve runs
// beside the search), the search takes the same path and ends with the
// same point.
func TestImproveTimingIndependent(t *testing.T) {
	m := hardKnapsack(40, 5, 3)
	m.Columns() // built here, not by the Improve goroutines
	run := func(delay time.Duration) (Result, int, int) {
		calls, gains := 0, 0
		set := Settings{NodeLimit: 300, RelGap: 1e-9}
		set.Improve = func(_ context.Context, inc []float64, _ *lp.Basis) []float64 {
			calls++
			time.Sleep(delay)
			y := greedyAdd(m, inc)
			if y != nil {
				gains++
			}
			return y
		}
		r, err := Solve(context.Background(), m, set)
		if err != nil {
			t.Fatal(err)
		}
		checkIncumbent(t, m, r)
		return r, calls, gains
	}
	quick, calls, gains := run(0)
	if gains == 0 {
		t.Fatalf("Improve improved none of its %d incumbents: the test shows nothing", calls)
	}
	late, lateCalls, _ := run(30 * time.Millisecond)
	if late.Nodes != quick.Nodes || late.LPIterations != quick.LPIterations || late.Objective != quick.Objective || lateCalls != calls {
		t.Errorf("late answers: %d nodes, %d iterations, objective %v, %d calls; at once: %d, %d, %v, %d",
			late.Nodes, late.LPIterations, late.Objective, lateCalls, quick.Nodes, quick.LPIterations, quick.Objective, calls)
	}
}

// TestHelperBetweenRounds: with a time limit, a helper that has
// answered is followed, between root cut rounds, by Improve on the new
// incumbent (on the 50-site 10-year synthetic case the rounds fill most
// of a 60 s limit, and the helper would sit idle); without one, the next
// Improve waits for the next call point. The model is a knapsack with
// three rows, started from the empty plan (objective 0); Improve's first
// answer is the greedy fill. In the first round the separation waits
// until that answer is ready, so that the search takes it at that round's
// end whatever the timing.
func TestHelperBetweenRounds(t *testing.T) {
	m := hardKnapsack(30, 3, 1)
	greedy := make([]float64, m.NumCols())
	for j := range greedy {
		greedy[j] = 1
		_, act := m.Evaluate(greedy)
		for i, a := range act {
			if a > m.RowUpper[i] {
				greedy[j] = 0
				break
			}
		}
	}
	want, _ := m.Evaluate(greedy)
	run := func(limit time.Duration) (inc, improved float64, rounds int) {
		// NodeLimit 2: the root (node 1) with its cut rounds, then a node.
		set := Settings{NoHeuristics: true, NoStrongBranching: true, NoRINS: true, NodeLimit: 2, TimeLimit: limit}
		calls := 0
		set.Improve = func(context.Context, []float64, *lp.Basis) []float64 {
			calls++ // on the helper goroutine, one call at a time
			if calls == 1 {
				return greedy
			}
			return nil
		}
		var s *search
		inc, improved = math.NaN(), math.NaN()
		set.Separate = func([]float64) []lp.Row {
			if s.rootX != nil { // the tree
				return nil
			}
			rounds++
			switch rounds {
			case 1:
				for wait := time.Now(); s.helper != nil && len(s.helper) == 0; {
					if time.Since(wait) > 10*time.Second {
						t.Fatal("Improve gave no answer in 10 s")
					}
					time.Sleep(time.Millisecond)
				}
			case 2:
				inc, improved = s.incObj, s.improvedObj
			}
			return nil
		}
		s = newSearch(context.Background(), m, set.withDefaults())
		s.run([][]float64{make([]float64, m.NumCols())})
		return inc, improved, rounds
	}
	// The search's own sense is a minimisation: the greedy fill is −want.
	inc, improved, rounds := run(time.Hour)
	if rounds < 2 || math.Abs(inc+want) > 1e-9 || improved != inc {
		t.Errorf("with a time limit, second round: incumbent %v, Improve last saw %v (%d rounds); want %v for both", inc, improved, rounds, -want)
	}
	inc, improved, rounds = run(0)
	if rounds < 2 || improved != 0 {
		t.Errorf("without a time limit, second round: incumbent %v, Improve last saw %v (%d rounds); want Improve at 0 still", inc, improved, rounds)
	}
}

// TestPollHelper checks how the search takes the helper goroutine's
// answers between root cut rounds: pollHelper takes what is ready, without
// waiting, and only when the search has a time limit; an answer that is
// not the last leaves the helper running; joinHelper takes every answer up
// to the last. The helper is a stand-in channel; the model is the
// knapsack of TestImproveCallback after a root-only search from the start
// that completes to 3.05, and the answers hold points of objective 5.1
// (a, s) and 8.1 (a, c, s: the optimum).
func TestPollHelper(t *testing.T) {
	m := linkedKnapsack()
	set := Settings{NoHeuristics: true, NoCuts: true, NoStrongBranching: true, NodeLimit: 1}.withDefaults()
	start := [][]float64{{0, 0, 1, 1}}
	better, best := []float64{1, 0, 0, 1}, []float64{1, 0, 1, 1}
	helper := func(s *search) (chan helperAnswer, *int) {
		ch, stops := make(chan helperAnswer, 2), 0
		s.helper, s.stopHelper = ch, func() { stops++ }
		return ch, &stops
	}
	s := newSearch(context.Background(), m, set)
	s.run(start)
	if math.Abs(s.incObj+3.05) > 1e-9 {
		t.Fatalf("incumbent %v after the root, want −3.05 (internal sense)", s.incObj)
	}
	ch, stops := helper(s)
	ch <- helperAnswer{points: [][]float64{better}}
	s.pollHelper() // no time limit: the path must not depend on timing
	if s.helper == nil || len(ch) != 1 || math.Abs(s.incObj+3.05) > 1e-9 {
		t.Fatalf("without a time limit pollHelper took an answer (incumbent %v)", s.incObj)
	}
	s.deadline = time.Now().Add(time.Hour)
	s.pollHelper()
	if math.Abs(s.incObj+5.1) > 1e-9 {
		t.Fatalf("incumbent %v after polling, want −5.1", s.incObj)
	}
	if s.helper == nil || *stops != 0 {
		t.Fatal("an answer that is not the last ended the helper")
	}
	s.pollHelper() // nothing ready: it must not wait
	ch <- helperAnswer{points: [][]float64{best}, rinsIters: 7, last: true}
	iters := s.rinsIters
	s.pollHelper()
	if s.helper != nil || *stops != 1 || s.rinsIters != iters+7 || math.Abs(s.incObj+8.1) > 1e-9 {
		t.Fatalf("after the last answer: helper running %v, %d stops, %d sub-MIP iterations (want %d), incumbent %v (want −8.1)",
			s.helper != nil, *stops, s.rinsIters, iters+7, s.incObj)
	}

	s = newSearch(context.Background(), m, set)
	s.run(start)
	ch, stops = helper(s)
	ch <- helperAnswer{points: [][]float64{best}}
	ch <- helperAnswer{points: [][]float64{better}, last: true}
	s.joinHelper(false)
	if s.helper != nil || *stops != 1 || math.Abs(s.incObj+8.1) > 1e-9 {
		t.Fatalf("joinHelper: helper running %v, %d stops, incumbent %v (want −8.1)", s.helper != nil, *stops, s.incObj)
	}
}

// TestRootRoundsPollHelper checks that the root cut rounds poll the
// helper when the search has a time limit: an answer made ready during
// the first round (the separator installs a stand-in helper holding the
// point x = 1) is the incumbent by the time the second round calls the
// separator again; without a time limit it is taken only at the call
// point after the rounds. The model is TestSeparateCallback's odd cycle.
func TestRootRoundsPollHelper(t *testing.T) {
	m, x, y, z := oddCycle()
	for _, limit := range []time.Duration{0, time.Hour} {
		var s *search
		var seen []bool // per separator call: whether an incumbent was known
		set := Settings{NoHeuristics: true, NoStrongBranching: true, TimeLimit: limit}
		set.Separate = func(pt []float64) []lp.Row {
			seen = append(seen, s.incX != nil)
			if len(seen) == 1 {
				ch := make(chan helperAnswer, 1)
				ch <- helperAnswer{points: [][]float64{{1, 0, 0}}, last: true}
				s.helper, s.stopHelper = ch, func() {}
			}
			return []lp.Row{{Name: "clique", Lower: -lp.Inf, Upper: 1, Index: []int{x, y, z}, Value: []float64{1, 1, 1}}}
		}
		s = newSearch(context.Background(), m, set.withDefaults())
		r := s.run(nil)
		if len(seen) < 2 {
			t.Fatalf("time limit %v: the separator was called %d times, want two root rounds at least", limit, len(seen))
		}
		if want := limit > 0; seen[1] != want {
			t.Errorf("time limit %v: incumbent known at the second round %v, want %v", limit, seen[1], want)
		}
		if r.X == nil || r.Objective < 1-1e-9 {
			t.Errorf("time limit %v: the helper's point was not taken at all (objective %v)", limit, r.Objective)
		}
	}
}

// TestImproveStoppedAtTimeLimit checks that a search stopped by its time
// limit cancels the context of a running Improve and returns: here
// Improve answers only once its context ends.
func TestImproveStoppedAtTimeLimit(t *testing.T) {
	m := hardKnapsack(80, 10, 7)
	limit := 200 * time.Millisecond
	var ended []bool
	set := Settings{TimeLimit: limit, RelGap: 1e-9}
	set.Improve = func(ctx context.Context, inc []float64, _ *lp.Basis) []float64 {
		<-ctx.Done()
		ended = append(ended, ctx.Err() != nil)
		return nil
	}
	start := time.Now()
	r, err := Solve(context.Background(), m, set)
	took := time.Since(start)
	if err != nil {
		t.Fatal(err)
	}
	if took > limit+time.Second {
		t.Errorf("search took %v with a time limit of %v", took, limit)
	}
	if r.Status != Feasible || r.Stopped != TimeLimit {
		t.Errorf("status %v stopped %v, want feasible at the time limit", r.Status, r.Stopped)
	}
	if len(ended) != 1 || !ended[0] {
		t.Errorf("Improve calls ended %v, want one, ended by its context", ended)
	}
}

// TestLateStart checks that a start handed over after the root LP
// (Settings.LateStart) gives the same search as the same point given as
// Start: the root LP does not depend on the incumbent. The knapsack of
// TestImproveCallback, with a feasible start (one that needs completing
// by LP is completed from the root LP's basis when it comes late, so its
// iterations differ).
func TestLateStart(t *testing.T) {
	m := linkedKnapsack()
	start := []float64{0, 0, 1, 0}
	for _, set := range []Settings{
		{NoHeuristics: true, NoCuts: true, NoStrongBranching: true, NodeLimit: 1},
		{},
	} {
		early := set
		early.Start = start
		want, err := Solve(context.Background(), m, early)
		if err != nil {
			t.Fatal(err)
		}
		calls := 0
		late := set
		late.LateStart = func() []float64 { calls++; return start }
		got, err := Solve(context.Background(), m, late)
		if err != nil {
			t.Fatal(err)
		}
		if calls != 1 {
			t.Errorf("LateStart called %d times, want once", calls)
		}
		if got.Objective != want.Objective || got.Nodes != want.Nodes || got.LPIterations != want.LPIterations || got.Status != want.Status {
			t.Errorf("with LateStart: %v, objective %v, %d nodes, %d iterations; with Start: %v, %v, %d, %d",
				got.Status, got.Objective, got.Nodes, got.LPIterations, want.Status, want.Objective, want.Nodes, want.LPIterations)
		}
	}
}

// linkedKnapsack returns max 5a + 4b + 3c + 0.1s over binaries a, b, c
// with 2a + 3b + c ≤ 4.5, and s ∈ [0, 1] with s − a ≤ 0.5 (columns in that
// order): its LP relaxation is fractional, its optimum 8.1 at (1, 0, 1, 1).
func linkedKnapsack() *lp.Model {
	m := lp.NewModel("knapsack")
	m.Sense = lp.Maximize
	a := m.AddIntCol("a", 5, 0, 1)
	b := m.AddIntCol("b", 4, 0, 1)
	c := m.AddIntCol("c", 3, 0, 1)
	s := m.AddCol("s", 0.1, 0, 1)
	m.AddRow("weight", -lp.Inf, 4.5, []int{a, b, c}, []float64{2, 3, 1})
	m.AddRow("link", -lp.Inf, 0.5, []int{s, a}, []float64{1, -1})
	return m
}

// TestTreeSeparate: at a node, the caller's new rows that the LP point
// violates enter the pool and the LP, up to maxTreeSeparated over the
// tree; rows past what the cap leaves stay in the pool, past the cap (or
// with NoCuts) the callback is not asked. The model is the odd cycle of
// TestSeparateCallback after a root-only search, and the point its LP
// optimum, every column at 0.5.
func TestTreeSeparate(t *testing.T) {
	m, x, y, z := oddCycle()
	set := Settings{NoHeuristics: true, NoCuts: true, NoStrongBranching: true, NodeLimit: 1}.withDefaults()
	s := newSearch(context.Background(), m, set)
	s.run(nil)
	s.set.NoCuts = false
	calls := 0
	give := [][]float64{{1, 1, 1}} // the clique row x+y+z ≤ 1
	s.set.Separate = func([]float64) []lp.Row {
		calls++
		var out []lp.Row
		for _, v := range give {
			out = append(out, lp.Row{Name: "row", Lower: -lp.Inf, Upper: 1, Index: []int{x, y, z}, Value: v})
		}
		return out
	}
	rows := s.lps.NumRows()
	pt := []float64{0.5, 0.5, 0.5}
	if !s.treeSeparate(pt) {
		t.Fatal("the caller's row did not enter the LP")
	}
	last := s.pool[len(s.pool)-1]
	if s.lps.NumRows() != rows+1 || len(s.rows) != rows+1 || s.sepCuts != 1 || last.lpRow != rows || last.kind != "caller" {
		t.Errorf("LP rows %d, row infos %d, separated %d, the cut in row %d as %q; want %d, %d, 1, %d, caller",
			s.lps.NumRows(), len(s.rows), s.sepCuts, last.lpRow, last.kind, rows+1, rows+1, rows)
	}
	if s.treeSeparate(pt) {
		t.Error("the same row entered twice")
	}
	// Two new rows broken at pt, room for one: the second waits in the pool.
	give = [][]float64{{1, 1, 2}, {2, 1, 1}}
	s.sepCuts = maxTreeSeparated - 1
	if !s.treeSeparate(pt) {
		t.Fatal("no row entered with room for one")
	}
	waiting := s.pool[len(s.pool)-1]
	if s.lps.NumRows() != rows+2 || s.sepCuts != maxTreeSeparated || waiting.val[0] != 2 || waiting.lpRow != -1 {
		t.Errorf("LP rows %d, separated %d, the second row %v in LP row %d; want %d, %d, [2 1 1], −1",
			s.lps.NumRows(), s.sepCuts, waiting.val, waiting.lpRow, rows+2, maxTreeSeparated)
	}
	asked := calls
	give = [][]float64{{1, 2, 1}}
	if s.treeSeparate(pt) || calls != asked {
		t.Errorf("past the cap the callback was asked (%d calls, %d before)", calls, asked)
	}
	s.sepCuts = 0
	s.set.NoCuts = true
	if s.treeSeparate(pt) || calls != asked {
		t.Errorf("with NoCuts the callback was asked (%d calls, %d before)", calls, asked)
	}
}

// TestSeparateInTree: the search asks the caller for cuts at its first
// nodes, not only in the root rounds, and below treeSeparateDepth
// where a plunge starts, at most maxStartSeparations times; a row it
// gives there enters the LP. The model is a three-row 0/1 knapsack
// (hardKnapsack) whose search takes more nodes than there are of depth 3
// or less (15). First the callback gives nothing: after the root rounds
// it is asked at most once per node of depth ≤ 3 plus once per plunge
// start tried below (plungeStartSeparate), and some are. Then, at tree
// nodes only, it gives the row "objective ≤ the optimum" (the optimum
// found by enumeration, so the row holds at every integer point): the row
// enters the LP once, the optimum stays and the search takes fewer nodes.
func TestSeparateInTree(t *testing.T) {
	m := hardKnapsack(16, 3, 1)
	st, opt := bruteForce(m)
	if st != Optimal {
		t.Fatalf("enumeration: %v", st)
	}
	all := make([]int, m.NumCols())
	for j := range all {
		all[j] = j
	}
	objRow := lp.Row{Name: "objective", Lower: -lp.Inf, Upper: opt, Index: all, Value: m.Obj}
	run := func(give bool) (r Result, s *search, rootCalls, treeCalls int) {
		set := Settings{NoHeuristics: true, NoStrongBranching: true, RelGap: 1e-9}
		set.Separate = func(x []float64) []lp.Row {
			if s.rootX == nil { // set once the root rounds are over
				rootCalls++
				return nil
			}
			treeCalls++
			if give {
				return []lp.Row{objRow}
			}
			return nil
		}
		s = newSearch(context.Background(), m, set.withDefaults())
		r = s.run(nil)
		return r, s, rootCalls, treeCalls
	}
	plain, ps, _, treeCalls := run(false)
	if plain.Status != Optimal || math.Abs(plain.Objective-opt) > 1e-9 {
		t.Fatalf("status %v, objective %v; want optimal, %v", plain.Status, plain.Objective, opt)
	}
	starts := ps.startSeparations
	if treeCalls <= starts || treeCalls > 15+starts || starts == 0 || starts > maxStartSeparations || plain.Nodes <= 15 {
		t.Errorf("asked at %d tree nodes of %d, %d of them plunge starts below depth %d; want 1 to 15 above, and 1 to %d below, in more than 15 nodes",
			treeCalls, plain.Nodes, starts, treeSeparateDepth, maxStartSeparations)
	}
	r, s, _, _ := run(true)
	if r.Status != Optimal || math.Abs(r.Objective-opt) > 1e-9 {
		t.Fatalf("with the row: status %v, objective %v; want optimal, %v", r.Status, r.Objective, opt)
	}
	if s.sepCuts+s.startCuts != 1 || r.Nodes >= plain.Nodes {
		t.Errorf("with the row: %d rows entered at nodes, %d nodes; want 1, fewer than %d", s.sepCuts+s.startCuts, r.Nodes, plain.Nodes)
	}
}

// TestImproveNoWaitUnderTimeLimit: with a time limit the search does not
// wait for an Improve still at work, neither at a call point nor at its
// end. Improve here runs until its context ends; the search must still
// prove the knapsack optimal (the proof needs nodes past the next call
// point) and end, stopping Improve, long before its 20 s limit (it takes
// milliseconds; waiting at either place would take the whole limit).
// Without a time limit the search waits, so that its path does not
// depend on timing (TestImproveTimingIndependent).
func TestImproveNoWaitUnderTimeLimit(t *testing.T) {
	m := hardKnapsack(40, 5, 3)
	m.Columns()
	calls := 0
	set := Settings{RelGap: 1e-9, TimeLimit: 20 * time.Second, HeuristicFreq: 1}
	set.Improve = func(ctx context.Context, _ []float64, _ *lp.Basis) []float64 {
		calls++
		<-ctx.Done()
		return nil
	}
	start := time.Now()
	r, err := Solve(context.Background(), m, set)
	if err != nil {
		t.Fatal(err)
	}
	checkIncumbent(t, m, r)
	if took := time.Since(start); r.Status != Optimal || r.Nodes < 10 || calls != 1 || took > set.TimeLimit/2 {
		t.Errorf("status %v after %d nodes and %v, Improve called %d times; want optimal, more than a few nodes, one call that never ended on its own, and far less than the limit",
			r.Status, r.Nodes, took, calls)
	}
}

// TestImpliedCompletion: a column that an equality row over integer
// columns fixes (k = y1 + 2·y2) is found by findImplied, and a start that
// left it stale is completed with it free, not lost. By construction: max
// 5·y1 + 4·y2 with 6·y1 + 4·y2 ≤ 9 has its integer optimum 8 at y2 = 2,
// where k = 4; the LP optimum (y2 = 2.25) is fractional, so with one node
// and no heuristics the search has only the start. Columns that an
// equality does not fix whole stay unmarked: q, equal to a continuous
// column, and r, in two rows.
func TestImpliedCompletion(t *testing.T) {
	m := lp.NewModel("implied")
	m.Sense = lp.Maximize
	y1 := m.AddIntCol("y1", 5, 0, 3)
	y2 := m.AddIntCol("y2", 4, 0, 3)
	k := m.AddIntCol("k", 0, 0, 9)
	q := m.AddIntCol("q", 0, 0, 9)
	z := m.AddCol("z", 0, 0, 9)
	r := m.AddIntCol("r", 0, 0, 9)
	m.AddRow("knap", -lp.Inf, 9, []int{y1, y2}, []float64{6, 4})
	m.AddRow("count", 0, 0, []int{k, y1, y2}, []float64{1, -1, -2})
	m.AddRow("cont", 0, 0, []int{q, z}, []float64{1, -1})
	m.AddRow("r1", 0, 0, []int{r, y1}, []float64{1, -1})
	m.AddRow("r2", -lp.Inf, 3, []int{r, y2}, []float64{1, 1})
	p, ok := newProblem(m, DefaultIntTol)
	if !ok {
		t.Fatal("newProblem: infeasible bounds")
	}
	for j, want := range []bool{false, false, true, false, false, false} {
		if got := p.implied != nil && p.implied[j]; got != want {
			t.Errorf("column %s: implied %v, want %v", m.ColName[j], got, want)
		}
	}
	start := []float64{0, 2, 0, 0, 0, 0} // k left at 0: violates "count"
	res, err := Solve(context.Background(), m, Settings{Start: start, NodeLimit: 1, NoHeuristics: true, NoCuts: true})
	if err != nil {
		t.Fatal(err)
	}
	if res.X == nil || res.Objective != 8 || res.X[k] != 4 {
		t.Fatalf("status %v objective %v x %v: want the start completed to k = 4, objective 8", res.Status, res.Objective, res.X)
	}
	checkIncumbent(t, m, res)
}
