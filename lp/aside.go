package lp

import (
	"runtime"
	"sync/atomic"
)

// asideMinRows is the least number of rows at which the dual simplex
// solves for the steepest-edge update (τ = B⁻¹ρ) on a second goroutine.
// That solve is dense whenever rho is (the hyper-sparse path does not pay
// there), and it was the largest single cost of the dual simplex: 15 % of
// the CPU of a 60 s search on the synthetic M case (25 sites, 7 years;
// 5,175 rows), 12 % on L (50 sites, 10 years; 23,826 rows). Measured with
// the solve aside, the same paths run faster: BenchmarkSolveNodes on M
// (300 nodes, 66,209 iterations) 12.2 and 12.6 s against 13.5 s; the 16
// synthetic 10-site 7-year cases (1,528 rows) proved in 49.0 and 43.7 s
// against 55.6 and 46.8 s (two pairs of runs, the machine's speed
// drifting between them); in 60 s, M's search did 2,400 nodes against
// 2,140, and L's root cut rounds 78,544 iterations against 72,944.
const asideMinRows = 1000

// asideWorker runs dense FTRANs (factor.ftranAside) on a goroutine of its
// own while the dual simplex goes on with the pivot row, the ratio test
// and the entering column. The goroutine lives for one dualSimplex call
// and waits for work by looking again and again, yielding its core now
// and then (runtime.Gosched), not by sleeping: a first version started a
// goroutine per solve and reported back on a channel, and the wake-ups
// cost more than the solves saved (M's search did 1,860 nodes in 60 s
// against 2,150). So a large LP keeps two cores busy while it solves.
// When the goroutine has not taken a solve by the time the caller needs
// it (a single core, or the other one busy), join does it itself. Either
// way the arithmetic is the same, so the result does not depend on who
// ran it.
type asideWorker struct {
	// job is gen<<1, with the low bit set once the solve of that
	// generation is taken (by the goroutine or by join); done is the
	// generation the goroutine finished last.
	job, done atomic.Uint64
	stop      atomic.Bool
	gen       uint64
	pending   bool // started and not yet joined
	f         *factor
	b, out    []float64
}

// asideBusy is set while a worker exists: one at a time in the process,
// so that concurrent solves (the search's and its helper's) do not fill
// both cores with waiting goroutines.
var asideBusy atomic.Bool

// newAsideWorker starts the goroutine of a worker, or returns nil when
// another worker exists; close ends it.
func newAsideWorker() *asideWorker {
	if !asideBusy.CompareAndSwap(false, true) {
		return nil
	}
	a := &asideWorker{}
	go a.run()
	return a
}

// asideStarts counts the solves handed to a worker (for the tests).
var asideStarts atomic.Int64

// asideSpins is how many times the goroutine looks for work between two
// yields of its core.
const asideSpins = 64

func (a *asideWorker) run() {
	for n := 1; !a.stop.Load(); n++ {
		st := a.job.Load()
		if st&1 == 0 && st != 0 && a.job.CompareAndSwap(st, st|1) {
			a.f.ftranAside(a.b, a.out)
			a.done.Store(st >> 1)
			continue
		}
		if n%asideSpins == 0 {
			runtime.Gosched()
		}
	}
}

// start hands f.ftranAside(b, out) to the worker. The caller must not
// change f, b or out until join.
func (a *asideWorker) start(f *factor, b, out []float64) {
	asideStarts.Add(1)
	a.gen++
	a.f, a.b, a.out, a.pending = f, b, out, true
	a.job.Store(a.gen << 1)
}

// join returns once the solve of the last start is done, doing it when
// the goroutine has not taken it; without a pending solve it returns at
// once.
func (a *asideWorker) join() {
	if a == nil || !a.pending {
		return
	}
	a.pending = false
	if a.job.CompareAndSwap(a.gen<<1, a.gen<<1|1) {
		a.f.ftranAside(a.b, a.out)
		return
	}
	for a.done.Load() != a.gen {
	}
}

// close joins the pending solve and ends the goroutine.
func (a *asideWorker) close() {
	if a == nil {
		return
	}
	a.join()
	a.stop.Store(true)
	asideBusy.Store(false)
}
