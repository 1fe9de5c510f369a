package stats

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"
)

// Ranks writes the 1-based ranks of x into dst and returns it; dst is
// allocated when nil. Tied values get the average of the ranks they span
// (the "average" or fractional ranking), so the ranks always sum to
// n(n+1)/2. NaN values get rank NaN and the other values are ranked among
// themselves.
//
// dst must not overlap x. Ranks panics if dst is not nil and
// len(dst) != len(x).
func Ranks(dst, x []float64) []float64 {
	if dst == nil {
		dst = make([]float64, len(x))
	}
	if len(dst) != len(x) {
		panic("stats: Ranks length mismatch")
	}
	// The non-NaN values sorted; a value's average rank is then the mean of
	// the first and last positions it holds, (lo+1 + hi)/2 with lo values
	// below it and hi at or below it. Sorting plain float64s and searching
	// needs no comparison callback, which under wasm cost most of the time.
	sorted := make([]float64, 0, len(x))
	for i, v := range x {
		if math.IsNaN(v) {
			dst[i] = math.NaN()
			continue
		}
		sorted = append(sorted, v)
	}
	slices.Sort(sorted)
	for i, v := range x {
		if math.IsNaN(v) {
			continue
		}
		lo, hi := below(sorted, v), atOrBelow(sorted, v)
		dst[i] = float64(lo+1+hi) / 2
	}
	return dst
}

// below returns how many values of the sorted s are less than v.
func below(s []float64, v float64) int {
	lo, hi := 0, len(s)
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if s[m] < v {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo
}

// atOrBelow returns how many values of the sorted s are at most v.
func atOrBelow(s []float64, v float64) int {
	lo, hi := 0, len(s)
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if s[m] <= v {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo
}

// constant reports whether every value of x equals the first one. It is
// the exact zero-variance test: a computed variance of identical values
// need not be exactly zero.
func constant(x []float64) bool {
	for _, v := range x[1:] {
		if v != x[0] {
			return false
		}
	}
	return true
}

// Pearson returns the product-moment correlation
//
//	r = Σ(x−x̄)(y−ȳ) / √(Σ(x−x̄)² Σ(y−ȳ)²)
//
// clamped to [−1, 1]. It is NaN when n < 2, when either series is constant
// (zero variance), or when any value is NaN. It panics if the lengths differ.
func Pearson(x, y []float64) float64 {
	if len(x) != len(y) {
		panic("stats: Pearson length mismatch")
	}
	if len(x) < 2 || constant(x) || constant(y) {
		return math.NaN()
	}
	r := stat.Correlation(x, y, nil)
	return clampR(r)
}

func clampR(r float64) float64 {
	switch {
	case r > 1:
		return 1
	case r < -1:
		return -1
	}
	return r
}

// Spearman returns Spearman's rank correlation ρ: Pearson's r computed on
// the average ranks of x and y (see Ranks). With ties this differs from
// the shortcut 1 − 6Σd²/(n(n²−1)), which is only exact without ties. NaN
// when n < 2 or either series is constant. It panics if the lengths differ.
func Spearman(x, y []float64) float64 {
	if len(x) != len(y) {
		panic("stats: Spearman length mismatch")
	}
	return Pearson(Ranks(nil, x), Ranks(nil, y))
}

// PValueT returns the two-sided p-value of a correlation r under the
// t approximation:
//
//	t = r·√(df/(1−r²)),   p = 2·P(T_df ≥ |t|)
//
// with T_df Student's t with df degrees of freedom (df = n − 2 for a plain
// correlation, n − 2 − k for a partial one with k covariates). |r| ≥ 1 gives
// 0. NaN r, df ≤ 0 or NaN df give NaN.
func PValueT(r, df float64) float64 {
	if math.IsNaN(r) || math.IsNaN(df) || df <= 0 {
		return math.NaN()
	}
	if math.Abs(r) >= 1 {
		return 0
	}
	t := r * math.Sqrt(df/(1-r*r))
	return tTwoSided(t, df)
}

// tTwoSided is 2·P(T_df ≥ |t|), computed from the survival function so that
// small p keep their relative precision.
func tTwoSided(t, df float64) float64 {
	if math.IsNaN(t) || math.IsNaN(df) || df <= 0 {
		return math.NaN()
	}
	p := 2 * distuv.StudentsT{Mu: 0, Sigma: 1, Nu: df}.Survival(math.Abs(t))
	return math.Min(p, 1)
}

// normTwoSided is 2·P(Z ≥ |z|) = erfc(|z|/√2) for a standard normal Z.
// It uses math.Erfc directly: gonum's Normal.Survival is 0.5·(1 − erf),
// which loses relative precision in the far tail (about 1e−8 at |z| = 6).
func normTwoSided(z float64) float64 {
	if math.IsNaN(z) {
		return math.NaN()
	}
	return math.Erfc(math.Abs(z) / math.Sqrt2)
}
