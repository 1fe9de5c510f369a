package stats

import (
	"fmt"
	"testing"
)

func benchData(n int) (x, y []float64) {
	rng := NewRand(1)
	x, y = make([]float64, n), make([]float64, n)
	for i := range x {
		x[i] = rng.NormFloat64()
		y[i] = 0.3*x[i] + rng.NormFloat64()
	}
	return x, y
}

func BenchmarkSpearman(b *testing.B) {
	x, y := benchData(200)
	b.ReportAllocs()
	for b.Loop() {
		Spearman(x, y)
	}
}

func BenchmarkPermCorr(b *testing.B) {
	x, y := benchData(200)
	for _, spearman := range []bool{true, false} {
		for _, perms := range []int{1000, 5000} {
			b.Run(fmt.Sprintf("spearman=%v/n=200/perms=%d", spearman, perms), func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					PermCorr(x, y, spearman, perms, 1)
				}
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(perms), "ns/perm")
			})
		}
	}
}

func BenchmarkBH(b *testing.B) {
	rng := NewRand(2)
	p := make([]float64, 1024)
	for i := range p {
		p[i] = rng.Float64()
	}
	b.ReportAllocs()
	for b.Loop() {
		BH(p)
	}
}

func BenchmarkExactSpearmanP(b *testing.B) {
	x, y := benchData(10)
	b.ReportAllocs()
	for b.Loop() {
		ExactSpearmanP(x, y)
	}
}

func BenchmarkEffectiveN(b *testing.B) {
	rng := NewRand(3)
	for _, phi := range []float64{0.5, 0.95} {
		x, y := ar1(rng, 10000, phi), ar1(rng, 10000, phi)
		b.Run(fmt.Sprintf("n=10000/phi=%g", phi), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				EffectiveN(x, y)
			}
		})
	}
}

func BenchmarkClusters(b *testing.B) {
	rng := NewRand(4)
	stat := grid(40, 200)
	for _, row := range stat {
		for j := range row {
			row[j] = rng.NormFloat64()
		}
	}
	b.ReportAllocs()
	for b.Loop() {
		MaxAbsClusterSum(stat, 2)
	}
}
