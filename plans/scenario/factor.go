package scenario

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"netstage/plans"
)

// Names of the factors a sweep can vary.
const (
	Growth       = plans.FactorGrowth
	Tariff       = plans.FactorTariff
	Capex        = plans.FactorCapex
	DiscountRate = plans.FactorDiscountRate
	Budget       = plans.FactorBudget
)

// factorNames lists the known factors in the order help texts show them.
var factorNames = plans.FactorNames()

// FactorNames returns the names Apply understands.
func FactorNames() []string { return plans.FactorNames() }

// ErrUnknownFactor is wrapped by errors about a factor name Apply does not know.
var ErrUnknownFactor = errors.New("unknown factor")

// Factor is one varied assumption and the values it takes, in the order given.
type Factor struct {
	Name   string    `json:"name"`
	Values []float64 `json:"values"`
}

// ParseVary parses one --vary argument, NAME=v1,v2,...
func ParseVary(s string) (Factor, error) {
	name, list, ok := strings.Cut(s, "=")
	name = strings.TrimSpace(name)
	if !ok || name == "" || strings.TrimSpace(list) == "" {
		return Factor{}, fmt.Errorf("scenario: --vary %q: want NAME=v1,v2,... with NAME one of %s", s, strings.Join(factorNames, ", "))
	}
	if !knownFactor(name) {
		return Factor{}, fmt.Errorf("scenario: --vary %q: %w %q (known: %s)", s, ErrUnknownFactor, name, strings.Join(factorNames, ", "))
	}
	f := Factor{Name: name}
	for _, part := range strings.Split(list, ",") {
		part = strings.TrimSpace(part)
		v, err := strconv.ParseFloat(part, 64)
		if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
			return Factor{}, fmt.Errorf("scenario: --vary %s: %q is not a finite number", name, part)
		}
		if err := checkValue(name, v); err != nil {
			return Factor{}, err
		}
		f.Values = append(f.Values, v)
	}
	return f, nil
}

func knownFactor(name string) bool { return plans.IsFactor(name) }

// checkValue rejects values that make no case (plans.CheckFactorValue).
func checkValue(name string, v float64) error {
	if err := plans.CheckFactorValue(name, v); err != nil {
		return fmt.Errorf("scenario: %w", err)
	}
	return nil
}

// BaseValue returns the value of factor name that leaves c unchanged.
func BaseValue(c *plans.Case, name string) float64 {
	if name == DiscountRate {
		return c.DiscountRate
	}
	return 1
}

// Setting is one factor at one value.
type Setting struct {
	Name  string
	Value float64
}

// Apply returns a copy of c with the settings applied in order; c itself is
// never changed (the copy shares only what it does not modify). It returns
// an error for an unknown factor or a value that makes the case invalid
// (a growth rate at or below −100 %).
func Apply(c *plans.Case, settings []Setting) (*plans.Case, error) {
	out := shallowCopy(c)
	for _, s := range settings {
		if err := checkValue(s.Name, s.Value); err != nil {
			return nil, err
		}
		var err error
		switch s.Name {
		case Growth:
			err = scaleGrowth(out, s.Value)
		case Tariff:
			scaleTariffs(out, s.Value)
		case Capex:
			scaleEquipmentPrices(out, s.Value)
		case DiscountRate:
			out = withDiscountRate(out, s.Value)
		case Budget:
			scaleBudget(out, s.Value)
		default:
			err = fmt.Errorf("scenario: %w %q", ErrUnknownFactor, s.Name)
		}
		if err != nil {
			return nil, err
		}
	}
	return out, nil
}

// shallowCopy copies the Case struct; slices are copied where they are
// changed.
func shallowCopy(c *plans.Case) *plans.Case {
	cc := *c
	return &cc
}

// withDiscountRate returns a copy of c with discount rate r. Case derives
// every discount factor from DiscountRate when asked (TestDiscountRateRevaluesBasePlan
// would catch a cached copy going stale).
func withDiscountRate(c *plans.Case, r float64) *plans.Case {
	out := shallowCopy(c)
	out.DiscountRate = r
	return out
}

// scaleGrowth multiplies each demand's growth by m (see the package doc).
func scaleGrowth(c *plans.Case, m float64) error {
	demands := make([]plans.Demand, len(c.Demands))
	for k, d := range c.Demands {
		old := d.Forecast
		f := make([]float64, len(old))
		if len(old) > 0 {
			f[0] = old[0]
		}
		if !math.IsNaN(d.Growth) {
			g := m * d.Growth
			if g <= -1 {
				return fmt.Errorf("scenario: growth ×%g gives demand %s a growth rate of %g, at or below -100 %%", m, d.ID, g)
			}
			for i := 1; i < len(old); i++ {
				f[i] = old[0] * math.Pow(1+g, float64(i))
			}
			d.Growth = g
		} else {
			for i := 1; i < len(old); i++ {
				if old[i-1] <= 0 {
					f[i] = old[i]
					continue
				}
				step := 1 + m*(old[i]/old[i-1]-1)
				if step <= 0 {
					return fmt.Errorf("scenario: growth ×%g makes demand %s fall to zero or below in year %d", m, d.ID, c.Year(i))
				}
				f[i] = f[i-1] * step
			}
		}
		// Contracts are stated in Gbps: committed traffic stays as
		// contracted, capped by the scenario's forecast.
		committed := make([]float64, len(d.Committed))
		for i, v := range d.Committed {
			committed[i] = math.Min(v, f[i])
		}
		d.Forecast, d.Committed = f, committed
		demands[k] = d
	}
	c.Demands = demands
	return nil
}

func scaleTariffs(c *plans.Case, m float64) {
	demands := make([]plans.Demand, len(c.Demands))
	for k, d := range c.Demands {
		d.Tariff = scaled(d.Tariff, m)
		demands[k] = d
	}
	c.Demands = demands
}

// scaleEquipmentPrices multiplies the capex of every item by m, with the
// spend thresholds of every vendor's tiers.
func scaleEquipmentPrices(c *plans.Case, m float64) {
	all := make([]bool, len(c.Vendors))
	for i := range all {
		all[i] = true
	}
	scaleQuotes(c, all, m, false)
}

// scaleQuotes multiplies the prices of the vendors marked in which by m:
// module capex, spend-tier thresholds, and with leases also lease fees.
func scaleQuotes(c *plans.Case, which []bool, m float64, leases bool) {
	items := make([]plans.Item, len(c.Items))
	for k, it := range c.Items {
		if which[it.Vendor] {
			it.CapexPerUnit *= m
			it.CapexPerKM *= m
			it.UnitCapex = scaled(it.UnitCapex, m)
			it.KMCapex = scaled(it.KMCapex, m)
			if leases && it.Kind == plans.Lease {
				it.Opex *= m
				it.OrderOpex = scaled(it.OrderOpex, m)
			}
		}
		items[k] = it
	}
	c.Items = items
	vendors := make([]plans.Vendor, len(c.Vendors))
	for k, v := range c.Vendors {
		if which[k] && len(v.Tiers) > 0 {
			tiers := make([]plans.Tier, len(v.Tiers))
			for i, t := range v.Tiers {
				if t.Basis == plans.TierBySpend {
					t.Threshold *= m
				}
				tiers[i] = t
			}
			v.Tiers = tiers
		}
		vendors[k] = v
	}
	c.Vendors = vendors
}

func scaleBudget(c *plans.Case, m float64) {
	b := c.Budget
	b.Yearly = make([]float64, len(c.Budget.Yearly))
	for i, v := range c.Budget.Yearly {
		if math.IsInf(v, 1) {
			b.Yearly[i] = v
		} else {
			b.Yearly[i] = v * m
		}
	}
	if !math.IsInf(b.Cumulative, 1) {
		b.Cumulative *= m
	}
	c.Budget = b
}

// BudgetCap returns the total capex the case's budget allows over the
// horizon: the cumulative cap, or the sum of the yearly caps, whichever is
// smaller; ok is false when the budget leaves the total uncapped.
func BudgetCap(c *plans.Case) (float64, bool) {
	sum := 0.0
	for _, v := range c.Budget.Yearly {
		sum += v
	}
	if len(c.Budget.Yearly) == 0 {
		sum = math.Inf(1)
	}
	total := math.Min(sum, c.Budget.Cumulative)
	return total, !math.IsInf(total, 1)
}

func scaled(v []float64, m float64) []float64 {
	if v == nil {
		return nil
	}
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = x * m
	}
	return out
}
