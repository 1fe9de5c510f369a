package stats

import (
	"cmp"
	"math"
	"slices"
)

// BH returns Benjamini–Hochberg (1995, JRSS-B 57:289) adjusted p-values
// (q-values) in the order of p. With the m non-NaN p-values sorted
// ascending, p(1) ≤ … ≤ p(m),
//
//	q(i) = min over j ≥ i of min(1, m·p(j)/j)
//
// so that rejecting every test with q ≤ α is the BH step-up procedure at
// false discovery rate α. NaN p-values stay NaN and do not count in m.
func BH(p []float64) []float64 {
	q := make([]float64, len(p))
	idx := make([]int, 0, len(p))
	for i, v := range p {
		if math.IsNaN(v) {
			q[i] = math.NaN()
			continue
		}
		idx = append(idx, i)
	}
	slices.SortFunc(idx, func(a, b int) int {
		if c := cmp.Compare(p[a], p[b]); c != 0 {
			return c
		}
		return cmp.Compare(a, b)
	})
	m := float64(len(idx))
	run := 1.0
	for k := len(idx) - 1; k >= 0; k-- {
		v := m * p[idx[k]] / float64(k+1)
		if v < run {
			run = v
		}
		q[idx[k]] = run
	}
	return q
}

// Bonferroni returns min(1, m·p) for each p-value, with m the number of
// non-NaN p-values. NaN p-values stay NaN.
func Bonferroni(p []float64) []float64 {
	m := 0
	for _, v := range p {
		if !math.IsNaN(v) {
			m++
		}
	}
	q := make([]float64, len(p))
	for i, v := range p {
		q[i] = math.Min(1, float64(m)*v) // NaN stays NaN
		if math.IsNaN(v) {
			q[i] = math.NaN()
		}
	}
	return q
}
