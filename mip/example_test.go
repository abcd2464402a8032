package mip_test

import (
	"context"
	"fmt"
	"math"

	"netstage/lp"
	"netstage/mip"
)

// A small capital budgeting problem: pick projects (0/1) to maximise value
// within a budget, where project 2 needs project 0. By hand: projects 0
// and 1 (cost 12, value 19) beat every other affordable set.
func ExampleSolve() {
	m := lp.NewModel("projects")
	m.Sense = lp.Maximize
	value := []float64{8, 11, 6, 4}
	cost := []float64{5, 7, 4, 3}
	cols := make([]int, len(value))
	for j := range value {
		cols[j] = m.AddIntCol(fmt.Sprintf("p%d", j), value[j], 0, 1)
	}
	m.AddRow("budget", math.Inf(-1), 14, cols, cost)
	m.AddRow("needs", math.Inf(-1), 0, []int{cols[2], cols[0]}, []float64{1, -1})

	r, err := mip.Solve(context.Background(), m, mip.Settings{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(r.Status, r.Objective, r.X)
	// Output: optimal 19 [1 1 0 0]
}

// A Solver takes candidate solutions before the search, for instance a plan
// known from an earlier run.
func ExampleSolver_AddSolution() {
	m := lp.NewModel("cover")
	// minimise x + y + z with x + y ≥ 1, y + z ≥ 1, x + z ≥ 1 (binaries)
	x := m.AddIntCol("x", 1, 0, 1)
	y := m.AddIntCol("y", 1, 0, 1)
	z := m.AddIntCol("z", 1, 0, 1)
	m.AddRow("xy", 1, lp.Inf, []int{x, y}, []float64{1, 1})
	m.AddRow("yz", 1, lp.Inf, []int{y, z}, []float64{1, 1})
	m.AddRow("xz", 1, lp.Inf, []int{x, z}, []float64{1, 1})

	sv, err := mip.NewSolver(m, mip.Settings{})
	if err != nil {
		fmt.Println(err)
		return
	}
	sv.AddSolution([]float64{1, 1, 1})
	r, _ := sv.Solve(context.Background())
	fmt.Println(r.Status, r.Objective)
	// Output: optimal 2
}

// Progress reports come with every new incumbent and at an interval; a
// Heuristic can propose points built from the LP solution.
func ExampleSettings_heuristic() {
	m := lp.NewModel("round up")
	// minimise 3a + 5b with 2a + 4b ≥ 7, a, b integer in [0, 10]
	a := m.AddIntCol("a", 3, 0, 10)
	b := m.AddIntCol("b", 5, 0, 10)
	m.AddRow("need", 7, lp.Inf, []int{a, b}, []float64{2, 4})

	set := mip.Settings{
		Heuristic: func(x []float64) [][]float64 {
			// round every value up: feasible for this ≥ row
			y := make([]float64, len(x))
			for j, v := range x {
				y[j] = float64(int(v + 0.999999))
			}
			return [][]float64{y}
		},
	}
	r, _ := mip.Solve(context.Background(), m, set)
	fmt.Println(r.Status, r.Objective, r.X)
	// Output: optimal 10 [0 2]
}
