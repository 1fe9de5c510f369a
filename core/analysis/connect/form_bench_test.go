package connect

import (
	"context"
	"fmt"
	"math"
	"testing"

	"amplink/core/spectral"
)

// stdSpans returns the standard workload's grid (cmd/amplink-workload: 40
// log-spaced frequencies 2–60 Hz, 3→10 cycles, 500 Hz) and its two windows
// on 2.5 s epochs starting at −1 s: 15–25 Hz in −0.4…−0.1 s and 4–8 Hz in
// 0.3…0.6 s.
func stdSpans(tb testing.TB) (*spectral.Bank, []Span) {
	fr, err := spectral.Frequencies(2, 60, 40, "log")
	if err != nil {
		tb.Fatal(err)
	}
	b, err := spectral.NewBank(500, fr, spectral.Cycles(40, 3, 10))
	if err != nil {
		tb.Fatal(err)
	}
	mk := func(t0, t1, f0, f1 float64) Span {
		return Span{From: int(math.Ceil((t0 + 1) * 500)), To: int(math.Floor((t1+1)*500)) + 1, Freqs: b.Within(f0, f1)}
	}
	return b, []Span{mk(-0.4, -0.1, 15, 25), mk(0.3, 0.6, 4, 8)}
}

// BenchmarkFormVsFFT times one channel's window powers (200 trials of
// 1250 samples) on each of the standard workload's windows by the FFT route
// and through the window's quadratic form at three tolerances, and the form's
// construction. It reports the rank the form needed on average and, for the
// FFT route, ns per unit of fftRouteCost; for the form, ns per multiply-add,
// the two figures behind the cost constants in form.go.
func BenchmarkFormVsFFT(b *testing.B) {
	bank, spans := stdSpans(b)
	e := wpEpochs(200, 1, 1250, 500)
	for s, sp := range spans {
		h := bank.MaxHalf(sp.Freqs)
		lo, hi := spectral.Crop(e.NSamples, sp.From, sp.To, h)
		nfft := spectral.PowerOfTwo(spectral.TightFFTLen(hi-lo, sp.From-lo, sp.To-lo, h))
		b.Run(fmt.Sprintf("span=%d/fft", s), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := WindowPower(context.Background(), nil, bank, nil, e, 0, []Span{sp}); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/(200*fftRouteCost(nfft, len(sp.Freqs))), "ns/unit")
		})
		b.Run(fmt.Sprintf("span=%d/build", s), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if NewForm(bank, e.NSamples, sp, 1e-8, 300) == nil {
					b.Fatal("no form")
				}
			}
		})
		for _, tol := range []float64{1e-10, 1e-8, 1e-6} {
			f := NewForm(bank, e.NSamples, sp, tol, 300)
			buf := make([]float64, f.Len())
			b.Run(fmt.Sprintf("span=%d/form/tol=%g", s, tol), func(b *testing.B) {
				b.ReportAllocs()
				fma := 0
				for b.Loop() {
					for t := range 200 {
						_, r, _ := f.Power(e.Trial(t, 0), buf)
						fma += r * f.Len()
					}
				}
				b.ReportMetric(float64(fma)/float64(200*b.N*f.Len()), "rank")
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(fma), "ns/fma")
			})
		}
	}
}
