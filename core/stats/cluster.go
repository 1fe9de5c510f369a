package stats

import "math"

// Clusters finds the clusters of a 2-D statistic map, as in the first two
// steps of a cluster-based permutation test (Maris and Oostenveld 2007,
// J Neurosci Methods 164:177). stat is indexed [row][col] (rows are
// frequencies and columns times in amplink's maps); rows may differ in
// length. A pixel is positive when stat > thresh and negative when
// stat < −thresh; a cluster is a maximal set of same-sign pixels joined
// through 4-connected neighbours (up, down, left, right). Positive and
// negative pixels never share a cluster, and NaN pixels belong to none.
//
// labels has the shape of stat: 0 outside every cluster, k ≥ 1 inside
// cluster k. sums[k−1] is the sum of stat over cluster k, so it is positive
// for a positive cluster and negative for a negative one. Clusters are
// numbered in the row-major order of their first pixel, so the output is
// deterministic.
//
// Clusters panics if thresh is negative or NaN.
func Clusters(stat [][]float64, thresh float64) (labels [][]int, sums []float64) {
	if !(thresh >= 0) {
		panic("stats: Clusters threshold must be non-negative")
	}
	labels = make([][]int, len(stat))
	for i, row := range stat {
		labels[i] = make([]int, len(row))
	}
	sign := func(v float64) int {
		switch {
		case v > thresh:
			return 1
		case v < -thresh:
			return -1
		}
		return 0 // includes NaN
	}
	var queue [][2]int
	for i, row := range stat {
		for j, v := range row {
			s := sign(v)
			if s == 0 || labels[i][j] != 0 {
				continue
			}
			k := len(sums) + 1
			sum := 0.0
			labels[i][j] = k
			queue = append(queue[:0], [2]int{i, j})
			for len(queue) > 0 {
				p := queue[len(queue)-1]
				queue = queue[:len(queue)-1]
				sum += stat[p[0]][p[1]]
				for _, d := range [4][2]int{{-1, 0}, {1, 0}, {0, -1}, {0, 1}} {
					r, c := p[0]+d[0], p[1]+d[1]
					if r < 0 || r >= len(stat) || c < 0 || c >= len(stat[r]) {
						continue
					}
					if labels[r][c] == 0 && sign(stat[r][c]) == s {
						labels[r][c] = k
						queue = append(queue, [2]int{r, c})
					}
				}
			}
			sums = append(sums, sum)
		}
	}
	return labels, sums
}

// MaxAbsClusterSum returns the largest |sum| over the clusters of stat at
// thresh (see Clusters), or 0 when there are none. Computed for each
// permutation of the data, it gives the null distribution of the maximum
// cluster sum (Maris and Oostenveld 2007, step 3).
func MaxAbsClusterSum(stat [][]float64, thresh float64) float64 {
	_, sums := Clusters(stat, thresh)
	m := 0.0
	for _, s := range sums {
		m = math.Max(m, math.Abs(s))
	}
	return m
}

// ClusterP returns the permutation p-value of each observed cluster sum
// against a null of maximum absolute cluster sums, one per permutation:
//
//	p_k = PermP(#{null_b ≥ |sums_k|·(1 − 1e−9)}, len(null))
//
// Because the null is of the maximum over the map, the p-values control the
// family-wise error over clusters. It is NaN for every cluster when null is
// empty.
func ClusterP(sums, null []float64) []float64 {
	p := make([]float64, len(sums))
	for k, s := range sums {
		if len(null) == 0 || math.IsNaN(s) {
			p[k] = math.NaN()
			continue
		}
		thr := math.Abs(s) * (1 - permTol)
		b := 0
		for _, v := range null {
			if v >= thr {
				b++
			}
		}
		p[k] = PermP(b, len(null))
	}
	return p
}
