package stats

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// FisherZ returns Fisher's variance-stabilising transform z = atanh(r)
// = ½·ln((1+r)/(1−r)). |r| = 1 gives ±Inf; |r| > 1 or NaN gives NaN.
func FisherZ(r float64) float64 {
	if math.IsNaN(r) || math.Abs(r) > 1 {
		return math.NaN()
	}
	return math.Atanh(r)
}

// fisherVar is the sampling variance of atanh(r) from n pairs:
// 1/(n−3) for Pearson, and (1 + r²/2)/(n−3) for Spearman after Bonett and
// Wright (2000), Psychometrika 65:23.
func fisherVar(r float64, n int, spearman bool) float64 {
	v := 1 / float64(n-3)
	if spearman {
		v *= 1 + r*r/2
	}
	return v
}

// FisherCI returns the two-sided confidence interval at the given level
// (for example 0.95) for a correlation r from n pairs:
//
//	[tanh(z − c·SE), tanh(z + c·SE)],  z = atanh r,  c = Φ⁻¹(1 − (1−level)/2)
//
// with SE = 1/√(n−3) for Pearson and SE = √((1 + r²/2)/(n−3)) for
// Spearman (Bonett and Wright 2000). Both bounds are NaN when n ≤ 3, when r
// is NaN or outside [−1, 1], or when level is not in (0, 1).
func FisherCI(r float64, n int, level float64, spearman bool) (lo, hi float64) {
	if n <= 3 || math.IsNaN(r) || math.Abs(r) > 1 || !(level > 0 && level < 1) {
		return math.NaN(), math.NaN()
	}
	z := math.Atanh(r)
	c := distuv.UnitNormal.Quantile(1 - (1-level)/2)
	se := math.Sqrt(fisherVar(r, n, spearman))
	return math.Tanh(z - c*se), math.Tanh(z + c*se)
}

// CompareIndependent tests whether two correlations from independent
// samples differ:
//
//	Z = (atanh r1 − atanh r2) / √(v1 + v2),   p = 2·(1 − Φ(|Z|))
//
// with v = 1/(n−3), or (1 + r²/2)/(n−3) when spearman is set (Bonett and
// Wright 2000). NaN when either n ≤ 3 or either r is NaN or outside (−1, 1).
func CompareIndependent(r1 float64, n1 int, r2 float64, n2 int, spearman bool) (z, p float64) {
	if n1 <= 3 || n2 <= 3 || !openUnit(r1) || !openUnit(r2) {
		return math.NaN(), math.NaN()
	}
	z = (math.Atanh(r1) - math.Atanh(r2)) / math.Sqrt(fisherVar(r1, n1, spearman)+fisherVar(r2, n2, spearman))
	return z, normTwoSided(z)
}

// openUnit reports whether r lies in the open interval (−1, 1).
func openUnit(r float64) bool { return r > -1 && r < 1 }

// CompareDependent tests whether two correlations that share variable j,
// r_jk and r_jh, measured on the same n cases, differ, given the third
// correlation r_kh. It is Steiger's (1980, Psychol Bull 87:245, eq. 14) Z
// with the pooled r̄ = (r_jk + r_jh)/2:
//
//	ψ = r_kh(1 − 2r̄²) − ½r̄²(1 − 2r̄² − r_kh²)
//	s̄ = ψ / (1 − r̄²)²
//	Z = (atanh r_jk − atanh r_jh)·√(n − 3) / √(2 − 2s̄),   p = 2·(1 − Φ(|Z|))
//
// NaN when n ≤ 3 or any correlation is NaN or outside (−1, 1).
func CompareDependent(rjk, rjh, rkh float64, n int) (z, p float64) {
	if n <= 3 || !openUnit(rjk) || !openUnit(rjh) || !openUnit(rkh) {
		return math.NaN(), math.NaN()
	}
	rb := (rjk + rjh) / 2
	rb2 := rb * rb
	psi := rkh*(1-2*rb2) - 0.5*rb2*(1-2*rb2-rkh*rkh)
	s := psi / ((1 - rb2) * (1 - rb2))
	den := 2 - 2*s
	if !(den > 0) {
		return math.NaN(), math.NaN()
	}
	z = (math.Atanh(rjk) - math.Atanh(rjh)) * math.Sqrt(float64(n-3)) / math.Sqrt(den)
	return z, normTwoSided(z)
}
