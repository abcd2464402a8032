package scenario

import (
	"context"
	"errors"
	"strings"
	"sync/atomic"
	"testing"
)

// values returns n distinct valid values of a multiplier factor.
func values(n int) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = 0.5 + float64(i)/float64(n)
	}
	return v
}

func TestGridCap(t *testing.T) {
	for _, tt := range []struct {
		name   string
		counts []int // values of growth, tariff, capex, ...
		limit  int
		want   []string // in the error; nil: no error
	}{
		{"at the default cap", []int{100, 100}, 0, nil},
		{"one over the default cap", []int{10001}, 0, []string{"10,001 scenarios", "growth 10001", "cap of 10,000", "--max-scenarios 10001"}},
		{"product over the cap", []int{20, 20, 30}, 0, []string{"12,000 scenarios", "growth 20 × tariff 20 × capex 30", "--shard"}},
		{"raised cap", []int{20, 20, 30}, 12000, nil},
		{"lowered cap", []int{3, 3}, 8, []string{"9 scenarios", "cap of 8"}},
		// 10^4 values of each of five factors: 10^20 points, beyond int64;
		// the size must still be reported, not wrap around.
		{"beyond int64", []int{10000, 10000, 10000, 10000, 10000}, 0, []string{"1e+20 scenarios"}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			names := FactorNames()
			var fs []Factor
			for k, n := range tt.counts {
				fs = append(fs, Factor{Name: names[k], Values: values(n)})
			}
			if len(fs) > 3 {
				fs[3].Values = values(tt.counts[3]) // discount_rate: 0.5 … 1.5 is no rate
				for i := range fs[3].Values {
					fs[3].Values[i] = float64(i) / float64(tt.counts[3]) * 0.5
				}
			}
			g, err := NewGrid(fs)
			if err != nil {
				t.Fatal(err)
			}
			err = g.CheckSize(tt.limit)
			if tt.want == nil {
				if err != nil {
					t.Fatalf("got error %v, want none", err)
				}
				return
			}
			if !errors.Is(err, ErrGridTooLarge) {
				t.Fatalf("got error %v, want ErrGridTooLarge", err)
			}
			for _, w := range tt.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q lacks %q", err, w)
				}
			}
		})
	}
}

// TestRunRefusesLargeGrid: Run checks the cap before any solve, the base
// point's included.
func TestRunRefusesLargeGrid(t *testing.T) {
	g, err := NewGrid([]Factor{{Name: Tariff, Values: values(101)}, {Name: Capex, Values: values(100)}})
	if err != nil {
		t.Fatal(err)
	}
	var n atomic.Int64
	_, err = Run(context.Background(), testCase(), g, Options{Solve: countingSolve(fakeSolve, &n)})
	if !errors.Is(err, ErrGridTooLarge) {
		t.Fatalf("got error %v, want ErrGridTooLarge", err)
	}
	if n.Load() != 0 {
		t.Errorf("%d solves before refusing, want 0", n.Load())
	}
	// With a cap of 4, a 2 × 2 grid runs.
	g, _ = NewGrid([]Factor{{Name: Tariff, Values: []float64{0.9, 1.1}}, {Name: Capex, Values: []float64{0.9, 1.1}}})
	if _, err := Run(context.Background(), testCase(), g, Options{Solve: fakeSolve, MaxScenarios: 4}); err != nil {
		t.Errorf("2 × 2 grid under a cap of 4: %v", err)
	}
}
