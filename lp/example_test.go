package lp_test

import (
	"context"
	"fmt"
	"math"
	"os"
	"strings"

	"netstage/lp"
)

// A small production plan: maximise 3x + 2y subject to x + y ≤ 4,
// x + 3y ≤ 7, x ≤ 3.
func Example() {
	m := lp.NewModel("plan")
	m.Sense = lp.Maximize
	x := m.AddCol("x", 3, 0, 3)
	y := m.AddCol("y", 2, 0, lp.Inf)
	m.AddRow("capacity", math.Inf(-1), 4, []int{x, y}, []float64{1, 1})
	m.AddRow("labour", math.Inf(-1), 7, []int{x, y}, []float64{1, 3})
	r, err := lp.Solve(context.Background(), m, lp.Settings{})
	if err != nil {
		panic(err)
	}
	fmt.Printf("%v: objective %.4g at x=%.4g y=%.4g\n", r.Status, r.Objective, r.X[x], r.X[y])
	fmt.Printf("dual of capacity %.4g, reduced cost of x %.4g\n", r.Dual[0], r.ReducedCost[x])
	// Output:
	// optimal: objective 11 at x=3 y=1
	// dual of capacity 2, reduced cost of x 1
}

// A Solver keeps its basis: after a bound change (a branch), the re-solve
// starts from the previous optimum.
func ExampleSolver_SetColBounds() {
	m := lp.NewModel("branch")
	x := m.AddCol("x", -1, 0, 10)
	y := m.AddCol("y", -1, 0, 10)
	m.AddRow("r", math.Inf(-1), 3.5, []int{x, y}, []float64{2, 1})
	m.AddRow("s", math.Inf(-1), 2.5, []int{x, y}, []float64{-1, 1})
	sv, err := lp.NewSolver(m, lp.Settings{})
	if err != nil {
		panic(err)
	}
	r := sv.Solve(context.Background())
	fmt.Printf("root: %v %.4g, x=%.4g\n", r.Status, r.Objective, r.X[x])
	sv.SetColBounds(x, 0, 0) // branch x ≤ 0
	r = sv.Solve(context.Background())
	fmt.Printf("x ≤ 0: %v %.4g, y=%.4g\n", r.Status, r.Objective, r.X[y])
	// Output:
	// root: optimal -3.167, x=0.3333
	// x ≤ 0: optimal -2.5, y=2.5
}

// Tableau rows give Gomory and MIR cuts: every point satisfying the rows
// obeys Σ row[k]·z[k] = 0 with z = (x, row activities).
func ExampleSolver_TableauRow() {
	m := lp.NewModel("cut")
	x := m.AddCol("x", -1, 0, lp.Inf)
	y := m.AddCol("y", -1, 0, lp.Inf)
	m.AddRow("r", math.Inf(-1), 4, []int{x, y}, []float64{2, 2})
	sv, _ := lp.NewSolver(m, lp.Settings{})
	sv.Solve(context.Background())
	row := make([]float64, sv.NumCols()+sv.NumRows())
	basic, value := sv.TableauRow(0, row)
	fmt.Printf("basic variable %d = %.4g, row %.4g\n", basic, value, row)
	// Output:
	// basic variable 0 = 2, row [1 1 -0.5]
}

// ReadMPS reads fixed or free MPS; the objective constant is minus the RHS
// of the objective row.
func ExampleReadMPS() {
	src := `NAME tiny
ROWS
 N obj
 G demand
COLUMNS
 x obj 2 demand 1
 y obj 3 demand 1
RHS
 RHS obj -10 demand 5
BOUNDS
 UP BND x 4
ENDATA
`
	m, err := lp.ReadMPS(strings.NewReader(src), lp.MPSAuto)
	if err != nil {
		panic(err)
	}
	r, _ := lp.Solve(context.Background(), m, lp.Settings{})
	fmt.Printf("%d×%d, constant %v, optimum %v\n", m.NumRows(), m.NumCols(), m.Constant, r.Objective)
	// Output:
	// 1×2, constant 10, optimum 21
}

// WriteMPS writes free MPS with explicit bounds on integer columns.
func ExampleWriteMPS() {
	m := lp.NewModel("w")
	k := m.AddIntCol("k", 1, 0, lp.Inf)
	m.AddRow("r", 2, lp.Inf, []int{k}, []float64{3})
	if err := lp.WriteMPS(os.Stdout, m); err != nil {
		panic(err)
	}
	// Output:
	// NAME w
	// ROWS
	//  N  obj
	//  G  r
	// COLUMNS
	//     MARKER0   'MARKER'                 'INTORG'
	//     k         obj       1
	//     k         r         3
	//     MARKER1   'MARKER'                 'INTEND'
	// RHS
	//     RHS       r         2
	// BOUNDS
	//  LO BND       k         0
	//  PL BND       k
	// ENDATA
}
