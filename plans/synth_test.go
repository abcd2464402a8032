package plans

import (
	"bytes"
	"math"
	"testing"
)

// TestSyntheticGravity checks the gravity model on a generated case: the
// first-year demand of a pair is proportional to population_a ×
// population_b × exp(−km/d₀), so the ratio demand/(weight) is the same for
// every pair up to the rounding to 0.1 Gbps.
func TestSyntheticGravity(t *testing.T) {
	g := &synthGen{rng: newSynthRand(7), years: 3, seed: 7}
	g.makeSites(20)
	g.makeLinks()
	g.makeDemands()
	pairs := g.sortedPairs()
	d0 := pairs[len(pairs)/2].km
	var ratios []float64
	total := 0.0
	for _, d := range g.demands {
		w := g.sites[d.a].population * g.sites[d.b].population * math.Exp(-g.dist[d.a][d.b]/d0)
		if d.forecast1 >= 2 { // rounding to 0.1 Gbps is then within 5 %
			ratios = append(ratios, d.forecast1/w)
		}
		total += d.forecast1
	}
	if len(ratios) < 5 {
		t.Fatalf("only %d demands above 2 Gbps", len(ratios))
	}
	for _, r := range ratios {
		if math.Abs(r/ratios[0]-1) > 0.05 {
			t.Errorf("demand/weight ratio %.4g differs from %.4g by more than rounding", r, ratios[0])
		}
	}
	// The first-year total is sites × synthGbpsPerSite up to rounding.
	if want := 20 * synthGbpsPerSite; math.Abs(total-want) > 0.1*float64(len(g.demands)) {
		t.Errorf("first-year total %.1f Gbps, want %.1f", total, want)
	}
	// Demands are kept in decreasing weight: every kept pair weighs at
	// least as much as every dropped pair.
	kept := map[[2]int]bool{}
	minKept := math.Inf(1)
	for _, d := range g.demands {
		kept[[2]int{d.a, d.b}] = true
		minKept = math.Min(minKept, g.sites[d.a].population*g.sites[d.b].population*math.Exp(-g.dist[d.a][d.b]/d0))
	}
	for _, p := range pairs {
		if kept[[2]int{p.a, p.b}] {
			continue
		}
		if w := g.sites[p.a].population * g.sites[p.b].population * math.Exp(-p.km/d0); w > minKept*(1+1e-12) {
			t.Fatalf("dropped pair %d-%d weighs %.4g, more than a kept one (%.4g)", p.a, p.b, w, minKept)
		}
	}
}

func TestSyntheticDeterministic(t *testing.T) {
	a, err := Synthetic(12, 4, 42)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := Synthetic(12, 4, 42)
	c, _ := Synthetic(12, 4, 43)
	if len(a) != len(b) {
		t.Fatalf("same seed: %d files, then %d", len(a), len(b))
	}
	for i := range a {
		if a[i].Name != b[i].Name || !bytes.Equal(a[i].Data, b[i].Data) {
			t.Errorf("same seed, different %s", a[i].Name)
		}
	}
	if bytes.Equal(a[0].Data, c[0].Data) {
		t.Errorf("seeds 42 and 43 give the same case")
	}
}

func TestSyntheticBadArguments(t *testing.T) {
	tests := []struct {
		name         string
		sites, years int
	}{
		{"too few sites", 2, 5},
		{"too many sites", maxSyntheticSites + 1, 5},
		{"no years", 10, 0},
		{"too many years", 10, maxSyntheticYears + 1},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if _, err := Synthetic(tc.sites, tc.years, 1); err == nil {
				t.Errorf("Synthetic(%d, %d) gave no error", tc.sites, tc.years)
			}
		})
	}
}
