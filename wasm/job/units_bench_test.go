package job

import (
	"fmt"
	"testing"

	"amplink/core/pipeline"
)

// BenchmarkUnits measures packing and unpacking unit results, which the
// page moves between workers after every run.
func BenchmarkUnits(b *testing.B) {
	for _, n := range []int{100, 10000} {
		res := make([]pipeline.UnitResult, 20)
		for i := range res {
			res[i] = pipeline.UnitResult{ID: i, Values: make([]float64, n)}
		}
		enc := EncodeUnits(res)
		b.Run(fmt.Sprintf("encode-%d", n), func(b *testing.B) {
			b.SetBytes(int64(len(enc)))
			for b.Loop() {
				EncodeUnits(res)
			}
		})
		b.Run(fmt.Sprintf("decode-%d", n), func(b *testing.B) {
			b.SetBytes(int64(len(enc)))
			for b.Loop() {
				if _, err := DecodeUnits(enc); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
