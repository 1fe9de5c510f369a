package stats

import (
	"math"

	"gonum.org/v1/gonum/stat"
)

// OneSampleT tests whether the mean of x differs from 0:
//
//	t = x̄ / (s/√n),   df = n − 1,   p = 2·P(T_df ≥ |t|)
//
// with s the sample standard deviation (n − 1 denominator). All three are
// NaN when n < 2, when x is constant, or when any value is NaN.
func OneSampleT(x []float64) (t, df, p float64) {
	n := len(x)
	if n < 2 || constant(x) || hasNaN(x) {
		return math.NaN(), math.NaN(), math.NaN()
	}
	m, s := stat.MeanStdDev(x, nil)
	t = m / (s / math.Sqrt(float64(n)))
	df = float64(n - 1)
	return t, df, tTwoSided(t, df)
}

// WelchT tests whether the means of x and y differ without assuming equal
// variances (Welch 1947):
//
//	t = (x̄ − ȳ) / √(s_x²/n_x + s_y²/n_y)
//	df = (s_x²/n_x + s_y²/n_y)² / ((s_x²/n_x)²/(n_x−1) + (s_y²/n_y)²/(n_y−1))
//	p = 2·P(T_df ≥ |t|)
//
// The Welch–Satterthwaite df is not an integer in general. All three are
// NaN when either sample has fewer than 2 values, when both are constant,
// or when any value is NaN.
func WelchT(x, y []float64) (t, df, p float64) {
	nx, ny := len(x), len(y)
	if nx < 2 || ny < 2 || hasNaN(x) || hasNaN(y) || (constant(x) && constant(y)) {
		return math.NaN(), math.NaN(), math.NaN()
	}
	mx, vx := stat.MeanVariance(x, nil)
	my, vy := stat.MeanVariance(y, nil)
	if constant(x) {
		vx = 0
	}
	if constant(y) {
		vy = 0
	}
	ax, ay := vx/float64(nx), vy/float64(ny)
	se2 := ax + ay
	t = (mx - my) / math.Sqrt(se2)
	df = se2 * se2 / (ax*ax/float64(nx-1) + ay*ay/float64(ny-1))
	return t, df, tTwoSided(t, df)
}
