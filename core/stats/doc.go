// Package stats holds the statistics the amplink analyses use: ranks,
// Pearson and Spearman correlation, partial correlation, p-values from the
// t distribution and from exact enumeration, Fisher z intervals and
// comparisons, seeded permutation tests, Benjamini–Hochberg and Bonferroni
// adjustment, one-sample and Welch t tests, cluster sums on 2-D maps, and an
// effective sample size for autocorrelated series.
//
// All functions take plain []float64 slices. Where a destination slice is
// taken it comes first and is allocated when nil. Undefined results (too few
// values, zero variance) are NaN, never a panic; panics are reserved for
// programmer errors such as slices of different lengths and carry the prefix
// "stats:".
//
// Randomness comes only from NewRand, a math/rand/v2 PCG source with a fixed
// second word, so that a seed gives the same permutations on every platform.
package stats
