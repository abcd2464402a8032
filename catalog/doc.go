// Package catalog reads vendor cost catalogs: TOML files of vendor quotes,
// the link upgrades they sell (capacity modules and leases) and their volume
// discounts.
//
// A catalog file looks like this (money in the vendor's currency, capacity
// in Gbps in each direction, lead times in months, lives in years):
//
//	[[vendors]]
//	id = "acme"
//	name = "Acme Optical"
//	quote = "Q-2027-17"
//	valid_until = 2027-06-30
//	currency = "EUR"
//
//	[[items]]
//	id = "acme-100g"
//	vendor = "acme"
//	kind = "module"          # or "lease" (no capex, opex is the yearly fee)
//	classes = ["metro"]      # link classes it fits
//	gbps = 100
//	capex = 40000            # per unit
//	capex_per_km = 0         # per unit per km of the link
//	opex = 2000              # per unit per year
//	lead_months = 3
//	book_life = 7
//	slots = 1                # link slots per unit (default 1)
//	max_units = 4            # per link (default 1)
//	erosion = 0.15           # yearly list price erosion (negative: prices rise)
//
//	[[tiers]]                # all-units discount per vendor and order year
//	vendor = "acme"
//	basis = "spend"          # or "units"
//	threshold = 200000
//	discount = 0.05
//
// Decode reports every problem of a file in one run as an ErrorList of
// *Error values with file, line, column and key; unknown keys are errors
// with a suggestion when an allowed key is close. Suspicious values that are
// still legal come back as Warnings.
//
// Parse, Source and Table are the checked TOML reader shared with package
// plans, which reads the case file the same way. The TOML decoder does not
// give positions for keys inside arrays of tables, so the source is scanned a
// second time to find where every key starts.
package catalog
