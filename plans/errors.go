package plans

import "netstage/catalog"

// Bad input is reported with the same types as package catalog, so that one
// list holds the errors of a case file and of its catalogs, sorted by file
// and position.
type (
	// Error is one problem in an input file: {File, Line, Col, Key, Err}.
	// Err wraps one of the catalog.Err* sentinels (ErrRange, ErrReference,
	// ErrUnknownKey, ...), so errors.Is tells kinds apart.
	Error = catalog.Error
	// ErrorList is every error of one load, sorted by file and position.
	ErrorList = catalog.ErrorList
	// Warning is a legal but suspicious value.
	Warning = catalog.Warning
)
