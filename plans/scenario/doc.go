// Package scenario runs a planning case under changed assumptions: the
// vendor comparison of `netstage compare` (one solve per catalog alone and one
// with every catalog), the scenario grid of `netstage sweep`, and the
// one-factor-at-a-time tornado of `netstage report`.
//
// # Factors
//
// A sweep varies named factors of a case (Apply):
//
//	growth         multiplier m on each demand's growth: forecast f₁·(1+m·g)^(t−1);
//	               for an explicit forecast list, each year-on-year change is
//	               multiplied by m. Committed traffic stays as contracted
//	               (Gbps), capped by the new forecast; in a case with no
//	               tariffs every demand is committed, so there the whole
//	               forecast moves.
//	tariff         multiplier on every tariff of every year (0 leaves no
//	               tariff: the case is then planned in cost mode).
//	capex          multiplier on equipment prices (module capex per unit and
//	               per km); volume-tier thresholds on spend move with it, so
//	               the multiplier is a pure price level and a plan's capex
//	               scales by exactly m. Candidate link builds and leases are
//	               not equipment and do not change.
//	discount_rate  the discount rate itself (absolute, 0.08 = 8 %).
//	budget         multiplier on every capex cap (yearly and cumulative).
//
// The base value of a factor is 1 for a multiplier and the case's own rate
// for discount_rate.
//
// # Grid, shards and merge
//
// The grid is the product of the factors' value lists in the order given,
// the first factor outermost (it changes slowest). Scenario j of the grid
// belongs to shard j mod n (shards count from 0, as Kubernetes indexed jobs
// and Slurm arrays do). Besides the grid, a sweep solves reference points:
// the base (every factor at its base value) and each factor's values with
// the others at base, which the tornado view and the budget frontier need.
// Reference points already in the grid are not solved twice; the others get
// indices after the grid and are shared among the shards the same way. A
// shard writes JSON lines (a header, then one record per scenario); Merge
// checks that the shards belong to one sweep and cover it exactly once, and
// the merged report is identical to the one an unsharded run builds, because
// both are built from the same records and JSON keeps every float64 exactly.
//
// A grid larger than DefaultMaxScenarios points (10,000) is refused before
// any solve unless the caller raises the cap (Grid.CheckSize): the size is
// the product of the value counts and grows fast.
//
// # Tornado
//
// Tornado is the one-factor-at-a-time run behind a report's tornado chart
// ([report.tornado]): the case as it is, then for each factor the case with
// that factor alone at its low and at its high value (Apply with one
// setting), the other assumptions at the case's own values: 1 + 2k solves
// for k factors, not a grid. Its bars are the sweep's TornadoBar.
//
// # Regret
//
// The base plan (the optimum of the base point) has its purchases fixed and
// is re-evaluated in each scenario by the routing LP, with the budget not
// enforced. Its regret in a scenario is the scenario's own optimum minus the
// base plan's re-evaluated NPV. Re-optimising can only do better when the
// base plan is a feasible plan of the scenario, so regret is reported only
// then: a base plan that breaks the scenario's budget, or cannot carry its
// committed demand, is flagged instead. When a scenario solve stopped at its
// gap below the base plan's value, the base plan is itself the best plan
// known for the scenario and the regret is 0; a base plan valued above the
// scenario's proven bound is an inconsistency and is reported as such.
//
// # Compare and break-even
//
// OnlyCatalog keeps the vendors and items of one catalog. A losing catalog's
// break-even discount is found by bisection on a uniform multiplier p on its
// quote (module capex, lease fees and spend-tier thresholds): its NPV is a
// maximum of functions that fall as p rises, so it is non-increasing in p,
// and bisection stops when the multiplier is known to 0.5 percentage points
// and the NPV at the reported discount is within 0.5 % of the winner's.
package scenario
