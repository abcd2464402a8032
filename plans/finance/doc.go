// Package finance holds the discounted-cash-flow arithmetic that netstage
// reports: discount factors, present values, NPV, annuity factors, IRR,
// payback year, profitability index and straight-line depreciation.
//
// Conventions. Money is in one currency; signs follow the cash: money in is
// positive, money out (capex, opex, tax) negative. Rates are fractions
// (0.1 = 10 % a year). Years are counted from the valuation date: year 0 is
// now, year t is the end of the t-th year. In mid-year mode a flow of year
// t ≥ 1 is discounted over t − 0.5 years, the usual approximation for cash
// that arrives evenly through the year.
//
// IRR is reported only for conventional flows: exactly one change of sign
// in the non-zero flows. Descartes' rule of signs then guarantees exactly
// one rate above −100 % at which the NPV is zero, and that rate is found by
// bisection on a bracket, which cannot fail to converge. With several sign
// changes the IRR may not exist or not be unique, and IRR reports none.
//
// The formulas are the standard ones of corporate-finance textbooks: the
// present-value factor (1+r)^−n, the annuity factor (1 − (1+r)^−n)/r and the
// straight-line book value cost·(1 − k/L) after k of L years of life.
package finance
