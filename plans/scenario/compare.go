package scenario

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"
	"sync"

	"netstage/plans"
)

// AllVariant is the name of the variant that may mix every catalog.
const AllVariant = "all"

// Break-even search settings (issue: the discount to 0.5 %).
const (
	// BreakEvenStep is the width, as a fraction of list price, to which the
	// break-even multiplier is bracketed.
	BreakEvenStep = 0.005
	// BreakEvenNPVTolerance is how close, relative to the winner's NPV
	// (at least 1 currency unit), the losing catalog's NPV must be at the
	// reported discount.
	BreakEvenNPVTolerance = 0.005
	// breakEvenMaxSolves bounds the bisection (2^−30 is far below any
	// price a quote states).
	breakEvenMaxSolves = 30
)

// OnlyCatalog returns a copy of c restricted to the vendors and items of
// catalog k (an index into c.Catalogs), which becomes the case's only
// catalog. Links keep only the items of that catalog.
func OnlyCatalog(c *plans.Case, k int) *plans.Case {
	if k < 0 || k >= len(c.Catalogs) {
		panic(fmt.Sprintf("scenario: catalog %d out of range [0, %d)", k, len(c.Catalogs)))
	}
	out := shallowCopy(c)
	out.Catalogs = []plans.CatalogFile{c.Catalogs[k]}
	vendorMap := make([]int, len(c.Vendors))
	out.Vendors = nil
	for i, v := range c.Vendors {
		vendorMap[i] = -1
		if v.Catalog == k {
			vendorMap[i] = len(out.Vendors)
			v.Catalog = 0
			out.Vendors = append(out.Vendors, v)
		}
	}
	itemMap := make([]int, len(c.Items))
	out.Items = nil
	for i, it := range c.Items {
		itemMap[i] = -1
		if vendorMap[it.Vendor] >= 0 {
			itemMap[i] = len(out.Items)
			it.Vendor = vendorMap[it.Vendor]
			out.Items = append(out.Items, it)
		}
	}
	out.Links = make([]plans.Link, len(c.Links))
	for i, l := range c.Links {
		var items []int
		for _, it := range l.Items {
			if itemMap[it] >= 0 {
				items = append(items, itemMap[it])
			}
		}
		l.Items = items
		out.Links[i] = l
	}
	return out
}

// ScaleQuote returns a copy of c with every price of catalog k's quotes
// multiplied by p: module capex, lease fees and spend-tier thresholds (so a
// plan's cost of that quote scales by exactly p). Module opex (power,
// space) is not a quoted price and does not change.
func ScaleQuote(c *plans.Case, k int, p float64) *plans.Case {
	out := shallowCopy(c)
	which := make([]bool, len(c.Vendors))
	for i, v := range c.Vendors {
		which[i] = v.Catalog == k
	}
	scaleQuotes(out, which, p, true)
	return out
}

// Variant is one solve of a comparison.
type Variant struct {
	// Name is the catalog file's name, or AllVariant.
	Name string `json:"name"`
	// Catalog indexes Case.Catalogs (−1 for AllVariant).
	Catalog        int      `json:"-"`
	Status         string   `json:"status"`
	Objective      *float64 `json:"objective"`
	Bound          *float64 `json:"bound"`
	IncrementalNPV *float64 `json:"incremental_npv"`
	IRR            *float64 `json:"irr"`
	PaybackYear    *int     `json:"payback_year"`
	Capex          float64  `json:"capex"`
	// CapexByYear has one entry per year of the horizon.
	CapexByYear []YearAmount `json:"capex_by_year"`
	// UnitsByVendor counts module and lease units bought per vendor.
	UnitsByVendor []VendorUnits `json:"units_by_vendor"`
	// Infeasibility says why the variant has no plan.
	Infeasibility []string `json:"infeasibility"`
	// Winner marks the best single catalog.
	Winner bool `json:"winner"`
	// BreakEvenDiscount is, for a losing catalog, the uniform discount on
	// its quote at which it would match the winner (0.1 = 10 % off list; 0
	// when tied with it); nil for the winner, for all, and when no discount
	// makes it win.
	BreakEvenDiscount *float64 `json:"break_even_discount"`
	// BreakEvenNPV is the catalog's NPV at that discount.
	BreakEvenNPV *float64 `json:"break_even_npv"`
	// BreakEvenNote explains a missing break-even discount.
	BreakEvenNote string `json:"break_even_note,omitempty"`

	// Result is the full solve (not in the JSON).
	Result *plans.Result `json:"-"`
}

// YearAmount is an amount of money in one calendar year.
type YearAmount struct {
	Year   int     `json:"year"`
	Amount float64 `json:"amount"`
}

// VendorUnits is the number of units bought from one vendor.
type VendorUnits struct {
	Vendor string `json:"vendor"`
	Units  int    `json:"units"`
}

// Difference is one link and order year where the variants' plans differ:
// Buys[i] is what variant i orders there ("" for nothing).
type Difference struct {
	Link string   `json:"link"`
	Year int      `json:"year"`
	Buys []string `json:"buys"`
}

// contenderTol: a losing catalog's bound must exceed the winner's NPV by
// more than this (relative) to make it a contender, so that rounding in
// the last digits of two equal optima does not.
const contenderTol = 1e-9

// Comparison is the result of Compare.
type Comparison struct {
	Case     string    `json:"case"`
	Currency string    `json:"currency"`
	Variants []Variant `json:"variants"`
	// Winner is the name of the best single catalog ("" when none has a plan).
	Winner string `json:"winner"`
	// Contenders are the other single catalogs whose proven bound is above
	// the winner's NPV, or whose search stopped before it had a bound: the
	// searches stopped (time limit, gap) before ruling out a plan better
	// than the winner's, so the ranking is not proven against them. Empty
	// when it is.
	Contenders []string `json:"contenders"`
	// Tied are the other single catalogs whose NPV equals the winner's
	// (relative 1e-9): the winner is then only first in catalog order, and
	// their break-even discount is 0. Searches that a time limit stopped
	// before they found anything better than the do-nothing plan tie so.
	Tied        []string     `json:"tied"`
	Differences []Difference `json:"differences"`
}

// CompareOptions tune Compare.
type CompareOptions struct {
	// Solve solves one variant (required).
	Solve SolveFunc
	// NoBreakEven skips the break-even search.
	NoBreakEven bool
	// Jobs is the number of solves run at once (0 or 1: one at a time):
	// the variants, then the break-even searches of the losing catalogs.
	Jobs int
	// SolveFrom, when set, solves the all-catalogs variant starting from
	// the best single catalog's plan (plans.SolveOptions.StartPlan), after
	// the single catalogs: every plan of one catalog is a plan of all of
	// them, so even a search stopped by its time limit then does no worse
	// than the best catalog alone. It also starts the break-even searches'
	// solves from plans that fit them (see BreakEven). Without it, Solve
	// solves everything, the all-catalogs variant alongside the others.
	SolveFrom SolveFromFunc
}

// parallel runs f(0..n−1) with at most jobs calls at once and returns the
// first error by index.
func parallel(n, jobs int, f func(i int) error) error {
	errs := make([]error, n)
	sem := make(chan struct{}, max(jobs, 1))
	var wg sync.WaitGroup
	for i := 0; i < n; i++ {
		wg.Add(1)
		sem <- struct{}{}
		go func() {
			defer wg.Done()
			defer func() { <-sem }()
			errs[i] = f(i)
		}()
	}
	wg.Wait()
	return errors.Join(errs...)
}

// Compare solves c once per catalog alone and once with all catalogs
// (with SolveFrom, after the others and from the best one's plan), and for
// each losing catalog finds its break-even discount.
func Compare(ctx context.Context, c *plans.Case, opts CompareOptions) (*Comparison, error) {
	if opts.Solve == nil {
		panic("scenario: Compare without a solve function")
	}
	cmp := &Comparison{Case: c.Name, Currency: c.Currency, Differences: []Difference{}}
	n := len(c.Catalogs)
	cmp.Variants = make([]Variant, n+1)
	solveVariant := func(k int, start []plans.PlanRow) error {
		name, vc, catalog := AllVariant, c, -1
		if k < n {
			name, vc, catalog = c.Catalogs[k].Name, OnlyCatalog(c, k), k
		}
		res, err := solveStarting(ctx, opts.Solve, opts.SolveFrom, vc, start)
		if err != nil {
			return fmt.Errorf("scenario: variant %s: %w", name, err)
		}
		cmp.Variants[k] = newVariant(name, catalog, c, res)
		return nil
	}
	// The variants solved side by side: all of them, or with SolveFrom the
	// single catalogs, the all-catalogs one coming after them.
	together := n + 1
	if opts.SolveFrom != nil {
		together = n
	}
	if err := parallel(together, opts.Jobs, func(k int) error { return solveVariant(k, nil) }); err != nil {
		return nil, err
	}
	win := -1
	for i, v := range cmp.Variants[:n] {
		if v.Objective != nil && (win < 0 || *v.Objective > *cmp.Variants[win].Objective) {
			win = i
		}
	}
	if together == n {
		var start []plans.PlanRow
		if win >= 0 {
			start = cmp.Variants[win].Result.Plan
		}
		if err := solveVariant(n, start); err != nil {
			return nil, err
		}
	}
	cmp.Contenders, cmp.Tied = []string{}, []string{}
	tied := make([]bool, n)
	if win >= 0 {
		cmp.Variants[win].Winner = true
		cmp.Winner = cmp.Variants[win].Name
		w := *cmp.Variants[win].Objective
		tol := contenderTol * math.Max(1, math.Abs(w))
		for i, v := range cmp.Variants[:n] {
			if i == win {
				continue
			}
			if v.Objective != nil && *v.Objective >= w-tol {
				tied[i] = true
				cmp.Tied = append(cmp.Tied, v.Name)
			}
			// A search stopped before its first bound rules nothing out.
			unknown := v.Bound == nil && (v.Status == string(plans.StatusFeasible) || v.Status == string(plans.StatusLimit))
			if unknown || v.Bound != nil && *v.Bound > w+tol {
				cmp.Contenders = append(cmp.Contenders, v.Name)
			}
		}
	}
	if !opts.NoBreakEven {
		err := parallel(len(cmp.Variants), opts.Jobs, func(i int) error {
			v := &cmp.Variants[i]
			if v.Catalog < 0 || i == win {
				return nil
			}
			if win < 0 {
				v.BreakEvenNote = "no catalog alone has a plan"
				return nil
			}
			if tied[i] {
				// It matches the winner at list price already.
				d := 0.0
				v.BreakEvenDiscount, v.BreakEvenNPV = &d, v.Objective
				return nil
			}
			var own []plans.PlanRow
			if v.Objective != nil {
				own = v.Result.Plan
			}
			be, err := BreakEven(ctx, c, v.Catalog, *cmp.Variants[win].Objective, opts.Solve, opts.SolveFrom, own)
			if err != nil {
				return err
			}
			v.BreakEvenDiscount, v.BreakEvenNPV, v.BreakEvenNote = be.Discount, be.NPV, be.Note
			return nil
		})
		if err != nil {
			return nil, err
		}
	}
	cmp.Differences = differences(cmp.Variants)
	return cmp, nil
}

func newVariant(name string, k int, c *plans.Case, res *plans.Result) Variant {
	v := Variant{Name: name, Catalog: k, Status: string(res.Status), Objective: res.Objective, Bound: res.Bound,
		IncrementalNPV: res.IncrementalNPV, IRR: res.IRR, PaybackYear: res.PaybackYear,
		CapexByYear: []YearAmount{}, UnitsByVendor: []VendorUnits{}, Infeasibility: []string{}, Result: res}
	for _, row := range res.Infeasibility {
		v.Infeasibility = append(v.Infeasibility, row.Message)
	}
	if res.Objective == nil {
		return v
	}
	byYear := make([]float64, c.Horizon)
	units := map[string]int{}
	for _, row := range res.Plan {
		if i := row.Year - c.FirstYear; i >= 0 && i < c.Horizon {
			byYear[i] += row.Capex
		}
		v.Capex += row.Capex
		if row.Kind != plans.KindBuild {
			units[row.Vendor] += row.Units
		}
	}
	for i, a := range byYear {
		v.CapexByYear = append(v.CapexByYear, YearAmount{Year: c.Year(i), Amount: a})
	}
	for name, n := range units {
		v.UnitsByVendor = append(v.UnitsByVendor, VendorUnits{Vendor: name, Units: n})
	}
	sort.Slice(v.UnitsByVendor, func(a, b int) bool { return v.UnitsByVendor[a].Vendor < v.UnitsByVendor[b].Vendor })
	return v
}

// BreakEvenResult is the outcome of BreakEven.
type BreakEvenResult struct {
	// Discount is 1 − p at the multiplier p found (nil when none).
	Discount *float64
	// NPV is the catalog's NPV at that discount.
	NPV *float64
	// Note explains a nil Discount.
	Note string
	// Solves counts the solves the search took.
	Solves int
}

// BreakEven finds the uniform discount on catalog k's quote at which the
// catalog alone reaches target (the winner's NPV): it brackets the price
// multiplier p in [0, 1] by bisection, keeping NPV(lo) ≥ target > NPV(hi),
// until hi − lo ≤ BreakEvenStep and NPV(lo) is within
// BreakEvenNPVTolerance of target, and reports the discount 1 − lo.
// A price level with no plan counts as −∞ (a lower price can only add plans
// within the budget).
//
// With from, each price level's solve starts from the plan of the lowest
// price level above it solved so far (at first start, the catalog's own
// plan at list price): a plan stays within the budget, and reaches the
// same spend tiers, when prices fall, so that plan fits, and a search
// stopped by its time limit cannot make NPV(p) fall below that plan's
// value at p. Without from (nil), solve solves every level.
func BreakEven(ctx context.Context, c *plans.Case, k int, target float64, solve SolveFunc, from SolveFromFunc, start []plans.PlanRow) (BreakEvenResult, error) {
	var out BreakEvenResult
	var plan []plans.PlanRow // the plan at the last evaluated price level
	npv := func(p float64) (float64, error) {
		out.Solves++
		res, err := solveStarting(ctx, solve, from, OnlyCatalog(ScaleQuote(c, k, p), k), start)
		if err != nil {
			return 0, fmt.Errorf("scenario: break-even of %s at %.4g × list: %w", c.Catalogs[k].Name, p, err)
		}
		plan = nil
		if res.Objective == nil {
			return math.Inf(-1), nil
		}
		plan = res.Plan
		return *res.Objective, nil
	}
	tol := BreakEvenNPVTolerance * math.Max(math.Abs(target), 1)
	lo, hi := 0.0, 1.0
	flo, err := npv(lo)
	if err != nil {
		return out, err
	}
	if flo < target {
		if math.IsInf(flo, -1) {
			out.Note = "has no plan even at no cost"
		} else {
			out.Note = "does not win even at no cost"
		}
		return out, nil
	}
	for out.Solves < breakEvenMaxSolves && (hi-lo > BreakEvenStep || flo-target > tol) {
		mid := (lo + hi) / 2
		f, err := npv(mid)
		if err != nil {
			return out, err
		}
		if f >= target {
			lo, flo = mid, f
		} else {
			hi = mid
			if plan != nil {
				start = plan // fits every price below mid
			}
		}
	}
	d := 1 - lo
	out.Discount, out.NPV = &d, &flo
	return out, nil
}

// differences lists the links and order years where the variants with a
// plan buy different things, sorted by link then year.
func differences(vs []Variant) []Difference {
	type key struct {
		link string
		year int
	}
	buys := make([]map[key][]string, len(vs))
	keys := map[key]bool{}
	for i, v := range vs {
		buys[i] = map[key][]string{}
		if v.Objective == nil {
			continue
		}
		for _, row := range v.Result.Plan {
			k := key{row.Link, row.Year}
			var s string
			if row.Kind == plans.KindBuild {
				s = "build"
			} else {
				s = fmt.Sprintf("%d×%s (%s)", row.Units, row.Item, row.Vendor)
			}
			buys[i][k] = append(buys[i][k], s)
			keys[k] = true
		}
	}
	var out []Difference
	for k := range keys {
		d := Difference{Link: k.link, Year: k.year}
		same := true
		var first string
		n := 0
		for i, v := range vs {
			s := ""
			if b := buys[i][k]; len(b) > 0 {
				b = append([]string(nil), b...)
				sort.Strings(b)
				s = strings.Join(b, " + ")
			}
			d.Buys = append(d.Buys, s)
			if v.Objective == nil {
				continue
			}
			if n == 0 {
				first = s
			} else if s != first {
				same = false
			}
			n++
		}
		if !same {
			out = append(out, d)
		}
	}
	sort.Slice(out, func(a, b int) bool {
		if out[a].Link != out[b].Link {
			return out[a].Link < out[b].Link
		}
		return out[a].Year < out[b].Year
	})
	if out == nil {
		out = []Difference{}
	}
	return out
}
