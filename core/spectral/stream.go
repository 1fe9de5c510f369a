package spectral

import (
	"fmt"

	"gonum.org/v1/gonum/dsp/fourier"
)

// Stream convolves long continuous signals with one wavelet of a Bank by
// overlap-save block convolution, delivering the 'same'-aligned analytic
// signal y = x∗w_i (see Analytic) in consecutive chunks. Its memory depends
// on the FFT length only, not on the signal length. A Stream must not be used
// by more than one goroutine at a time.
type Stream struct {
	bank  *Bank
	i, h  int
	nfft  int
	block int // output samples per FFT: nfft − 2h

	rfft *fourier.FFT
	cfft *fourier.CmplxFFT
	w    []complex128
	xr   []float64
	x    []complex128
	y    []complex128
}

// DefaultStreamLen returns the FFT length NewStream uses when asked for 0:
// GoodSize(max(8·(2h+1), 4096)) for kernel half-length h. Each FFT then
// yields at least 7/8 of its length as output.
func DefaultStreamLen(h int) int { return GoodSize(max(8*(2*h+1), 4096)) }

// NewStream returns a Stream for wavelet i with FFT length nfft, which must
// exceed 2·Half(i); nfft == 0 picks DefaultStreamLen(Half(i)). Each FFT
// yields nfft − 2·Half(i) output samples (see Block).
func (b *Bank) NewStream(i, nfft int) *Stream {
	if i < 0 || i >= b.Len() {
		panic(fmt.Sprintf("spectral: wavelet index %d out of range [0,%d)", i, b.Len()))
	}
	h := b.halves[i]
	if nfft == 0 {
		nfft = DefaultStreamLen(h)
	}
	if nfft <= 2*h {
		panic(fmt.Sprintf("spectral: stream FFT length %d not longer than 2×%d kernel half-length", nfft, h))
	}
	return &Stream{
		bank:  b,
		i:     i,
		h:     h,
		nfft:  nfft,
		block: nfft - 2*h,
		rfft:  fourier.NewFFT(nfft),
		cfft:  fourier.NewCmplxFFT(nfft),
		w:     b.Spectrum(i, nfft),
		xr:    make([]float64, nfft),
		x:     make([]complex128, nfft),
		y:     make([]complex128, nfft),
	}
}

// Len returns the FFT length.
func (s *Stream) Len() int { return s.nfft }

// Block returns the number of output samples per FFT, the length of every
// chunk but the last.
func (s *Stream) Block() int { return s.block }

// Run convolves x with the wavelet and calls fn(start, y) for consecutive
// chunks, in order, where y[q] is output sample start+q of the 'same'-aligned
// analytic signal (in the unit of x). Chunks cover [0, len(x)) exactly; all
// but the last have Block() samples. y is reused: it is valid only until fn
// returns. Run does not allocate.
func (s *Stream) Run(x []float32, fn func(start int, y []complex128)) {
	s.run(len(x), func(dst []float64, lo int) {
		for m := range dst {
			dst[m] = float64(x[lo+m])
		}
	}, fn)
}

// RunFloat64 is Run for float64 samples.
func (s *Stream) RunFloat64(x []float64, fn func(start int, y []complex128)) {
	s.run(len(x), func(dst []float64, lo int) { copy(dst, x[lo:]) }, fn)
}

// run implements overlap-save: block b loads input samples [a, a+nfft) with
// a = start−h (zero outside the signal); circular output c[m] for m ≥ 2h is
// the full linear convolution at a+m, which is 'same' sample start+m−2h.
func (s *Stream) run(n int, fill func(dst []float64, lo int), fn func(start int, y []complex128)) {
	nf, h := s.nfft, s.h
	scale := complex(1/float64(nf), 0)
	for start := 0; start < n; start += s.block {
		a := start - h
		lo, hi := max(a, 0), min(a+nf, n)
		clear(s.xr[:lo-a])
		fill(s.xr[lo-a:hi-a], lo)
		clear(s.xr[hi-a:])

		s.rfft.Coefficients(s.x[:nf/2+1], s.xr)
		for k := 1; k < nf-k; k++ {
			v := s.x[k]
			s.x[nf-k] = complex(real(v), -imag(v))
		}
		for k, v := range s.w {
			s.x[k] *= v
		}
		s.cfft.Sequence(s.y, s.x)

		cnt := min(s.block, n-start)
		y := s.y[2*h : 2*h+cnt]
		for q := range y {
			y[q] *= scale
		}
		fn(start, y)
	}
}
