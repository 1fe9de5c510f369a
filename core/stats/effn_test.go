package stats

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/dsp/fourier"
	"testing"
)

// ar1 returns a stationary AR(1) series x_t = φ·x_{t−1} + e_t.
func ar1(rng *rand.Rand, n int, phi float64) []float64 {
	x := make([]float64, n)
	x[0] = rng.NormFloat64() / math.Sqrt(1-phi*phi)
	for t := 1; t < n; t++ {
		x[t] = phi*x[t-1] + rng.NormFloat64()
	}
	return x
}

// For two independent AR(1) series ρxx(k)ρyy(k) = (φxφy)^k, so
// 1 + 2Σ_{k≥1}(φxφy)^k = (1 + φxφy)/(1 − φxφy) (geometric series; Bartlett
// 1935, common practice). n_eff/n from long series must match within 6%
// (sampling error of the autocorrelations plus the truncation at 0.01).
func TestEffectiveNAR1(t *testing.T) {
	const n = 40000
	for i, c := range []struct{ px, py float64 }{
		{0, 0}, {0.5, 0.5}, {0.9, 0.3}, {0.95, 0.95}, // the last one needs the FFT path (> 32 lags)
	} {
		t.Run(fmt.Sprintf("phi=%g,%g", c.px, c.py), func(t *testing.T) {
			rng := NewRand(uint64(100 + i))
			x, y := ar1(rng, n, c.px), ar1(rng, n, c.py)
			g := c.px * c.py
			want := n * (1 - g) / (1 + g)
			checkRel(t, "n_eff", EffectiveN(x, y), want, 0.06)
			if got := EffectiveN(x, y); got > n {
				t.Errorf("n_eff = %g > n", got)
			}
		})
	}
}

// Bartlett's approximation says var(r) ≈ 1/n_eff for independent series.
// Monte Carlo over 400 independent pairs (relative SE of a variance from
// 400 draws ≈ 7%): the empirical variance of r must match the mean 1/n_eff
// within 25%, and the naive 1/n must be clearly too small.
func TestEffectiveNVarianceOfR(t *testing.T) {
	rng := NewRand(77)
	const reps, n = 400, 400
	var sumR2, sumInv float64
	for range reps {
		x, y := ar1(rng, n, 0.7), ar1(rng, n, 0.7)
		r := Pearson(x, y)
		sumR2 += r * r
		sumInv += 1 / EffectiveN(x, y)
	}
	varR, pred := sumR2/reps, sumInv/reps
	checkRel(t, "var(r) vs 1/n_eff", varR, pred, 0.25)
	if varR < 2.0/n {
		t.Errorf("var(r) = %g, not above 2/n: the test series are not autocorrelated enough", varR)
	}
}

func TestEffectiveNOptions(t *testing.T) {
	rng := NewRand(5)
	x, y := ar1(rng, 2000, 0.8), ar1(rng, 2000, 0.8)
	full := EffectiveN(x, y)
	one := ESS{MaxLag: 1}.N(x, y)
	// With one lag, n_eff = n/(1 + 2ρxx(1)ρyy(1)).
	want := 2000 / (1 + 2*lagDot(cen(x), 1)/lagDot(cen(x), 0)*lagDot(cen(y), 1)/lagDot(cen(y), 0))
	checkRel(t, "MaxLag 1", one, want, 1e-12)
	if !(one > full) {
		t.Errorf("MaxLag 1 gives %g, full %g: fewer positive lags must give a larger n_eff", one, full)
	}
	if got := (ESS{MinProduct: 2}).N(x, y); got != 2000 {
		t.Errorf("MinProduct 2 (no lag passes) gives %g, want n", got)
	}
	if got := EffectiveN([]float64{1, 2, 3}, []float64{3, 1, 2}); got != 3 {
		t.Errorf("n = 3 (no lags) gives %g", got)
	}
}

func cen(v []float64) []float64 { c, _ := centered(v); return c }

// The FFT autocorrelation equals the direct lagged sums.
func TestAutocorrFFT(t *testing.T) {
	rng := NewRand(6)
	for _, n := range []int{7, 100, 1000} {
		c, ss := centered(ar1(rng, n, 0.6))
		ac := autocorr(fourier.NewFFT(fftSize(n)), c, ss, n-1)
		for k := range ac {
			checkAbs(t, fmt.Sprintf("n=%d lag %d", n, k), ac[k], lagDot(c, k)/ss, 1e-12)
		}
	}
}
