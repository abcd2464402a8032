package plans

import (
	"os"
	"path/filepath"
	"testing"
)

// writeSynthetic generates a case and writes its files into a new temporary
// directory; it returns the case file's path.
func writeSynthetic(tb testing.TB, sites, years int, seed int64) string {
	tb.Helper()
	files, err := Synthetic(sites, years, seed)
	if err != nil {
		tb.Fatal(err)
	}
	dir := tb.TempDir()
	for _, f := range files {
		if err := os.WriteFile(filepath.Join(dir, f.Name), f.Data, 0o644); err != nil {
			tb.Fatal(err)
		}
	}
	return filepath.Join(dir, files[0].Name)
}

func TestSyntheticLoads(t *testing.T) {
	sizes := []SyntheticSize{{"tiny", 3, 1}, {"few", 5, 3}}
	sizes = append(sizes, SyntheticSizes...)
	if testing.Short() {
		sizes = sizes[:3]
	}
	for _, sz := range sizes {
		for seed := int64(1); seed <= 3; seed++ {
			c, warns, err := Load(writeSynthetic(t, sz.Sites, sz.Years, seed))
			if err != nil {
				t.Fatalf("%s seed %d: the loader rejects the synthetic case: %v", sz.Name, seed, err)
			}
			for _, w := range warns {
				t.Logf("%s seed %d: warning: %v", sz.Name, seed, w)
			}
			if len(c.Sites) != sz.Sites || c.Horizon != sz.Years {
				t.Errorf("%s seed %d: %d sites, %d years; want %d, %d", sz.Name, seed, len(c.Sites), c.Horizon, sz.Sites, sz.Years)
			}
			checkSyntheticCase(t, c)
		}
	}
}

// checkSyntheticCase checks the properties Synthetic promises.
func checkSyntheticCase(t *testing.T, c *Case) {
	t.Helper()
	n := len(c.Sites)
	// Connected over existing links (union-find).
	parent := make([]int, n)
	for i := range parent {
		parent[i] = i
	}
	find := func(x int) int {
		for parent[x] != x {
			x = parent[x]
		}
		return x
	}
	existing, candidates := 0, 0
	for _, l := range c.Links {
		if l.Candidate != nil {
			candidates++
			continue
		}
		existing++
		parent[find(l.A)] = find(l.B)
	}
	for i := 1; i < n; i++ {
		if find(i) != find(0) {
			t.Errorf("%s: site %s is not connected to %s by existing links", c.Name, c.Sites[i].ID, c.Sites[0].ID)
		}
	}
	if candidates < 1 && n >= 5 {
		t.Errorf("%s: no candidate link", c.Name)
	}
	// Average degree about three (a tree has 2(n−1)/n; the generator adds
	// links up to 3 per site on average).
	if deg := 2 * float64(existing+candidates) / float64(n); n >= 10 && (deg < 2.5 || deg > 3.6) {
		t.Errorf("%s: average degree %.2f, want about 3", c.Name, deg)
	}
	// Growth 10–30 % a year (common practice, REFERENCES.md §4) and
	// tariffs eroding 10–25 % a year (common practice).
	for _, d := range c.Demands {
		if d.Growth < synthGrowthMin || d.Growth > synthGrowthMax {
			t.Errorf("%s: demand %s grows %.3f a year, outside 10–30 %%", c.Name, d.ID, d.Growth)
		}
		if d.Erosion < synthTariffErosionMin || d.Erosion > synthTariffErosionMax {
			t.Errorf("%s: demand %s tariff erosion %.3f, outside 10–25 %%", c.Name, d.ID, d.Erosion)
		}
	}
	if len(c.Catalogs) < 2 || len(c.Vendors) < 2 {
		t.Errorf("%s: %d catalogs, %d vendors; want two or three", c.Name, len(c.Catalogs), len(c.Vendors))
	}
	if _, capped := c.Budget.YearCap(0); !capped {
		t.Errorf("%s: no budget", c.Name)
	}
	// Module economies of scale: within a vendor, the 400 Gbps module has
	// 4× the capacity of the 100 Gbps one for about 3× the price (SNDlib
	// module cost data, Orlowski et al., Networks 2010): accept 2.5–3.5.
	for v := range c.Vendors {
		var small, large *Item
		for i := range c.Items {
			it := &c.Items[i]
			if it.Vendor != v || it.Kind != Module {
				continue
			}
			switch it.Gbps {
			case 100:
				small = it
			case 400:
				large = it
			}
		}
		if small == nil || large == nil {
			continue
		}
		if r := large.CapexPerUnit / small.CapexPerUnit; r < 2.5 || r > 3.5 {
			t.Errorf("%s: vendor %s: 4× capacity costs %.2f×, want about 3×", c.Name, c.Vendors[v].ID, r)
		}
	}
}
