// Command netstage plans multi-year capacity investments for a network: it
// reads a planning case and vendor cost catalogs, chooses which link upgrades
// to buy in which year, and reports the staged plan with its NPV breakdown.
//
// Exit codes: 0 success (a plan found, warnings only), 1 runtime failure or
// no plan within limits, 2 bad input or usage, 3 infeasible or unbounded case.
package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
)

// Exit codes shared by every command (DESIGN.md §4).
const (
	exitOK         = 0
	exitFailure    = 1
	exitBadInput   = 2
	exitInfeasible = 3
)

// version is set at build time with -ldflags "-X main.version=...".
var version = "dev"

func main() {
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

// run executes one command line and returns the process exit code.
// Ctrl-C cancels the context so that long solves stop cleanly and still
// report the best plan found.
func run(args []string, stdout, stderr io.Writer) int {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	root := newRootCmd(stdout, stderr)
	root.SetArgs(args)
	err := root.ExecuteContext(ctx)
	if err == nil {
		return exitOK
	}
	var quiet *silentExit
	if errors.As(err, &quiet) {
		return quiet.code
	}
	fmt.Fprintln(stderr, "netstage:", err)
	var ce *codedError
	if errors.As(err, &ce) {
		return ce.code
	}
	// Errors cobra raises itself (unknown flag or command, wrong arity) are usage errors.
	return exitBadInput
}

// codedError carries the exit code a command chose for its error.
type codedError struct {
	code int
	err  error
}

func (e *codedError) Error() string { return e.err.Error() }
func (e *codedError) Unwrap() error { return e.err }

// withCode wraps err so that run exits with code. A nil err stays nil.
func withCode(code int, err error) error {
	if err == nil {
		return nil
	}
	return &codedError{code: code, err: err}
}

// silentExit ends the command with code after the command has already
// written everything the user needs (for example an infeasible case that was
// explained on stdout).
type silentExit struct{ code int }

func (e *silentExit) Error() string { return fmt.Sprintf("exit status %d", e.code) }
