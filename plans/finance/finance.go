package finance

import (
	"math"
)

// irrTolerance is the relative width of the bracket, in the discount-factor
// variable x = 1/(1+r), at which IRR stops bisecting. 1e-14 is close to
// float64 resolution and gives the rate to about 12 significant digits.
const irrTolerance = 1e-14

// irrMaxBisections caps the bisection steps; 2000 halvings shrink any
// float64 bracket below irrTolerance long before the cap is reached.
const irrMaxBisections = 2000

// irrMaxFactor bounds the search for the upper end of the bracket in
// x = 1/(1+r): x = 1e15 means a rate of −99.9999999999999 %. Flows whose
// root lies beyond it have no IRR worth reporting.
const irrMaxFactor = 1e15

// paybackTolerance is the relative slack, measured against the largest
// absolute flow, with which a cumulative sum still counts as non-negative.
// It absorbs rounding in sums that are zero on paper.
const paybackTolerance = 1e-9

// DiscountFactor returns the factor that brings a cash flow of year t back
// to year 0 at the yearly rate r: (1+r)^−t at the end of the year, or
// (1+r)^−(t−0.5) in mid-year mode (for t ≥ 1; year 0 is never shifted).
// A negative r (down to, not including, −1) is allowed. Cost O(1).
func DiscountFactor(r float64, t int, midYear bool) float64 {
	n := float64(t)
	if midYear && t >= 1 {
		n -= 0.5
	}
	return math.Pow(1+r, -n)
}

// PV returns the present value of an amount received in year t at the rate
// r: amount × DiscountFactor(r, t, midYear). Cost O(1).
func PV(amount, r float64, t int, midYear bool) float64 {
	return amount * DiscountFactor(r, t, midYear)
}

// NPV returns the net present value at the rate r of the flows, where
// flows[t] is the cash of year t (flows[0] happens now and is not
// discounted). Cost O(len(flows)).
func NPV(r float64, flows []float64, midYear bool) float64 {
	var sum float64
	for t, f := range flows {
		sum += PV(f, r, t, midYear)
	}
	return sum
}

// AnnuityFactor returns the present value at the rate r of 1 paid at the
// end of each of n years: (1 − (1+r)^−n)/r, and n when r is 0. Cost O(1).
func AnnuityFactor(r float64, n int) float64 {
	if r == 0 {
		return float64(n)
	}
	return (1 - math.Pow(1+r, -float64(n))) / r
}

// SignChanges counts the changes of sign between consecutive non-zero
// flows. Cost O(len(flows)).
func SignChanges(flows []float64) int {
	changes := 0
	prev := 0.0
	for _, f := range flows {
		if f == 0 {
			continue
		}
		if prev != 0 && (f > 0) != (prev > 0) {
			changes++
		}
		prev = f
	}
	return changes
}

// IRR returns the internal rate of return of the flows (indexed by year as
// in NPV, end-of-year convention): the rate r > −1 at which their NPV is
// zero. ok is false when the flows do not change sign exactly once (no IRR,
// or possibly several), when a flow is not finite, or when the root lies
// below a rate of −99.9999999999999 %. Cost O(len(flows)) per bisection
// step, at most irrMaxBisections steps.
func IRR(flows []float64) (r float64, ok bool) {
	for _, f := range flows {
		if math.IsNaN(f) || math.IsInf(f, 0) {
			return 0, false
		}
	}
	if SignChanges(flows) != 1 {
		return 0, false
	}
	// Drop leading and trailing zeros: they only multiply the polynomial in
	// x = 1/(1+r) by a power of x, which moves no positive root.
	first, last := 0, len(flows)-1
	for flows[first] == 0 {
		first++
	}
	for flows[last] == 0 {
		last--
	}
	c := flows[first : last+1]
	// p(x) = Σ c[k]·x^k has exactly one positive root (Descartes). p(0) =
	// c[0]; p(x) takes the sign of c[last] for large x.
	sign0 := c[0] > 0
	lo, hi := 0.0, 1.0
	for (polySign(c, hi) > 0) == sign0 {
		lo = hi
		hi *= 2
		if hi > irrMaxFactor {
			return 0, false
		}
	}
	for i := 0; i < irrMaxBisections && hi-lo > irrTolerance*hi; i++ {
		mid := lo + (hi-lo)/2
		s := polySign(c, mid)
		if s == 0 {
			lo, hi = mid, mid
			break
		}
		if (s > 0) == sign0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	x := lo + (hi-lo)/2
	return 1/x - 1, true
}

// polySign returns the sign (−1, 0, +1) of Σ c[k]·x^k for x > 0. For x > 1 it
// evaluates the reversed polynomial in 1/x, which has the same sign and
// cannot overflow.
func polySign(c []float64, x float64) int {
	var v float64
	if x <= 1 {
		for k := len(c) - 1; k >= 0; k-- {
			v = v*x + c[k]
		}
	} else {
		y := 1 / x
		for k := 0; k < len(c); k++ {
			v = v*y + c[k]
		}
	}
	switch {
	case v > 0:
		return 1
	case v < 0:
		return -1
	}
	return 0
}

// PaybackYear returns the first year from which the cumulative undiscounted
// cash stays non-negative to the end: the smallest i such that
// flows[0] + … + flows[j] ≥ 0 for every j ≥ i, offset by firstYear (so that
// flows[i] belongs to year firstYear + i). ok is false when the cumulative
// cash is negative at the end, or when flows is empty. Cost O(len(flows)).
func PaybackYear(flows []float64, firstYear int) (year int, ok bool) {
	if len(flows) == 0 {
		return 0, false
	}
	scale := 0.0
	for _, f := range flows {
		scale = math.Max(scale, math.Abs(f))
	}
	tol := paybackTolerance * scale
	cum := 0.0
	from := -1 // first index of the current non-negative run
	for i, f := range flows {
		cum += f
		if cum >= -tol {
			if from < 0 {
				from = i
			}
		} else {
			from = -1
		}
	}
	if from < 0 {
		return 0, false
	}
	return firstYear + from, true
}

// ProfitabilityIndex returns 1 + npv/pvInvestment: the present value that
// each unit of invested present value brings back (above 1 the investment
// pays). npv is the net present value of the investment's flows including
// the investment itself; pvInvestment is the present value of the capex,
// as a positive amount. ok is false when pvInvestment is not positive.
// Cost O(1).
func ProfitabilityIndex(npv, pvInvestment float64) (index float64, ok bool) {
	if !(pvInvestment > 0) {
		return 0, false
	}
	return 1 + npv/pvInvestment, true
}

// BookValue returns the straight-line book value of an asset of the given
// cost and book life (in years) after age years of service:
// cost·(1 − age/life), clamped to cost before service and to 0 after the
// life. A life of 0 or less writes the asset off at once. Cost O(1).
func BookValue(cost float64, life, age int) float64 {
	switch {
	case age <= 0:
		return cost
	case life <= 0 || age >= life:
		return 0
	}
	return cost * (1 - float64(age)/float64(life))
}

// DepreciationSchedule returns the straight-line depreciation of an asset in
// each of the years 1..years of a horizon, when the asset enters service in
// year inService (1-based) with the given cost and book life: cost/life in
// each of the years inService … inService+life−1 that fall inside the
// horizon, 0 elsewhere. A life of 0 or less writes the whole cost off in the
// in-service year. Over the horizon, cost = Σ schedule + BookValue(cost,
// life, years − inService + 1) for an asset in service by the horizon's end.
// Cost O(years).
func DepreciationSchedule(cost float64, life, inService, years int) []float64 {
	out := make([]float64, years)
	if inService < 1 || inService > years {
		return out
	}
	if life <= 0 {
		out[inService-1] = cost
		return out
	}
	per := cost / float64(life)
	for t := inService; t < inService+life && t <= years; t++ {
		out[t-1] = per
	}
	return out
}
