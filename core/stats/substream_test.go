package stats

import (
	"math"
	"testing"
)

// Substreams of one seed are reproducible, distinct from each other and
// from NewRand(seed), and neighbouring ones are uncorrelated: the Pearson r
// of 4000 uniform draws of streams k and k+1 stays within 4/√n of 0 (the
// null standard error of r is about 1/√n, common practice).
func TestNewRandFor(t *testing.T) {
	const n = 4000
	draw := func(k uint64) []float64 {
		r := NewRandFor(7, k)
		out := make([]float64, n)
		for i := range out {
			out[i] = r.Float64()
		}
		return out
	}
	if a, b := draw(3), draw(3); a[0] != b[0] || a[n-1] != b[n-1] {
		t.Fatal("substream 3 of seed 7 is not reproducible")
	}
	base := NewRand(7).Float64()
	for k := uint64(0); k < 8; k++ {
		x, y := draw(k), draw(k+1)
		if x[0] == base || x[0] == y[0] {
			t.Errorf("substream %d starts like another stream", k)
		}
		if r := Pearson(x, y); math.Abs(r) > 4/math.Sqrt(n) {
			t.Errorf("substreams %d and %d: r = %.4f", k, k+1, r)
		}
	}
}
