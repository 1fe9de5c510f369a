package connect_test

import (
	"fmt"
	"math"
	"testing"

	"amplink/cmd/amplink-workload/workload"
	"amplink/core/analysis/connect"
	"amplink/core/spectral"
)

// BenchmarkEnvelopeStream streams the 8–12 Hz band signals of a 10-minute
// channel pair at 500 Hz (the --envelope workload of cmd/amplink-workload,
// first two channels) through BandSignal and accumulates plain and
// orthogonalised envelope co-moments with Moments, chunk by chunk as the
// recipe's continuous envelope units do: each chunk of the retained span is
// convolved from its crop (chunk ± the longest kernel half-width) with FFT
// length GoodSize(crop + 2·half), or, for the tight variants, with
// TightFFTLen (a chunk of 2^16 − 2·half then gets a power-of-two FFT). It reports retained samples of the pair per second.
func BenchmarkEnvelopeStream(b *testing.B) {
	const rate, seconds = 500.0, 600.0
	rec := workload.Continuous(2, rate, seconds, 1)
	x, y := rec.Samples[0], rec.Samples[1]
	freqs, err := spectral.Frequencies(2, 60, 40, "log")
	if err != nil {
		b.Fatal(err)
	}
	bank, err := spectral.NewBank(rate, freqs, spectral.Cycles(len(freqs), 3, 10))
	if err != nil {
		b.Fatal(err)
	}
	band := bank.Within(8, 12)
	half := bank.MaxHalf(band)
	n := len(x)
	lo0, hi0 := half, n-half
	for _, c := range []struct {
		chunk int
		tight bool
	}{{4096, false}, {16384, false}, {1 << 16, false}, {1 << 16, true}, {1<<16 - 2*half, true}, {hi0 - lo0, false}} {
		name := fmt.Sprintf("chunk=%d", c.chunk)
		if c.tight {
			name += "/tight"
		}
		if c.chunk == 1<<16-2*half {
			name += "/nfft=65536"
		}
		b.Run(name, func(b *testing.B) {
			convs := map[int]*spectral.Convolver{}
			var zx, zy []complex128
			var plain, xy, yx connect.Moments
			run := func() {
				plain, xy, yx = connect.Moments{}, connect.Moments{}, connect.Moments{}
				for s := lo0; s < hi0; s += c.chunk {
					e := min(s+c.chunk, hi0)
					lo, hi := spectral.Crop(n, s, e, half)
					nfft := spectral.GoodSize(hi - lo + 2*half)
					if c.tight {
						nfft = spectral.TightFFTLen(hi-lo, s-lo, e-lo, half)
					}
					conv := convs[nfft]
					if conv == nil {
						conv = bank.NewConvolver(nfft)
						conv.Tight = c.tight
						convs[nfft] = conv
					}
					conv.Load(x[lo:hi])
					zx = connect.BandSignal(zx, conv, band, s-lo, e-lo)
					conv.Load(y[lo:hi])
					zy = connect.BandSignal(zy, conv, band, s-lo, e-lo)
					for k := range zx {
						ax, ay := math.Hypot(real(zx[k]), imag(zx[k])), math.Hypot(real(zy[k]), imag(zy[k]))
						plain.Add(ax, ay)
						xy.Add(ax, connect.OrthAmp(zx[k], zy[k]))
						yx.Add(ay, connect.OrthAmp(zy[k], zx[k]))
					}
				}
			}
			run()
			if r := plain.R(); math.IsNaN(r) || plain.N != float64(hi0-lo0) {
				b.Fatalf("plain r = %v over %v samples, want a number over %d", r, plain.N, hi0-lo0)
			}
			b.ReportAllocs()
			for b.Loop() {
				run()
			}
			b.ReportMetric(float64(hi0-lo0)*float64(b.N)/b.Elapsed().Seconds(), "samples/s")
			b.ReportMetric((xy.R()+yx.R())/2, "r_orth")
		})
	}
}
