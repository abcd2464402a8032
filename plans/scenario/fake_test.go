package scenario

import (
	"context"
	"fmt"
	"math"
	"sort"

	"netstage/plans"
)

// testCase builds a small case by hand: three sites in a line, two links,
// two demands, a three-year horizon and two catalogs with one vendor each.
func testCase() *plans.Case {
	const T = 3
	c := &plans.Case{
		Name: "hand", FirstYear: 2030, Horizon: T, Currency: "EUR",
		DiscountRate: 0.1, Ceiling: 0.7, ReadyByMonth: 9,
		Budget:   plans.Budget{Yearly: []float64{5000, math.Inf(1), 3000}, Cumulative: math.Inf(1)},
		Sites:    []plans.Site{{ID: "a"}, {ID: "b"}, {ID: "c"}},
		Catalogs: []plans.CatalogFile{{Name: "north.toml"}, {Name: "south.toml"}},
		Vendors: []plans.Vendor{
			{ID: "nv", Name: "North", Catalog: 0, Rate: 1, Tiers: []plans.Tier{{Basis: plans.TierBySpend, Threshold: 2000, Discount: 0.1}}},
			{ID: "sv", Name: "South", Catalog: 1, Rate: 1, Tiers: []plans.Tier{{Basis: plans.TierByUnits, Threshold: 3, Discount: 0.05}}},
		},
	}
	item := func(id string, vendor int, kind plans.ItemKind, gbps, capex, opex float64) plans.Item {
		it := plans.Item{ID: id, Vendor: vendor, Kind: kind, Classes: []string{"metro"}, Gbps: gbps,
			CapexPerUnit: capex, CapexPerKM: 1, Opex: opex, BookLife: 5, SlotsPerUnit: 1, MaxUnits: 4}
		for i := 0; i < T; i++ {
			f := math.Pow(0.9, float64(i))
			it.PriceFactor = append(it.PriceFactor, f)
			it.UnitCapex = append(it.UnitCapex, capex*f)
			it.KMCapex = append(it.KMCapex, f)
			if kind == plans.Lease {
				it.OrderOpex = append(it.OrderOpex, opex*f)
			} else {
				it.OrderOpex = append(it.OrderOpex, opex)
			}
			it.InService = append(it.InService, i)
		}
		if kind == plans.Lease {
			it.CapexPerUnit, it.CapexPerKM, it.BookLife = 0, 0, 0
			for i := range it.UnitCapex {
				it.UnitCapex[i], it.KMCapex[i] = 0, 0
			}
		}
		return it
	}
	c.Items = []plans.Item{
		item("n100", 0, plans.Module, 100, 1000, 50),
		item("s100", 1, plans.Module, 100, 900, 80),
		item("slease", 1, plans.Lease, 10, 0, 120),
	}
	c.Links = []plans.Link{
		{ID: "a-b", A: 0, B: 1, KM: 10, Class: "metro", Ceiling: 0.7, Slots: plans.UnlimitedSlots, Installed: 10, BaseCapacity: []float64{10, 10, 10}, Items: []int{0, 1, 2}},
		{ID: "b-c", A: 1, B: 2, KM: 20, Class: "metro", Ceiling: 0.7, Slots: plans.UnlimitedSlots, Installed: 10, BaseCapacity: []float64{10, 10, 10}, Items: []int{0, 1, 2}},
	}
	demand := func(id string, a, b int, f1, g, p float64) plans.Demand {
		d := plans.Demand{ID: id, A: a, B: b, Growth: g}
		for i := 0; i < T; i++ {
			f := f1 * math.Pow(1+g, float64(i))
			d.Forecast = append(d.Forecast, f)
			d.Committed = append(d.Committed, f/2)
			d.Tariff = append(d.Tariff, p*math.Pow(0.85, float64(i)))
		}
		return d
	}
	c.Demands = []plans.Demand{demand("a-b", 0, 1, 40, 0.2, 3), demand("a-c", 0, 2, 20, 0.3, 5)}
	return c
}

// fakeSolve is a stand-in for plans.Solve with a closed form, for testing
// the sweep and compare machinery (not the model): every link gets, in the
// first year, the fewest units of the cheapest module that carries the
// largest forecast total of the horizon; NPV = discounted revenue of the
// whole forecast minus that capex; infeasible when the capex breaks the
// first year's budget or no module fits.
func fakeSolve(_ context.Context, c *plans.Case) (*plans.Result, error) {
	need := 0.0
	for i := 0; i < c.Horizon; i++ {
		need = math.Max(need, c.TotalForecast(i))
	}
	var rows []plans.PlanRow
	capex := 0.0
	for _, l := range c.Links {
		best := -1
		for _, k := range l.Items {
			it := &c.Items[k]
			if it.Kind != plans.Module {
				continue
			}
			if best < 0 || it.Capex(0, l.KM)/it.Gbps < c.Items[best].Capex(0, l.KM)/c.Items[best].Gbps {
				best = k
			}
		}
		if best < 0 {
			return &plans.Result{Case: c.Name, Status: plans.StatusInfeasible,
				Infeasibility: []plans.InfeasibilityRow{{Kind: plans.InfeasibleLink, Name: l.ID, Message: "no module fits link " + l.ID}}}, nil
		}
		it := &c.Items[best]
		units := int(math.Ceil((need - l.Installed) / it.Gbps))
		if units < 1 {
			continue
		}
		cost := float64(units) * it.Capex(0, l.KM)
		capex += cost
		rows = append(rows, plans.PlanRow{Year: c.FirstYear, InService: c.FirstYear, Link: l.ID, Kind: plans.KindModule,
			Item: it.ID, Vendor: c.Vendors[it.Vendor].ID, Units: units, Gbps: float64(units) * it.Gbps, ListCapex: cost, Capex: cost})
	}
	if capex > c.Budget.Yearly[0] {
		return &plans.Result{Case: c.Name, Status: plans.StatusInfeasible,
			Infeasibility: []plans.InfeasibilityRow{{Kind: plans.InfeasibleBudget, Name: "yearly", Year: c.FirstYear, Amount: capex - c.Budget.Yearly[0],
				Message: fmt.Sprintf("budget %d short by %.0f", c.FirstYear, capex-c.Budget.Yearly[0])}}}, nil
	}
	npv := fakeRevenue(c) - c.DiscountFactor(0)*capex
	return fakeResult(c, rows, npv), nil
}

func fakeRevenue(c *plans.Case) float64 {
	r := 0.0
	for _, d := range c.Demands {
		for i := 0; i < c.Horizon; i++ {
			r += c.DiscountFactor(i) * 12 * d.Tariff[i] * d.Forecast[i]
		}
	}
	return r
}

func fakeResult(c *plans.Case, rows []plans.PlanRow, npv float64) *plans.Result {
	sort.Slice(rows, func(a, b int) bool { return rows[a].Link < rows[b].Link })
	res := &plans.Result{Case: c.Name, Status: plans.StatusOptimal, Objective: &npv, Bound: &npv, Plan: rows}
	for i := 0; i < c.Horizon; i++ {
		row := plans.CashflowRow{Year: c.Year(i)}
		for _, p := range rows {
			if p.Year == c.Year(i) {
				row.Capex += p.Capex
			}
		}
		res.Cashflow = append(res.Cashflow, row)
	}
	return res
}

// fakeEvaluate values fixed purchases in c the way fakeSolve values its own
// plan, at c's prices; infeasible when they cannot carry the committed total.
func fakeEvaluate(_ context.Context, c *plans.Case, purchases []plans.PlanRow) (*plans.Result, error) {
	var rows []plans.PlanRow
	capex := 0.0
	committed := 0.0
	for i := 0; i < c.Horizon; i++ {
		s := 0.0
		for _, d := range c.Demands {
			s += d.Committed[i]
		}
		committed = math.Max(committed, s)
	}
	for _, p := range purchases {
		l := &c.Links[c.LinkIndex(p.Link)]
		var it *plans.Item
		for k := range c.Items {
			if c.Items[k].ID == p.Item {
				it = &c.Items[k]
			}
		}
		if it == nil {
			return nil, fmt.Errorf("no item %s", p.Item)
		}
		p.Capex = float64(p.Units) * it.Capex(p.Year-c.FirstYear, l.KM)
		capex += p.Capex
		rows = append(rows, p)
	}
	for _, l := range c.Links {
		carry := l.Installed
		for _, p := range rows {
			if p.Link == l.ID {
				carry += p.Gbps
			}
		}
		if carry < committed {
			return &plans.Result{Case: c.Name, Status: plans.StatusInfeasible}, nil
		}
	}
	npv := fakeRevenue(c) - c.DiscountFactor(0)*capex
	return fakeResult(c, rows, npv), nil
}
