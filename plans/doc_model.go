// # The planning model
//
// BuildModel writes the case as a mixed-integer program (DESIGN.md §2) and
// Solve solves it with package mip. The model is a minimisation of −NPV in
// case currency, so that the exported MPS file (Export) has −NPV as its
// optimum; budget and vendor-spend rows are written in thousands for
// numerics. With n sites of which S are ends of demands, m links (A = 2m
// arcs, one per direction), K demands, T years and O (link, item) pairs
// where the item fits the link, the model has
//
//   - S·(A − arcs into the source)·T flow columns, aggregated by source
//     site (never one column per path), and S·(n − 1)·T conservation rows;
//   - K·T served columns, committed ≤ served ≤ forecast (= forecast in cost
//     mode), each carried in both directions and billed once;
//   - A·T capacity rows: flow ≤ ceiling × (base capacity + units in
//     service × Gbps);
//   - at most O·T integer unit columns, cumulative (units ordered by the
//     order year, non-decreasing, at most the unit limit and the slots),
//     branched on instead of per-year orders: units in service in year t
//     are the cumulative units of the last order year serving by t;
//   - one binary build column per candidate link and order year, gating
//     its modules (units ≤ limit × built by their in-service year);
//   - per vendor with volume tiers and order year: one binary per tier
//     (and "no discount"), and the list spend split by tier and by group
//     of purchases sharing book life and in-service year, with
//     threshold·z ≤ part ≤ max·z, max the least of the largest spend
//     and what the year's budget pays at the discount — the disaggregated
//     (convex-hull) form, so discounted capex, depreciation and salvage
//     stay exact; the search branches on these binaries before the
//     others (branchPriority);
//   - one budget row per capped year, one for the cumulative cap;
//   - with [case] one_vendor, per group of links that must share a vendor
//     (a class, or the network) and having items of several vendors: one
//     binary per vendor, at most one of them on, and one row per unit
//     column capping its units by its vendor's binary;
//   - cut-set rows: for every site, every pair of linked sites, every site
//     with the sites within one and within two links of it, and every
//     year, up to three MIR roundings (one per module size) of "the
//     crossing demands' traffic fits in the crossing links", with and
//     without the served traffic — at most 6·(3n + m)·T rows;
//   - at most m·T integer step columns, each with the row that makes it
//     the capacity a link has gained by a year in steps of the gcd of its
//     items' Gbps (model_steps.go): they change no plan and not the LP
//     relaxation, but the search branches on a link's capacity right
//     after the tier binaries, before the unit columns.
//
// The objective coefficient of a unit of capex ordered in year τ and in
// service from year s with book life L is −DF_τ + τ_tax·Σ DF_t/L over its
// depreciation years inside the horizon + DF_T·(1 − (T − s + 1)/L)⁺ (the
// straight-line salvage); yearly opex from s on weighs −(1 − τ_tax)·Σ DF_t.
// During the search, the heuristic rounds LP points to plans
// (solve_heuristic.go), and each new best plan goes through a local search
// on its unit counts (solve_improve.go): moves of one unit — one more or one
// less from an order year on, an order a year later or earlier — ranked by
// the reduced costs of the LP with the decisions fixed and judged by
// re-solving that LP, so that traffic re-routes around each change. With
// a time limit, once no move pays, the local search re-plans one region
// at a time (the links at a site and its neighbours) by a sub-MIP with the
// rest of the plan fixed, beside the search, up to the limit.
// Solve then fixes the integer decisions and solves two LPs: the NPV again
// (its capacity-row duals give the value of one more Gbps per link and
// year) and, holding that NPV, the fewest Gbps·km, so the routing reported
// sends no traffic the long way round (routings of equal Gbps·km remain
// ties, broken by the LP's pivots). With a time limit the search stops
// early enough to leave time for these LPs (twice the baseline's time, at
// most a quarter of the limit); the Gbps·km stage, a tie-break, stops at the
// limit (after at least a second) and a warning then says the routes may
// take longer paths. The cash flow is recomputed from the purchases and the served
// traffic alone and equals the MIP objective (checked in the tests).
// The do-nothing baseline is an LP without purchases whose committed
// traffic may fall short at the SLA penalty; an infeasible case is
// explained by elastic versions of the model (see Result.Infeasibility).

package plans
