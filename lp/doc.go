// Package lp solves linear programs with a sparse bounded-variable revised
// simplex method, and reads and writes them in MPS format.
//
// The problem form is
//
//	minimise (or maximise) c·x + constant
//	subject to rowLower ≤ A·x ≤ rowUpper, colLower ≤ x ≤ colUpper,
//
// with any bound allowed to be infinite. Nothing is converted to standard
// form: each row gets a slack and every variable keeps its own bounds, so
// branch-and-bound can change bounds and re-solve from the previous basis.
//
// # Variables and signs
//
// A Solver numbers the columns 0 … n−1 and the row slacks n … n+m−1; the
// slack of row i is its activity s_i = a_i·x, so the constraints read
// [A | −I]·(x, s) = 0 with rowLower ≤ s ≤ rowUpper. Results are in the
// model's own units and sense: ReducedCost = c − Aᵀ·Dual, and Dual[i] is the
// change of the optimal objective per unit increase of row i's active bound.
// For a minimisation, a column at its lower bound has ReducedCost ≥ 0 and a
// binding ≥ row has Dual ≥ 0; for a maximisation both signs flip.
// Solver.TableauRow returns rows of B⁻¹[A | −I] for cutting planes.
//
// # Method
//
// The dual simplex method is the main engine (after a bound change or a new
// row the old basis stays dual feasible). A basis that is not dual feasible
// is first repaired by flipping boxed variables to the bound their reduced
// cost asks for; otherwise by solving, with the same dual simplex, an
// auxiliary problem whose bounds are boxes around zero. Costs are perturbed
// slightly on a cold start against dual degeneracy, and the primal simplex
// method cleans up once the perturbation is removed; it also finds unbounded
// rays. The dual ratio test flips boxed variables to their other bound
// while that keeps the leaving variable infeasible (bound flipping, "long
// step"), then picks the largest pivot within Harris' tolerance; the primal
// ratio test is Harris' two-pass test. Leaving rows are priced by dual
// steepest edge, entering columns of the primal simplex by Devex; with
// Settings.SecondCore, a large LP's steepest-edge solve runs on a second
// goroutine beside the rest of the iteration (aside.go), with the same
// arithmetic. The dual simplex forms its pivot row from a row-wise copy of A that lists each
// row's nonbasic entries first (partition.go), so basic columns cost
// nothing there. After a
// cost change the primal simplex continues from the old, primal feasible
// basis. Infeasibility and unboundedness are reported only with a
// certificate (Result.Ray) that the solver has checked. Long runs of degenerate pivots in an unperturbed solve
// switch the perturbation on. A solve stopped at a limit in the dual
// simplex takes the true costs back when its basis stays dual feasible
// under them, and then reports its objective as a bound on the optimum
// (Result.ObjectiveIsBound). The basis is factorised as sparse LU (singletons
// first, then Markowitz pivoting with threshold 0.1) with Forrest–Tomlin
// updates and a refactorisation every 100 updates, when the updates hold
// more nonzeros than the factors, when the pivot seen from the row and
// from the column disagree, or when an update's new diagonal disagrees
// with the pivot. The model is scaled by
// geometric row/column passes rounded to powers of two. Memory is
// proportional to the nonzeros of A and of the factors; no dense m×n array
// is formed.
//
// Literature: Forrest and Tomlin, Updated triangular factors of the basis
// to maintain sparsity in the product form simplex method (Math.
// Programming 2, 1972); Koberstein, The dual simplex method, techniques for a fast and
// stable implementation (PhD thesis, Paderborn, 2005); Forrest and Goldfarb,
// Steepest-edge simplex algorithms for linear programming (Math.
// Programming 57, 1992); Harris, Pivot selection methods of the Devex LP
// code (Math. Programming 5, 1973); Markowitz, The elimination form of the
// inverse and its application to linear programming (Management Science 3,
// 1957).
//
// # MPS
//
// ReadMPS reads fixed and free MPS, including RANGES, every bound type,
// OBJSENSE and integer MARKER sections; the objective constant is minus the
// RHS of the objective row, as CLP and HiGHS read it. Integer columns without
// bounds are general integers in [0, +∞) (some readers make them binary, so
// WriteMPS writes explicit bounds for every integer column).
//
// The package knows nothing of networks or money; see package mip for integer
// programs built on it.
package lp
