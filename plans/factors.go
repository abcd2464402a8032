package plans

import (
	"fmt"
	"slices"
)

// Names of the case assumptions a sensitivity run can vary (plans/scenario
// applies them; [report.tornado] and `sweep --vary` name them).
const (
	FactorGrowth       = "growth"        // multiplier on every growth rate
	FactorTariff       = "tariff"        // multiplier on every tariff
	FactorCapex        = "capex"         // multiplier on every equipment price
	FactorDiscountRate = "discount_rate" // the discount rate itself
	FactorBudget       = "budget"        // multiplier on every budget cap
)

var factorNames = []string{FactorGrowth, FactorTariff, FactorCapex, FactorDiscountRate, FactorBudget}

// FactorNames returns the names of the factors, in the order help texts
// show them.
func FactorNames() []string { return slices.Clone(factorNames) }

// IsFactor reports whether name is one of FactorNames.
func IsFactor(name string) bool { return slices.Contains(factorNames, name) }

// CheckFactorValue rejects a value of a known factor that makes no case:
// a negative multiplier of tariffs, prices or budgets, or a discount rate
// outside [0, 1). The error text has no package prefix: callers add theirs.
func CheckFactorValue(name string, v float64) error {
	switch name {
	case FactorTariff, FactorCapex, FactorBudget:
		if v < 0 {
			return fmt.Errorf("%s multiplier %g: must be ≥ 0", name, v)
		}
	case FactorDiscountRate:
		// the range [finance] discount_rate allows
		if v < 0 || v >= 1 {
			return fmt.Errorf("discount_rate %g: must be a fraction ≥ 0 and < 1 (0.08 = 8 %%)", v)
		}
	}
	return nil
}

// Sensitivity is one factor of a tornado chart: the case is solved with the
// factor at Low and at High, every other assumption as in the case.
type Sensitivity struct {
	Name      string
	Low, High float64
}
