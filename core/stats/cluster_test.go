package stats

import (
	"fmt"
	"math"
	"testing"
)

func grid(rows, cols int) [][]float64 {
	g := make([][]float64, rows)
	for i := range g {
		g[i] = make([]float64, cols)
	}
	return g
}

func fill(g [][]float64, r0, r1, c0, c1 int, v float64) {
	for i := r0; i < r1; i++ {
		for j := c0; j < c1; j++ {
			g[i][j] = v
		}
	}
}

// clusterSize counts the pixels labelled k.
func clusterSize(labels [][]int, k int) int {
	n := 0
	for _, row := range labels {
		for _, l := range row {
			if l == k {
				n++
			}
		}
	}
	return n
}

// Cluster forming as in Maris & Oostenveld (2007) steps 1–2: threshold
// positive and negative separately, 4-connected pixels, sum the statistic.
// Expected sizes and sums are counted by hand from the planted blocks.
func TestClusters(t *testing.T) {
	type want struct {
		size int
		sum  float64
	}
	cases := []struct {
		name   string
		stat   [][]float64
		thresh float64
		want   []want // in label order (row-major first pixel)
	}{
		{
			name: "planted blocks",
			stat: func() [][]float64 {
				g := grid(10, 20)
				fill(g, 2, 5, 3, 7, 5)    // 3×4 positive block, sum 60
				fill(g, 6, 8, 12, 14, -3) // 2×2 negative block, sum −12
				g[0][19] = 1.5            // below threshold
				g[9][0] = -2              // equal to −thresh: not included
				return g
			}(),
			thresh: 2,
			want:   []want{{12, 60}, {4, -12}},
		},
		{
			name:   "diagonal is not adjacent",
			stat:   [][]float64{{3, 0}, {0, 3}},
			thresh: 1,
			want:   []want{{1, 3}, {1, 3}},
		},
		{
			name:   "positive next to negative",
			stat:   [][]float64{{4, 4, -4, -4}},
			thresh: 1,
			want:   []want{{2, 8}, {2, -8}},
		},
		{
			name: "U shape is one cluster",
			stat: [][]float64{
				{2, 0, 2},
				{2, 0, 2},
				{2, 2, 2},
			},
			thresh: 1,
			want:   []want{{7, 14}},
		},
		{
			name:   "NaN and ragged rows",
			stat:   [][]float64{{2, math.NaN(), 2}, {2}, {2, 2}},
			thresh: 1,
			want:   []want{{4, 8}, {1, 2}},
		},
		{
			name:   "none",
			stat:   grid(3, 3),
			thresh: 0,
			want:   nil,
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			labels, sums := Clusters(c.stat, c.thresh)
			if len(sums) != len(c.want) {
				t.Fatalf("%d clusters %v, want %d", len(sums), sums, len(c.want))
			}
			maxAbs := 0.0
			for k, w := range c.want {
				if got := clusterSize(labels, k+1); got != w.size {
					t.Errorf("cluster %d: size %d, want %d", k+1, got, w.size)
				}
				checkAbs(t, fmt.Sprintf("cluster %d sum", k+1), sums[k], w.sum, 1e-12)
				maxAbs = math.Max(maxAbs, math.Abs(w.sum))
			}
			checkAbs(t, "MaxAbsClusterSum", MaxAbsClusterSum(c.stat, c.thresh), maxAbs, 1e-12)
			for i, row := range c.stat {
				if len(labels[i]) != len(row) {
					t.Fatalf("labels row %d has %d columns, want %d", i, len(labels[i]), len(row))
				}
			}
		})
	}
}

// A planted block survives a max-sum null built from shuffled maps;
// p = (b+1)/(m+1) (Phipson & Smyth 2010, from memory).
func TestClusterNull(t *testing.T) {
	rng := NewRand(8)
	noise := func() [][]float64 {
		g := grid(12, 30)
		for _, row := range g {
			for j := range row {
				row[j] = rng.NormFloat64()
			}
		}
		return g
	}
	obs := noise()
	for i := 4; i < 8; i++ {
		for j := 10; j < 20; j++ {
			obs[i][j] += 4
		}
	}
	labels, sums := Clusters(obs, 2)
	// The block's centre pixel must be labelled, and its cluster must cover
	// most of the 40 planted pixels.
	k := labels[6][15]
	if k == 0 || clusterSize(labels, k) < 30 {
		t.Fatalf("planted block: label %d, size %d", k, clusterSize(labels, k))
	}
	const m = 199
	null := make([]float64, m)
	for b := range null {
		null[b] = MaxAbsClusterSum(noise(), 2)
	}
	p := ClusterP(sums, null)
	checkAbs(t, "planted cluster p", p[k-1], 1.0/(m+1), 1e-15)
	checkAbs(t, "hand null", ClusterP([]float64{-5}, []float64{1, 5, 7, 2})[0], 3.0/5, 1e-15)
	if !math.IsNaN(ClusterP([]float64{3}, nil)[0]) {
		t.Error("empty null: p not NaN")
	}
}
