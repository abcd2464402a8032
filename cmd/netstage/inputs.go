package main

import (
	"errors"
	"fmt"
	"io"

	"netstage/plans"
)

// loadCase loads the case file at path, or the embedded demo case when
// useDemo is set (exactly one of the two must be given). Every error it
// returns is bad input and carries exit code 2: a file that cannot be read,
// or the list of every problem found in the case and its catalogs. Warnings
// come back with the case; the caller decides where to print them
// (printWarnings).
func loadCase(path string, useDemo bool) (*plans.Case, []plans.Warning, error) {
	switch {
	case path == "" && !useDemo:
		return nil, nil, withCode(exitBadInput, errors.New("name a case file or use --demo"))
	case path != "" && useDemo:
		return nil, nil, withCode(exitBadInput, errors.New("give a case file or --demo, not both"))
	}
	var (
		c     *plans.Case
		warns []plans.Warning
		err   error
	)
	if useDemo {
		c, warns, err = plans.LoadDemo()
	} else {
		c, warns, err = plans.Load(path)
	}
	if err != nil {
		var list plans.ErrorList
		if errors.As(err, &list) {
			return nil, warns, withCode(exitBadInput, &inputErrors{list: list})
		}
		return nil, warns, withCode(exitBadInput, err)
	}
	return c, warns, nil
}

// inputErrors presents every error of a load under one heading, one per
// line, so that the message reads well after the "netstage: " prefix.
type inputErrors struct{ list plans.ErrorList }

func (e *inputErrors) Error() string {
	n := len(e.list)
	head := "bad input (1 error):"
	if n != 1 {
		head = fmt.Sprintf("bad input (%d errors):", n)
	}
	return head + "\n" + e.list.Error()
}

func (e *inputErrors) Unwrap() error { return e.list }

// printWarnings writes one line per warning.
func printWarnings(w io.Writer, warns []plans.Warning) {
	for _, x := range warns {
		fmt.Fprintln(w, "warning:", x)
	}
}
