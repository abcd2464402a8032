package lp

import (
	"context"
	"errors"
	"fmt"
	"math"
)

// Tolerances of the simplex method. They apply to the scaled model.
const (
	// defaultFeasibilityTol is the largest bound violation of a basic
	// variable treated as feasible (common practice: 1e-7).
	defaultFeasibilityTol = 1e-7
	// defaultOptimalityTol is the largest reduced-cost sign violation
	// treated as dual feasible (common practice: 1e-7).
	defaultOptimalityTol = 1e-7
	// pivotTol is the smallest |pivot| the ratio tests accept.
	pivotTol = 1e-7
	// refactorEvery is the number of basis updates after which the
	// factorisation is rebuilt from scratch (common practice: about 100).
	refactorEvery = 100
	// etaGrowth: the factorisation is also rebuilt once the updates hold
	// more than this many times the nonzeros of L, U and the diagonal, so
	// that they never cost each solve more than the factors do. With the
	// product-form updates this rebuilt the 25-site synthetic planning
	// case's factors after some 20 updates (dense tableau columns) and made
	// each iteration 16–19 % cheaper; the Forrest–Tomlin updates hold some
	// 41 nonzeros each there (spike and row eta), so refactorEvery rules.
	etaGrowth = 1.0
	// pivotMismatchTol: when the pivot computed from the row and from the
	// column differ by more than this (relative), the factorisation is
	// rebuilt (common practice: 1e-7).
	pivotMismatchTol = 1e-7
	// phase1Box is the bound given to free variables in the auxiliary
	// problem that finds a dual feasible basis (one-sided variables get a
	// box of width 1).
	phase1Box = 1000
)

// Solver solves one linear program repeatedly, keeping the basis and its
// factorisation between solves so that a re-solve after a bound change, a
// cost change or new rows starts from the previous basis.
//
// Variables are numbered 0 … NumCols()−1 for the columns x and
// NumCols()+i for the slack of row i, whose value is the row activity
// a_i·x (so the constraints read [A | −I]·(x, s) = 0 with
// RowLower ≤ s ≤ RowUpper). A Solver is not safe for concurrent use; Clone
// the model and make one Solver per goroutine.
type Solver struct {
	model *Model // private copy of the caller's model, in its own units
	set   Settings
	n, m  int

	// Scaled problem: A' = diag(rowScale)·A·diag(colScale), x' = x/colScale,
	// s' = s·rowScale. Costs are those of a minimisation.
	colScale []float64
	rowScale []float64
	csc, csr *Sparse
	cost     []float64 // length n+m (the true scaled costs; slacks 0)
	work     []float64 // the costs in use (perturbed, zero, …)
	lo, up   []float64 // scaled bounds, length n+m

	// Basis.
	head []int       // head[p] is the variable basic at position p
	stat []VarStatus // status of every variable
	x    []float64   // value of every variable (scaled)
	y    []float64   // row duals (scaled, minimisation)
	d    []float64   // reduced costs (scaled, minimisation), 0 for basics
	dse  []float64   // dual steepest-edge weights per position
	// dseDue lists the positions of the slacks of rows added since the
	// last solve, whose weights the next solve computes exactly.
	dseDue []int

	fac       *factor
	facValid  bool
	savedWork []float64 // scratch of unperturb
	shape     int       // incremented whenever rows are added or removed

	iterations int // in the current solve
	// limitBound: the solve stopped at a limit in the dual simplex on the
	// true costs with a dual feasible basis (Result.ObjectiveIsBound).
	limitBound bool
	ray        []float64
	warm       bool // the basis comes from an earlier solve: no perturbation
	perturbed  bool // the working costs differ from the true costs

	// scratch
	rho, alphaRow, alphaCol, tau []float64
	primalRHS                    []float64 // scratch of computePrimal (not alphaCol: the dual simplex tracks alphaCol's nonzeros across refactorisations)
	tauNZ                        []int     // positions of tau that may be nonzero after the DSE solve
	devex                        []float64 // primal pricing weights
	rowNZ                        []int     // variables with a nonzero in alphaRow
	rhoNZ, alphaNZ               []int     // rows of rho, positions of alphaCol that may be nonzero (sorted)
	unitNZ                       [1]int
	nzMark                       []bool    // scratch of keepNZ, all false between calls
	pinf                         []float64 // primal infeasibility per basis position (dual simplex)
	infList                      []int     // positions p with pinf[p] > 0, in no particular order
	infAt                        []int     // index of p in infList, or −1
	flipRows                     []int     // scratch for applyFlips
	rowIndex                     []int     // rowIndex[i] = i: the index lists of the slack columns
	lu                           luScratch // work space of the factorisations
	rowMark                      []bool
	rowDirty                     bool // alphaRow must be cleared in full
	cands                        []ratioCandidate
	// tauAside and tauWork are the vector and work space of the DSE solve
	// when it runs on a second goroutine (asideWorker).
	tauAside, tauWork []float64
	// part is the row-wise copy of A partitioned into nonbasic and basic
	// entries (partition.go), kept by the dual simplex.
	part  rowPartition
	flips []int
}

// State is a saved iterate of a Solver (bounds and basis), for strong
// branching: SaveState, change bounds and solve, then RestoreState.
type State struct {
	colLower, colUpper []float64
	head               []int
	stat               []VarStatus
	dse                []float64
	m                  int
	shape              int     // Solver.shape when saved
	fac                *factor // the factorisation of this basis, if any
}

// NewSolver prepares a solver for m, which it copies: later changes to m do
// not reach the solver. The initial basis is the slack basis. It returns an
// error for inconsistent models (lengths, NaN, lower > upper). Cost
// O(nonzeros).
func NewSolver(m *Model, s Settings) (*Solver, error) {
	if err := validateModel(m); err != nil {
		return nil, err
	}
	sv := &Solver{model: m.Clone(), set: s}
	sv.n, sv.m = sv.model.NumCols(), sv.model.NumRows()
	sv.buildScaled()
	sv.slackBasis()
	return sv, nil
}

// validateModel checks the lengths and values of a model's vectors.
func validateModel(m *Model) error {
	n, r := m.NumCols(), m.NumRows()
	if len(m.ColLower) != n || len(m.ColUpper) != n || len(m.Integer) != n || len(m.ColName) != n {
		return errors.New("lp: model column vectors differ in length")
	}
	if len(m.RowUpper) != r || len(m.RowName) != r {
		return errors.New("lp: model row vectors differ in length")
	}
	for j := 0; j < n; j++ {
		if math.IsNaN(m.Obj[j]) || math.IsInf(m.Obj[j], 0) {
			return fmt.Errorf("lp: column %d has objective %v", j, m.Obj[j])
		}
		if err := checkBounds("column", j, m.ColLower[j], m.ColUpper[j]); err != nil {
			return err
		}
	}
	for i := 0; i < r; i++ {
		if err := checkBounds("row", i, m.RowLower[i], m.RowUpper[i]); err != nil {
			return err
		}
	}
	for _, v := range m.entVal {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("lp: matrix entry %v", v)
		}
	}
	return nil
}

func checkBounds(what string, k int, lo, up float64) error {
	if math.IsNaN(lo) || math.IsNaN(up) || lo > up || math.IsInf(lo, 1) || math.IsInf(up, -1) {
		return fmt.Errorf("lp: %s %d has bounds [%v, %v]", what, k, lo, up)
	}
	return nil
}

// NumCols returns the number of columns.
func (s *Solver) NumCols() int { return s.n }

// NumRows returns the number of rows, including rows added by AddRows.
func (s *Solver) NumRows() int { return s.m }

// Model returns the solver's own copy of the model, with the current
// column bounds, costs and rows. It must not be modified.
func (s *Solver) Model() *Model { return s.model }

// SetSettings replaces the settings for later solves.
func (s *Solver) SetSettings(set Settings) { s.set = set }

// Settings returns the settings in use.
func (s *Solver) Settings() Settings { return s.set }

// SetColBounds changes the bounds of column j (model units). The basis is
// kept, so the next Solve re-starts from it by dual simplex. It panics if j
// is out of range or lower > upper. Cost O(1).
func (s *Solver) SetColBounds(j int, lower, upper float64) {
	if j < 0 || j >= s.n {
		panic(fmt.Sprintf("lp: SetColBounds: column %d out of range", j))
	}
	if !(lower <= upper) {
		panic(fmt.Sprintf("lp: SetColBounds: column %d bounds [%v, %v]", j, lower, upper))
	}
	s.model.ColLower[j], s.model.ColUpper[j] = lower, upper
	s.lo[j], s.up[j] = lower/s.colScale[j], upper/s.colScale[j]
}

// ColBounds returns the current bounds of column j (model units).
func (s *Solver) ColBounds(j int) (lower, upper float64) {
	return s.model.ColLower[j], s.model.ColUpper[j]
}

// SetRowBounds changes the bounds of row i (model units), keeping the basis.
func (s *Solver) SetRowBounds(i int, lower, upper float64) {
	if i < 0 || i >= s.m {
		panic(fmt.Sprintf("lp: SetRowBounds: row %d out of range", i))
	}
	if !(lower <= upper) {
		panic(fmt.Sprintf("lp: SetRowBounds: row %d bounds [%v, %v]", i, lower, upper))
	}
	s.model.RowLower[i], s.model.RowUpper[i] = lower, upper
	s.lo[s.n+i], s.up[s.n+i] = lower*s.rowScale[i], upper*s.rowScale[i]
}

// SetObjective replaces the objective coefficients (model units and sense;
// len(c) must be NumCols, else it panics). The basis is kept; the next Solve
// restores dual feasibility first (by primal simplex if needed).
func (s *Solver) SetObjective(c []float64) {
	if len(c) != s.n {
		panic("lp: SetObjective: wrong length")
	}
	copy(s.model.Obj, c)
	s.setCosts()
}

// AddRows appends rows (cuts). Their slacks become basic, so the current
// basis stays a basis and the next Solve continues by dual simplex. It
// panics if a row names a missing column or has Lower > Upper (or NaN).
// Cost O(nonzeros of the model).
func (s *Solver) AddRows(rows []Row) {
	for _, r := range rows {
		if len(r.Index) != len(r.Value) {
			panic("lp: AddRows: Index and Value differ in length")
		}
		if checkBounds("row", 0, r.Lower, r.Upper) != nil {
			panic(fmt.Sprintf("lp: AddRows: row %q has bounds [%v, %v]", r.Name, r.Lower, r.Upper))
		}
		s.model.AddRow(r.Name, r.Lower, r.Upper, r.Index, r.Value)
	}
	oldM := s.m
	s.m = s.model.NumRows()
	s.rebuildMatrix(oldM)
	for i := oldM; i < s.m; i++ {
		v := s.n + i
		s.stat = append(s.stat, Basic)
		s.head = append(s.head, v)
		s.dse = append(s.dse, 1)
		s.dseDue = append(s.dseDue, i)
	}
	s.resizeScratch()
	s.facValid = false
	s.shape++
}

// RemoveRows deletes the rows whose indices are listed (any order,
// duplicates ignored); later rows move down. Where a removed row's slack was
// nonbasic, a basic variable leaves the basis in its place (chosen to keep
// the basis nonsingular) and becomes nonbasic at its nearest bound. It
// panics on an index out of range.
func (s *Solver) RemoveRows(idx []int) {
	s.dseDue = s.dseDue[:0]
	del := make([]bool, s.m)
	some := false
	for _, i := range idx {
		if i < 0 || i >= s.m {
			panic(fmt.Sprintf("lp: RemoveRows: row %d out of range", i))
		}
		del[i] = true
		some = true
	}
	if !some {
		return
	}
	// Make every removed row's slack basic first.
	for i := 0; i < s.m; i++ {
		if !del[i] || s.stat[s.n+i] == Basic {
			continue
		}
		if !s.ensureFactor() {
			break
		}
		// Column i of B⁻¹: the basic variable at the position with the
		// largest entry can be swapped with the slack of row i without
		// making the basis singular.
		col := make([]float64, s.m)
		col[i] = 1
		s.fac.ftran(col)
		best, bestAbs := -1, 0.0
		for p, v := range col {
			hv := s.head[p]
			if hv >= s.n && del[hv-s.n] {
				continue
			}
			if a := math.Abs(v); a > bestAbs {
				best, bestAbs = p, a
			}
		}
		if best < 0 {
			continue
		}
		out := s.head[best]
		s.head[best] = s.n + i
		s.stat[s.n+i] = Basic
		s.stat[out] = s.nearestBoundStatus(out)
		s.facValid = false
	}
	// Compact the rows.
	keep := make([]int, 0, s.m)
	for i := 0; i < s.m; i++ {
		if !del[i] {
			keep = append(keep, i)
		}
	}
	newIndex := make([]int, s.m)
	for i := range newIndex {
		newIndex[i] = -1
	}
	for k, i := range keep {
		newIndex[i] = k
	}
	s.model = s.model.keepRows(keep)
	// Rebuild the basis heading: columns keep their positions' order.
	var head []int
	var dse []float64
	for p, v := range s.head {
		if v >= s.n {
			if newIndex[v-s.n] < 0 {
				continue
			}
			v = s.n + newIndex[v-s.n]
		}
		head = append(head, v)
		dse = append(dse, s.dse[p])
	}
	stat := s.stat[:s.n]
	for _, i := range keep {
		stat = append(stat, s.stat[s.n+i])
	}
	rowScale := make([]float64, len(keep))
	for k, i := range keep {
		rowScale[k] = s.rowScale[i]
	}
	s.m = len(keep)
	s.rowScale = rowScale
	s.head, s.dse, s.stat = head, dse, stat
	if len(s.head) != s.m {
		// Could not repair (singular factor): fall back to the slack basis.
		s.slackBasis()
	}
	s.rebuildMatrix(s.m)
	s.resizeScratch()
	s.facValid = false
	s.shape++
}

// keepRows returns a copy of m with only the listed rows, renumbered.
func (m *Model) keepRows(keep []int) *Model {
	newIndex := make([]int, m.NumRows())
	for i := range newIndex {
		newIndex[i] = -1
	}
	for k, i := range keep {
		newIndex[i] = k
	}
	c := m.Clone()
	c.RowName, c.RowLower, c.RowUpper = nil, nil, nil
	for _, i := range keep {
		c.RowName = append(c.RowName, m.RowName[i])
		c.RowLower = append(c.RowLower, m.RowLower[i])
		c.RowUpper = append(c.RowUpper, m.RowUpper[i])
	}
	c.entRow, c.entCol, c.entVal = nil, nil, nil
	for k, i := range m.entRow {
		if ni := newIndex[i]; ni >= 0 {
			c.entRow = append(c.entRow, ni)
			c.entCol = append(c.entCol, m.entCol[k])
			c.entVal = append(c.entVal, m.entVal[k])
		}
	}
	c.changed()
	return c
}

// nearestBoundStatus returns the nonbasic status for variable v closest to
// its current value.
func (s *Solver) nearestBoundStatus(v int) VarStatus {
	lo, up, x := s.lo[v], s.up[v], s.x[v]
	switch {
	case lo == up:
		return Fixed
	case math.IsInf(lo, -1) && math.IsInf(up, 1):
		return AtZero
	case math.IsInf(lo, -1):
		return AtUpper
	case math.IsInf(up, 1):
		return AtLower
	case x-lo <= up-x:
		return AtLower
	}
	return AtUpper
}

// Basis returns the current basis (a copy).
func (s *Solver) Basis() Basis {
	b := Basis{Cols: make([]VarStatus, s.n), Rows: make([]VarStatus, s.m)}
	copy(b.Cols, s.stat[:s.n])
	copy(b.Rows, s.stat[s.n:])
	return b
}

// SetBasis loads a basis. It returns an error (and keeps the old basis) if
// the lengths are wrong or the number of Basic entries is not NumRows. A
// singular basis is accepted and repaired at the next Solve by replacing
// dependent columns with slacks. Statuses that name an infinite bound are
// corrected at the next Solve.
func (s *Solver) SetBasis(b Basis) error {
	if len(b.Cols) != s.n || len(b.Rows) != s.m {
		return fmt.Errorf("lp: basis has %d+%d entries, want %d+%d", len(b.Cols), len(b.Rows), s.n, s.m)
	}
	var head []int
	for j, st := range b.Cols {
		if st == Basic {
			head = append(head, j)
		}
	}
	for i, st := range b.Rows {
		if st == Basic {
			head = append(head, s.n+i)
		}
	}
	if len(head) != s.m {
		return fmt.Errorf("lp: basis has %d basic variables, want %d", len(head), s.m)
	}
	copy(s.stat, b.Cols)
	copy(s.stat[s.n:], b.Rows)
	s.head = head
	s.dseDue = s.dseDue[:0]
	for p := range s.dse {
		s.dse[p] = 1
	}
	s.facValid = false
	// A loaded basis is a warm start: perturbing the costs would move an
	// optimal basis away from optimality.
	s.warm = true
	return nil
}

// BasicVars returns the basis heading: element p is the variable basic at
// position p, a column j < NumCols() or NumCols()+i for row i's slack
// (whose value is the row activity). Positions are those TableauRow takes.
// The slice is a copy, valid until the next change or solve.
func (s *Solver) BasicVars() []int { return append([]int(nil), s.head...) }

// TableauRow fills out (length NumCols()+NumRows()) with row pos of the
// simplex tableau B⁻¹·[A | −I] for the current basis, in the model's own
// (unscaled) units, and returns the variable basic at that position and its
// current value. With z = (x, s), where s_i = a_i·x is row i's activity,
// every point satisfying the rows obeys
//
//	Σ_k out[k]·z[k] = 0,   out[basic] = 1, out[k] = 0 for the other basic variables,
//
// so basic = −Σ_{k nonbasic} out[k]·z[k]. Gomory and MIR cuts are derived
// from this row with the nonbasic variables at their bounds (their status in
// Basis()). Call it after an Optimal solve; cost one sparse solve with the
// basis and O(nonzeros). It panics on a wrong length or position.
func (s *Solver) TableauRow(pos int, out []float64) (basic int, value float64) {
	if len(out) != s.n+s.m || pos < 0 || pos >= s.m {
		panic("lp: TableauRow: wrong length or position")
	}
	if !s.ensureFactor() {
		for k := range out {
			out[k] = math.NaN()
		}
		return s.head[pos], math.NaN()
	}
	rho := make([]float64, s.m)
	rho[pos] = 1
	s.btranRow(rho)
	row := make([]float64, s.n)
	s.pivotRow(rho, row)
	basic = s.head[pos]
	db := s.unscaleFactor(basic)
	for j := 0; j < s.n; j++ {
		out[j] = row[j] * db / s.colScale[j]
	}
	for i := 0; i < s.m; i++ {
		// Slack column −e_i: entry −ρ_i; its scale factor is 1/rowScale.
		out[s.n+i] = -rho[i] * db * s.rowScale[i]
	}
	for _, v := range s.head {
		out[v] = 0
	}
	out[basic] = 1
	return basic, s.x[basic] * db
}

// unscaleFactor returns the factor taking variable v from scaled to model
// units.
func (s *Solver) unscaleFactor(v int) float64 {
	if v < s.n {
		return s.colScale[v]
	}
	return 1 / s.rowScale[v-s.n]
}

// SaveState returns a copy of the column bounds and the basis, and keeps a
// reference to the basis factorisation so that RestoreState need not
// factorise again. Cost O(n+m).
func (s *Solver) SaveState() *State {
	st := &State{
		colLower: append([]float64(nil), s.model.ColLower...),
		colUpper: append([]float64(nil), s.model.ColUpper...),
		head:     append([]int(nil), s.head...),
		stat:     append([]VarStatus(nil), s.stat...),
		dse:      append([]float64(nil), s.dse...),
		m:        s.m,
		shape:    s.shape,
	}
	if s.facValid {
		s.fac.shared = true // the State refers to its arrays: never recycle them
		s.fac.ftOwned = false
		f := *s.fac
		st.fac = &f
	}
	return st
}

// RestoreState puts back bounds and basis saved by SaveState. It panics if
// rows were added or removed in between.
func (s *Solver) RestoreState(st *State) {
	if st.m != s.m {
		panic("lp: RestoreState: the number of rows changed since SaveState")
	}
	for j := 0; j < s.n; j++ {
		s.SetColBounds(j, st.colLower[j], st.colUpper[j])
	}
	copy(s.head, st.head)
	copy(s.stat, st.stat)
	copy(s.dse, st.dse)
	s.facValid = false
	if st.fac != nil && st.shape == s.shape {
		// Reuse the saved factorisation. The copy's slices have their
		// capacity clipped, so its future updates cannot overwrite what
		// another State still refers to.
		f := *st.fac
		f.clipUpdates()
		s.fac = &f
		s.facValid = true
	}
}

// Solve runs the simplex method from the current basis and returns the
// result in the model's units and sense. A new solver starts from the slack
// basis; later calls warm-start from the last basis, which suits bound
// changes (dual simplex) and cost changes. Cancelling ctx (nil means
// context.Background) stops the solve with status Cancelled.
//
// Signs, in the model's own sense: ReducedCost = c − Aᵀ·Dual, and Dual[i]
// is the change of the optimal objective per unit increase of the bound of
// row i that is active. For a minimisation, a column at its lower bound has
// ReducedCost ≥ 0, at its upper bound ≤ 0; a row at its lower bound (a
// binding ≥ row) has Dual ≥ 0, at its upper bound ≤ 0. For a maximisation
// every one of these signs flips. Values not Optimal (limits, cutoff) are
// those of the last iterate, with one exception: after a limit Dual and
// ReducedCost may belong to an earlier basis, as the dual simplex keeps
// only the reduced costs current (at a cutoff they are recomputed for the
// final basis).
func (s *Solver) Solve(ctx context.Context) Result {
	if ctx == nil {
		ctx = context.Background()
	}
	s.ray = nil
	st := s.run(ctx)
	if st != NumericalTrouble && st != Cancelled {
		s.warm = true
	}
	if st == ObjectiveCutoff {
		// The dual simplex keeps the reduced costs up to date but not the
		// row multipliers; the cutoff's dual bound is worth their values.
		s.computeDuals()
	}
	return s.result(st)
}

// result assembles a Result in model units.
func (s *Solver) result(st Status) Result {
	r := Result{Status: st, Iterations: s.iterations, Basis: s.Basis(), ObjectiveIsBound: s.limitBound}
	if st == Unbounded || st == Infeasible {
		r.Ray = s.ray
	}
	m := s.model
	r.X = make([]float64, s.n)
	for j := 0; j < s.n; j++ {
		r.X[j] = s.x[j] * s.colScale[j]
	}
	r.Objective, r.RowActivity = m.Evaluate(r.X)
	sign := 1.0
	if m.Sense == Maximize {
		sign = -1
	}
	r.Dual = make([]float64, s.m)
	for i := 0; i < s.m; i++ {
		r.Dual[i] = sign * s.y[i] * s.rowScale[i]
	}
	r.ReducedCost = append([]float64(nil), m.Obj...)
	rows := m.Rows()
	for i := 0; i < s.m; i++ {
		yi := r.Dual[i]
		if yi == 0 {
			continue
		}
		for p := rows.Start[i]; p < rows.Start[i+1]; p++ {
			r.ReducedCost[rows.Index[p]] -= yi * rows.Value[p]
		}
	}
	return r
}
