package scenario

import (
	"context"
	"fmt"
	"sync"

	"netstage/plans"
)

// TornadoOptions tune Tornado. The zero value of a field means its default.
type TornadoOptions struct {
	// Solve solves one case (required).
	Solve SolveFunc
	// Base is the case's own solve, when the caller has it (the report's
	// plan): its NPV is the bars' base. Nil: Tornado solves the case.
	Base *plans.Result
	// SolveFrom, when set, solves each end starting from the base plan
	// (as sweep's Options.SolveFrom): where that plan fits, a time-limited
	// end is never worse than it.
	SolveFrom SolveFromFunc
	// Jobs is the number of solves run at once (0 or 1: one at a time).
	Jobs int
	// Progress, when set, is called after each solve at a factor's end with
	// the setting solved, its outcome and the count done of the total (one
	// call at a time, from several goroutines when Jobs > 1).
	Progress func(s Setting, r *Record, done, total int)
}

// Tornado is a one-factor-at-a-time sensitivity run: the case as it is, and
// for each factor the case with that factor alone at its low and at its
// high value (Apply with that one setting), every other assumption at the
// case's own values: 1 + 2k solves for k factors (1 + 2k − 1 when Base is
// given), not the product of a grid. It returns one bar per factor, widest
// swing first (a bar with an end that has no plan first of all), and the
// base record.
//
// An end without a plan (infeasible, or no plan within the limits) has a
// nil NPV and its status in the bar; a solve that fails at run time is
// recorded as StatusError, as in a sweep. Bad input (an unknown factor, a
// value that makes no case) is an error wrapping ErrBadScenario, found
// before any solve.
func Tornado(ctx context.Context, c *plans.Case, factors []plans.Sensitivity, opts TornadoOptions) ([]TornadoBar, Record, error) {
	if opts.Solve == nil {
		panic("scenario: Tornado without a solve function")
	}
	// Each end is a point with one setting, applied to c alone.
	ends := make([]Point, 0, 2*len(factors))
	cases := make([]*plans.Case, 0, 2*len(factors))
	seen := map[string]bool{}
	for _, f := range factors {
		if !knownFactor(f.Name) {
			return nil, Record{}, fmt.Errorf("%w: %w %q", ErrBadScenario, ErrUnknownFactor, f.Name)
		}
		if seen[f.Name] {
			return nil, Record{}, fmt.Errorf("%w: factor %s is given twice", ErrBadScenario, f.Name)
		}
		seen[f.Name] = true
		for _, v := range []float64{f.Low, f.High} {
			p := Point{{Name: f.Name, Value: v}}
			cc, err := Apply(c, p)
			if err != nil {
				return nil, Record{}, fmt.Errorf("%w: %w (tornado end %s)", ErrBadScenario, err, p)
			}
			ends = append(ends, p)
			cases = append(cases, cc)
		}
	}

	baseRes := opts.Base
	if baseRes == nil {
		var err error
		if baseRes, err = opts.Solve(ctx, c); err != nil {
			return nil, Record{}, fmt.Errorf("scenario: tornado base: %w", err)
		}
	}
	base := newRecord(0, false, Point{}, c, baseRes, nil)

	records := make([]Record, len(ends))
	var mu sync.Mutex
	done := 0
	err := parallel(len(ends), opts.Jobs, func(k int) error {
		if ctx.Err() != nil {
			return nil
		}
		res, err := solveStarting(ctx, opts.Solve, opts.SolveFrom, cases[k], baseRes.Plan)
		records[k] = newRecord(k+1, true, ends[k], cases[k], res, err)
		if opts.Progress != nil {
			mu.Lock()
			done++
			opts.Progress(ends[k][0], &records[k], done, len(ends))
			mu.Unlock()
		}
		return nil
	})
	if err == nil {
		err = ctx.Err()
	}
	if err != nil {
		return nil, Record{}, fmt.Errorf("scenario: tornado stopped: %w", err)
	}
	bars := make([]TornadoBar, len(factors))
	for i, f := range factors {
		bars[i] = newTornadoBar(f.Name, f.Low, f.High, &records[2*i], &records[2*i+1], &base)
	}
	sortTornado(bars)
	return bars, base, nil
}
