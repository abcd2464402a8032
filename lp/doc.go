// Package lp solves linear programs with a sparse bounded-variable revised
// simplex method, and reads and writes them in MPS format.
//
// The problem form is
//
//	minimise (or maximise) c·x + constant
//	subject to rowLower ≤ A·x ≤ rowUpper, colLower ≤ x ≤ colUpper,
//
// with any bound allowed to be infinite. Nothing is converted to standard
// form: each row gets a slack and every variable keeps its own bounds, so
// branch-and-bound can change bounds and re-solve from the previous basis.
//
// The package knows nothing of networks or money; see package mip for integer
// programs built on it.
package lp
