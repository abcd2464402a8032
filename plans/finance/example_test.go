package finance_test

import (
	"fmt"

	"netstage/plans/finance"
)

func ExampleDiscountFactor() {
	fmt.Printf("%.5f\n", finance.DiscountFactor(0.10, 5, false))
	fmt.Printf("%.5f\n", finance.DiscountFactor(0.10, 1, true))
	// Output:
	// 0.62092
	// 0.95346
}

func ExamplePV() {
	fmt.Printf("%.2f\n", finance.PV(1000, 0.08, 3, false))
	// Output:
	// 793.83
}

func ExampleNPV() {
	// An outlay of 100 now and 60 at the end of each of the next two years.
	fmt.Printf("%.4f\n", finance.NPV(0.10, []float64{-100, 60, 60}, false))
	// Output:
	// 4.1322
}

func ExampleAnnuityFactor() {
	fmt.Printf("%.5f\n", finance.AnnuityFactor(0.10, 5))
	// Output:
	// 3.79079
}

func ExampleIRR() {
	r, ok := finance.IRR([]float64{-100, 60, 60})
	fmt.Printf("%.2f%% %v\n", 100*r, ok)
	_, ok = finance.IRR([]float64{-100, 230, -132}) // two sign changes
	fmt.Println(ok)
	// Output:
	// 13.07% true
	// false
}

func ExamplePaybackYear() {
	year, ok := finance.PaybackYear([]float64{-100, 60, 60}, 2027)
	fmt.Println(year, ok)
	// Output:
	// 2029 true
}

func ExampleProfitabilityIndex() {
	npv := finance.NPV(0.10, []float64{-100, 60, 60}, false)
	pi, ok := finance.ProfitabilityIndex(npv, 100)
	fmt.Printf("%.3f %v\n", pi, ok)
	// Output:
	// 1.041 true
}

func ExampleBookValue() {
	fmt.Println(finance.BookValue(1000, 5, 2))
	// Output:
	// 600
}

func ExampleDepreciationSchedule() {
	fmt.Println(finance.DepreciationSchedule(300, 3, 2, 5))
	// Output:
	// [0 100 100 100 0]
}

func ExampleSignChanges() {
	fmt.Println(finance.SignChanges([]float64{-100, 0, 60, -5}))
	// Output:
	// 2
}
