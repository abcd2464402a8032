package lp

import (
	"context"
	"math"
	"math/bits"
	"math/rand"
	"runtime"
	"slices"
	"time"
)

const (
	// perturbBase is the relative size of the cost perturbation against
	// dual degeneracy (common practice: about 5e-7).
	perturbBase = 5e-7
	// maxRounds bounds the dual/primal clean-up rounds after the main
	// dual simplex.
	maxRounds = 6
	// checkEvery is how often (iterations) the context and clock are read.
	checkEvery = 16
	// stallIterations: after this many consecutive degenerate dual pivots
	// an unperturbed solve perturbs its costs (against cycling).
	stallIterations = 50
	// minPivotTol is the smallest pivot the dual ratio test falls back to
	// before giving up on a row that cannot prove infeasibility.
	minPivotTol = 1e-11
	// certificateZero: entries of a tableau row below this are treated as
	// zero when checking an infeasibility proof.
	certificateZero = 1e-12
	// safetyIterations (plus 50 per variable) ends a solve that has no
	// iteration limit but runs far longer than the simplex method needs.
	safetyIterations = 100000
)

// slackBasis makes every slack basic and puts each column at a bound.
func (s *Solver) slackBasis() {
	nm := s.n + s.m
	s.stat = make([]VarStatus, nm)
	s.x = make([]float64, nm)
	s.head = make([]int, s.m)
	s.dse = make([]float64, s.m)
	for j := 0; j < s.n; j++ {
		s.stat[j] = s.defaultStatus(j)
	}
	for i := 0; i < s.m; i++ {
		s.stat[s.n+i] = Basic
		s.head[i] = s.n + i
		s.dse[i] = 1
	}
	s.resizeScratch()
	s.facValid = false
}

// defaultStatus is the nonbasic status of v at its finite bound nearest
// zero, or AtZero when free.
func (s *Solver) defaultStatus(v int) VarStatus {
	lo, up := s.lo[v], s.up[v]
	switch {
	case lo == up:
		return Fixed
	case math.IsInf(lo, -1) && math.IsInf(up, 1):
		return AtZero
	case math.IsInf(lo, -1):
		return AtUpper
	case math.IsInf(up, 1):
		return AtLower
	case math.Abs(up) < math.Abs(lo):
		return AtUpper
	}
	return AtLower
}

func (s *Solver) resizeScratch() {
	nm := s.n + s.m
	s.x = resize(s.x, nm)
	s.d = resize(s.d, nm)
	s.y = resize(s.y, s.m)
	s.rho = resize(s.rho, s.m)
	s.tau = resize(s.tau, s.m)
	s.tauAside = resize(s.tauAside, s.m)
	s.tauWork = resize(s.tauWork, s.m)
	s.alphaCol = resize(s.alphaCol, s.m)
	s.primalRHS = resize(s.primalRHS, s.m)
	s.alphaRow = resize(s.alphaRow, nm)
	if cap(s.rowMark) >= nm {
		s.rowMark = s.rowMark[:nm]
	} else {
		s.rowMark = make([]bool, nm)
	}
	s.rowDirty = true
	s.work = resize(s.work, nm)
	for i := len(s.rowIndex); i < s.m; i++ {
		s.rowIndex = append(s.rowIndex, i)
	}
}

// column returns variable v's column of [A' | −I].
func (s *Solver) column(v int) ([]int, []float64) {
	if v < s.n {
		a, b := s.csc.Start[v], s.csc.Start[v+1]
		return s.csc.Index[a:b], s.csc.Value[a:b]
	}
	i := v - s.n
	return s.rowIndex[i : i+1 : i+1], minusOne
}

var minusOne = []float64{-1}

// ensureFactor factorises the basis if needed, replacing dependent basic
// columns with slacks. It reports whether a factorisation is available.
func (s *Solver) ensureFactor() bool {
	if s.facValid {
		return true
	}
	if s.fac != nil && !s.fac.shared {
		s.lu.spare = s.fac // about to be replaced: its arrays serve the new factor
		s.fac = nil
	}
	for attempt := 0; attempt < 4; attempt++ {
		f, bad, free := factorizeWith(&s.lu, s.m, func(p int) ([]int, []float64) { return s.column(s.head[p]) })
		if f != nil {
			s.fac = f
			s.facValid = true
			return true
		}
		for k, p := range bad {
			out := s.head[p]
			s.stat[out] = s.nearestBoundStatus(out)
			in := s.n + free[k]
			s.head[p] = in
			s.stat[in] = Basic
			s.dse[p] = 1
		}
	}
	return false
}

// newRowWeights sets the dual steepest-edge weights of the slacks of rows
// added since the last solve (dseDue) to their exact values ‖e_pᵀB⁻¹‖²,
// one btran each. The slack of a new row i is basic, and row p of B⁻¹ is
// (−a_B·B_old⁻¹, e_i): its norm grows with the row's coefficients on
// basic columns, where the weight 1 that AddRows gives would make the
// pricing take every new row first. The old positions' weights stay
// exact (their rows of B⁻¹ only gain zeros).
func (s *Solver) newRowWeights() {
	if len(s.dseDue) == 0 {
		return
	}
	rho := make([]float64, s.m)
	for _, p := range s.dseDue {
		if p >= s.m || s.head[p] != s.n+p {
			continue // the factorisation put another column there
		}
		rho[p] = 1
		s.fac.btran(rho)
		w := 0.0
		for i, v := range rho {
			w += v * v
			rho[i] = 0
		}
		s.dse[p] = w
	}
	s.dseDue = s.dseDue[:0]
}

// refactor rebuilds the factorisation and recomputes primal and dual values.
func (s *Solver) refactor() bool {
	s.facValid = false
	if !s.ensureFactor() {
		return false
	}
	s.computePrimal()
	s.computeDuals()
	return true
}

// btranRow overwrites rho (length m, indexed by position) with e_pᵀ·B⁻¹
// when rho = e_p on entry.
func (s *Solver) btranRow(rho []float64) { s.fac.btran(rho) }

// pivotRow computes row[j] = rhoᵀ·a_j for every column j (row-wise, using
// the nonzeros of rho). The slack entries, −rho[i], are left to the caller.
func (s *Solver) pivotRow(rho []float64, row []float64) {
	for j := range row[:s.n] {
		row[j] = 0
	}
	for i, r := range rho {
		if r == 0 {
			continue
		}
		for p := s.csr.Start[i]; p < s.csr.Start[i+1]; p++ {
			row[s.csr.Index[p]] += r * s.csr.Value[p]
		}
	}
}

// pivotRowSparse fills s.alphaRow with the pivot row ρᵀ[A | −I] over all
// variables and lists in s.rowNZ the variables whose entry may be nonzero,
// touching only the rows where ρ is nonzero and their entries. Entries
// outside the list are zero. rhoNZ lists the rows where ρ may be nonzero
// (nil: anywhere). With nonbasicOnly the entries of basic columns are left
// out (they stay zero), read from the partitioned copy s.part, which must
// be up to date.
func (s *Solver) pivotRowSparse(rho []float64, rhoNZ []int, nonbasicOnly bool) {
	row, mark := s.alphaRow, s.rowMark
	if s.rowDirty {
		for v := range row {
			row[v] = 0
			mark[v] = false
		}
		s.rowDirty = false
	} else {
		for _, v := range s.rowNZ {
			row[v] = 0
			mark[v] = false
		}
	}
	nz := s.rowNZ[:0]
	n := s.n
	idx, val, ends := s.csr.Index, s.csr.Value, s.csr.Start[1:]
	if nonbasicOnly {
		idx, val, ends = s.part.idx, s.part.val, s.part.end
	}
	add := func(i int, r float64) {
		v := n + i
		row[v] = -r
		mark[v] = true
		nz = append(nz, v)
		for p := s.csr.Start[i]; p < ends[i]; p++ {
			j := idx[p]
			if !mark[j] {
				mark[j] = true
				nz = append(nz, j)
			}
			row[j] += r * val[p]
		}
	}
	if rhoNZ != nil {
		for _, i := range rhoNZ {
			if r := rho[i]; r != 0 {
				add(i, r)
			}
		}
	} else {
		for i, r := range rho {
			if r != 0 {
				add(i, r)
			}
		}
	}
	s.rowNZ = nz
}

// fixStatuses makes every nonbasic status consistent with the bounds and
// sets nonbasic values accordingly.
func (s *Solver) fixStatuses() {
	for v := range s.stat {
		st := s.stat[v]
		if st == Basic {
			continue
		}
		lo, up := s.lo[v], s.up[v]
		switch {
		case lo == up:
			st = Fixed
		case st == Fixed:
			st = s.defaultStatus(v)
		case st == AtLower && math.IsInf(lo, -1), st == AtUpper && math.IsInf(up, 1), st == AtZero && !(math.IsInf(lo, -1) && math.IsInf(up, 1)):
			st = s.defaultStatus(v)
		}
		s.stat[v] = st
		s.x[v] = s.boundValue(v, st)
	}
}

func (s *Solver) boundValue(v int, st VarStatus) float64 {
	switch st {
	case AtLower, Fixed:
		return s.lo[v]
	case AtUpper:
		return s.up[v]
	}
	return 0
}

// computePrimal sets the basic values from the nonbasic ones:
// B·x_B = −N·x_N.
func (s *Solver) computePrimal() {
	rhs := s.primalRHS
	clear(rhs)
	for v, st := range s.stat {
		if st == Basic {
			continue
		}
		xv := s.x[v]
		if xv == 0 {
			continue
		}
		idx, val := s.column(v)
		for k, i := range idx {
			rhs[i] -= val[k] * xv
		}
	}
	s.fac.ftran(rhs)
	for p, v := range s.head {
		s.x[v] = rhs[p]
	}
}

// computeDuals sets y from Bᵀ·y = c_B and the reduced costs d = c − [A|−I]ᵀy
// for the costs in s.work.
func (s *Solver) computeDuals() {
	y := s.y
	for p, v := range s.head {
		y[p] = s.work[v]
	}
	s.fac.btran(y)
	for j := 0; j < s.n; j++ {
		if s.stat[j] == Basic {
			s.d[j] = 0
			continue
		}
		dj := s.work[j]
		for p := s.csc.Start[j]; p < s.csc.Start[j+1]; p++ {
			dj -= y[s.csc.Index[p]] * s.csc.Value[p]
		}
		s.d[j] = dj
	}
	for i := 0; i < s.m; i++ {
		v := s.n + i
		if s.stat[v] == Basic {
			s.d[v] = 0
		} else {
			s.d[v] = s.work[v] + y[i]
		}
	}
}

// dualInfeasible reports whether nonbasic v's reduced cost has the wrong
// sign for its status.
func (s *Solver) dualInfeasible(v int, tol float64) bool {
	switch s.stat[v] {
	case AtLower:
		return s.d[v] < -tol
	case AtUpper:
		return s.d[v] > tol
	case AtZero:
		return math.Abs(s.d[v]) > tol
	}
	return false
}

// flipToDualFeasible moves boxed nonbasic variables to the bound their
// reduced cost asks for, and reports whether some other variable stays dual
// infeasible. It recomputes the basic values when something moved.
func (s *Solver) flipToDualFeasible(tol float64) (stillInfeasible bool) {
	moved := false
	for v, st := range s.stat {
		if st == Basic || st == Fixed || !s.dualInfeasible(v, tol) {
			continue
		}
		st, ok := s.flipStatus(v)
		if !ok {
			stillInfeasible = true
			continue
		}
		s.stat[v] = st
		s.x[v] = s.boundValue(v, st)
		moved = true
	}
	if moved {
		s.computePrimal()
	}
	return stillInfeasible
}

// flipStatus returns the bound status at which nonbasic v's reduced cost
// has the right sign, and false when the bound it needs is infinite (no
// flip mends v).
func (s *Solver) flipStatus(v int) (VarStatus, bool) {
	switch {
	case s.d[v] > 0 && !math.IsInf(s.lo[v], -1):
		return AtLower, true
	case s.d[v] < 0 && !math.IsInf(s.up[v], 1):
		return AtUpper, true
	}
	return 0, false
}

func (s *Solver) primalTol() float64 {
	if s.set.FeasibilityTol > 0 {
		return s.set.FeasibilityTol
	}
	return defaultFeasibilityTol
}

func (s *Solver) dualTol() float64 {
	if s.set.OptimalityTol > 0 {
		return s.set.OptimalityTol
	}
	return defaultOptimalityTol
}

// limits tracks iteration and time limits and cancellation.
type limits struct {
	ctx      context.Context
	deadline time.Time
	maxIter  int
}

// check returns a non-zero status when the solve must stop.
func (s *Solver) checkLimits(lim *limits) Status {
	if lim.maxIter > 0 && s.iterations >= lim.maxIter {
		return IterationLimit
	}
	if s.iterations >= safetyIterations+50*(s.n+s.m) {
		// Far beyond what the simplex method needs: assume cycling.
		return NumericalTrouble
	}
	if s.iterations%checkEvery == 0 {
		if lim.ctx.Err() != nil {
			return Cancelled
		}
		if !lim.deadline.IsZero() && time.Now().After(lim.deadline) {
			return TimeLimit
		}
	}
	return StatusUnknown
}

// run is the solve driver.
func (s *Solver) run(ctx context.Context) Status {
	s.iterations = 0
	s.limitBound = false
	s.resizeScratch()
	lim := &limits{ctx: ctx, maxIter: s.set.MaxIterations}
	if s.set.TimeLimit > 0 {
		lim.deadline = time.Now().Add(s.set.TimeLimit)
	}
	if ctx.Err() != nil {
		return Cancelled
	}
	if s.m == 0 {
		return s.solveNoRows()
	}
	if !s.ensureFactor() {
		return NumericalTrouble
	}
	s.newRowWeights()
	copy(s.work, s.cost)
	s.perturbed = false
	if !s.warm && !s.set.NoPerturbation {
		s.perturb()
		s.perturbed = true
	}
	s.fixStatuses()
	s.computePrimal()
	s.computeDuals()
	ptol, dtol := s.primalTol(), s.dualTol()

	for round := 0; round < maxRounds; round++ {
		if s.flipToDualFeasible(dtol) && round == 0 && s.warm && s.maxPrimalInfeasibility() <= ptol {
			// A primal feasible basis with new costs (SetObjective): the
			// primal simplex continues from it directly.
			if st := s.primalSimplex(lim); st != Optimal {
				return st
			}
		}
		if s.flipToDualFeasible(dtol) {
			st := s.dualPhase1(lim)
			if st != Optimal {
				return st
			}
			if s.flipToDualFeasible(dtol) {
				// Dual infeasible: the LP is unbounded or infeasible.
				return s.unboundedOrInfeasible(lim)
			}
		}
		st := s.dualSimplex(lim, s.set.HasCutoff)
		switch st {
		case IterationLimit, TimeLimit, Cancelled:
			// The dual objective bounds the optimum only on the true
			// costs: a perturbed solve gets them back if its basis stays
			// dual feasible under them.
			if s.perturbed {
				s.unperturb(dtol)
			}
			s.limitBound = !s.perturbed && s.maxDualInfeasibility() <= dtol
		}
		if st != Optimal {
			// An Infeasible status comes with a checked certificate that
			// does not depend on the costs, perturbed or not.
			return st
		}
		if s.perturbed {
			copy(s.work, s.cost)
			s.perturbed = false
		}
		if !s.freshen(round) {
			return NumericalTrouble
		}
		if s.maxDualInfeasibility() > dtol {
			st = s.primalSimplex(lim)
			if st != Optimal {
				return st
			}
			if !s.freshen(round) {
				return NumericalTrouble
			}
		}
		if s.maxPrimalInfeasibility() <= ptol && s.maxDualInfeasibility() <= dtol {
			return Optimal
		}
	}
	return NumericalTrouble
}

// freshUpdates: below this many updates since the last factorisation, the
// final check recomputes values with the current factors instead of
// factorising again.
const freshUpdates = 20

// freshen recomputes primal and dual values from scratch for the final
// check; with many updates (or in a repeated round) it refactorises first.
func (s *Solver) freshen(round int) bool {
	if round > 0 || s.fac.numUpdates() >= freshUpdates {
		return s.refactor()
	}
	s.computePrimal()
	s.computeDuals()
	return true
}

// solveNoRows handles a model without rows: each column sits at its best
// bound.
func (s *Solver) solveNoRows() Status {
	copy(s.work, s.cost)
	for j := 0; j < s.n; j++ {
		c := s.work[j]
		switch {
		case c > 0 && math.IsInf(s.lo[j], -1), c < 0 && math.IsInf(s.up[j], 1):
			return Unbounded
		case s.lo[j] == s.up[j]:
			s.stat[j] = Fixed
		case c > 0:
			s.stat[j] = AtLower
		case c < 0:
			s.stat[j] = AtUpper
		default:
			s.stat[j] = s.defaultStatus(j)
		}
		s.x[j] = s.boundValue(j, s.stat[j])
		s.d[j] = c
	}
	return Optimal
}

// perturb adds small random amounts to the working costs of the columns,
// in the direction that keeps a column at its likely bound dual feasible.
func (s *Solver) perturb() {
	rng := rand.New(rand.NewSource(s.set.Seed + 1))
	maxC := 0.0
	for j := 0; j < s.n; j++ {
		maxC = math.Max(maxC, math.Abs(s.cost[j]))
	}
	if maxC == 0 {
		return
	}
	base := perturbBase * math.Max(1, math.Min(maxC, 1e3))
	for j := 0; j < s.n; j++ {
		lo, up := s.lo[j], s.up[j]
		if lo == up {
			continue
		}
		delta := base * (1 + math.Abs(s.cost[j])/maxC) * (0.5 + 0.5*rng.Float64())
		switch {
		case s.stat[j] == AtUpper || (s.stat[j] == Basic && math.IsInf(lo, -1) && !math.IsInf(up, 1)):
			s.work[j] -= delta
		case math.IsInf(lo, -1) && math.IsInf(up, 1):
		default:
			s.work[j] += delta
		}
	}
}

// unperturb restores the true costs (clearing s.perturbed) when the basis
// stays dual feasible under them, up to flips of boxed columns to their
// other bound (which it makes, recomputing the primal values); otherwise
// the perturbed costs and their duals stay. Cost: one or two
// recomputations of the duals.
func (s *Solver) unperturb(tol float64) {
	s.savedWork = append(s.savedWork[:0], s.work...)
	copy(s.work, s.cost)
	s.computeDuals()
	for v, st := range s.stat {
		if st == Basic || st == Fixed || !s.dualInfeasible(v, tol) {
			continue
		}
		if _, ok := s.flipStatus(v); ok {
			continue // a flip mends it
		}
		copy(s.work, s.savedWork)
		s.computeDuals()
		return
	}
	s.flipToDualFeasible(tol)
	s.perturbed = false
}

// perturbNonbasic perturbs the working costs of the nonbasic columns in the
// direction that keeps them dual feasible; the duals y do not change, so
// only their reduced costs move.
func (s *Solver) perturbNonbasic() {
	rng := rand.New(rand.NewSource(s.set.Seed + int64(s.iterations) + 2))
	maxC := 0.0
	for j := 0; j < s.n; j++ {
		maxC = math.Max(maxC, math.Abs(s.cost[j]))
	}
	base := perturbBase * math.Max(1, math.Min(maxC, 1e3))
	for j := 0; j < s.n; j++ {
		var delta float64
		switch s.stat[j] {
		case AtLower:
			delta = base * (0.5 + 0.5*rng.Float64())
		case AtUpper:
			delta = -base * (0.5 + 0.5*rng.Float64())
		default:
			continue
		}
		s.work[j] += delta
		s.d[j] += delta
	}
	s.perturbed = true
}

func (s *Solver) maxPrimalInfeasibility() float64 {
	worst := 0.0
	for _, v := range s.head {
		worst = math.Max(worst, math.Max(s.lo[v]-s.x[v], s.x[v]-s.up[v]))
	}
	return worst
}

func (s *Solver) maxDualInfeasibility() float64 {
	worst := 0.0
	for v, st := range s.stat {
		switch st {
		case AtLower:
			worst = math.Max(worst, -s.d[v])
		case AtUpper:
			worst = math.Max(worst, s.d[v])
		case AtZero:
			worst = math.Max(worst, math.Abs(s.d[v]))
		}
	}
	return worst
}

// dualPhase1 finds a dual feasible basis by solving, with the dual simplex,
// the problem with the same costs and auxiliary bounds: free variables in
// [−phase1Box, phase1Box], one-sided ones in [0, 1] or [−1, 0], boxed ones
// fixed at 0. Every basis is dual feasible for it after bound flips, and
// its optimal basis is dual feasible for the real problem when the real
// problem has a dual feasible basis at all.
func (s *Solver) dualPhase1(lim *limits) Status {
	nm := s.n + s.m
	saveLo := append([]float64(nil), s.lo...)
	saveUp := append([]float64(nil), s.up...)
	for v := 0; v < nm; v++ {
		lo, up := saveLo[v], saveUp[v]
		switch {
		case math.IsInf(lo, -1) && math.IsInf(up, 1):
			s.lo[v], s.up[v] = -phase1Box, phase1Box
		case math.IsInf(up, 1):
			s.lo[v], s.up[v] = 0, 1
		case math.IsInf(lo, -1):
			s.lo[v], s.up[v] = -1, 0
		default:
			s.lo[v], s.up[v] = 0, 0
		}
		if s.stat[v] != Basic {
			switch {
			case s.lo[v] == s.up[v]:
				s.stat[v] = Fixed
			case s.d[v] >= 0:
				s.stat[v] = AtLower
			default:
				s.stat[v] = AtUpper
			}
			s.x[v] = s.boundValue(v, s.stat[v])
		}
	}
	s.computePrimal()
	st := s.dualSimplex(lim, false)
	copy(s.lo, saveLo)
	copy(s.up, saveUp)
	for v := 0; v < nm; v++ {
		if s.stat[v] == Basic {
			continue
		}
		// Put each nonbasic variable where its reduced cost asks.
		lo, up := s.lo[v], s.up[v]
		switch {
		case lo == up:
			s.stat[v] = Fixed
		case s.d[v] >= 0 && !math.IsInf(lo, -1):
			s.stat[v] = AtLower
		case s.d[v] <= 0 && !math.IsInf(up, 1):
			s.stat[v] = AtUpper
		default:
			s.stat[v] = s.defaultStatus(v)
		}
		s.x[v] = s.boundValue(v, s.stat[v])
	}
	if st == Infeasible {
		// Cannot happen in exact arithmetic (zero is feasible for the
		// auxiliary problem).
		st = NumericalTrouble
	}
	if st != Optimal {
		return st
	}
	if !s.refactor() {
		return NumericalTrouble
	}
	return Optimal
}

// unboundedOrInfeasible settles a dual infeasible problem: with zero costs
// the dual simplex finds a feasible point (or proves infeasibility); from
// there the primal simplex with the real costs finds the unbounded ray (or
// the optimum, should the dual infeasibility have been numerical noise).
func (s *Solver) unboundedOrInfeasible(lim *limits) Status {
	for v := range s.work {
		s.work[v] = 0
	}
	s.computeDuals()
	st := s.dualSimplex(lim, false)
	copy(s.work, s.cost)
	if st != Optimal {
		return st
	}
	if !s.refactor() {
		return NumericalTrouble
	}
	st = s.primalSimplex(lim)
	if st == Optimal {
		if !s.refactor() {
			return NumericalTrouble
		}
		if s.maxPrimalInfeasibility() <= s.primalTol() && s.maxDualInfeasibility() <= s.dualTol() {
			return Optimal
		}
		return NumericalTrouble
	}
	return st
}

// objectiveWork returns the working-cost objective of the current iterate.
func (s *Solver) objectiveWork() float64 {
	obj := 0.0
	for v, c := range s.work {
		obj += c * s.x[v]
	}
	return obj
}

// cutoffScaled returns the objective cutoff for the internal minimisation
// without the model constant.
func (s *Solver) cutoffScaled() float64 {
	c := s.set.ObjectiveCutoff - s.model.Constant
	if s.model.Sense == Maximize {
		c = -c
	}
	return c
}

// dualSimplex runs dual simplex iterations from a dual feasible basis
// until primal feasibility (Optimal), dual unboundedness (Infeasible), a
// limit, or (with useCutoff, only for the true costs) an objective above
// Settings.ObjectiveCutoff.
func (s *Solver) dualSimplex(lim *limits, useCutoff bool) Status {
	ptol, dtol := s.primalTol(), s.dualTol()
	rho, row, alpha, tau := s.rho, s.alphaRow, s.alphaCol, s.tau
	cutoff := s.cutoffScaled()
	cutoffAt := cutoff + dtol*(1+math.Abs(cutoff))
	// The objective is kept up to date through the iterations (exactly
	// recomputed whenever values are), and recomputed exactly before it is
	// compared with the cutoff within objSlack.
	objSlack := cutoffObjectiveSlack * (1 + math.Abs(cutoff))
	obj := 0.0
	// pinf[p] is the primal infeasibility of the variable basic at p (0
	// within tolerance), kept up to date where values change; dirty asks
	// for all of it (and obj) to be recomputed.
	s.pinf = resize(s.pinf, s.m)
	s.infAt = resize(s.infAt, s.m)
	pinf := s.pinf
	dirty := true
	// With SecondCore and two cores or more, the DSE solve of a dense rho
	// runs aside, beside the pivot row, the ratio test and the entering
	// column; every path that changes the factor joins it first.
	var aside *asideWorker
	if s.set.SecondCore && s.m >= asideMinRows && runtime.GOMAXPROCS(0) > 1 {
		if aside = newAsideWorker(); aside != nil {
			defer aside.close()
		}
	}
	// refresh factorises the basis afresh, as a numerical doubt or the
	// growth of the updates asks, restores dual feasibility by bound
	// flips and asks for the values to be recomputed.
	refresh := func() bool {
		aside.join()
		if !s.refactor() {
			return false
		}
		s.flipToDualFeasible(dtol)
		dirty = true
		return true
	}
	degenerate := 0
	// The positions where rho, alpha and tau may be nonzero after their
	// last solves (nil: anywhere). Each iteration zeroes only those: three
	// dense clears of m values cost more than the sparse solves on large
	// models.
	var rhoWas, alphaWas, tauWas []int
	for {
		if degenerate > stallIterations && !s.perturbed && !s.set.NoPerturbation {
			// A long run of degenerate pivots: perturb the costs of the
			// nonbasic columns now (the run driver removes it at the end).
			s.perturbNonbasic()
			degenerate = 0
		}
		if s.perturbed {
			useCutoff = false
		}
		if st := s.checkLimits(lim); st != StatusUnknown {
			return st
		}
		if s.fac.needsRefactor() && !refresh() {
			return NumericalTrouble
		}
		if dirty {
			// New solve or new factorisation (which may have replaced
			// dependent columns): the statuses may have changed.
			s.syncPartition()
			s.infList = s.infList[:0]
			for p := range pinf {
				pinf[p] = 0
				s.infAt[p] = -1
			}
			for p := range pinf {
				s.setInfeasibility(p, ptol)
			}
			if useCutoff {
				obj = s.objectiveWork()
			}
			dirty = false
		}
		if useCutoff && obj > cutoffAt-objSlack {
			// The running objective is near the cutoff: decide on the
			// exact one.
			obj = s.objectiveWork()
			if obj > cutoffAt {
				return ObjectiveCutoff
			}
		}
		// Choose the leaving row: largest infeasibility²/weight, ties to
		// the lowest position (so the path does not depend on the list's
		// order).
		r, best := -1, 0.0
		for _, p := range s.infList {
			inf := pinf[p]
			if score := inf * inf / s.dse[p]; score > best || (score == best && p < r) {
				r, best = p, score
			}
		}
		if r < 0 {
			return Optimal
		}
		leave := s.head[r]
		target := s.up[leave]
		sgn := 1.0
		if s.x[leave] < s.lo[leave] {
			target, sgn = s.lo[leave], -1
		}
		delta := s.x[leave] - target

		zeroAt(rho, rhoWas)
		rho[r] = 1
		s.unitNZ[0] = r
		rhoNZ := s.keepNZ(&s.rhoNZ, s.fac.btranSparse(rho, s.unitNZ[:]))
		rhoWas = rhoNZ
		tauAside := aside != nil && s.fac.denseFromStart(rhoNZ)
		if tauAside {
			copy(s.tauAside, rho)
			aside.start(s.fac, s.tauAside, s.tauWork)
		}
		s.pivotRowSparse(rho, rhoNZ, true)
		// Bound-flipping ratio test with Harris tolerances.
		usedTol := pivotTol
		q, flips, st := s.dualRatioTest(sgn, math.Abs(delta), row, usedTol)
		if st == Infeasible && !s.provesInfeasible(row, leave, sgn) {
			// Entries below the pivot tolerance keep the row from proving
			// infeasibility (badly scaled models): look again with smaller
			// pivots, protected by the row/column pivot comparison.
			for usedTol > minPivotTol && st == Infeasible {
				usedTol /= 100
				q, flips, st = s.dualRatioTest(sgn, math.Abs(delta), row, usedTol)
			}
			if st == Infeasible {
				return NumericalTrouble
			}
		}
		if st == Infeasible {
			s.ray = s.farkasRay(rho, sgn)
		}
		if st != StatusUnknown {
			return st
		}
		// Entering column.
		zeroAt(alpha, alphaWas)
		idx, val := s.column(q)
		for k, i := range idx {
			alpha[i] = val[k]
		}
		alphaNZ := s.keepNZ(&s.alphaNZ, s.fac.ftranEntering(alpha, idx))
		alphaWas = alphaNZ
		arq := alpha[r]
		if math.Abs(arq-row[q]) > pivotMismatchTol*(1+math.Abs(arq)) && s.fac.numUpdates() > 0 {
			if !refresh() {
				return NumericalTrouble
			}
			continue
		}
		if math.Abs(arq) < usedTol {
			if s.fac.numUpdates() > 0 {
				aside.join()
				if !s.refactor() {
					return NumericalTrouble
				}
				dirty = true
				continue
			}
			return NumericalTrouble
		}
		if len(flips) > 0 {
			obj += s.applyFlips(flips, ptol)
			tauWas = nil // applyFlips works in tau
			delta = s.x[leave] - target
		}
		// Dual step.
		thetaD := s.d[q] / row[q]
		if math.Abs(thetaD) <= dtol*1e-3 {
			degenerate++
		} else {
			degenerate = 0
		}
		if thetaD != 0 {
			for _, v := range s.rowNZ {
				if s.stat[v] != Basic {
					s.d[v] -= thetaD * row[v]
				}
			}
		}
		s.d[q] = 0
		s.d[leave] = -thetaD
		// Primal step.
		dq := delta / arq
		xLeave := s.x[leave]
		dObj := 0.0
		if dq != 0 {
			if alphaNZ != nil {
				for _, p := range alphaNZ {
					v := s.head[p]
					step := dq * alpha[p]
					s.x[v] -= step
					dObj -= s.work[v] * step
					s.setInfeasibility(p, ptol)
				}
			} else {
				for p, v := range s.head {
					if alpha[p] == 0 {
						continue
					}
					step := dq * alpha[p]
					s.x[v] -= step
					dObj -= s.work[v] * step
					s.setInfeasibility(p, ptol)
				}
			}
		}
		// The loop moved leave by −dq·alpha[r]; it ends at target instead.
		dObj += s.work[leave]*(target-xLeave) - s.work[leave]*(-dq*arq)
		dObj += s.work[q] * dq
		obj += dObj
		s.x[q] += dq
		s.x[leave] = target
		// Dual steepest-edge weights: w_p = ‖e_pᵀB⁻¹‖².
		wr := 0.0
		if rhoNZ != nil {
			for _, i := range rhoNZ {
				wr += rho[i] * rho[i]
			}
		} else {
			for _, v := range rho {
				wr += v * v
			}
		}
		tau := tau
		if tauAside {
			aside.join()
			tau = s.tauAside
		} else {
			if rhoNZ != nil {
				zeroAt(tau, tauWas)
				for _, i := range rhoNZ {
					tau[i] = rho[i]
				}
			} else {
				copy(tau, rho)
			}
			tauWas = nil
			if nz := s.fac.ftranSparse(tau, rhoNZ); nz != nil {
				s.tauNZ = append(s.tauNZ[:0], nz...)
				tauWas = s.tauNZ
			}
		}
		updateDSE := func(p int) {
			if p == r || alpha[p] == 0 {
				return
			}
			ratio := alpha[p] / arq
			w := s.dse[p] + ratio*(ratio*wr-2*tau[p])
			s.dse[p] = math.Max(w, 1e-4)
		}
		if alphaNZ != nil {
			for _, p := range alphaNZ {
				updateDSE(p)
			}
		} else {
			for p := range s.dse {
				updateDSE(p)
			}
		}
		s.dse[r] = math.Max(wr/(arq*arq), 1e-4)
		// Basis change.
		s.head[r] = q
		s.stat[q] = Basic
		switch {
		case s.lo[leave] == s.up[leave]:
			s.stat[leave] = Fixed
		case sgn < 0:
			s.stat[leave] = AtLower
		default:
			s.stat[leave] = AtUpper
		}
		s.partitionMove(q, true)
		s.partitionMove(leave, false)
		s.setInfeasibility(r, ptol)
		s.iterations++
		// An update refused as numerically doubtful: factorise the new
		// basis afresh.
		if !s.fac.update(r, arq) && !refresh() {
			return NumericalTrouble
		}
	}
}

// cutoffObjectiveSlack: the dual simplex's running objective is checked
// against the exact one when it comes within this much (relative to the
// cutoff) of the cutoff; its rounding drift between two exact
// recomputations is far smaller.
const cutoffObjectiveSlack = 1e-7

// setInfeasibility records in s.pinf[p] the primal infeasibility of the
// variable basic at position p, or 0 when it is within tol of its bounds,
// and keeps s.infList (the positions with a nonzero entry) in step.
func (s *Solver) setInfeasibility(p int, tol float64) {
	v := s.head[p]
	xv := s.x[v]
	inf := 0.0
	switch {
	case xv < s.lo[v]-tol:
		inf = s.lo[v] - xv
	case xv > s.up[v]+tol:
		inf = xv - s.up[v]
	}
	s.pinf[p] = inf
	k := s.infAt[p]
	switch {
	case inf != 0 && k < 0:
		s.infAt[p] = len(s.infList)
		s.infList = append(s.infList, p)
	case inf == 0 && k >= 0:
		last := s.infList[len(s.infList)-1]
		s.infList[k] = last
		s.infAt[last] = k
		s.infList = s.infList[:len(s.infList)-1]
		s.infAt[p] = -1
	}
}

// zeroAt sets v to zero at the listed positions, or everywhere when the
// list is nil.
func zeroAt(v []float64, nz []int) {
	if nz == nil {
		clear(v)
		return
	}
	for _, i := range nz {
		v[i] = 0
	}
}

// keepNZ copies a nonzero list returned by a sparse solve (valid only
// until the next solve) into *dst, sorted ascending, so that loops over it
// visit entries in the order a dense scan would. nil stays nil.
func (s *Solver) keepNZ(dst *[]int, nz []int) []int {
	if nz == nil {
		return nil
	}
	out := (*dst)[:0]
	if n := len(nz); n*bits.Len(uint(n)) <= s.m/4 {
		out = append(out, nz...)
		slices.Sort(out)
	} else {
		// Long list: mark and scan instead of sorting.
		mark := s.nzMarkFor()
		for _, i := range nz {
			mark[i] = true
		}
		for i, in := range mark {
			if in {
				out = append(out, i)
				mark[i] = false
			}
		}
	}
	*dst = out
	return out
}

// ratioCandidate is a nonbasic variable whose reduced cost reaches zero
// as the dual step grows: at t = d/a.
type ratioCandidate struct {
	v int
	a float64 // the pivot-row entry, signed so that a·t is d's decrease
}

// dualRatioTest chooses the entering variable for a leaving row with
// pivot row row and direction sgn, where slope is the primal infeasibility
// of the leaving variable (the initial slope of the dual objective). Boxed
// variables whose breakpoints the step can pass while the slope stays
// positive are returned in flips: they move to their other bound. Among
// the breakpoints at the final step, Harris' tolerance admits the largest
// pivot. It returns Infeasible when the dual objective rises without limit.
func (s *Solver) dualRatioTest(sgn, slope float64, row []float64, pivTol float64) (q int, flips []int, st Status) {
	ptol, dtol := s.primalTol(), s.dualTol()
	cands := s.cands[:0]
	for _, v := range s.rowNZ {
		vs := s.stat[v]
		if vs == Basic || vs == Fixed {
			continue
		}
		a := sgn * row[v]
		if (a > pivTol && (vs == AtLower || vs == AtZero)) || (a < -pivTol && (vs == AtUpper || vs == AtZero)) {
			cands = append(cands, ratioCandidate{v, a})
		}
	}
	s.cands = cands
	flips = s.flips[:0]
	defer func() { s.flips = flips[:0] }()
	for len(cands) > 0 {
		tmax := math.Inf(1)
		for _, c := range cands {
			var bound float64
			if c.a > 0 {
				bound = (s.d[c.v] + dtol) / c.a
			} else {
				bound = (s.d[c.v] - dtol) / c.a
			}
			tmax = math.Min(tmax, bound)
		}
		best, bestAbs, drop := -1, 0.0, 0.0
		for k, c := range cands {
			if s.d[c.v]/c.a > tmax {
				continue
			}
			drop += math.Abs(c.a) * (s.up[c.v] - s.lo[c.v]) // +Inf when not boxed
			if math.Abs(c.a) > bestAbs {
				best, bestAbs = k, math.Abs(c.a)
			}
		}
		if best < 0 {
			return -1, nil, NumericalTrouble
		}
		if !(slope-drop > ptol) {
			// Passing this group would leave the leaving variable feasible
			// (within tolerance): one of the group enters.
			return cands[best].v, flips, StatusUnknown
		}
		// Pass this group of breakpoints: flip them and go on.
		slope -= drop
		rest := cands[:0]
		for _, c := range cands {
			if s.d[c.v]/c.a <= tmax {
				flips = append(flips, c.v)
			} else {
				rest = append(rest, c)
			}
		}
		cands = rest
	}
	return -1, nil, Infeasible
}

// provesInfeasible checks, in the scaled model, that the tableau row of the
// leaving variable proves infeasibility: the largest value over all bounds
// of sgn·Σ row[v]·z_v (the leaving variable with coefficient 1, other basic
// variables 0) must be below −feasibility tolerance. Entries under
// certificateZero count as zero.
func (s *Solver) provesInfeasible(row []float64, leave int, sgn float64) bool {
	h := 0.0
	add := func(c, lo, up float64) {
		switch {
		case math.Abs(c) <= certificateZero:
		case c > 0:
			h += c * up
		default:
			h += c * lo
		}
	}
	for v, st := range s.stat {
		if st == Basic {
			continue
		}
		add(sgn*row[v], s.lo[v], s.up[v])
	}
	add(sgn, s.lo[leave], s.up[leave])
	return h < -s.primalTol()
}

// farkasRay returns the infeasibility certificate of a leaving row whose
// dual ratio test found no bound: y = sgn·diag(rowScale)·ρ over the rows
// (model units), for which max (yᵀA·x − yᵀs) over the column and row
// bounds is negative.
func (s *Solver) farkasRay(rho []float64, sgn float64) []float64 {
	y := make([]float64, s.m)
	for i, r := range rho {
		y[i] = sgn * r * s.rowScale[i]
	}
	return y
}

// applyFlips moves the listed nonbasic variables to their other bound,
// updates the basic values, Δx_B = −B⁻¹·Σ a_j·Δx_j, and the primal
// infeasibilities (tolerance tol) of the positions that moved. It returns
// the change of the working objective. A dense solve (many flips) updates
// only its nonzero positions too: recomputing every infeasibility after
// each one cost the 50-site relaxation three passes over the rows in most
// of its flipping iterations.
func (s *Solver) applyFlips(flips []int, tol float64) (dObj float64) {
	col := s.tau
	clear(col)
	rows := s.flipRows[:0]
	mark := s.nzMarkFor()
	for _, v := range flips {
		var dx float64
		if s.stat[v] == AtLower {
			s.stat[v] = AtUpper
			dx = s.up[v] - s.lo[v]
		} else {
			s.stat[v] = AtLower
			dx = s.lo[v] - s.up[v]
		}
		s.x[v] = s.boundValue(v, s.stat[v])
		dObj += s.work[v] * dx
		idx, val := s.column(v)
		for k, i := range idx {
			col[i] += val[k] * dx
			if !mark[i] {
				mark[i] = true
				rows = append(rows, i)
			}
		}
	}
	for _, i := range rows {
		mark[i] = false
	}
	s.flipRows = rows
	move := func(p int) {
		v := s.head[p]
		s.x[v] -= col[p]
		dObj -= s.work[v] * col[p]
		s.setInfeasibility(p, tol)
	}
	nz := s.fac.ftranSparse(col, rows)
	if nz == nil {
		for p, c := range col {
			if c != 0 {
				move(p)
			}
		}
		return dObj
	}
	for _, p := range nz {
		move(p)
	}
	return dObj
}

// nzMarkFor returns s.nzMark sized to the rows, all false.
func (s *Solver) nzMarkFor() []bool {
	if len(s.nzMark) < s.m {
		s.nzMark = make([]bool, s.m)
	}
	return s.nzMark[:s.m]
}

// primalSimplex runs primal simplex iterations (Devex pricing, Harris
// ratio test, bound flips) from a primal feasible basis until dual
// feasibility (Optimal), an unbounded ray (Unbounded) or a limit.
func (s *Solver) primalSimplex(lim *limits) Status {
	dtol := s.dualTol()
	m, n := s.m, s.n
	rho, row, alpha := s.rho, s.alphaRow, s.alphaCol
	defer func() {
		for p := range s.dse {
			s.dse[p] = 1
		}
	}()
	// Devex reference weights of the variables for pricing, starting at 1.
	devex := resize(s.devex, n+m)
	for v := range devex {
		devex[v] = 1
	}
	s.devex = devex
	for {
		if st := s.checkLimits(lim); st != StatusUnknown {
			return st
		}
		if s.fac.needsRefactor() {
			if !s.refactor() {
				return NumericalTrouble
			}
		}
		q, best := -1, 0.0
		for v, st := range s.stat {
			if st == Basic || st == Fixed {
				continue
			}
			dv := s.d[v]
			var inf float64
			switch st {
			case AtLower:
				inf = -dv
			case AtUpper:
				inf = dv
			case AtZero:
				inf = math.Abs(dv)
			}
			if inf <= dtol {
				continue
			}
			if score := inf * inf / devex[v]; score > best {
				q, best = v, score
			}
		}
		if q < 0 {
			return Optimal
		}
		dir := 1.0
		if s.d[q] > 0 {
			dir = -1
		}
		for i := range alpha {
			alpha[i] = 0
		}
		idx, val := s.column(q)
		for k, i := range idx {
			alpha[i] = val[k]
		}
		s.fac.ftranEntering(alpha, nil)
		flip := s.up[q] - s.lo[q]
		usedTol := pivotTol
		r, step := s.primalRatioTest(alpha, dir, usedTol)
		for r < 0 && math.IsInf(flip, 1) && !s.provesUnbounded(alpha, dir) && usedTol > minPivotTol {
			// Entries below the pivot tolerance spoil the ray: look
			// again with smaller pivots.
			usedTol /= 100
			r, step = s.primalRatioTest(alpha, dir, usedTol)
		}
		if r < 0 && math.IsInf(flip, 1) && !s.provesUnbounded(alpha, dir) {
			return NumericalTrouble
		}
		if step < 0 {
			step = 0
		}
		if r < 0 && math.IsInf(flip, 1) {
			s.ray = s.unboundedRay(q, dir)
			return Unbounded
		}
		if r < 0 || flip <= step {
			// Bound flip of the entering variable; the basis stays.
			for p, v := range s.head {
				s.x[v] -= alpha[p] * dir * flip
			}
			if s.stat[q] == AtLower {
				s.stat[q] = AtUpper
			} else {
				s.stat[q] = AtLower
			}
			s.x[q] = s.boundValue(q, s.stat[q])
			s.iterations++
			continue
		}
		leave := s.head[r]
		arq := alpha[r]
		for i := range rho {
			rho[i] = 0
		}
		rho[r] = 1
		s.fac.btran(rho)
		s.pivotRowSparse(rho, nil, false)
		if math.Abs(arq-row[q]) > pivotMismatchTol*(1+math.Abs(arq)) && s.fac.numUpdates() > 0 {
			if !s.refactor() {
				return NumericalTrouble
			}
			continue
		}
		thetaD := s.d[q] / arq
		wq := devex[q]
		for _, v := range s.rowNZ {
			if s.stat[v] != Basic {
				s.d[v] -= thetaD * row[v]
				if row[v] != 0 {
					ratio := row[v] / arq
					devex[v] = math.Max(devex[v], ratio*ratio*wq)
				}
			}
		}
		s.d[q] = 0
		s.d[leave] = -thetaD
		devex[leave] = math.Max(wq/(arq*arq), 1)
		for p, v := range s.head {
			s.x[v] -= alpha[p] * dir * step
		}
		s.x[q] += dir * step
		g := -arq * dir
		if g < 0 {
			s.stat[leave] = AtLower
		} else {
			s.stat[leave] = AtUpper
		}
		if s.lo[leave] == s.up[leave] {
			s.stat[leave] = Fixed
		}
		s.x[leave] = s.boundValue(leave, s.stat[leave])
		s.head[r] = q
		s.stat[q] = Basic
		s.iterations++
		if !s.fac.update(r, alpha[r]) && !s.refactor() {
			return NumericalTrouble
		}
	}
}

// primalRatioTest is Harris' two-pass ratio test over the basic variables
// for an entering column alpha moving in direction dir (basic p changes at
// rate −alpha[p]·dir). It returns the leaving position (−1 if no basic
// variable limits the step) and the step.
func (s *Solver) primalRatioTest(alpha []float64, dir, pivTol float64) (r int, step float64) {
	ptol := s.primalTol()
	tmax := math.Inf(1)
	for p, v := range s.head {
		g := -alpha[p] * dir
		var bound float64
		switch {
		case g < -pivTol && !math.IsInf(s.lo[v], -1):
			bound = (s.x[v] - s.lo[v] + ptol) / -g
		case g > pivTol && !math.IsInf(s.up[v], 1):
			bound = (s.up[v] - s.x[v] + ptol) / g
		default:
			continue
		}
		if bound < tmax {
			tmax = bound
		}
	}
	r, rAbs := -1, 0.0
	if math.IsInf(tmax, 1) {
		return -1, 0
	}
	for p, v := range s.head {
		g := -alpha[p] * dir
		var ratio float64
		switch {
		case g < -pivTol && !math.IsInf(s.lo[v], -1):
			ratio = (s.x[v] - s.lo[v]) / -g
		case g > pivTol && !math.IsInf(s.up[v], 1):
			ratio = (s.up[v] - s.x[v]) / g
		default:
			continue
		}
		if ratio <= tmax && math.Abs(g) > rAbs {
			r, rAbs, step = p, math.Abs(g), ratio
		}
	}
	return r, step
}

// provesUnbounded checks that the entering direction moves no basic
// variable towards a finite bound (entries under certificateZero count as
// zero).
func (s *Solver) provesUnbounded(alpha []float64, dir float64) bool {
	for p, v := range s.head {
		g := -alpha[p] * dir
		if (g < -certificateZero && !math.IsInf(s.lo[v], -1)) || (g > certificateZero && !math.IsInf(s.up[v], 1)) {
			return false
		}
	}
	return true
}

// unboundedRay returns the primal direction (model units) along which the
// objective improves without limit: entering variable q moving by dir.
func (s *Solver) unboundedRay(q int, dir float64) []float64 {
	ray := make([]float64, s.n)
	if q < s.n {
		ray[q] = dir * s.colScale[q]
	}
	for p, v := range s.head {
		if v < s.n {
			ray[v] = -s.alphaCol[p] * dir * s.colScale[v]
		}
	}
	return ray
}
