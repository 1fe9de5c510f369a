package stats

import (
	"encoding/binary"
	"math"
	"testing"
)

// floatsFrom decodes little-endian float64s from b (a trailing partial
// value is dropped).
func floatsFrom(b []byte) []float64 {
	x := make([]float64, len(b)/8)
	for i := range x {
		x[i] = math.Float64frombits(binary.LittleEndian.Uint64(b[8*i:]))
	}
	return x
}

func floatBytes(x []float64) []byte {
	b := make([]byte, 8*len(x))
	for i, v := range x {
		binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(v))
	}
	return b
}

// FuzzCorrelation checks invariants of Ranks, Spearman, Pearson and the
// exact p on arbitrary values: no panic, ranks of the non-NaN values sum to
// m(m+1)/2, |r| ≤ 1 or NaN, symmetry, and p in (0, 1]. Seeded from the
// scipy cases in testdata/stats/ref.json.
func FuzzCorrelation(f *testing.F) {
	ref := loadRef(f)
	for _, c := range ref.Corr {
		f.Add(floatBytes(c.X), floatBytes(c.Y))
	}
	for _, c := range ref.Exact {
		f.Add(floatBytes(c.X), floatBytes(c.Y))
	}
	f.Fuzz(func(t *testing.T, bx, by []byte) {
		x, y := floatsFrom(bx), floatsFrom(by)
		n := min(len(x), len(y))
		x, y = x[:n], y[:n]
		r := Ranks(nil, x)
		m, sum := 0, 0.0
		for i, v := range r {
			if math.IsNaN(x[i]) != math.IsNaN(v) {
				t.Fatalf("rank %d of %g is %g", i, x[i], v)
			}
			if !math.IsNaN(v) {
				m++
				sum += v
			}
		}
		if sum != float64(m*(m+1))/2 {
			t.Fatalf("ranks sum to %g, want %d", sum, m*(m+1)/2)
		}
		rs := Spearman(x, y)
		if !math.IsNaN(rs) && math.Abs(rs) > 1 {
			t.Fatalf("ρ = %g", rs)
		}
		if rs2 := Spearman(y, x); !within(rs, rs2, 1e-12) {
			t.Fatalf("ρ(x,y) = %g, ρ(y,x) = %g", rs, rs2)
		}
		if rp := Pearson(x, y); !math.IsNaN(rp) && math.Abs(rp) > 1 {
			t.Fatalf("r = %g", rp)
		}
		if n <= 8 {
			if p, ok := ExactSpearmanP(x, y); !ok || (!math.IsNaN(p) && !(p > 0 && p <= 1)) {
				t.Fatalf("exact p = %g, ok %v", p, ok)
			}
			if p, ok := ExactPearsonP(x, y); !ok || (!math.IsNaN(p) && !(p > 0 && p <= 1)) {
				t.Fatalf("exact Pearson p = %g, ok %v", p, ok)
			}
		}
	})
}

// FuzzClusters checks that every labelled pixel is beyond the threshold,
// that the cluster sums add up to the labelled pixels' total, and that no
// input panics. Seeded with small maps like those of TestClusters.
func FuzzClusters(f *testing.F) {
	f.Add(floatBytes([]float64{3, 0, 0, 3, -4, -4, 2, math.NaN()}), uint8(3), 1.0)
	f.Add(floatBytes([]float64{2, 0, 2, 2, 0, 2, 2, 2, 2}), uint8(3), 1.0)
	f.Fuzz(func(t *testing.T, b []byte, cols uint8, thresh float64) {
		if !(thresh >= 0) || cols == 0 {
			return
		}
		v := floatsFrom(b)
		var stat [][]float64
		for i := 0; i < len(v); i += int(cols) {
			stat = append(stat, v[i:min(i+int(cols), len(v))])
		}
		labels, sums := Clusters(stat, thresh)
		total := make([]float64, len(sums))
		for i, row := range stat {
			for j, s := range row {
				k := labels[i][j]
				if k == 0 {
					continue
				}
				if !(s > thresh || s < -thresh) {
					t.Fatalf("pixel %d,%d = %g labelled %d at threshold %g", i, j, s, k, thresh)
				}
				total[k-1] += s
			}
		}
		for k := range sums {
			if sums[k] != total[k] && !(math.IsNaN(sums[k]) && math.IsNaN(total[k])) && !within(sums[k], total[k], 1e-9*math.Abs(total[k])) {
				t.Fatalf("cluster %d: sum %g, pixels add to %g", k+1, sums[k], total[k])
			}
		}
	})
}
