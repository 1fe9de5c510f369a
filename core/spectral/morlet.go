package spectral

import (
	"fmt"
	"math"
)

// Support is the half-width of every kernel in units of σt: kernels are
// truncated at t = ±Support·σt.
const Support = 4

// Frequencies returns a grid of steps frequencies (Hz) from low to high,
// both included. spacing is "log" (geometric, f_i = low·(high/low)^(i/(steps−1)))
// or "linear" (evenly spaced, f_i = low + i·(high−low)/(steps−1)). The last
// element is exactly high. steps == 1 gives [low].
//
// The error names the offending value; the caller adds the recipe field.
func Frequencies(low, high float64, steps int, spacing string) ([]float64, error) {
	switch {
	case math.IsNaN(low) || math.IsInf(low, 0):
		return nil, fmt.Errorf("low frequency %v is not a finite number", low)
	case low <= 0:
		return nil, fmt.Errorf("low frequency %v Hz must be greater than 0", low)
	case math.IsNaN(high) || math.IsInf(high, 0):
		return nil, fmt.Errorf("high frequency %v is not a finite number", high)
	case high < low:
		return nil, fmt.Errorf("high frequency %v Hz is below the low frequency %v Hz", high, low)
	case steps < 1:
		return nil, fmt.Errorf("steps %d must be at least 1", steps)
	}
	if spacing != "log" && spacing != "linear" {
		return nil, fmt.Errorf("unknown spacing %q (want \"log\" or \"linear\")", spacing)
	}
	f := make([]float64, steps)
	f[0] = low
	if steps == 1 {
		return f, nil
	}
	last := float64(steps - 1)
	for i := 1; i < steps-1; i++ {
		if spacing == "log" {
			f[i] = low * math.Pow(high/low, float64(i)/last)
		} else {
			f[i] = low + float64(i)*(high-low)/last
		}
	}
	f[steps-1] = high
	return f, nil
}

// Cycles returns n cycle counts growing geometrically with the index,
// c_i = c0·(c1/c0)^(i/(n−1)), so that c_0 = c0 and c_{n−1} = c1 exactly.
// n == 1 gives [c0]; n < 1 gives nil. c0 and c1 should be positive; NewBank
// rejects cycle counts that are not.
func Cycles(n int, c0, c1 float64) []float64 {
	if n < 1 {
		return nil
	}
	c := make([]float64, n)
	c[0] = c0
	if n == 1 {
		return c
	}
	last := float64(n - 1)
	for i := 1; i < n-1; i++ {
		c[i] = c0 * math.Pow(c1/c0, float64(i)/last)
	}
	c[n-1] = c1
	return c
}

// SigmaT returns the temporal standard deviation σt = n/(2π·f) in seconds of
// the Morlet wavelet with n cycles at f Hz.
func SigmaT(f, n float64) float64 { return n / (2 * math.Pi * f) }

// SigmaF returns the spectral standard deviation σf = f/n in Hz of the Morlet
// wavelet with n cycles at f Hz. σt·σf = 1/(2π).
func SigmaF(f, n float64) float64 { return f / n }

// FWHM returns the full width at half maximum 2·√(2·ln 2)·σ ≈ 2.3548·σ of a
// Gaussian with standard deviation σ, in the unit of σ.
func FWHM(sigma float64) float64 { return 2 * math.Sqrt(2*math.Ln2) * sigma }

// Half returns the kernel half-length H = ⌈Support·σt·rate⌉ in samples of the
// wavelet with n cycles at f Hz sampled at rate Hz. The kernel has 2H+1 taps.
// It panics when H would not fit in an int32: check Taps (or build the
// kernels with NewBank, which does) before trusting a rate or frequency
// from a file.
func Half(rate, f, n float64) int {
	h := math.Ceil(Support * SigmaT(f, n) * rate)
	if !(h >= 0 && h <= math.MaxInt32) {
		panic(fmt.Sprintf("spectral: wavelet half-length %v samples (%v Hz, %v cycles, %v Hz) is out of range", h, f, n, rate))
	}
	return int(h)
}

// Kernel writes the amplitude-normalised complex Morlet wavelet with n cycles
// at f Hz, sampled at rate Hz, into dst and returns it:
//
//	w[k] = 2·exp(i·2π·f·t_k)·g(t_k)/Σ_j g(t_j),  g(t) = exp(−t²/(2σt²)),  t_k = (k−H)/rate,
//
// for k = 0 … 2H with H = Half(rate, f, n). The kernel is dimensionless; a
// cosine of amplitude A at f convolved with it has modulus A. dst is reused
// when its capacity suffices and allocated otherwise.
func Kernel(dst []complex128, rate, f, n float64) []complex128 {
	h := Half(rate, f, n)
	m := 2*h + 1
	if cap(dst) < m {
		dst = make([]complex128, m)
	}
	dst = dst[:m]
	st := SigmaT(f, n)
	var sum float64
	for k := range dst {
		t := float64(k-h) / rate
		g := math.Exp(-t * t / (2 * st * st))
		sum += g
		dst[k] = complex(g, 0)
	}
	scale := 2 / sum
	for k := range dst {
		t := float64(k-h) / rate
		s, c := math.Sincos(2 * math.Pi * f * t)
		g := real(dst[k]) * scale
		dst[k] = complex(g*c, g*s)
	}
	return dst
}

// GoodSize returns the smallest m ≥ n whose only prime factors are 2, 3 and 5,
// lengths that gonum's mixed-radix FFT handles well. GoodSize returns 1 for
// n ≤ 1.
func GoodSize(n int) int {
	if n <= 1 {
		return 1
	}
	for m := n; ; m++ {
		r := m
		for _, p := range [...]int{2, 3, 5} {
			for r%p == 0 {
				r /= p
			}
		}
		if r == 1 {
			return m
		}
	}
}
