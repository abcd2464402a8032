package mip

import (
	"context"
	"testing"
)

// BenchmarkMIPLIB solves the four MIPLIB 3 samples to proven optimality.
func BenchmarkMIPLIB(b *testing.B) {
	for _, tc := range miplibCases {
		b.Run(tc.name, func(b *testing.B) {
			m := readSample(b, tc.name)
			b.ReportAllocs()
			nodes := 0
			for i := 0; i < b.N; i++ {
				r, err := Solve(context.Background(), m, Settings{})
				if err != nil || r.Status != Optimal {
					b.Fatalf("status %v, err %v", r.Status, err)
				}
				nodes = r.Nodes
			}
			b.ReportMetric(float64(nodes), "nodes")
		})
	}
}
