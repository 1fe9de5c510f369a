package stats

import (
	"math"

	"gonum.org/v1/gonum/dsp/fourier"
)

// DefaultMinProduct is the truncation threshold EffectiveN uses when
// ESS.MinProduct is zero.
const DefaultMinProduct = 0.01

// directLags is how many lags ESS computes by direct sums before it
// switches to an FFT autocorrelation, which costs O(n log n) however slowly
// the autocorrelation decays.
const directLags = 32

// ESS configures the effective sample size of EffectiveN. The zero value
// is the documented default.
type ESS struct {
	// MaxLag is the largest lag summed. Zero or negative means n/4;
	// larger values are capped at n − 1.
	MaxLag int
	// MinProduct stops the sum at the first lag k whose product
	// ρxx(k)·ρyy(k) is below it (that lag is not added). Zero means
	// DefaultMinProduct.
	MinProduct float64
}

// EffectiveN returns ESS{}.N(x, y): the effective number of independent
// pairs for the correlation of two autocorrelated series.
func EffectiveN(x, y []float64) float64 { return ESS{}.N(x, y) }

// N returns the effective sample size for Pearson's r between the series x
// and y, after Bartlett (1935) and Bayley and Hammersley (1946):
//
//	n_eff = n / (1 + 2·Σ_{k=1}^{K} ρxx(k)·ρyy(k))
//
// with the sample autocorrelations
//
//	ρxx(k) = Σ_{t=0}^{n−1−k} (x_t − x̄)(x_{t+k} − x̄) / Σ_t (x_t − x̄)²
//
// Truncation rule: K + 1 is the first lag k ≥ 1 at which
// ρxx(k)·ρyy(k) < MinProduct (0.01 by default), or K = MaxLag (n/4 by
// default), whichever comes first. Every summed product is positive, so
// n_eff ≤ n; for white noise the first product is usually below the
// threshold and n_eff = n. Use df = n_eff − 2 in PValueT.
//
// NaN when n < 2, either series is constant or any value is NaN. It panics
// if the lengths differ.
func (o ESS) N(x, y []float64) float64 {
	if len(x) != len(y) {
		panic("stats: EffectiveN length mismatch")
	}
	n := len(x)
	if n < 2 || constant(x) || constant(y) || hasNaN(x) || hasNaN(y) {
		return math.NaN()
	}
	maxLag := o.MaxLag
	if maxLag <= 0 {
		maxLag = n / 4
	}
	maxLag = min(maxLag, n-1)
	thr := o.MinProduct
	if thr == 0 {
		thr = DefaultMinProduct
	}
	xc, vx := centered(x)
	yc, vy := centered(y)
	var ax, ay []float64
	sum := 0.0
	for k := 1; k <= maxLag; k++ {
		var px, py float64
		if k <= directLags {
			px, py = lagDot(xc, k)/vx, lagDot(yc, k)/vy
		} else {
			if ax == nil {
				fft := fourier.NewFFT(fftSize(n))
				ax, ay = autocorr(fft, xc, vx, maxLag), autocorr(fft, yc, vy, maxLag)
			}
			px, py = ax[k], ay[k]
		}
		prod := px * py
		if !(prod >= thr) {
			break
		}
		sum += prod
	}
	return float64(n) / (1 + 2*sum)
}

// centered returns v − v̄ and Σ(v − v̄)².
func centered(v []float64) ([]float64, float64) {
	m := mean(v)
	c := make([]float64, len(v))
	ss := 0.0
	for i, x := range v {
		c[i] = x - m
		ss += c[i] * c[i]
	}
	return c, ss
}

// lagDot returns Σ_{t=0}^{n−1−k} c_t·c_{t+k}.
func lagDot(c []float64, k int) float64 {
	s := 0.0
	for t := 0; t+k < len(c); t++ {
		s += c[t] * c[t+k]
	}
	return s
}

// fftSize is the power of two ≥ 2n used to zero-pad a series of length n.
func fftSize(n int) int {
	size := 1
	for size < 2*n {
		size <<= 1
	}
	return size
}

// autocorr returns ρ(0..maxLag) of the centred series c with Σc² = ss,
// from an FFT plan of length N = fftSize(len(c)): zero-padding to N ≥ 2n
// makes the circular autocovariance equal the linear one,
// Σ_t c_t c_{t+k} = IDFT(|DFT c|²)_k / N (gonum's Sequence is the
// unnormalised inverse).
func autocorr(fft *fourier.FFT, c []float64, ss float64, maxLag int) []float64 {
	size := fft.Len()
	buf := make([]float64, size)
	copy(buf, c)
	coef := fft.Coefficients(nil, buf)
	for i, v := range coef {
		coef[i] = complex(real(v)*real(v)+imag(v)*imag(v), 0)
	}
	seq := fft.Sequence(buf, coef)
	out := make([]float64, maxLag+1)
	for k := range out {
		out[k] = seq[k] / float64(size) / ss
	}
	return out
}
