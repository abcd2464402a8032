// Package mip solves mixed-integer linear programs by branch-and-bound over
// the LP relaxation of package lp.
//
// A problem is an lp.Model whose Integer marks say which columns must take
// integer values:
//
//	minimise or maximise  c·x + constant
//	subject to            rowLower ≤ A·x ≤ rowUpper
//	                      colLower ≤ x ≤ colUpper,  x_j ∈ ℤ where Integer[j]
//
// Solve (or NewSolver and Solver.Solve) returns a Result with a Status
// (optimal, feasible, infeasible, unbounded, limit), the best point found,
// its objective and a proven bound, both in the model's own sense (for a
// maximisation the bound is an upper bound). The gap is
// |bound − objective| / max(|objective|, 1); the search stops as "optimal"
// when it falls to Settings.RelGap (default 1e-4) or the absolute gap to
// Settings.AbsGap (default 1e-6). A search stopped by a time or node limit
// or by cancelling its context reports "feasible" with its gap when it has a
// point, "limit" otherwise — never "optimal" unless the gap is closed.
//
// The search, internally a minimisation:
//
//   - Presolve: coefficients of binary columns in one-sided rows are
//     tightened where the row is redundant at one of the column's values
//     (same integer points, tighter LP); incumbents are always checked
//     against the caller's untouched model. Integer columns that an
//     equality over other integer columns fixes (findImplied) are left
//     free when a candidate's continuous part is completed by LP, so a
//     candidate that left them stale is not lost.
//   - Root: activity-based bound propagation, then once more with the
//     continuous columns tightened too (on a copy: the integer columns keep
//     what a chain of rows through continuous columns implies, such as a
//     budget over spend columns that each cover priced units), the LP
//     relaxation, rounds of
//     sequentially lifted knapsack cover cuts on the rows, Gomory
//     mixed-integer cuts on tableau rows (at most maxGomoryNonzeros
//     nonzeros: denser rows slow every later iteration; with
//     Settings.CMIR, where that drops a row's cut, the most efficacious
//     MIR of the row over the divisors 1, ½, ¼ and ⅛, often sparser:
//     tableauMIR), aggregated
//     complemented mixed-integer rounding (c-MIR) cuts on sums of up to six
//     tight rows (cmir.go; with Settings.CMIR), plus the caller's own cuts
//     (Settings.Separate), with a small pool that ages slack cuts out of
//     the LP; reduced-cost fixing of the global domain whenever
//     the incumbent improves; rounding and diving heuristics (a rounding
//     that violates rows is repaired by an LP over the continuous columns
//     at the root, after each dive and every few nodes); at the same call
//     points as Settings.Heuristic, a sub-MIP over the integer columns on
//     which the incumbent and the LP point disagree (RINS, rins.go), with
//     a node limit and an iteration budget of a twentieth of the search's
//     own, run beside the search like Settings.Improve.
//   - Nodes: each node LP is warm-started from its parent's basis by the
//     dual simplex, with the incumbent (minus the allowed gap) as objective
//     cutoff; bounds are propagated on rows and on the objective cutoff,
//     reduced costs fix columns inside the subtree, and pool cuts (covers,
//     c-MIR and the caller's, not Gomory's) that the node's LP point violates
//     re-enter the LP, up to a hundred over the tree; at the nodes of
//     depth 3 or less the caller's cuts are also separated anew, up to a
//     hundred more; deeper, at a node taken from the queue (where a plunge
//     starts), the caller's cuts and, with Settings.CMIR, c-MIR cuts are
//     separated, the twenty most efficacious entering the LP, up to two
//     hundred over the tree (plungeStartSeparate; off with
//     Settings.NoPlungeCuts). Each node stores only its own bound changes,
//     chained to its parent's.
//   - Proofs (proofs.go): a node whose LP bound reaches the cutoff, or a
//     strong-branching child that does, leaves an inequality over the
//     integer columns, aggregated from its LP's row multipliers and
//     reduced costs, that every point better than the incumbent
//     satisfies; an infeasible one leaves one from its LP's ray that
//     every feasible point satisfies. Before its LP each node checks the
//     pool of such proofs, which prunes it or tightens its bounds.
//   - Branching: reliability branching — pseudocosts with the product score,
//     strong branching with an iteration cap on columns whose pseudocosts
//     have fewer than 4 observations (common practice is about 8; 4 was
//     faster on our benchmarks); strong branching may spend at most half
//     the node LP iterations plus an offset. Settings.Priority restricts
//     the choice to the fractional columns of the highest priority.
//   - Node selection: depth-first plunging into the preferred child while it
//     stays promising, then best estimate, with a best-bound node taken
//     every few picks so that the bound rises.
//   - When the objective has integer coefficients on integer columns only,
//     bounds are rounded up to the objective's lattice (multiples of the
//     coefficients' gcd).
//
// Callers can give a starting solution (Settings.Start, Solver.AddSolution,
// or Settings.LateStart, asked for once the root LP has ended, so that it
// can be computed meanwhile) and propose solutions during the search
// (Settings.Heuristic, called with the node's LP solution). Every candidate, and every incumbent, is checked
// against the original model's bounds, rows and integrality; a candidate
// that violates rows has its integer values fixed and its continuous
// columns re-optimised by LP. Settings.Improve hands each new incumbent to
// the caller's own local search (with the basis of the LP that completed
// it, as a warm start) at the same call points as Settings.Heuristic; the
// local search runs on a goroutine of its own until the next call point,
// where its answer is taken and checked the same way (so its timing does
// not change the path); with a time limit, an answer ready between two
// root cut rounds is taken there. Settings.Progress receives the
// incumbent, bound, gap, nodes and elapsed time.
//
// The search is deterministic: the same model, settings and seed give the
// same path and the same answer (a time limit, by nature, may stop it at a
// different point, and lets the root cut rounds take the local search's
// answer as soon as it is ready). A model whose LP relaxation is unbounded is
// reported unbounded when it has a feasible point (with rational data, one
// feasible point and an unbounded relaxation imply an unbounded MIP:
// Meyer, Math. Programming 7, 1974), infeasible otherwise.
//
// References: Achterberg, Koch and Martin, "Branching rules revisited",
// Oper. Res. Letters 33, 2005 (reliability branching); Witzig, Berthold
// and Heinz, "Experiments with conflict analysis in mixed integer
// programming", CPAIOR 2017 (proofs from the LP's multipliers, there
// called dual proofs; from memory); Nemhauser and
// Wolsey, Integer and Combinatorial Optimization, 1988 (Gomory mixed-integer
// and cover inequalities); Marchand and Wolsey, "Aggregation and mixed
// integer rounding to solve MIPs", Oper. Res. 49, 2001 (c-MIR; from
// memory); Cornuéjols, Li and Vandenbussche, "K-cuts: a variation of
// Gomory mixed integer cuts from the LP tableau", INFORMS J. Computing 15,
// 2003 (tableau rows multiplied before rounding; from memory).
package mip
