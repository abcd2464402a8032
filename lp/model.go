package lp

import (
	"fmt"
	"math"
	"sort"
)

// Model is a linear (or, with integrality marks, mixed-integer) program
//
//	minimise or maximise  c·x + Constant
//	subject to            RowLower ≤ A·x ≤ RowUpper
//	                      ColLower ≤ x ≤ ColUpper
//
// Bounds may be infinite (±Inf). An equality row has RowLower == RowUpper.
// The matrix is kept as a list of entries; Columns and Rows return compressed
// copies, rebuilt only after a change. Building a model costs O(nonzeros).
type Model struct {
	Name     string
	Sense    Sense
	Constant float64 // objective constant
	ObjName  string  // name of the objective row in MPS files ("" means "obj")

	ColName  []string
	Obj      []float64
	ColLower []float64
	ColUpper []float64
	Integer  []bool // integrality marks, used by mip; lp ignores them

	RowName  []string
	RowLower []float64
	RowUpper []float64

	entRow []int
	entCol []int
	entVal []float64

	csc *Sparse // cached compressed columns; nil after a change
	csr *Sparse // cached compressed rows; nil after a change
}

// Sparse is a compressed sparse matrix: for compressed columns, the entries of
// column j are Index[Start[j]:Start[j+1]] (row numbers, increasing) and
// Value[...]; for compressed rows the roles of rows and columns swap.
// Duplicate entries of one position are summed; exact zeros are dropped.
type Sparse struct {
	Start []int
	Index []int
	Value []float64
}

// NewModel returns an empty minimisation.
func NewModel(name string) *Model { return &Model{Name: name} }

// NumCols returns the number of columns.
func (m *Model) NumCols() int { return len(m.Obj) }

// NumRows returns the number of rows.
func (m *Model) NumRows() int { return len(m.RowLower) }

// NumNonzeros returns the number of stored matrix entries (before summing
// duplicates).
func (m *Model) NumNonzeros() int { return len(m.entVal) }

// AddCol appends a column with objective coefficient obj and bounds, and
// returns its index.
func (m *Model) AddCol(name string, obj, lower, upper float64) int {
	m.ColName = append(m.ColName, name)
	m.Obj = append(m.Obj, obj)
	m.ColLower = append(m.ColLower, lower)
	m.ColUpper = append(m.ColUpper, upper)
	m.Integer = append(m.Integer, false)
	m.changed()
	return len(m.Obj) - 1
}

// AddIntCol appends an integer column and returns its index.
func (m *Model) AddIntCol(name string, obj, lower, upper float64) int {
	j := m.AddCol(name, obj, lower, upper)
	m.Integer[j] = true
	return j
}

// AddRow appends the row lower ≤ Σ vals[k]·x[cols[k]] ≤ upper and returns its
// index. It panics if cols and vals differ in length or name a missing column.
func (m *Model) AddRow(name string, lower, upper float64, cols []int, vals []float64) int {
	if len(cols) != len(vals) {
		panic("lp: AddRow: cols and vals differ in length")
	}
	i := len(m.RowLower)
	m.RowName = append(m.RowName, name)
	m.RowLower = append(m.RowLower, lower)
	m.RowUpper = append(m.RowUpper, upper)
	for k, j := range cols {
		m.SetCoef(i, j, vals[k])
	}
	m.changed()
	return i
}

// SetCoef adds v to the matrix entry (row i, column j). Several calls for one
// position sum. It panics on an index out of range.
func (m *Model) SetCoef(i, j int, v float64) {
	if i < 0 || i >= len(m.RowLower) || j < 0 || j >= len(m.Obj) {
		panic(fmt.Sprintf("lp: SetCoef(%d, %d) outside a %d×%d model", i, j, len(m.RowLower), len(m.Obj)))
	}
	if v == 0 {
		return
	}
	m.entRow = append(m.entRow, i)
	m.entCol = append(m.entCol, j)
	m.entVal = append(m.entVal, v)
	m.changed()
}

func (m *Model) changed() { m.csc, m.csr = nil, nil }

// Columns returns the matrix in compressed sparse columns. The result is
// shared and must not be modified. Cost O(nonzeros) after a change, O(1)
// otherwise.
func (m *Model) Columns() *Sparse {
	if m.csc == nil {
		m.csc = compress(len(m.Obj), m.entCol, m.entRow, m.entVal)
	}
	return m.csc
}

// Rows returns the matrix in compressed sparse rows (shared, read-only).
func (m *Model) Rows() *Sparse {
	if m.csr == nil {
		m.csr = compress(len(m.RowLower), m.entRow, m.entCol, m.entVal)
	}
	return m.csr
}

// compress builds a compressed matrix with n major slots from triplets,
// summing duplicates and dropping zeros. Minor indices come out sorted.
func compress(n int, major, minor []int, val []float64) *Sparse {
	start := make([]int, n+1)
	for _, a := range major {
		start[a+1]++
	}
	for a := 0; a < n; a++ {
		start[a+1] += start[a]
	}
	idx := make([]int, len(major))
	v := make([]float64, len(major))
	next := append([]int(nil), start[:n]...)
	for k, a := range major {
		p := next[a]
		idx[p] = minor[k]
		v[p] = val[k]
		next[a]++
	}
	// Sort each slot by minor index and merge duplicates in place.
	out := 0
	newStart := make([]int, n+1)
	for a := 0; a < n; a++ {
		lo, hi := start[a], start[a+1]
		seg := pairSorter{idx[lo:hi], v[lo:hi]}
		if !sort.IsSorted(seg) {
			sort.Stable(seg)
		}
		newStart[a] = out
		for p := lo; p < hi; p++ {
			if out > newStart[a] && idx[out-1] == idx[p] {
				v[out-1] += v[p]
				continue
			}
			idx[out], v[out] = idx[p], v[p]
			out++
		}
		// Drop entries that summed to zero.
		w := newStart[a]
		for p := newStart[a]; p < out; p++ {
			if v[p] != 0 {
				idx[w], v[w] = idx[p], v[p]
				w++
			}
		}
		out = w
	}
	newStart[n] = out
	return &Sparse{Start: newStart, Index: idx[:out:out], Value: v[:out:out]}
}

type pairSorter struct {
	idx []int
	val []float64
}

func (p pairSorter) Len() int           { return len(p.idx) }
func (p pairSorter) Less(a, b int) bool { return p.idx[a] < p.idx[b] }
func (p pairSorter) Swap(a, b int) {
	p.idx[a], p.idx[b] = p.idx[b], p.idx[a]
	p.val[a], p.val[b] = p.val[b], p.val[a]
}

// Clone returns a deep copy of m.
func (m *Model) Clone() *Model {
	c := *m
	c.ColName = append([]string(nil), m.ColName...)
	c.Obj = append([]float64(nil), m.Obj...)
	c.ColLower = append([]float64(nil), m.ColLower...)
	c.ColUpper = append([]float64(nil), m.ColUpper...)
	c.Integer = append([]bool(nil), m.Integer...)
	c.RowName = append([]string(nil), m.RowName...)
	c.RowLower = append([]float64(nil), m.RowLower...)
	c.RowUpper = append([]float64(nil), m.RowUpper...)
	c.entRow = append([]int(nil), m.entRow...)
	c.entCol = append([]int(nil), m.entCol...)
	c.entVal = append([]float64(nil), m.entVal...)
	c.csc, c.csr = nil, nil
	return &c
}

// Evaluate returns the objective c·x + Constant and the row activities A·x
// of a point x, in the model's own sense. Cost O(nonzeros).
func (m *Model) Evaluate(x []float64) (objective float64, activity []float64) {
	if len(x) != m.NumCols() {
		panic("lp: Evaluate: x has the wrong length")
	}
	objective = m.Constant
	for j, c := range m.Obj {
		objective += c * x[j]
	}
	activity = make([]float64, m.NumRows())
	cols := m.Columns()
	for j := range m.Obj {
		for p := cols.Start[j]; p < cols.Start[j+1]; p++ {
			activity[cols.Index[p]] += cols.Value[p] * x[j]
		}
	}
	return objective, activity
}

// MaxViolation returns the largest bound or row violation of x, absolute,
// and whether every column marked Integer is within intTol of an integer.
func (m *Model) MaxViolation(x []float64, intTol float64) (violation float64, integral bool) {
	_, act := m.Evaluate(x)
	integral = true
	for j, v := range x {
		violation = math.Max(violation, math.Max(m.ColLower[j]-v, v-m.ColUpper[j]))
		if m.Integer[j] && math.Abs(v-math.Round(v)) > intTol {
			integral = false
		}
	}
	for i, a := range act {
		violation = math.Max(violation, math.Max(m.RowLower[i]-a, a-m.RowUpper[i]))
	}
	return violation, integral
}
