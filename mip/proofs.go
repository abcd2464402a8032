package mip

import (
	"math"

	"netstage/lp"
)

// A proof is an inequality Σ val·x[idx] ≤ cutoff + base over integer
// columns, learnt from a node whose LP bound reached the cutoff, that every
// point better than the incumbent satisfies. It is derived from the node
// LP's row multipliers y: for any x whose row activities lie within their
// bounds, c·x = y·(A·x) + d·x with d = c − Aᵀy, and y·(A·x) ≥ K, where K
// takes each row's lower side where yᵢ > 0 and its upper side where
// yᵢ < 0. A better point has c·x + constant ≤ cutoff, so
// d·x ≤ cutoff − constant − K. The continuous columns, and integer ones
// whose d is negligible, are replaced by their smallest contribution over
// the global domain, which leaves the integer columns the branching moved.
// The inequality holds whatever y is (optimal or not, and the cutoff may
// only fall, which makes it stronger); the node's own domain violates it,
// and so may other nodes whose domains give those columns similar bounds.
// Checked at each node before its LP, the proofs prune such nodes without
// an LP and tighten the bounds of others (reduced-cost fixing with another
// node's reduced costs). An infeasible node LP gives a proof the same way
// from its ray (Farkas multipliers) with c left out: every feasible point
// satisfies it, whatever the cutoff.
//
// Measured on the synthetic planning cases of 10 sites over 7 years (seeds
// 1 to 16, proved to 1e-4, 2026-12-04): 3,583 nodes in all against 4,683
// without proofs (4,084 with proofs from tree nodes only, not from
// strong-branching children); no seed took more nodes. The proofs from
// rays matter where budgets bind: the synthetic 15-site 6-year cases of
// seeds 13 and 5 with a budget of 20,000 a year proved in 194 and 179
// nodes, against 561 and 1,049 with the objective proofs alone and 673
// and 989 without proofs (since 2026-12-05 the root propagation bounds
// the units the budget cannot pay for, and they take 13 nodes each). On
// the 25-site 7-year case (M) the proofs run to about 800 columns: its
// first 3,000 nodes learnt 368 of them, which tightened 31,427 bounds and
// pruned 4 nodes, and took 82 to 87 s against 80 s without (the checks
// at each node); over 2,400 s beside a run without them, the bound per
// node was 60 to 80 better and the nodes per second 11 % fewer, so the
// bound per second was worse. Hence maxProofLen: at 400, M learns none
// and takes the path it took before, while the cases above keep their
// gains.
type proof struct {
	idx  []int
	val  []float64
	base float64
	// farkas marks a proof from an infeasible LP's ray y: there c is
	// left out and Σ val·x ≤ base holds for every feasible point, whatever
	// the cutoff.
	farkas bool
}

// rhs is the proof's right-hand side under the cutoff limit.
func (pf *proof) rhs(limit float64) float64 {
	if pf.farkas {
		return pf.base
	}
	return limit + pf.base
}

// Proof pool limits: a proof is kept only when it has at most
// maxProofLen columns (longer ones cost more to check at every node than
// they prune, see above), and the pool keeps the newest proofs up to
// maxProofNonzeros nonzeros in all.
const (
	maxProofLen      = 400
	maxProofNonzeros = 200000
	// proofRelTol weakens a proof's right-hand side by this share of the
	// magnitudes that went into it, against rounding in y and d.
	proofRelTol = 1e-9
)

// learnProof derives a proof from r, the LP result of the current node,
// whose bound reached the cutoff or which is infeasible (from its ray,
// when the LP gave one), and adds it to the pool when the node's domain
// (s.lo, s.up) violates it.
func (s *search) learnProof(r lp.Result) {
	p := s.p
	farkas := r.Status == lp.Infeasible
	y := r.Dual
	if farkas {
		y = r.Ray
	}
	if s.set.NoProofs || len(y) != len(s.rows) || (!farkas && math.IsInf(s.pruneLimit(), 1)) {
		return
	}
	d := append(s.proofD[:0], p.obj...)
	if farkas {
		// A ray proves that no x in the node's box has A·x within the row
		// bounds: the same aggregation without the objective.
		clear(d)
	}
	k, mag := 0.0, 0.0
	for i, yi := range y {
		if yi == 0 {
			continue
		}
		row := s.rows[i]
		side := row.lower
		if yi < 0 {
			side = row.upper
		}
		if math.IsInf(side, 0) {
			if math.Abs(yi) > 1e-9 {
				return // a multiplier on a side the row does not have
			}
			continue
		}
		k += yi * side
		mag += math.Abs(yi * side)
		for q, j := range row.idx {
			d[j] -= yi * row.val[q]
		}
	}
	s.proofD = d
	dmax := 0.0
	for j, dj := range d {
		if p.isInt[j] {
			dmax = math.Max(dmax, math.Abs(dj))
		}
	}
	if dmax == 0 {
		return
	}
	rest := 0.0 // smallest contribution of the columns relaxed to the global domain
	var idx []int
	var val []float64
	for j, dj := range d {
		if dj == 0 {
			continue
		}
		if p.isInt[j] && math.Abs(dj) > 1e-9*dmax && s.glo[j] < s.gup[j] {
			idx = append(idx, j)
			val = append(val, dj)
			if len(idx) > maxProofLen {
				return
			}
			mag += math.Abs(dj) * math.Max(math.Abs(s.glo[j]), math.Abs(s.gup[j]))
			continue
		}
		b := s.glo[j]
		if dj < 0 {
			b = s.gup[j]
		}
		if math.IsInf(b, 0) {
			if math.Abs(dj) <= 1e-12*dmax {
				// Rounding error on a column the LP holds between its
				// bounds: dropped, with room for it in the tolerance.
				mag += math.Abs(dj) * math.Max(1e6, 1e3*math.Abs(r.X[j]))
				continue
			}
			return
		}
		rest += dj * b
		mag += math.Abs(dj * b)
	}
	if len(idx) == 0 {
		return
	}
	pf := proof{idx: idx, val: val, base: -k - rest + proofRelTol*mag, farkas: farkas}
	if !farkas {
		pf.base -= p.constant
	}
	minAct, _, _, _ := rowActivity(pf.idx, pf.val, s.lo, s.up)
	if minAct <= pf.rhs(s.pruneLimit()) {
		return // not violated at this node: too weak to keep
	}
	if proofHook != nil {
		proofHook(pf, s.pruneLimit())
	}
	s.proofs = append(s.proofs, pf)
	s.proofNZ += len(idx)
	if s.proofNZ > maxProofNonzeros {
		// Forget the older half.
		drop, nz := 0, 0
		for drop < len(s.proofs) && nz < s.proofNZ/2 {
			nz += len(s.proofs[drop].idx)
			drop++
		}
		s.proofs = append(s.proofs[:0:0], s.proofs[drop:]...)
		s.proofNZ -= nz
	}
}

// Test hooks (nil otherwise): proofHook sees every proof learnt, with the
// cutoff in force then; proofUseHook sees, at the end of a search, how
// many nodes the proofs pruned and how many bounds they tightened.
var (
	proofHook    func(pf proof, cutoff float64)
	proofUseHook func(prunes, fixes int)
)

// learnChildProof learns a proof from r, the LP of a strong-branching
// child that puts column j in [lo, up] within the current domain.
func (s *search) learnChildProof(r lp.Result, j int, lo, up float64) {
	saveLo, saveUp := s.lo[j], s.up[j]
	s.lo[j], s.up[j] = lo, up
	s.learnProof(r)
	s.lo[j], s.up[j] = saveLo, saveUp
}

// applyProofs checks the pool against the current domain (s.lo, s.up):
// it reports false when a proof shows that no better point lies in it,
// and otherwise tightens the integer bounds the proofs imply (each proof
// is a row Σ val·x ≤ rhs to the propagator), propagating each tightening
// through the model's rows.
func (s *search) applyProofs() bool {
	if len(s.proofs) == 0 {
		return true
	}
	limit := s.pruneLimit()
	var changed []int
	note := func(j int) {
		changed = append(changed, j)
		s.proofFixes++
	}
	for round := 0; round < 3; round++ {
		changed = changed[:0]
		for _, pf := range s.proofs {
			if !pf.farkas && math.IsInf(limit, 1) {
				continue
			}
			if !s.prop.propagateRow(pf.idx, pf.val, math.Inf(-1), pf.rhs(limit), s.lo, s.up, note) {
				s.proofPrunes++
				return false
			}
		}
		if len(changed) == 0 {
			return true
		}
		if !s.prop.propagate(s.lo, s.up, changed, nil) {
			return false
		}
	}
	return true
}
