package lp

import "math"

// scalePasses is the number of geometric row/column equilibration passes
// (common practice: a few).
const scalePasses = 4

// powerOfTwo rounds a positive factor to the nearest power of two, so that
// scaling loses no bits.
func powerOfTwo(f float64) float64 {
	if !(f > 0) || math.IsInf(f, 0) {
		return 1
	}
	return math.Exp2(math.Round(math.Log2(f)))
}

// buildScaled computes scale factors (unless Settings.NoScaling) and the
// scaled matrix, bounds and costs. Cost O(scalePasses·nonzeros).
func (s *Solver) buildScaled() {
	s.colScale = make([]float64, s.n)
	s.rowScale = make([]float64, s.m)
	for j := range s.colScale {
		s.colScale[j] = 1
	}
	for i := range s.rowScale {
		s.rowScale[i] = 1
	}
	if !s.set.NoScaling {
		cols := s.model.Columns()
		rowMin := make([]float64, s.m)
		rowMax := make([]float64, s.m)
		for pass := 0; pass < scalePasses; pass++ {
			for i := range rowMin {
				rowMin[i], rowMax[i] = math.Inf(1), 0
			}
			for j := 0; j < s.n; j++ {
				for p := cols.Start[j]; p < cols.Start[j+1]; p++ {
					a := math.Abs(cols.Value[p]) * s.colScale[j]
					i := cols.Index[p]
					rowMin[i] = math.Min(rowMin[i], a)
					rowMax[i] = math.Max(rowMax[i], a)
				}
			}
			for i := range s.rowScale {
				if rowMax[i] > 0 {
					s.rowScale[i] = 1 / math.Sqrt(rowMin[i]*rowMax[i])
				}
			}
			for j := 0; j < s.n; j++ {
				lo, hi := math.Inf(1), 0.0
				for p := cols.Start[j]; p < cols.Start[j+1]; p++ {
					a := math.Abs(cols.Value[p]) * s.rowScale[cols.Index[p]]
					lo = math.Min(lo, a)
					hi = math.Max(hi, a)
				}
				if hi > 0 {
					s.colScale[j] = 1 / math.Sqrt(lo*hi)
				}
			}
		}
		for i := range s.rowScale {
			s.rowScale[i] = powerOfTwo(s.rowScale[i])
		}
		for j := range s.colScale {
			s.colScale[j] = powerOfTwo(s.colScale[j])
		}
	}
	s.rebuildMatrix(s.m)
}

// rebuildMatrix rebuilds the scaled matrices, bounds and costs from the
// model. Rows from firstNew on get a scale factor computed from the column
// scales. Cost O(nonzeros).
func (s *Solver) rebuildMatrix(firstNew int) {
	rows := s.model.Rows()
	for i := firstNew; i < s.m; i++ {
		f := 1.0
		if !s.set.NoScaling {
			lo, hi := math.Inf(1), 0.0
			for p := rows.Start[i]; p < rows.Start[i+1]; p++ {
				a := math.Abs(rows.Value[p]) * s.colScale[rows.Index[p]]
				lo = math.Min(lo, a)
				hi = math.Max(hi, a)
			}
			if hi > 0 {
				f = powerOfTwo(1 / math.Sqrt(lo*hi))
			}
		}
		if i < len(s.rowScale) {
			s.rowScale[i] = f
		} else {
			s.rowScale = append(s.rowScale, f)
		}
	}
	s.rowScale = s.rowScale[:s.m]
	cols := s.model.Columns()
	s.csc = scaleSparse(cols, s.colScale, s.rowScale)
	s.csr = scaleSparse(rows, s.rowScale, s.colScale)
	nm := s.n + s.m
	s.lo = resize(s.lo, nm)
	s.up = resize(s.up, nm)
	for j := 0; j < s.n; j++ {
		s.lo[j] = s.model.ColLower[j] / s.colScale[j]
		s.up[j] = s.model.ColUpper[j] / s.colScale[j]
	}
	for i := 0; i < s.m; i++ {
		s.lo[s.n+i] = s.model.RowLower[i] * s.rowScale[i]
		s.up[s.n+i] = s.model.RowUpper[i] * s.rowScale[i]
	}
	s.setCosts()
}

// setCosts recomputes the scaled minimisation costs from the model.
func (s *Solver) setCosts() {
	nm := s.n + s.m
	s.cost = resize(s.cost, nm)
	sign := 1.0
	if s.model.Sense == Maximize {
		sign = -1
	}
	for j := 0; j < s.n; j++ {
		s.cost[j] = sign * s.model.Obj[j] * s.colScale[j]
	}
	for k := s.n; k < nm; k++ {
		s.cost[k] = 0
	}
}

// scaleSparse returns a copy of a with entry (major a, minor b) multiplied
// by majorScale[a]·minorScale[b].
func scaleSparse(a *Sparse, majorScale, minorScale []float64) *Sparse {
	out := &Sparse{Start: a.Start, Index: a.Index, Value: make([]float64, len(a.Value))}
	for k := 0; k+1 < len(a.Start); k++ {
		for p := a.Start[k]; p < a.Start[k+1]; p++ {
			out.Value[p] = a.Value[p] * majorScale[k] * minorScale[a.Index[p]]
		}
	}
	return out
}

// resize returns v with length n, keeping its first elements. A new array
// has a quarter more room: the work spaces of successive factorisations
// grow by small steps as the basis fills.
func resize[T any](v []T, n int) []T {
	if cap(v) >= n {
		return v[:n]
	}
	w := make([]T, n, n+n/4)
	copy(w, v)
	return w
}
