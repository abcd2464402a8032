// Package demo embeds the demo case: an invented regional operator, its
// network, a five-year traffic forecast and two invented vendors' catalogs.
// Every name and number in it is made up for trying netstage; none describes
// a real company, network or quote.
//
// `netstage demo DIR` writes these files for editing, and `--demo` on any
// command reads them from here directly.
package demo

import "embed"

// CaseFile is the name of the case file inside Files.
const CaseFile = "case.toml"

// Files holds case.toml and the catalogs/ it names.
//
//go:embed case.toml catalogs/*.toml
var Files embed.FS
