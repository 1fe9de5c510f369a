package spectral

import (
	"fmt"
	"math"
	"sync"

	"gonum.org/v1/gonum/dsp/fourier"
)

// Bank is a set of Morlet wavelets for one sample rate, with the FFT spectra
// of the kernels cached per FFT length. A Bank is safe for concurrent use by
// many goroutines.
type Bank struct {
	rate    float64
	freqs   []float64
	cycles  []float64
	halves  []int
	kernels [][]complex128

	mu      sync.Mutex
	spectra map[specKey]*specEntry
	bands   map[string]*bandEntry
}

type specKey struct{ i, nfft int }

type specEntry struct {
	once sync.Once
	w    []complex128
}

// MaxTaps bounds the kernels of one Bank: their taps together (complex128,
// 16 bytes each) may number at most MaxTaps, 2^24 (256 MiB). A legitimate
// grid needs far fewer: 50 wavelets from 0.5 Hz with 10 cycles at 5 kHz
// come to about 6.4 million taps.
const MaxTaps = 1 << 24

// LengthError says a wavelet would be longer than the data it is applied to
// (or than MaxTaps). Taps is computed in floating point, so it may exceed
// any int.
type LengthError struct {
	Index  int     // the wavelet's index in the bank
	Freq   float64 // Hz
	Cycles float64
	Rate   float64 // Hz
	Taps   float64 // the kernel's length 2H+1 in samples
	Max    int     // the most taps allowed: the data's length in samples
	Total  bool    // the bank's taps together exceed MaxTaps
}

func (e *LengthError) Error() string {
	if e.Total {
		return fmt.Sprintf("the wavelets together would have %.3g taps at %g Hz, more than the %d a bank may hold", e.Taps, e.Rate, MaxTaps)
	}
	return fmt.Sprintf("the %.4g Hz wavelet with %.3g cycles would be %.3g samples long (%.3g s at %g Hz), longer than the %d samples of the data",
		e.Freq, e.Cycles, e.Taps, e.Taps/e.Rate, e.Rate, e.Max)
}

// Taps returns the length 2H+1 of the kernel with n cycles at f Hz sampled
// at rate Hz, computed in floating point (see Half), so that an absurd rate
// or frequency gives a large number rather than an overflowed int.
func Taps(rate, f, n float64) float64 {
	return 2*math.Ceil(Support*SigmaT(f, n)*rate) + 1
}

// NewBank builds the wavelets with cycles[i] cycles at freqs[i] Hz for
// signals sampled at rate Hz. Every frequency must be positive and below the
// Nyquist frequency rate/2, every cycle count positive, and both slices of
// the same non-zero length. The slices are copied. The kernels together may
// have at most MaxTaps taps.
func NewBank(rate float64, freqs, cycles []float64) (*Bank, error) {
	return NewBankFor(rate, freqs, cycles, MaxTaps)
}

// NewBankFor is NewBank for data of maxLen samples: it refuses, with a
// *LengthError and before building any kernel, a wavelet longer than maxLen
// samples, since it would be longer than the data it is applied to.
func NewBankFor(rate float64, freqs, cycles []float64, maxLen int) (*Bank, error) {
	if math.IsNaN(rate) || math.IsInf(rate, 0) || rate <= 0 {
		return nil, fmt.Errorf("spectral: sample rate %v Hz must be a positive number", rate)
	}
	if len(freqs) == 0 {
		return nil, fmt.Errorf("spectral: no frequencies")
	}
	if len(cycles) != len(freqs) {
		return nil, fmt.Errorf("spectral: %d frequencies but %d cycle counts", len(freqs), len(cycles))
	}
	maxLen = min(maxLen, MaxTaps)
	total := 0.0
	for i, f := range freqs {
		n := cycles[i]
		switch {
		case math.IsNaN(f) || f <= 0 || f >= rate/2:
			return nil, fmt.Errorf("spectral: frequency %d (%v Hz) must be above 0 and below the Nyquist frequency %v Hz", i, f, rate/2)
		case math.IsNaN(n) || math.IsInf(n, 0) || n <= 0:
			return nil, fmt.Errorf("spectral: cycle count %d (%v) must be a positive number", i, n)
		}
		t := Taps(rate, f, n)
		if !(t <= float64(maxLen)) {
			return nil, &LengthError{Index: i, Freq: f, Cycles: n, Rate: rate, Taps: t, Max: maxLen}
		}
		total += t
	}
	if total > MaxTaps {
		return nil, &LengthError{Index: -1, Rate: rate, Taps: total, Max: maxLen, Total: true}
	}
	b := &Bank{
		rate:    rate,
		freqs:   append([]float64(nil), freqs...),
		cycles:  append([]float64(nil), cycles...),
		halves:  make([]int, len(freqs)),
		kernels: make([][]complex128, len(freqs)),
		spectra: make(map[specKey]*specEntry),
	}
	for i, f := range freqs {
		b.halves[i] = Half(rate, f, cycles[i])
		b.kernels[i] = Kernel(nil, rate, f, cycles[i])
	}
	return b, nil
}

// Rate returns the sample rate in Hz.
func (b *Bank) Rate() float64 { return b.rate }

// Len returns the number of wavelets.
func (b *Bank) Len() int { return len(b.freqs) }

// Freq returns the centre frequency of wavelet i in Hz.
func (b *Bank) Freq(i int) float64 { return b.freqs[i] }

// Cycles returns the number of cycles of wavelet i.
func (b *Bank) Cycles(i int) float64 { return b.cycles[i] }

// Half returns the half-length H of wavelet i in samples; the kernel has
// 2H+1 taps.
func (b *Bank) Half(i int) int { return b.halves[i] }

// Kernel returns the time-domain taps of wavelet i (see Kernel). The slice is
// shared and must not be modified.
func (b *Bank) Kernel(i int) []complex128 { return b.kernels[i] }

// Within returns the indices of the wavelets whose frequency lies in the
// inclusive range [lo, hi] Hz, in bank order. A relative tolerance of 1e-9
// absorbs rounding in computed grids, so a grid point printed as 15 counts as
// inside [15, 25].
func (b *Bank) Within(lo, hi float64) []int {
	var idx []int
	for i, f := range b.freqs {
		if f >= lo*(1-1e-9) && f <= hi*(1+1e-9) {
			idx = append(idx, i)
		}
	}
	return idx
}

// MaxHalf returns the largest half-length among the wavelets listed in idx,
// or among all wavelets when idx is nil. It is the margin a cropped segment
// needs on each side (see Crop).
func (b *Bank) MaxHalf(idx []int) int {
	m := 0
	if idx == nil {
		for _, h := range b.halves {
			m = max(m, h)
		}
		return m
	}
	for _, i := range idx {
		m = max(m, b.halves[i])
	}
	return m
}

// Spectrum returns the unnormalised DFT W[k] = Σ_j w[j]·exp(−i2πjk/nfft) of
// kernel i zero-padded to nfft samples (taps at indices 0 … 2H). It is
// computed once per (i, nfft) and cached; repeated calls return the same
// slice, which must not be modified. Spectrum is safe for concurrent use.
// It panics if nfft is shorter than the kernel.
func (b *Bank) Spectrum(i, nfft int) []complex128 {
	if i < 0 || i >= len(b.kernels) {
		panic(fmt.Sprintf("spectral: wavelet index %d out of range [0,%d)", i, len(b.kernels)))
	}
	if nfft < len(b.kernels[i]) {
		panic(fmt.Sprintf("spectral: FFT length %d shorter than kernel %d (%d taps)", nfft, i, len(b.kernels[i])))
	}
	k := specKey{i, nfft}
	b.mu.Lock()
	e := b.spectra[k]
	if e == nil {
		e = new(specEntry)
		b.spectra[k] = e
	}
	b.mu.Unlock()
	e.once.Do(func() {
		w := make([]complex128, nfft)
		copy(w, b.kernels[i])
		fourier.NewCmplxFFT(nfft).Coefficients(w, w)
		e.w = w
	})
	return e.w
}
