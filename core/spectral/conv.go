package spectral

import (
	"fmt"
	"math"
	"math/bits"

	"gonum.org/v1/gonum/dsp/fourier"
)

// FFTLen returns the FFT length GoodSize(n + 2·half) that a Convolver needs
// for a signal of n samples and kernels of half-length up to half.
func FFTLen(n, half int) int { return GoodSize(n + 2*half) }

// Crop returns the input span [lo, hi) of a signal of nSamples samples that
// determines the 'same'-aligned output samples [from, to) exactly for kernels
// of half-length up to half: lo = max(0, from−half), hi = min(nSamples, to+half).
// Convolving only x[lo:hi] and reading output samples [from−lo, to−lo) gives
// the same values as convolving all of x and reading [from, to), because
// every tap that reaches outside [lo, hi) falls outside x or is not needed.
func Crop(nSamples, from, to, half int) (lo, hi int) {
	return max(0, from-half), min(nSamples, to+half)
}

// Convolver holds one goroutine's FFT plans and buffers for one FFT length.
// It convolves one loaded real signal with any wavelet of its Bank. A
// Convolver must not be used by more than one goroutine at a time; make one
// per goroutine with Bank.NewConvolver. After the first call for each
// wavelet, Load, Analytic, MeanPower and TFPower do not allocate.
type Convolver struct {
	// Tight relaxes the FFT-length check to what the requested samples need.
	// By default (false) every call panics unless len(x) + 2·Half(i) ≤ nfft,
	// so that no sample of the circular FFT result wraps. With Tight set, a
	// call on output samples [from, to) only requires
	//
	//	from ≥ len(x) + Half(i) − nfft   and   to + Half(i) ≤ nfft,
	//
	// which is exactly the condition for those samples to be free of
	// wrap-around; the values then equal the default ones to rounding. A cropped
	// segment (see Crop) read only in its interior then needs an FFT of about
	// its own length (see TightFFTLen) instead of its length plus 2·Half(i).
	Tight bool

	bank *Bank
	nfft int
	rfft *fourier.FFT
	cfft *fourier.CmplxFFT

	xr   []float64      // zero-padded input, nfft
	x    []complex128   // full Hermitian spectrum of xr, nfft
	out  []complex128   // IFFT of x·W for wavelet cur, unnormalised, nfft
	spec [][]complex128 // per-wavelet view of bank.Spectrum(i, nfft)

	// Folded decimation for TFPower (see tfPowerFolded).
	roots []complex128      // exp(i2πk/nfft), built on first use
	fold  []complex128      // folded spectrum, nfft/step
	mfft  *fourier.CmplxFFT // inverse FFT of length nfft/step

	n      int // length of the loaded signal, −1 before Load
	cur    int // wavelet whose result is in out, −1 if none
	scale  float64
	scale2 float64
}

// NewConvolver returns a Convolver for FFT length nfft, which must be at
// least len(x) + 2·Half(i) for every signal x and wavelet i it will be used
// with (see FFTLen). Choose nfft with GoodSize for speed.
func (b *Bank) NewConvolver(nfft int) *Convolver {
	c := &Convolver{
		bank: b,
		rfft: new(fourier.FFT),
		cfft: new(fourier.CmplxFFT),
		spec: make([][]complex128, b.Len()),
	}
	c.Reset(nfft)
	return c
}

// Reset reinitialises c for FFT length nfft, reusing its buffers when they
// are large enough. The loaded signal is discarded; Tight is kept.
func (c *Convolver) Reset(nfft int) {
	if nfft < 1 {
		panic(fmt.Sprintf("spectral: FFT length %d < 1", nfft))
	}
	c.nfft = nfft
	c.rfft.Reset(nfft)
	c.cfft.Reset(nfft)
	c.xr = resize(c.xr, nfft)
	c.x = resize(c.x, nfft)
	c.out = resize(c.out, nfft)
	clear(c.spec)
	c.n, c.cur = -1, -1
	c.scale = 1 / float64(nfft)
	c.scale2 = 1 / (float64(nfft) * float64(nfft))
	c.roots = c.roots[:0]
}

func resize[T any](s []T, n int) []T {
	if cap(s) < n {
		return make([]T, n)
	}
	return s[:n]
}

// Bank returns the Bank c convolves with.
func (c *Convolver) Bank() *Bank { return c.bank }

// Len returns the FFT length.
func (c *Convolver) Len() int { return c.nfft }

// Loaded returns the length of the loaded signal, or −1 before the first Load.
func (c *Convolver) Loaded() int { return c.n }

// Load zero-pads x to the FFT length and computes its spectrum, which every
// later Analytic, MeanPower and TFPower call shares until the next Load.
// It panics if x is longer than the FFT length.
func (c *Convolver) Load(x []float32) {
	c.checkLoad(len(x))
	for j, v := range x {
		c.xr[j] = float64(v)
	}
	clear(c.xr[len(x):])
	c.forward(len(x))
}

// LoadFloat64 is Load for float64 samples.
func (c *Convolver) LoadFloat64(x []float64) {
	c.checkLoad(len(x))
	copy(c.xr, x)
	clear(c.xr[len(x):])
	c.forward(len(x))
}

func (c *Convolver) checkLoad(n int) {
	if n > c.nfft {
		panic(fmt.Sprintf("spectral: signal of %d samples longer than FFT length %d", n, c.nfft))
	}
}

// forward computes the full spectrum of the real sequence in xr by the
// real-input FFT and Hermitian symmetry X[nfft−k] = conj(X[k]).
func (c *Convolver) forward(n int) {
	nf := c.nfft
	c.rfft.Coefficients(c.x[:nf/2+1], c.xr)
	for k := 1; k < nf-k; k++ {
		v := c.x[k]
		c.x[nf-k] = complex(real(v), -imag(v))
	}
	c.n = n
	c.cur = -1
}

// TightFFTLen returns the smallest good FFT length (see GoodSize) with which
// a Convolver with Tight set can return output samples [from, to) of a signal
// of n samples for kernels of half-length up to half:
// GoodSize(max(n, 2·half+1, n+half−from, to+half)).
func TightFFTLen(n, from, to, half int) int {
	return GoodSize(max(n, 2*half+1, n+half-from, to+half))
}

// TightFFTLenStep is TightFFTLen rounded up to a multiple of step whose
// quotient has only the prime factors 2, 3 and 5, so that TFPower can read
// every step-th sample by folding the spectrum (see Convolver.TFPower).
func TightFFTLenStep(n, from, to, half, step int) int {
	m := max(n, 2*half+1, n+half-from, to+half)
	if step <= 1 {
		return GoodSize(m)
	}
	return step * GoodSize((m+step-1)/step)
}

// check panics if output samples [from, to) of wavelet i (half-length h) are
// outside the loaded signal or would wrap.
func (c *Convolver) check(h, from, to int) {
	if from < 0 || to < from || to > c.n {
		panic(fmt.Sprintf("spectral: sample range [%d,%d) outside the loaded signal [0,%d)", from, to, c.n))
	}
	if c.Tight {
		if from < c.n+h-c.nfft || to+h > c.nfft {
			panic(fmt.Sprintf("spectral: samples [%d,%d) of a %d-sample signal with kernel half-length %d need FFT length %d, have %d; the result would wrap",
				from, to, c.n, h, max(c.n+h-from, to+h), c.nfft))
		}
		return
	}
	if c.n+2*h > c.nfft {
		panic(fmt.Sprintf("spectral: signal of %d samples + 2×%d kernel half-length exceeds FFT length %d; the result would wrap", c.n, h, c.nfft))
	}
}

// compute checks the request and fills out with the unnormalised circular
// convolution of the loaded signal with wavelet i; it returns H.
func (c *Convolver) compute(i, from, to int) int {
	if c.n < 0 {
		panic("spectral: Convolver used before Load")
	}
	if i < 0 || i >= len(c.spec) {
		panic(fmt.Sprintf("spectral: wavelet index %d out of range [0,%d)", i, len(c.spec)))
	}
	h := c.bank.halves[i]
	c.check(h, from, to)
	if c.cur == i {
		return h
	}
	w := c.spec[i]
	if w == nil {
		w = c.bank.Spectrum(i, c.nfft)
		c.spec[i] = w
	}
	out, x := c.out, c.x
	for k := range out {
		out[k] = x[k] * w[k]
	}
	c.inverse(out)
	c.cur = i
	return h
}

// MaxRadixLen bounds the power-of-two lengths sent to gonum's radix-2/4
// transforms, whose twiddle factors come from repeated multiplication and so
// lose accuracy on long inputs (at 2^14 they agree with CmplxFFT to about
// 1e-13 relative; see TestRadixInverse).
const MaxRadixLen = 1 << 14

// inverse computes the unnormalised inverse FFT of v in place: gonum's
// radix-4 or radix-2 kernel for power-of-two lengths up to MaxRadixLen
// (faster by about 1.5× at the lengths window analyses use), CmplxFFT
// otherwise.
func (c *Convolver) inverse(v []complex128) {
	n := len(v)
	if n >= 4 && n <= MaxRadixLen && n&(n-1) == 0 {
		if bits.TrailingZeros(uint(n))%2 == 0 {
			fourier.SequenceRadix4(v)
		} else {
			fourier.SequenceRadix2(v)
		}
		return
	}
	c.cfft.Sequence(v, v)
}

// PowerOfTwo returns the smallest power of two ≥ n (1 for n ≤ 1).
func PowerOfTwo(n int) int {
	if n <= 1 {
		return 1
	}
	return 1 << bits.Len(uint(n-1))
}

// Analytic writes samples [from, to) of the 'same'-aligned linear
// convolution y = x∗w_i of the loaded signal x with wavelet i into dst and
// returns it (the complex analytic signal, in the unit of x). This is
// scipy.signal.fftconvolve(x, w, mode='same')[from:to]. dst is reused when
// its capacity suffices.
//
// It panics if len(x) + 2·Half(i) exceeds the FFT length, since the result
// would wrap (see Tight for the relaxed check), or if [from, to) is not
// inside [0, len(x)].
func (c *Convolver) Analytic(dst []complex128, i, from, to int) []complex128 {
	h := c.compute(i, from, to)
	m := to - from
	if cap(dst) < m {
		dst = make([]complex128, m)
	}
	dst = dst[:m]
	s := complex(c.scale, 0)
	for j, v := range c.out[from+h : to+h] {
		dst[j] = v * s
	}
	return dst
}

// MeanPower returns the mean of |y[j]|² over j in [from, to), where y is the
// analytic signal of the loaded signal with wavelet i (see Analytic), in the
// square of the signal's unit (µV² for µV). It returns NaN for an empty range
// and panics under the same conditions as Analytic.
func (c *Convolver) MeanPower(i, from, to int) float64 {
	h := c.compute(i, from, to)
	if from == to {
		return math.NaN()
	}
	var s float64
	for _, v := range c.out[from+h : to+h] {
		s += real(v)*real(v) + imag(v)*imag(v)
	}
	return s * c.scale2 / float64(to-from)
}

// TFCols returns the number of columns ⌈(to−from)/step⌉ of a TFPower map;
// step < 1 counts as 1.
func TFCols(from, to, step int) int {
	step = max(step, 1)
	if to <= from {
		return 0
	}
	return (to - from + step - 1) / step
}

// TFPower adds the power |y_i[j]|² of the loaded signal to a time-frequency
// map: dst[r][col] += |y_{idx[r]}[from + col·step]|² for col = 0 …
// TFCols(from, to, step)−1. Call it once per trial after Load and divide by
// the number of trials to get the trial-averaged power map (frequency × time,
// in the square of the signal's unit). step < 1 counts as 1 (no decimation).
//
// If dst is nil a zeroed map of len(idx) rows is allocated; otherwise it must
// have that shape. TFPower returns dst and panics under the same conditions
// as Analytic.
func TFPower(dst [][]float64, c *Convolver, idx []int, from, to, step int) [][]float64 {
	step = max(step, 1)
	cols := TFCols(from, to, step)
	if dst == nil {
		dst = make([][]float64, len(idx))
		for r := range dst {
			dst[r] = make([]float64, cols)
		}
	}
	if len(dst) != len(idx) {
		panic(fmt.Sprintf("spectral: power map has %d rows for %d frequencies", len(dst), len(idx)))
	}
	for r, row := range dst {
		if len(row) != cols {
			panic(fmt.Sprintf("spectral: power map row %d has %d columns, want %d", r, len(row), cols))
		}
	}
	if step > 1 && cols > 0 && c.nfft%step == 0 {
		c.tfPowerFolded(dst, idx, from, to, step)
		return dst
	}
	for r, i := range idx {
		row := dst[r]
		h := c.compute(i, from, to)
		for col := range row {
			v := c.out[from+col*step+h]
			row[col] += (real(v)*real(v) + imag(v)*imag(v)) * c.scale2
		}
	}
	return dst
}

// tfPowerFolded is TFPower for a step that divides the FFT length N. Every
// step-th output sample y[off + c·step], c = 0 … M−1 with M = N/step, is
//
//	y[off + c·step] = (1/N)·Σ_{k'<M} (Σ_j Z[k' + j·M])·exp(i2πk'c/M),
//	Z[k] = X[k]·W[k]·exp(i2πk·off/N),
//
// so folding the shifted product spectrum into M bins and one inverse FFT of
// length M gives them all, in place of an inverse FFT of length N. The
// values equal the unfolded ones to rounding.
func (c *Convolver) tfPowerFolded(dst [][]float64, idx []int, from, to, step int) {
	nf := c.nfft
	m := nf / step
	if len(c.roots) != nf {
		c.roots = resize(c.roots, nf)
		for k := range c.roots {
			s, co := math.Sincos(2 * math.Pi * float64(k) / float64(nf))
			c.roots[k] = complex(co, s)
		}
	}
	if len(c.fold) != m {
		c.fold = make([]complex128, m)
		c.mfft = fourier.NewCmplxFFT(m)
	}
	if c.n < 0 {
		panic("spectral: Convolver used before Load")
	}
	for r, i := range idx {
		if i < 0 || i >= len(c.spec) {
			panic(fmt.Sprintf("spectral: wavelet index %d out of range [0,%d)", i, len(c.spec)))
		}
		h := c.bank.halves[i]
		c.check(h, from, to)
		w := c.spec[i]
		if w == nil {
			w = c.bank.Spectrum(i, nf)
			c.spec[i] = w
		}
		off := from + h
		fold := c.fold
		clear(fold)
		p := 0
		for j := 0; j < step; j++ {
			base := j * m
			xs, ws := c.x[base:base+m], w[base:base+m]
			for k := range fold {
				fold[k] += xs[k] * ws[k] * c.roots[p]
				p += off
				if p >= nf {
					p -= nf
				}
			}
		}
		c.mfft.Sequence(fold, fold)
		row := dst[r]
		for col := range row {
			v := fold[col]
			row[col] += (real(v)*real(v) + imag(v)*imag(v)) * c.scale2
		}
	}
}
