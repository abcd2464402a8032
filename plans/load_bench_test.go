package plans

import (
	"testing"
	"testing/fstest"
)

// BenchmarkDecode measures loading and checking a case with its catalogs
// (parse, key positions, checks, derived vectors, first-year utilisation
// screen) on the synthetic sizes S, M and L, from memory.
func BenchmarkDecode(b *testing.B) {
	for _, sz := range SyntheticSizes {
		b.Run(sz.Name, func(b *testing.B) {
			files, err := Synthetic(sz.Sites, sz.Years, 1)
			if err != nil {
				b.Fatal(err)
			}
			fsys := fstest.MapFS{}
			for _, f := range files {
				fsys[f.Name] = &fstest.MapFile{Data: f.Data}
			}
			b.ReportAllocs()
			b.ResetTimer()
			for range b.N {
				if _, _, err := LoadFS(fsys, files[0].Name); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
