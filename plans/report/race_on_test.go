//go:build race

package report

// raceEnabled is true when the tests run under the race detector.
const raceEnabled = true
