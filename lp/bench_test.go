package lp

import (
	"context"
	"fmt"
	"testing"
)

// BenchmarkNetlib solves each Netlib sample from a cold start.
func BenchmarkNetlib(b *testing.B) {
	for _, tc := range netlibCases {
		b.Run(fmt.Sprintf("%s_%dx%d", tc.name, tc.rows-1, tc.cols), func(b *testing.B) {
			m := readSample(b, tc.name)
			b.ReportAllocs()
			for b.Loop() {
				r, err := Solve(context.Background(), m, Settings{})
				if err != nil || r.Status != Optimal {
					b.Fatalf("status %v, error %v", r.Status, err)
				}
			}
		})
	}
}

// BenchmarkWarmResolve measures a branch-and-bound step: tighten one
// bound, re-solve from the parent's basis, restore.
func BenchmarkWarmResolve(b *testing.B) {
	for _, name := range []string{"brandy", "finnis"} {
		b.Run(name, func(b *testing.B) {
			m := readSample(b, name)
			sv, err := NewSolver(m, Settings{})
			if err != nil {
				b.Fatal(err)
			}
			r0 := sv.Solve(context.Background())
			j := interiorColumn(m, r0)
			st := sv.SaveState()
			b.ReportAllocs()
			for b.Loop() {
				sv.SetColBounds(j, m.ColLower[j], r0.X[j]-min(1, (r0.X[j]-m.ColLower[j])/2))
				if r := sv.Solve(context.Background()); r.Status != Optimal {
					b.Fatalf("status %v", r.Status)
				}
				sv.RestoreState(st)
			}
		})
	}
}

// BenchmarkReadMPS reads the largest sample.
func BenchmarkReadMPS(b *testing.B) {
	readSample(b, "finnis")
	b.ReportAllocs()
	for b.Loop() {
		if _, err := ReadMPSFile(sampleDir + "finnis.mps"); err != nil {
			b.Fatal(err)
		}
	}
}
