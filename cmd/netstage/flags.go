package main

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"
)

// Flag checks shared by every command that runs a search (solve, report,
// compare, sweep, mps), so that they accept and reject the same values.

// parseTimeLimit reads a Go duration ("90s", "2m") or a bare number of
// seconds ("90", "1.5"); "" and "0" mean no limit (DESIGN.md §4).
func parseTimeLimit(s string) (time.Duration, error) {
	s = strings.TrimSpace(s)
	if s == "" {
		return 0, nil
	}
	if secs, err := strconv.ParseFloat(s, 64); err == nil {
		if secs < 0 || math.IsNaN(secs) || math.IsInf(secs, 0) || secs > math.MaxInt64/float64(time.Second) {
			return 0, withCode(exitBadInput, fmt.Errorf("--time-limit must be ≥ 0 seconds, got %s", s))
		}
		return time.Duration(secs * float64(time.Second)), nil
	}
	d, err := time.ParseDuration(s)
	if err != nil || d < 0 {
		return 0, withCode(exitBadInput, fmt.Errorf("--time-limit %q is not a duration like 90s or 2m, nor a number of seconds", s))
	}
	return d, nil
}

// checkGap rejects a negative or NaN --gap.
func checkGap(gap float64) error {
	if gap < 0 || math.IsNaN(gap) {
		return withCode(exitBadInput, fmt.Errorf("--gap must be a fraction ≥ 0 (1e-4 = 0.01 %%), got %v", gap))
	}
	return nil
}

// checkSearchFlags validates --gap and --time-limit before any work starts.
func checkSearchFlags(gap float64, timeLimit string) error {
	if err := checkGap(gap); err != nil {
		return err
	}
	_, err := parseTimeLimit(timeLimit)
	return err
}
