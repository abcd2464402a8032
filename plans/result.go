package plans

import (
	"fmt"
	"math"
	"strings"
)

// This file holds the types of a solved plan. The solve and export commands
// print them as terminal tables, JSON and CSV; the JSON tags are the stable
// schema of DESIGN.md §4.
//
// Units and signs everywhere in a Result:
//   - money is in the case currency (never the internal scaling), per year
//     and undiscounted unless the field says "pv" or "npv";
//   - capacities and traffic are Gbps, in each direction of a link;
//   - years are calendar years (the case's first year is its year 1);
//   - cash flow signs are the company's: revenue and salvage positive; opex,
//     capex and tax are positive amounts that are subtracted (a negative tax
//     is a credit).

// Status is the outcome of a solve.
type Status string

const (
	// StatusOptimal: a plan proven optimal within the gap asked for.
	StatusOptimal Status = "optimal"
	// StatusFeasible: a plan, not proven optimal (time limit or Ctrl-C);
	// Bound and Gap say how far from optimal it may be.
	StatusFeasible Status = "feasible"
	// StatusInfeasible: no plan meets the committed demands, unit limits
	// and budgets; Result.Infeasibility says what makes it so.
	StatusInfeasible Status = "infeasible"
	// StatusUnbounded: the model has no finite optimum (a modelling error:
	// every real case is bounded).
	StatusUnbounded Status = "unbounded"
	// StatusLimit: stopped by a limit before any plan was found.
	StatusLimit Status = "limit"
)

// Result is a solved plan with its NPV breakdown.
type Result struct {
	Case     string `json:"case"`     // the case's name
	Currency string `json:"currency"` // the case currency of every money field
	// CostMode is true when no demand pays a tariff: every demand is then
	// committed, and Objective is minus the plan's present cost.
	CostMode bool   `json:"cost_mode"`
	Status   Status `json:"status"`

	// Objective is the plan's NPV (cost mode: minus its present cost); it
	// equals the sum of Cashflow[].PV. Nil when there is no plan.
	Objective *float64 `json:"objective"`
	// Bound is a proven upper bound on the NPV (nil when none is known).
	Bound *float64 `json:"bound"`
	// Gap is |Bound − Objective| / max(|Objective|, 1) (nil without both);
	// for status optimal it is at most the gap asked for, where rounding
	// in the recomputed NPV would put it a hair above.
	Gap *float64 `json:"gap"`

	// BaselineNPV is the NPV of the do-nothing plan, with its SLA penalty
	// on committed traffic it cannot carry (nil when the baseline LP
	// could not be solved).
	BaselineNPV *float64 `json:"baseline_npv"`
	// IncrementalNPV = Objective − BaselineNPV.
	IncrementalNPV *float64 `json:"incremental_npv"`
	// IRR of the incremental cash flows (plan net − baseline net per year),
	// a fraction per year; nil unless those flows change sign exactly once,
	// and always nil in cost mode.
	IRR *float64 `json:"irr"`
	// PaybackYear is the first calendar year from which the cumulative
	// undiscounted incremental cash stays ≥ 0 (nil when it never does, and
	// in cost mode).
	PaybackYear *int `json:"payback_year"`
	// ProfitabilityIndex = 1 + IncrementalNPV / PV(capex of the plan);
	// nil without capex.
	ProfitabilityIndex *float64 `json:"profitability_index"`
	// TotalCapex is the plan's undiscounted capex after volume discounts.
	TotalCapex float64 `json:"total_capex"`
	// MPSObjective is the value of the exported minimisation (Export) at
	// the returned solution: −Objective up to rounding.
	MPSObjective *float64 `json:"mps_objective"`

	Plan             []PlanRow      `json:"plan"`              // sorted by order year, link, item
	Cashflow         []CashflowRow  `json:"cashflow"`          // one row per year of the horizon
	BaselineCashflow []CashflowRow  `json:"baseline_cashflow"` // the do-nothing plan's cash flow
	Links            []LinkYear     `json:"links"`             // sorted by link, year
	Demands          []DemandYear   `json:"demands"`           // sorted by demand, year
	Shortfall        []ShortfallRow `json:"baseline_shortfall"`
	// Routes splits each demand's served traffic into the paths it takes,
	// per year, in its direction From → To (sorted by demand, year, widest
	// first).
	Routes []Route `json:"routes"`
	// VendorChoice lists, under [case] one_vendor, the vendor the optimiser
	// chose for each group of links that had a choice (a class, or "" for
	// the whole network), in group order. Empty without one_vendor.
	VendorChoice []VendorChoice `json:"vendor_choice"`
	// Infeasibility lists what makes the case infeasible (status
	// infeasible only), most important first.
	Infeasibility []InfeasibilityRow `json:"infeasibility"`
	Warnings      []string           `json:"warnings"`
	Stats         SolverStats        `json:"solver"`

	// Kept for checks: the model, the final point (integer decisions
	// fixed, routing chosen) and the MIP's own objective value.
	model        *Model
	x            []float64
	mipObjective float64
}

// VendorChoice is the vendor a plan uses for one group of links under
// [case] one_vendor.
type VendorChoice struct {
	// Class is the link class of the group; "" means the whole network
	// (one_vendor = "network").
	Class string `json:"class"`
	// Vendor is the id of the vendor the plan buys from there, "" when it
	// buys nothing there.
	Vendor string `json:"vendor"`
}

// Kinds of PlanRow.
const (
	KindModule = "module" // a capacity module bought (capex)
	KindLease  = "lease"  // a lease taken (yearly fee as opex)
	KindBuild  = "build"  // a candidate link built (build cost as capex)
)

// PlanRow is one purchase of the staged plan: Units units of one item on
// one link, ordered in Year, or the build of a candidate link (Kind build,
// Item and Vendor empty, Units 1).
type PlanRow struct {
	Year      int     `json:"year"`       // order year: capex paid and counted against the budget
	InService int     `json:"in_service"` // first year the capacity carries traffic
	Link      string  `json:"link"`
	Kind      string  `json:"kind"` // KindModule, KindLease or KindBuild
	Item      string  `json:"item"`
	Vendor    string  `json:"vendor"`
	Units     int     `json:"units"`
	Gbps      float64 `json:"gbps"` // capacity added, per direction
	// ListCapex is the capex at list price (after equipment price erosion);
	// Capex is after the vendor's volume discount for that order year.
	ListCapex float64 `json:"list_capex"`
	Capex     float64 `json:"capex"`
	// Opex is the yearly opex (or lease fee) of these units from InService on.
	Opex float64 `json:"opex"`
}

// CashflowRow is one year of a plan's cash flow.
type CashflowRow struct {
	Year         int     `json:"year"`
	Revenue      float64 `json:"revenue"`
	Opex         float64 `json:"opex"`
	Capex        float64 `json:"capex"`
	Depreciation float64 `json:"depreciation"`
	Tax          float64 `json:"tax"`     // τ·(revenue − opex − depreciation); negative is a credit
	Penalty      float64 `json:"penalty"` // SLA penalty on committed traffic not carried (baseline only)
	Salvage      float64 `json:"salvage"` // book value at the horizon, last year only
	// Net = revenue − opex − capex − tax − penalty + salvage.
	Net            float64 `json:"net"`
	DiscountFactor float64 `json:"discount_factor"`
	// PV is the year's present value: DF·(net − salvage) + DF_T·salvage
	// (salvage is always discounted at the end of the horizon).
	PV           float64  `json:"pv"`
	CumulativePV float64  `json:"cumulative_pv"`
	Budget       *float64 `json:"budget"` // the year's capex cap; nil when uncapped
	BudgetUsed   float64  `json:"budget_used"`
	// Incremental is Net minus the baseline's Net for the year (plan rows
	// only; zero in the baseline's own rows).
	Incremental float64 `json:"incremental"`
}

// LinkYear is one link in one year, before (baseline) and after the plan.
type LinkYear struct {
	Link string `json:"link"`
	Year int    `json:"year"`
	// Capacity per direction in Gbps, and the peak utilisation over both
	// directions as a fraction of capacity (0 when there is no capacity).
	CapacityBefore    float64 `json:"capacity_before"`
	CapacityAfter     float64 `json:"capacity_after"`
	UtilisationBefore float64 `json:"utilisation_before"`
	UtilisationAfter  float64 `json:"utilisation_after"`
	Ceiling           float64 `json:"ceiling"`
	// Candidate marks a candidate new link; Built says whether it is in
	// service in this year (always true for an existing link). The value
	// of one more Gbps on an unbuilt candidate is what capacity there
	// would be worth, not a gain available without building it.
	Candidate bool `json:"candidate"`
	Built     bool `json:"built"`
	// AtCeiling flags a link whose busiest direction after the plan is at
	// the utilisation ceiling (see AtCeiling).
	AtCeiling bool `json:"at_ceiling"`
	// ShadowValue is the increase of the plan's NPV (present value, case
	// currency) per extra Gbps of capacity on this link in this year, from
	// the routing LP with the integer decisions fixed; nil when the link's
	// capacity does not bind.
	ShadowValue *float64 `json:"shadow_value"`
}

// Reasons a demand is not fully served.
const (
	ReasonCapacity = "capacity"  // the network cannot carry more
	ReasonNoProfit = "no-profit" // carrying more would need capacity that does not pay
)

// DemandYear is one demand in one year.
type DemandYear struct {
	Demand    string  `json:"demand"` // the demand's id
	From      string  `json:"from"`
	To        string  `json:"to"`
	Year      int     `json:"year"`
	Forecast  float64 `json:"forecast"`  // Gbps each direction
	Served    float64 `json:"served"`    // Gbps each direction
	Committed float64 `json:"committed"` // Gbps each direction
	Revenue   float64 `json:"revenue"`   // 12 × tariff × served
	Unserved  float64 `json:"unserved"`  // forecast − served
	Reason    string  `json:"reason"`    // "" when fully served, else ReasonCapacity or ReasonNoProfit
}

// ShortfallRow is committed traffic the do-nothing network cannot carry in
// one year, with what it puts at risk.
type ShortfallRow struct {
	Demand    string  `json:"demand"`
	From      string  `json:"from"`
	To        string  `json:"to"`
	Year      int     `json:"year"`
	Committed float64 `json:"committed"` // Gbps each direction
	Carried   float64 `json:"carried"`   // Gbps each direction
	Shortfall float64 `json:"shortfall"` // committed − carried
	Penalty   float64 `json:"penalty"`   // SLA penalty for the year
	// RevenueAtRisk is the yearly revenue of the committed traffic not
	// carried (12 × tariff × shortfall).
	RevenueAtRisk float64 `json:"revenue_at_risk"`
}

// Kinds of InfeasibilityRow.
const (
	InfeasibleDemand = "demand" // committed traffic that cannot be carried
	InfeasibleLink   = "link"   // a link whose capacity limits would have to be exceeded
	InfeasibleBudget = "budget" // a budget that would have to be raised
)

// InfeasibilityRow is one cause of infeasibility, from the elastic model:
// Amount is by how much the named limit would have to give (Gbps for a
// demand or link, case currency for a budget).
type InfeasibilityRow struct {
	Kind string `json:"kind"` // InfeasibleDemand, InfeasibleLink or InfeasibleBudget
	Name string `json:"name"` // demand or link id; "cumulative" for the cumulative budget
	// Year is the calendar year the limit binds in; 0 for a limit that is
	// not for one year (slots, the cumulative budget).
	Year int `json:"year"`
	// Amount is how far the limit falls short, in Unit: Gbps of committed
	// demand not carried (UnitGbps), money the budget lacks (the case
	// currency), slots a link lacks (UnitSlots); for a link full at its
	// largest possible capacity, that capacity (UnitGbpsMax).
	Amount  float64 `json:"amount"`
	Unit    string  `json:"unit"`
	Message string  `json:"message"`
}

// Units of InfeasibilityRow.Amount besides a currency code.
const (
	UnitGbps    = "Gbps"     // Gbps short
	UnitSlots   = "slots"    // slots short
	UnitGbpsMax = "Gbps max" // the largest possible capacity of a full link
)

// SolverStats describes the solve.
type SolverStats struct {
	Rows       int     `json:"rows"`
	Columns    int     `json:"columns"`
	Integers   int     `json:"integers"`
	Nodes      int     `json:"nodes"`
	Iterations int     `json:"iterations"`
	Seconds    float64 `json:"seconds"`
}

// VendorChoiceText says which vendor the optimiser chose for each group of
// links under [case] one_vendor ("" without one): "brightwave (one vendor
// for the whole network)" or "core: brightwave; metro: none bought (one
// vendor per link class)".
func (r *Result) VendorChoiceText() string {
	if len(r.VendorChoice) == 0 {
		return ""
	}
	parts := make([]string, len(r.VendorChoice))
	for i, ch := range r.VendorChoice {
		v := ch.Vendor
		if v == "" {
			v = "none bought"
		}
		if ch.Class == "" {
			parts[i] = v + " (one vendor for the whole network)"
		} else {
			parts[i] = ch.Class + ": " + v
		}
	}
	s := strings.Join(parts, "; ")
	if len(r.VendorChoice) > 1 || r.VendorChoice[0].Class != "" {
		s += " (one vendor per link class)"
	}
	return s
}

// CeilingTolerance is how close, as a fraction of capacity, a link's
// utilisation must come to its ceiling to count as at it: half the
// precision reports print (0.1 %). The routing reported is the one with
// the fewest Gbps·km among those within holdObjectiveTol of the optimal
// NPV, and it may leave a sliver of a binding link unused (0.79999 of an
// 80 % ceiling on the demo), which a planner still reads as full.
const CeilingTolerance = 0.0005

// AtCeiling reports whether utilisation u (a fraction of capacity) is at
// ceiling within CeilingTolerance.
func AtCeiling(u, ceiling float64) bool {
	return ceiling > 0 && u >= ceiling-CeilingTolerance
}

// GapAmount is the gap in money: how much a better plan could add to the
// NPV at most (bound − NPV, never below 0; in cost mode, how much it could
// save). ok is false without a plan or a bound.
func (r *Result) GapAmount() (amount float64, ok bool) {
	if r.Bound == nil || r.Objective == nil {
		return 0, false
	}
	return math.Max(0, *r.Bound-*r.Objective), true
}

// PaybackInFirstYear reports whether the payback year is the first year of
// the horizon: the cumulative incremental cash is never negative (a plan
// with no capex, such as a lease that pays from its first year).
func (r *Result) PaybackInFirstYear() bool {
	return r.PaybackYear != nil && len(r.Cashflow) > 0 && *r.PaybackYear == r.Cashflow[0].Year
}

// StoppedBeforeBetter reports a search that a limit (time, nodes, Ctrl-C)
// stopped before it found a plan better than the existing network: the
// answer buys nothing, which is no finding that no upgrade pays. On a
// large case with a short time limit the first LP alone can take longer.
func (r *Result) StoppedBeforeBetter() bool {
	return r.Status == StatusFeasible && len(r.Plan) == 0
}

// HorizonEndNote cautions about the purchases that enter service in the
// horizon's last year, or returns "" when the plan has none. The model
// weighs such a purchase against one year of traffic and, where the case
// credits salvage, the book value left at the horizon; the years after it,
// which pay for it in practice, lie outside the plan. So the horizon as
// much as the network decides it, and next year's plan, whose horizon
// reaches past it, should look at it again. Leases are left out: a fee
// paid year by year is weighed against the traffic of the same years.
func (r *Result) HorizonEndNote() string {
	if len(r.Cashflow) == 0 {
		return ""
	}
	last := r.Cashflow[len(r.Cashflow)-1]
	n := 0
	for _, p := range r.Plan {
		if p.InService == last.Year && p.Kind != KindLease {
			n++
		}
	}
	if n == 0 {
		return ""
	}
	what, each, them := "1 purchase enters", "it", "it"
	if n > 1 {
		what, each, them = fmt.Sprintf("%d purchases enter", n), "each", "them"
	}
	weighed := "that one year of traffic"
	if last.Salvage > 0 {
		weighed += " and the book value credited as salvage at the horizon"
	}
	return fmt.Sprintf("%s service in %d, the horizon's last year: the plan weighs %s against nothing but %s. "+
		"Review %s in next year's plan, whose horizon reaches past %s, before ordering.", what, last.Year, each, weighed, them, them)
}
