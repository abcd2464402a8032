package lp

import (
	"math"
	"math/rand"
	"testing"
)

// randomBasis returns the columns of a random sparse m×m matrix that is
// nonsingular: slack columns (−e_i, as in a slack-heavy basis) and
// structural columns with a dominant entry on a permuted diagonal and a few
// random off-diagonal entries.
func randomBasis(rng *rand.Rand, m int, slackShare float64) (idx [][]int, val [][]float64) {
	perm := rng.Perm(m)
	idx = make([][]int, m)
	val = make([][]float64, m)
	for p := 0; p < m; p++ {
		d := perm[p]
		if rng.Float64() < slackShare {
			idx[p], val[p] = []int{d}, []float64{-1}
			continue
		}
		idx[p] = []int{d}
		val[p] = []float64{4 + rng.Float64()}
		for k := 0; k < 1+rng.Intn(3); k++ {
			i := rng.Intn(m)
			if i == d {
				continue
			}
			idx[p] = append(idx[p], i)
			val[p] = append(val[p], rng.Float64()-0.5)
		}
	}
	return idx, val
}

// multiply returns B·x for B given by columns.
func multiply(idx [][]int, val [][]float64, x []float64) []float64 {
	out := make([]float64, len(x))
	for p := range idx {
		for k, i := range idx[p] {
			out[i] += val[p][k] * x[p]
		}
	}
	return out
}

// TestSparseSolvesMatchDense checks the hyper-sparse FTRAN and BTRAN
// against the dense ones (the same arithmetic, so the same values) and
// against the definition B·x = b, yᵀ·B = dᵀ, on random sparse bases with
// eta updates (source: the definition of the solves; the dense solves are
// the reference implementation).
func TestSparseSolvesMatchDense(t *testing.T) {
	rng := rand.New(rand.NewSource(5))
	trials := 40
	if testing.Short() {
		trials = 10
	}
	sparseF, sparseB := 0, 0
	for trial := 0; trial < trials; trial++ {
		m := hyperMinRows + rng.Intn(2000)
		// Odd trials are denser: their reach overflows and the sparse
		// solves fall back to the dense ones half-way.
		share := 0.8
		if trial%2 == 1 {
			share = 0.1
		}
		idx, val := randomBasis(rng, m, share)
		f, bad, _ := factorize(m, func(p int) ([]int, []float64) { return idx[p], val[p] })
		if f == nil || len(bad) > 0 {
			t.Fatalf("trial %d: random basis singular", trial)
		}
		// Updates: replace positions by new random columns, some more
		// than once (an update's own step replaced), through the dense
		// and the sparse FTRAN of the entering column.
		for u := 0; u < rng.Intn(60); u++ {
			p := rng.Intn(m)
			if u%4 == 3 && f.numUpdates() > 0 {
				p = f.newPos[rng.Intn(f.numUpdates())]
			}
			ci := []int{rng.Intn(m), rng.Intn(m)}
			cv := []float64{rng.Float64() + 1, rng.Float64() - 0.5}
			alpha := make([]float64, m)
			for k, i := range ci {
				alpha[i] += cv[k]
			}
			nz := ci
			if u%2 == 0 {
				nz = nil
			}
			f.ftranEntering(alpha, nz)
			if math.Abs(alpha[p]) < 0.1 {
				continue
			}
			if !f.update(p, alpha[p]) {
				t.Fatalf("trial %d: update %d refused", trial, u)
			}
			idx[p], val[p] = ci, cv
		}
		for rep := 0; rep < 20; rep++ {
			// Sparse right-hand side.
			nnz := 1 + rng.Intn(4)
			b := make([]float64, m)
			var nz []int
			for k := 0; k < nnz; k++ {
				i := rng.Intn(m)
				if b[i] == 0 {
					nz = append(nz, i)
				}
				b[i] = rng.Float64() - 0.5
			}
			orig := append([]float64(nil), b...)
			dense := append([]float64(nil), b...)
			f.ftran(dense)
			list := f.ftranSparse(b, nz)
			checkSame(t, "ftran", trial, b, dense, list)
			if list != nil {
				sparseF++
			}
			bx := multiply(idx, val, b)
			for i := range bx {
				if math.Abs(bx[i]-orig[i]) > 1e-9 {
					t.Fatalf("trial %d: ftran residual at row %d: got %g, want %g", trial, i, bx[i], orig[i])
				}
			}
			// BTRAN of the same pattern, indexed by positions.
			d := append([]float64(nil), orig...)
			dense = append(dense[:0], orig...)
			f.btran(dense)
			list = f.btranSparse(d, nz)
			checkSame(t, "btran", trial, d, dense, list)
			if list != nil {
				sparseB++
			}
			for p := range idx {
				s := 0.0
				for k, i := range idx[p] {
					s += val[p][k] * d[i]
				}
				if math.Abs(s-orig[p]) > 1e-9 {
					t.Fatalf("trial %d: btran residual at position %d: got %g, want %g", trial, p, s, orig[p])
				}
			}
		}
		for i, v := range f.work {
			if v != 0 {
				t.Fatalf("trial %d: work space not zero at %d after the solves", trial, i)
			}
		}
	}
	// Both paths must have run, or the comparison proves nothing.
	if sparseF == 0 || sparseB == 0 {
		t.Fatalf("hyper-sparse path used %d (ftran) and %d (btran) times, want some of each", sparseF, sparseB)
	}
	t.Logf("hyper-sparse solves: %d ftran, %d btran of %d each", sparseF, sparseB, trials*20)
}

// checkSame compares a sparse solve's result with the dense one and checks
// that the returned list (nil: dense) covers every nonzero.
func checkSame(t *testing.T, what string, trial int, got, want []float64, list []int) {
	t.Helper()
	for i := range got {
		if got[i] != want[i] {
			t.Fatalf("trial %d: %s entry %d: got %g, want %g (dense)", trial, what, i, got[i], want[i])
		}
	}
	if list == nil {
		return
	}
	in := make([]bool, len(got))
	for _, i := range list {
		in[i] = true
	}
	for i, v := range got {
		if v != 0 && !in[i] {
			t.Fatalf("trial %d: %s nonzero %d missing from the list", trial, what, i)
		}
	}
}

// TestRefactorRule checks when the updates ask for a fresh factorisation:
// updates whose spikes stay small do so only after refactorEvery updates,
// and dense ones as soon as their nonzeros pass etaGrowth times those of L,
// U and the diagonal, well before that count.
func TestRefactorRule(t *testing.T) {
	rng := rand.New(rand.NewSource(11))
	const m = 300
	idx, val := randomBasis(rng, m, 0.9)
	col := func(p int) ([]int, []float64) { return idx[p], val[p] }
	enter := func(f *factor, p int, alpha []float64) {
		t.Helper()
		f.ftranEntering(alpha, nil)
		if !f.update(p, alpha[p]) {
			t.Fatalf("update at position %d refused", p)
		}
	}

	f, bad, _ := factorize(m, col)
	if f == nil || len(bad) > 0 {
		t.Fatal("random basis singular")
	}
	for u := 1; u <= refactorEvery; u++ {
		if f.needsRefactor() {
			t.Fatalf("small updates: refactorisation asked after %d updates, want %d", u-1, refactorEvery)
		}
		// The column at position p, doubled: its spike is U's column.
		p := u % m
		alpha := make([]float64, m)
		for k, i := range idx[p] {
			alpha[i] = 2 * val[p][k]
		}
		enter(f, p, alpha)
	}
	if !f.needsRefactor() {
		t.Fatalf("no refactorisation asked after %d updates", refactorEvery)
	}

	f, _, _ = factorize(m, col)
	limit := etaGrowth * float64(len(f.lidx)+len(f.uidx)+m)
	updates := 0
	size := func() int { return len(f.spkIdx) + len(f.retaIdx) }
	for !f.needsRefactor() {
		if float64(size()) > limit {
			t.Fatalf("updates of %d nonzeros, above %g, without a refactorisation asked", size(), limit)
		}
		alpha := make([]float64, m)
		for i := range alpha {
			alpha[i] = 1 + rng.Float64()
		}
		enter(f, updates%m, alpha)
		updates++
	}
	if float64(size()) <= limit || updates >= refactorEvery {
		t.Fatalf("dense updates: refactorisation asked after %d updates with %d nonzeros (limit %g)", updates, size(), limit)
	}
}

// TestUpdatesOnCopies checks that a copy of an updated factor, as a saved
// State keeps it, and the factor it came from can both go on with updates
// of their own: each must still solve its own basis (source: the
// definition of the solves, B·x = b and yᵀ·B = dᵀ).
func TestUpdatesOnCopies(t *testing.T) {
	rng := rand.New(rand.NewSource(17))
	for _, m := range []int{300, hyperMinRows + 500} {
		idx, val := randomBasis(rng, m, 0.7)
		f, bad, _ := factorize(m, func(p int) ([]int, []float64) { return idx[p], val[p] })
		if f == nil || len(bad) > 0 {
			t.Fatal("random basis singular")
		}
		// update replaces n columns of the factor g, whose basis is
		// gi/gv, at random positions.
		update := func(g *factor, gi [][]int, gv [][]float64, n int) {
			for done := 0; done < n; {
				p := rng.Intn(m)
				ci := []int{rng.Intn(m), rng.Intn(m), rng.Intn(m)}
				cv := []float64{rng.Float64() + 1, rng.Float64() - 0.5, rng.Float64() - 0.5}
				alpha := make([]float64, m)
				for k, i := range ci {
					alpha[i] += cv[k]
				}
				g.ftranEntering(alpha, ci)
				if math.Abs(alpha[p]) < 0.1 {
					continue
				}
				if !g.update(p, alpha[p]) {
					t.Fatalf("m=%d: update refused", m)
				}
				gi[p], gv[p] = ci, cv
				done++
			}
		}
		update(f, idx, val, 20)
		// The copy, as SaveState and RestoreState make it.
		f.shared, f.ftOwned = true, false
		cp := *f
		cp.clipUpdates()
		ci := append([][]int(nil), idx...)
		cv := append([][]float64(nil), val...)
		update(f, idx, val, 30)
		update(&cp, ci, cv, 30)
		for _, c := range []struct {
			g    *factor
			i    [][]int
			v    [][]float64
			name string
		}{{f, idx, val, "factor"}, {&cp, ci, cv, "copy"}} {
			if c.g.numUpdates() != 50 {
				t.Fatalf("m=%d: %s has %d updates, want 50", m, c.name, c.g.numUpdates())
			}
			b := make([]float64, m)
			for i := range b {
				b[i] = rng.Float64() - 0.5
			}
			x := append([]float64(nil), b...)
			c.g.ftran(x)
			for i, v := range multiply(c.i, c.v, x) {
				if math.Abs(v-b[i]) > 1e-9 {
					t.Fatalf("m=%d: %s: ftran residual %g at row %d", m, c.name, v-b[i], i)
				}
			}
			y := append([]float64(nil), b...)
			c.g.btran(y)
			for p := range c.i {
				s := 0.0
				for k, i := range c.i[p] {
					s += c.v[p][k] * y[i]
				}
				if math.Abs(s-b[p]) > 1e-9 {
					t.Fatalf("m=%d: %s: btran residual %g at position %d", m, c.name, s-b[p], p)
				}
			}
		}
	}
}

// TestUpdateRefused checks that update refuses, and leaves the factor as it
// was, when no spike is kept or when the pivot it is given disagrees with
// the factors (the new diagonal must be the pivot times the old one): the
// factor must still solve its old basis (source: the definition of the
// solves).
func TestUpdateRefused(t *testing.T) {
	rng := rand.New(rand.NewSource(23))
	const m = 300
	idx, val := randomBasis(rng, m, 0.7)
	f, bad, _ := factorize(m, func(p int) ([]int, []float64) { return idx[p], val[p] })
	if f == nil || len(bad) > 0 {
		t.Fatal("random basis singular")
	}
	solvesOld := func(what string) {
		t.Helper()
		b := make([]float64, m)
		for i := range b {
			b[i] = rng.Float64() - 0.5
		}
		x := append([]float64(nil), b...)
		f.ftran(x)
		for i, v := range multiply(idx, val, x) {
			if math.Abs(v-b[i]) > 1e-9 {
				t.Fatalf("%s: ftran residual %g at row %d", what, v-b[i], i)
			}
		}
	}
	if f.update(0, 1) {
		t.Fatal("update without a kept spike accepted")
	}
	refused := 0
	for p := 0; p < m && refused < 5; p++ {
		alpha := make([]float64, m)
		alpha[rng.Intn(m)], alpha[rng.Intn(m)] = 1+rng.Float64(), rng.Float64()-0.5
		f.ftranEntering(alpha, nil)
		if math.Abs(alpha[p]) < 0.1 {
			continue
		}
		if f.update(p, 2*alpha[p]) {
			t.Fatalf("update at position %d accepted with twice its pivot", p)
		}
		refused++
		if f.numUpdates() != 0 || len(f.retaIdx) != 0 || len(f.spkIdx) != 0 {
			t.Fatalf("refused update left %d updates, %d row-eta and %d spike entries", f.numUpdates(), len(f.retaIdx), len(f.spkIdx))
		}
		solvesOld("after a refused update")
	}
	if refused == 0 {
		t.Fatal("no update tried")
	}
}
