package stats

import "math"

// MaxExactN is the largest n for which ExactSpearmanP and ExactPearsonP
// enumerate all n! orderings (10! = 3 628 800).
const MaxExactN = 10

// ExactSpearmanP returns the exact two-sided permutation p-value of
// Spearman's ρ for n ≤ MaxExactN:
//
//	p = #{π : |ρ(x, y∘π)| ≥ |ρ(x, y)|} / n!
//
// over all n! orderings π of y's ranks, visited with Heap's algorithm. The
// observed ordering is among them, so p ≥ 1/n!. Ties are handled through
// average ranks. The comparison is exact: twice an average rank is an
// integer, so n·Σ(2r_x)(2r_y) − Σ2r_x·Σ2r_y, which is proportional to ρ
// with a factor that does not depend on the ordering, is computed in integer
// arithmetic and equal values of |ρ| compare equal without a tolerance.
//
// ok is false (and p NaN) when n > MaxExactN. p is NaN with ok true when
// n < 2 or either series is constant. It panics if the lengths differ.
func ExactSpearmanP(x, y []float64) (p float64, ok bool) {
	if len(x) != len(y) {
		panic("stats: ExactSpearmanP length mismatch")
	}
	n := len(x)
	if n > MaxExactN {
		return math.NaN(), false
	}
	if n < 2 || constant(x) || constant(y) || hasNaN(x) || hasNaN(y) {
		return math.NaN(), true
	}
	rx, ry := Ranks(nil, x), Ranks(nil, y)
	var a, b [MaxExactN]int64
	var sa, sb, s int64
	for i := range n {
		a[i] = int64(math.Round(2 * rx[i]))
		b[i] = int64(math.Round(2 * ry[i]))
		sa += a[i]
		sb += b[i]
		s += a[i] * b[i]
	}
	nn := int64(n)
	obs := abs64(nn*s - sa*sb)
	count := 0
	visit := func() {
		if abs64(nn*s-sa*sb) >= obs {
			count++
		}
	}
	// Heap's algorithm, iterative form. Each swap of b[p] and b[q] changes
	// Σ a·b by (a[p]−a[q])(b[q]−b[p]).
	var c [MaxExactN]int
	visit()
	total := 1
	for i := 1; i < n; {
		if c[i] < i {
			p := 0
			if i%2 == 1 {
				p = c[i]
			}
			s += (a[p] - a[i]) * (b[i] - b[p])
			b[p], b[i] = b[i], b[p]
			visit()
			total++
			c[i]++
			i = 1
		} else {
			c[i] = 0
			i++
		}
	}
	return float64(count) / float64(total), true
}

// ExactPearsonP returns the exact two-sided permutation p-value of
// Pearson's r for n ≤ MaxExactN, enumerating all n! orderings of y with
// Heap's algorithm:
//
//	p = #{π : |r(x, y∘π)| ≥ |r(x, y)|·(1 − 1e−9)} / n!
//
// The relative tolerance lets orderings that tie with the observed one in
// exact arithmetic count despite rounding. ok is false (and p NaN) when
// n > MaxExactN; p is NaN with ok true when n < 2 or either series is
// constant or holds NaN or ±Inf. It panics if the lengths differ.
func ExactPearsonP(x, y []float64) (p float64, ok bool) {
	if len(x) != len(y) {
		panic("stats: ExactPearsonP length mismatch")
	}
	n := len(x)
	if n > MaxExactN {
		return math.NaN(), false
	}
	if n < 2 || constant(x) || constant(y) || hasNaN(x) || hasNaN(y) {
		return math.NaN(), true
	}
	var a, b [MaxExactN]float64
	mx, my := mean(x), mean(y)
	for i := range n {
		a[i] = x[i] - mx
		b[i] = y[i] - my
	}
	dot := func() float64 {
		var s float64
		for i := range n {
			s += a[i] * b[i]
		}
		return s
	}
	if d := dot(); math.IsNaN(d) || math.IsInf(d, 0) {
		return math.NaN(), true // infinite values
	}
	obs := math.Abs(dot()) * (1 - exactTol)
	count := 0
	var c [MaxExactN]int
	if math.Abs(dot()) >= obs {
		count++
	}
	total := 1
	for i := 1; i < n; {
		if c[i] < i {
			p := 0
			if i%2 == 1 {
				p = c[i]
			}
			b[p], b[i] = b[i], b[p]
			if math.Abs(dot()) >= obs {
				count++
			}
			total++
			c[i]++
			i = 1
		} else {
			c[i] = 0
			i++
		}
	}
	return float64(count) / float64(total), true
}

// exactTol is the relative tolerance used when a permuted |r| is compared
// with the observed one in floating point.
const exactTol = 1e-9

func abs64(v int64) int64 {
	if v < 0 {
		return -v
	}
	return v
}

func hasNaN(x []float64) bool {
	for _, v := range x {
		if math.IsNaN(v) {
			return true
		}
	}
	return false
}

func mean(x []float64) float64 {
	var s float64
	for _, v := range x {
		s += v
	}
	return s / float64(len(x))
}
