package mip

import "math"

// pseudocosts keep, per column, the average objective gain per unit of
// change observed when branching down and up.
type pseudocosts struct {
	sumDown, sumUp []float64
	numDown, numUp []int
	totDown, totUp float64 // over all columns, for uninitialised ones
	cntDown, cntUp int
}

// reliableCount is the number of observations after which a pseudocost is
// trusted and strong branching is skipped. Common practice is about 8; 4
// was faster overall on the MIPLIB samples and the demo case here, where
// strong branching is the largest cost of the search.
const reliableCount = 4

// minScoreGain keeps the product score informative when one side gains
// nothing.
const minScoreGain = 1e-6

func newPseudocosts(n int) *pseudocosts {
	return &pseudocosts{
		sumDown: make([]float64, n), sumUp: make([]float64, n),
		numDown: make([]int, n), numUp: make([]int, n),
	}
}

// update records that moving column j by dist (> 0) in direction up raised
// the LP objective by gain (≥ 0).
func (pc *pseudocosts) update(j int, up bool, dist, gain float64) {
	if dist <= 0 || math.IsNaN(gain) || math.IsInf(gain, 0) {
		return
	}
	g := math.Max(gain, 0) / dist
	if up {
		pc.sumUp[j] += g
		pc.numUp[j]++
		pc.totUp += g
		pc.cntUp++
	} else {
		pc.sumDown[j] += g
		pc.numDown[j]++
		pc.totDown += g
		pc.cntDown++
	}
}

// get returns the per-unit down and up pseudocosts of j, using the average
// over all columns where j has no observation yet (1 when nothing is known).
func (pc *pseudocosts) get(j int) (down, up float64) {
	if pc.numDown[j] > 0 {
		down = pc.sumDown[j] / float64(pc.numDown[j])
	} else if pc.cntDown > 0 {
		down = pc.totDown / float64(pc.cntDown)
	} else {
		down = 1
	}
	if pc.numUp[j] > 0 {
		up = pc.sumUp[j] / float64(pc.numUp[j])
	} else if pc.cntUp > 0 {
		up = pc.totUp / float64(pc.cntUp)
	} else {
		up = 1
	}
	return down, up
}

func (pc *pseudocosts) reliable(j int) bool {
	return pc.numDown[j] >= reliableCount && pc.numUp[j] >= reliableCount
}

// score is the product rule on the gains of both children.
func score(down, up float64) float64 {
	return math.Max(down, minScoreGain) * math.Max(up, minScoreGain)
}
