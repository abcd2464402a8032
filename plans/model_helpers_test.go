package plans

import (
	"context"
	"fmt"
	"math"
	"strings"
	"testing"

	"netstage/lp"
	"netstage/mip"
)

// Hand-built cases for the first-principles tests. Every derived vector is
// computed here from its definition in DESIGN.md §2 (prices (1−e)^i, the
// lead-time rule i + max(0, ⌈(m − c)/12⌉)), not by the loader.

type testItem struct {
	id, vendor   string
	gbps, capex  float64
	opex         float64
	lead, life   int
	maxUnits     int
	erosion      float64
	lease        bool
	slotsPerUnit int
}

// newCase returns a case of T years at rate r with the sites given, no
// budget, no tax, straight-line salvage, end-of-year discounting.
func newCase(T int, r float64, sites ...string) *Case {
	c := &Case{
		Name: "test", FirstYear: 2030, Horizon: T, Currency: "EUR",
		DiscountRate: r, Ceiling: 1, ReadyByMonth: 9,
		Budget: Budget{Yearly: make([]float64, T), Cumulative: math.Inf(1)},
	}
	for t := range c.Budget.Yearly {
		c.Budget.Yearly[t] = math.Inf(1)
	}
	for _, s := range sites {
		c.Sites = append(c.Sites, Site{ID: s, Name: s})
	}
	return c
}

func (c *Case) testLink(id, a, b string, km, installed, ceiling float64) *Link {
	l := Link{ID: id, A: c.SiteIndex(a), B: c.SiteIndex(b), KM: km, Class: "std", Ceiling: ceiling,
		Slots: UnlimitedSlots, Installed: installed, BaseCapacity: make([]float64, c.Horizon)}
	for t := range l.BaseCapacity {
		l.BaseCapacity[t] = installed
	}
	c.Links = append(c.Links, l)
	return &c.Links[len(c.Links)-1]
}

func (c *Case) testDemand(a, b string, forecast, committed, tariff float64) {
	d := Demand{ID: a + "-" + b, A: c.SiteIndex(a), B: c.SiteIndex(b)}
	for t := 0; t < c.Horizon; t++ {
		d.Forecast = append(d.Forecast, forecast)
		d.Committed = append(d.Committed, committed)
		d.Tariff = append(d.Tariff, tariff)
	}
	c.Demands = append(c.Demands, d)
}

func (c *Case) testVendor(id string, tiers ...Tier) {
	c.Vendors = append(c.Vendors, Vendor{ID: id, Name: id, Currency: c.Currency, Rate: 1, Tiers: tiers})
}

func (c *Case) testItem(ti testItem) {
	it := Item{ID: ti.id, Vendor: c.VendorIndex(ti.vendor), Kind: Module, Classes: []string{"std"},
		Gbps: ti.gbps, CapexPerUnit: ti.capex, Opex: ti.opex, LeadMonths: ti.lead, BookLife: ti.life,
		SlotsPerUnit: ti.slotsPerUnit, MaxUnits: ti.maxUnits, Erosion: ti.erosion}
	if ti.lease {
		it.Kind, it.CapexPerUnit, it.BookLife = Lease, 0, 0
	}
	for i := 0; i < c.Horizon; i++ {
		f := math.Pow(1-ti.erosion, float64(i))
		it.PriceFactor = append(it.PriceFactor, f)
		it.UnitCapex = append(it.UnitCapex, it.CapexPerUnit*f)
		it.KMCapex = append(it.KMCapex, 0)
		if ti.lease {
			it.OrderOpex = append(it.OrderOpex, ti.opex*f)
		} else {
			it.OrderOpex = append(it.OrderOpex, ti.opex)
		}
		delay := 0
		if d := ti.lead - c.ReadyByMonth; d > 0 {
			delay = (d + 11) / 12
		}
		it.InService = append(it.InService, i+delay)
	}
	c.Items = append(c.Items, it)
	for l := range c.Links {
		c.Links[l].Items = append(c.Links[l].Items, len(c.Items)-1)
	}
}

// df is the end-of-year discount factor of year t (1-based).
func df(r float64, t int) float64 { return math.Pow(1+r, -float64(t)) }

// bruteForce solves a tiny MIP by enumerating every integer point within
// the bounds and solving the LP of the rest: the independent oracle for
// the first-principles cases (STYLE.md: brute force on tiny MIPs). The
// capacity step columns (k_…, model_steps.go) are left to the LP: their
// equality rows make them whole once the units are, and enumerating them
// too multiplied the points by their ranges for nothing.
func bruteForce(ctx context.Context, m *lp.Model, s mip.Settings) (mip.Result, error) {
	var ints []int
	for j, isInt := range m.Integer {
		if isInt && !strings.HasPrefix(m.ColName[j], "k_") {
			ints = append(ints, j)
		}
	}
	res := mip.Result{Status: mip.Infeasible, Objective: math.Inf(1), Bound: math.Inf(1)}
	fixed := m.Clone()
	for j := range fixed.Integer {
		fixed.Integer[j] = false
	}
	var rec func(k int) error
	rec = func(k int) error {
		if k == len(ints) {
			r, err := lp.Solve(ctx, fixed, lp.Settings{})
			if err != nil {
				return err
			}
			res.Nodes++
			if r.Status == lp.Optimal && r.Objective < res.Objective-1e-9 {
				res.Objective, res.X, res.Status = r.Objective, r.X, mip.Optimal
			}
			return nil
		}
		j := ints[k]
		for v := math.Ceil(m.ColLower[j]); v <= m.ColUpper[j]; v++ {
			fixed.ColLower[j], fixed.ColUpper[j] = v, v
			if err := rec(k + 1); err != nil {
				return err
			}
		}
		fixed.ColLower[j], fixed.ColUpper[j] = m.ColLower[j], m.ColUpper[j]
		return nil
	}
	if err := rec(0); err != nil {
		return res, err
	}
	res.Bound = res.Objective
	res.Gap = 0
	return res, nil
}

// solveBoth solves c with mip and with brute force, checks that both find
// the same NPV, runs the invariant checks, and returns mip's result.
func solveBoth(t *testing.T, c *Case) *Result {
	t.Helper()
	ctx := context.Background()
	res, err := Solve(ctx, c, SolveOptions{Gap: 1e-9})
	if err != nil {
		t.Fatalf("Solve: %v", err)
	}
	saved := mipSolve
	mipSolve = bruteForce
	defer func() { mipSolve = saved }()
	oracle, err := Solve(ctx, c, SolveOptions{NoHeuristic: true})
	if err != nil {
		t.Fatalf("Solve by brute force: %v", err)
	}
	if res.Status != oracle.Status {
		t.Fatalf("status: mip %s, brute force %s", res.Status, oracle.Status)
	}
	if res.Objective != nil && !near(*res.Objective, *oracle.Objective, 1e-7) {
		t.Errorf("NPV: mip %.6f, brute force %.6f", *res.Objective, *oracle.Objective)
	}
	checkInvariants(t, c, res)
	return res
}

func near(a, b, rel float64) bool {
	return math.Abs(a-b) <= rel*math.Max(1, math.Max(math.Abs(a), math.Abs(b)))
}

// forSyntheticAndDemo runs fn as a subtest on the synthetic case of the
// given size for each seed and, outside -short, on the demo (tiers, a
// lease, a candidate link, two currencies).
func forSyntheticAndDemo(t *testing.T, sites, years int, seeds []int64, fn func(t *testing.T, c *Case)) {
	t.Helper()
	if !testing.Short() {
		t.Run("demo", func(t *testing.T) {
			c, _, err := LoadDemo()
			if err != nil {
				t.Fatal(err)
			}
			fn(t, c)
		})
	}
	for _, seed := range seeds {
		t.Run(fmt.Sprintf("synthetic-%d-%d-seed-%d", sites, years, seed), func(t *testing.T) {
			c, err := loadSynthetic(t, sites, years, seed)
			if err != nil {
				t.Fatal(err)
			}
			fn(t, c)
		})
	}
}
