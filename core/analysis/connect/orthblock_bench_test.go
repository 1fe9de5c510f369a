package connect

import (
	"fmt"
	"testing"
)

// BenchmarkOrthEnvelopes is every ordered pairwise orthogonalisation of 64
// channels over 16 384 samples, binned by 100 (1 kHz to 10 Hz), as an
// envelope unit does it: pair by pair (UnitPhasors once per channel, then
// OrthEnvelope per ordered pair, the route before OrthEnvelopes) or blocked
// (OrthEnvelopes). It reports ns per ordered pair and sample.
func BenchmarkOrthEnvelopes(b *testing.B) {
	const n, m, bin = 64, 16384, 100
	z := randomBands(n, m, 5)
	pairSamples := float64(n * (n - 1) * m)
	for _, kind := range []EnvKind{Amplitude, LogPower} {
		name := map[EnvKind]string{Amplitude: "amplitude", LogPower: "logpower"}[kind]
		b.Run(fmt.Sprintf("pairbypair/%s", name), func(b *testing.B) {
			dst := make([][]float64, n*(n-1))
			var u []complex128
			b.ReportAllocs()
			for b.Loop() {
				for i := range n {
					u = UnitPhasors(u, z[i])
					for j := range n {
						if i != j {
							k := OrthIndex(n, i, j)
							dst[k] = OrthEnvelope(dst[k], u, z[j], bin, nil, kind)
						}
					}
				}
			}
			b.ReportMetric(b.Elapsed().Seconds()*1e9/float64(b.N)/pairSamples, "ns/pair-sample")
		})
		b.Run(fmt.Sprintf("blocked/%s", name), func(b *testing.B) {
			var w OrthWork
			dst := OrthEnvelopes(nil, z, bin, nil, kind, &w)
			b.ReportAllocs()
			for b.Loop() {
				dst = OrthEnvelopes(dst, z, bin, nil, kind, &w)
			}
			b.ReportMetric(b.Elapsed().Seconds()*1e9/float64(b.N)/pairSamples, "ns/pair-sample")
		})
	}
}
