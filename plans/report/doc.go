// Package report renders a solved plan as a capex report that people who do
// not read terminal tables can check: a self-contained HTML page (inline CSS
// and SVG charts, no scripts, no external assets, printable on A4 and
// Letter) or a Markdown document for wikis and email.
//
// Input is the checked case (*plans.Case, for the assumptions, the catalogs
// and the site coordinates) and the solved plan (*plans.Result). The report
// never recomputes the plan: every money amount, capacity and rate it prints
// is a field of the Result (or of the Case, for assumptions), formatted for
// people, so that it agrees with `netstage solve --json`.
//
// Sections, in order: the decision in one paragraph (what to order in the
// first year and why, NPV against doing nothing, IRR, payback year, capex
// against budget); charts (capex by year against the budget, yearly net cash
// flow with the cumulative discounted cash flow, a link × year grid of peak
// utilisation before and after the plan, and a map of the network when the
// case gives site coordinates); the staged plan; the cash flow; why each
// upgrade; the assumptions with the solver's status, bound and gap; and the
// caution that forecasts are uncertain and that the plan needs review by
// finance and engineering under the operator's own policies.
//
// Number formats: money in whole units of the case currency with thousands
// separators and a minus sign (U+2212) for negative amounts; capacities in
// Mbps, Gbps or Tbps, whichever reads best; rates and utilisations as
// percentages with one decimal; discount factors with four decimals. Charts
// use the package's own colour palette: a single-hue sequential ramp for
// utilisation with a contrasting colour for links at their ceiling, and a
// distinct shape (not only a colour) for upgraded links, so that readers with
// colour-vision deficiencies can read them.
//
// Output is deterministic: the same case and result give the same bytes.
package report
