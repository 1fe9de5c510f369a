package stats

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// Partial returns the partial correlation of x and y controlling for the
// covariates covs (each of len(x)), and its degrees of freedom
// df = n − 2 − k for k covariates. x and y are each regressed by least
// squares (QR) on an intercept and the covariates, and r is Pearson's r of
// the two residual vectors:
//
//	r_xy·Z = r(x − Zβ_x, y − Zβ_y),   Z = [1 covs…]
//
// With one covariate z this equals (r_xy − r_xz·r_yz)/√((1−r_xz²)(1−r_yz²)).
// When spearman is set, x, y and every covariate are replaced by their
// average ranks first. Its p-value is PValueT(r, float64(df)).
//
// r is NaN when df < 1, when the covariates are collinear, when either
// residual is constant, or when any value is NaN. It panics if a length
// differs from len(x).
func Partial(x, y []float64, covs [][]float64, spearman bool) (r float64, df int) {
	n, k := len(x), len(covs)
	if len(y) != n {
		panic("stats: Partial length mismatch")
	}
	for _, c := range covs {
		if len(c) != n {
			panic("stats: Partial covariate length mismatch")
		}
	}
	df = n - 2 - k
	if df < 1 || hasNaN(x) || hasNaN(y) {
		return math.NaN(), df
	}
	if k == 0 {
		if spearman {
			return Spearman(x, y), df
		}
		return Pearson(x, y), df
	}
	a := mat.NewDense(n, k+1, nil)
	b := mat.NewDense(n, 2, nil)
	var rank []float64
	if spearman {
		rank = make([]float64, n)
	}
	for j, c := range covs {
		if hasNaN(c) {
			return math.NaN(), df
		}
		if spearman {
			c = Ranks(rank, c)
		}
		for i, v := range c {
			a.Set(i, j+1, v)
		}
	}
	xs, ys := x, y
	if spearman {
		xs, ys = Ranks(nil, x), Ranks(nil, y)
	}
	for i := range n {
		a.Set(i, 0, 1)
		b.Set(i, 0, xs[i])
		b.Set(i, 1, ys[i])
	}
	var beta mat.Dense
	if err := beta.Solve(a, b); err != nil {
		// mat.Condition: the covariates (with the intercept) are collinear
		// to working precision, so the residuals are not determined.
		return math.NaN(), df
	}
	var fit mat.Dense
	fit.Mul(a, &beta)
	rx := make([]float64, n)
	ry := make([]float64, n)
	for i := range n {
		rx[i] = xs[i] - fit.At(i, 0)
		ry[i] = ys[i] - fit.At(i, 1)
	}
	return Pearson(rx, ry), df
}

// PartialR returns the first-order partial correlation of x and y given z
// from the three pairwise correlations:
//
//	r_xy·z = (r_xy − r_xz·r_yz) / √((1 − r_xz²)(1 − r_yz²))
//
// NaN when |r_xz| or |r_yz| is 1 or any input is NaN.
func PartialR(rxy, rxz, ryz float64) float64 {
	den := math.Sqrt((1 - rxz*rxz) * (1 - ryz*ryz))
	if !(den > 0) || math.IsNaN(rxy) {
		return math.NaN()
	}
	return clampR((rxy - rxz*ryz) / den)
}
