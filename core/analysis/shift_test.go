package analysis

import (
	"math"
	"math/rand/v2"
	"testing"

	"amplink/core/stats"
)

// shifted is y moved circularly by lag samples, as the time-shift
// surrogates move it: out[i] = y[(i+lag) mod n].
func shifted(y []float64, lag int) []float64 {
	out := make([]float64, len(y))
	copy(out, y[lag:])
	copy(out[len(y)-lag:], y[:lag])
	return out
}

// TestShiftCorr: the one-pass correlation at a shift equals corr (gonum's
// stat.Correlation, or Spearman through stats.Ranks) of an explicitly
// shifted copy, to rounding, for smooth series, series with ties, and
// lags across the whole range; a constant series gives NaN as corr does.
func TestShiftCorr(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 5))
	n := 997
	x, y, tied := make([]float64, n), make([]float64, n), make([]float64, n)
	for i := range x {
		x[i] = math.Sin(float64(i)/17) + 0.3*rng.NormFloat64()
		y[i] = math.Sin(float64(i)/17+0.4) + 0.3*rng.NormFloat64()
		tied[i] = math.Round(2 * y[i]) // many ties
	}
	for _, c := range []struct {
		name     string
		x, y     []float64
		spearman bool
	}{
		{"pearson", x, y, false}, {"spearman", x, y, true},
		{"pearson ties", x, tied, false}, {"spearman ties", tied, x, true},
	} {
		sc := stats.NewShiftCorr(c.x, c.y, c.spearman)
		for _, lag := range []int{0, 1, 99, n / 2, n - 1, rng.IntN(n)} {
			want := corr(c.x, shifted(c.y, lag), c.spearman)
			if got := sc.At(lag); math.Abs(got-want) > 1e-13 {
				t.Errorf("%s, lag %d: %.17g, corr of the shifted copy %.17g", c.name, lag, got, want)
			}
		}
	}
	flat := make([]float64, n)
	for _, sp := range []bool{false, true} {
		if got := stats.NewShiftCorr(x, flat, sp).At(5); !math.IsNaN(got) || !math.IsNaN(corr(x, flat, sp)) {
			t.Errorf("constant series (spearman %v): %v", sp, got)
		}
	}
}

// BenchmarkTimeShift is one pair's 1000 time-shift surrogates on envelopes
// of 6000 samples (10 minutes at 10 Hz): the one-pass stats.ShiftCorr against a
// shifted copy and a full correlation per surrogate.
func BenchmarkTimeShift(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	n := 6000
	x, y := make([]float64, n), make([]float64, n)
	for i := range x {
		x[i], y[i] = rng.NormFloat64(), rng.NormFloat64()
	}
	lags := make([]int, 1000)
	for i := range lags {
		lags[i] = n/10 + rng.IntN(n-n/5)
	}
	b.Run("shiftCorr", func(b *testing.B) {
		for b.Loop() {
			sc := stats.NewShiftCorr(x, y, false)
			for _, l := range lags {
				sc.At(l)
			}
		}
	})
	b.Run("copy+corr", func(b *testing.B) {
		buf := make([]float64, n)
		for b.Loop() {
			for _, l := range lags {
				copy(buf, y[l:])
				copy(buf[n-l:], y[:l])
				corr(x, buf, false)
			}
		}
	})
}
