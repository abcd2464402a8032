// Package plans holds the planning case and the model that plans it.
//
// A case is read from a TOML case file (a [case] table with budget, finance,
// sites, links and demands) and the TOML cost catalogs it names (package
// catalog), checked, and turned into a Case: every reference resolved to an
// index, every money amount converted to the case's currency, and every
// per-year quantity derived once — forecasts f₁·(1+g)^(t−1), tariffs
// p₁·(1−e)^(t−1), item list prices after erosion, the in-service year of an
// order under the lead-time rule, and each link's capacity before purchases.
// DESIGN.md §2 (the project design notes) fixes the meaning of every input.
//
// Units: capacity and traffic in Gbps in each direction (links are full
// duplex); lengths in km; money in the case currency; tariffs per Gbps per
// month; rates as fractions (0.08 = 8 %). Per-year slices have length
// Case.Horizon and are indexed from 0 (the first year).
//
// Load reports bad input as a list of *Error values (file, line, column, key)
// covering every problem of a file in one run, and suspicious but legal values
// as Warnings.
package plans
