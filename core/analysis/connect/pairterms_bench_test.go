package connect

import (
	"math/rand/v2"
	"testing"
)

// BenchmarkPairTerms is one surrogate of a 6000-sample pair.
func BenchmarkPairTerms(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	const m = 6000
	z := make([][]complex128, 2)
	for c := range z {
		z[c] = make([]complex128, m)
		for k := range z[c] {
			z[c][k] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
	}
	for _, c := range []struct {
		name string
		l    Leakage
	}{{"pairwise", PairwiseOrth}, {"symmetric", SymmetricOrth}} {
		b.Run(c.name, func(b *testing.B) {
			pt := NewPairTermer(z, 0, 1, c.l, 10, nil, Amplitude)
			for b.Loop() {
				if _, err := pt.Shifted(1234); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
