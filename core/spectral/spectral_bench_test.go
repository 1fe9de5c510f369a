package spectral

import (
	"fmt"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

// benchBank is a 10-frequency 15–25 Hz band with 7 cycles at 500 Hz
// (H = 149 samples at 15 Hz).
func benchBank(b *testing.B) (*Bank, []int) {
	f, err := Frequencies(15, 25, 10, "log")
	if err != nil {
		b.Fatal(err)
	}
	bank, err := NewBank(500, f, Cycles(10, 7, 7))
	if err != nil {
		b.Fatal(err)
	}
	idx := make([]int, bank.Len())
	for i := range idx {
		idx[i] = i
	}
	return bank, idx
}

// BenchmarkWindowPower measures one trial's window power: Load plus MeanPower
// over a 10-frequency band for a 300-sample window, from a whole 1250-sample
// epoch or from the cropped segment around the window.
func BenchmarkWindowPower(b *testing.B) {
	bank, idx := benchBank(b)
	const n, from, to = 1250, 600, 900
	x := randomSignal(n, 1)
	h := bank.MaxHalf(idx)
	lo, hi := Crop(n, from, to, h)
	for _, c := range []struct {
		name     string
		seg      []float32
		from, to int
		nfft     int
		tight    bool
	}{
		{"epoch1250", x, from, to, FFTLen(n, h), false},
		{"crop300", x[lo:hi], from - lo, to - lo, FFTLen(hi-lo, h), false},
		{"crop300tight", x[lo:hi], from - lo, to - lo, TightFFTLen(hi-lo, from-lo, to-lo, h), true},
	} {
		b.Run(fmt.Sprintf("%s/nfft=%d", c.name, c.nfft), func(b *testing.B) {
			conv := bank.NewConvolver(c.nfft)
			conv.Tight = c.tight
			conv.Load(c.seg)
			for _, i := range idx {
				conv.MeanPower(i, c.from, c.to)
			}
			b.ReportAllocs()
			var sink float64
			for b.Loop() {
				conv.Load(c.seg)
				for _, i := range idx {
					sink += conv.MeanPower(i, c.from, c.to)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*len(idx)), "ns/freq")
			_ = sink
		})
	}
}

// BenchmarkSpectrumCacheHit measures a repeated Bank.Spectrum lookup.
func BenchmarkSpectrumCacheHit(b *testing.B) {
	bank, _ := benchBank(b)
	for _, nfft := range []int{600, 1600, 4096} {
		b.Run(fmt.Sprintf("nfft=%d", nfft), func(b *testing.B) {
			bank.Spectrum(3, nfft)
			b.ReportAllocs()
			for b.Loop() {
				bank.Spectrum(3, nfft)
			}
		})
	}
}

// BenchmarkForward compares the real-input FFT plus Hermitian fill (used by
// Load) with a complex FFT of the zero-imaginary signal.
func BenchmarkForward(b *testing.B) {
	for _, nfft := range []int{600, 1600, 4096} {
		x := make([]float64, nfft)
		for j, v := range randomSignal(nfft, 2) {
			x[j] = float64(v)
		}
		dst := make([]complex128, nfft)
		b.Run(fmt.Sprintf("real/nfft=%d", nfft), func(b *testing.B) {
			t := fourier.NewFFT(nfft)
			b.ReportAllocs()
			for b.Loop() {
				t.Coefficients(dst[:nfft/2+1], x)
				for k := 1; k < nfft-k; k++ {
					v := dst[k]
					dst[nfft-k] = complex(real(v), -imag(v))
				}
			}
		})
		b.Run(fmt.Sprintf("complex/nfft=%d", nfft), func(b *testing.B) {
			t := fourier.NewCmplxFFT(nfft)
			b.ReportAllocs()
			for b.Loop() {
				for j, v := range x {
					dst[j] = complex(v, 0)
				}
				t.Coefficients(dst, dst)
			}
		})
	}
}

// BenchmarkStream convolves 10 minutes of one channel at 500 Hz with a
// 10 Hz, 7-cycle wavelet (H = 223) for several FFT block lengths.
func BenchmarkStream(b *testing.B) {
	const rate, n = 500.0, 10 * 60 * 500
	bank, err := NewBank(rate, []float64{10}, []float64{7})
	if err != nil {
		b.Fatal(err)
	}
	x := randomSignal(n, 3)
	h := bank.Half(0)
	for _, nfft := range []int{GoodSize(4 * (2*h + 1)), 0, GoodSize(16 * (2*h + 1)), 16384, 65536} {
		s := bank.NewStream(0, nfft)
		b.Run(fmt.Sprintf("nfft=%d", s.Len()), func(b *testing.B) {
			var sink float64
			fn := func(start int, y []complex128) {
				for _, v := range y {
					sink += real(v)*real(v) + imag(v)*imag(v)
				}
			}
			b.SetBytes(4 * n)
			b.ReportAllocs()
			for b.Loop() {
				s.Run(x, fn)
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*n), "ns/sample")
			_ = sink
		})
	}
	b.Run("oneshot", func(b *testing.B) {
		c := bank.NewConvolver(FFTLen(n, h))
		dst := make([]complex128, n)
		c.Load(x)
		c.Analytic(dst, 0, 0, n) // warm the spectrum cache
		b.SetBytes(4 * n)
		b.ReportAllocs()
		for b.Loop() {
			c.Load(x)
			c.Analytic(dst, 0, 0, n)
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*n), "ns/sample")
	})
}

// BenchmarkBandSignal is one channel's 8–12 Hz band signal over a 65 536-
// sample envelope chunk at 1 kHz (40 log-spaced frequencies 2–60 Hz, 3→10
// cycles, as in the 1-hour envelope workload): the one-transform route of
// the envelope units before overlap-save (Load plus BandAnalytic on the
// chunk's crop, FFT length GoodSize(crop + 2·half), 67 500 points here)
// against BandBlocks at power-of-four block lengths and BandFilter's choice.
// It reports ns per output sample.
func BenchmarkBandSignal(b *testing.B) {
	const rate, m = 1000.0, 1 << 16
	f, err := Frequencies(2, 60, 40, "log")
	if err != nil {
		b.Fatal(err)
	}
	bank, err := NewBank(rate, f, Cycles(40, 3, 10))
	if err != nil {
		b.Fatal(err)
	}
	idx := bank.Within(8, 12)
	h := bank.MaxHalf(idx)
	x := randomSignal(m+2*h, 9)
	from, to := h, m+h
	per := func(b *testing.B) {
		b.ReportMetric(b.Elapsed().Seconds()*1e9/float64(b.N)/m, "ns/sample")
	}
	nfft := GoodSize(len(x) + 2*h)
	b.Run(fmt.Sprintf("oneshot/nfft=%d", nfft), func(b *testing.B) {
		c := bank.NewConvolver(nfft)
		c.Load(x)
		dst := c.BandAnalytic(nil, idx, from, to)
		b.ReportAllocs()
		for b.Loop() {
			c.Load(x)
			dst = c.BandAnalytic(dst, idx, from, to)
		}
		per(b)
	})
	for _, nb := range []int{4096, 16384} {
		b.Run(fmt.Sprintf("blocks/nfft=%d", nb), func(b *testing.B) {
			s := bank.NewBandBlocks(idx, nb)
			dst := s.Band(nil, x, from, to)
			b.ReportAllocs()
			for b.Loop() {
				dst = s.Band(dst, x, from, to)
			}
			per(b)
		})
	}
	b.Run(fmt.Sprintf("filter/nfft=%d", BandBlockLen(h, m)), func(b *testing.B) {
		fl := bank.NewBandFilter()
		dst := fl.Band(nil, idx, x, from, to)
		b.ReportAllocs()
		for b.Loop() {
			dst = fl.Band(dst, idx, x, from, to)
		}
		per(b)
	})
}

// BenchmarkBlockFFT is one inverse complex transform of the overlap-save
// block lengths: blockFFT (table twiddles) against gonum's SequenceRadix4
// (twiddles by repeated multiplication) and CmplxFFT.
func BenchmarkBlockFFT(b *testing.B) {
	for _, n := range []int{4096, 16384} {
		x := make([]complex128, n)
		for k := range x {
			x[k] = complex(float64(k%7), float64(k%5))
		}
		f := newBlockFFT(n)
		b.Run(fmt.Sprintf("blockFFT/%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				f.transform(x, true)
			}
		})
		b.Run(fmt.Sprintf("SequenceRadix4/%d", n), func(b *testing.B) {
			for b.Loop() {
				fourier.SequenceRadix4(x)
			}
		})
		c := fourier.NewCmplxFFT(n)
		b.Run(fmt.Sprintf("CmplxFFT/%d", n), func(b *testing.B) {
			for b.Loop() {
				c.Sequence(x, x)
			}
		})
	}
}
