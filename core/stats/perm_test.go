package stats

import (
	"bytes"
	"flag"
	"fmt"
	"math"
	"math/bits"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"testing"
)

var update = flag.Bool("update", false, "rewrite golden files in testdata/stats")

// TestShuffleGolden pins the permutations of Shuffle and the raw stream of
// NewRand for a few seeds, so that a change of generator, stream constant
// or shuffle loop (which would change every published permutation p) is
// caught. A mismatch writes shuffle.golden.got next to the golden file.
func TestShuffleGolden(t *testing.T) {
	var buf bytes.Buffer
	for _, seed := range []uint64{0, 1, 42, 1 << 63} {
		rng := NewRand(seed)
		fmt.Fprintf(&buf, "seed %d uint64:", seed)
		for range 3 {
			fmt.Fprintf(&buf, " %d", rng.Uint64())
		}
		buf.WriteString("\n")
		for _, n := range []int{5, 12} {
			perm := make([]int, n)
			for i := range perm {
				perm[i] = i
			}
			for range 2 {
				Shuffle(rng, perm)
				fmt.Fprintf(&buf, "seed %d n %d: %v\n", seed, n, perm)
			}
		}
	}
	golden := filepath.Join(testdataDir, "shuffle.golden")
	if *update {
		if err := os.WriteFile(golden, buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(golden)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(buf.Bytes(), want) {
		_ = os.WriteFile(golden+".got", buf.Bytes(), 0o644)
		t.Errorf("Shuffle output differs from %s; got written to %s.got", golden, golden)
	}
}

// On 64-bit platforms uintN must agree with math/rand/v2's IntN (same
// Lemire reduction), which also checks it against an independent
// implementation.
func TestUintNMatchesIntN(t *testing.T) {
	if bits.UintSize != 64 {
		t.Skip("IntN takes a 32-bit path here")
	}
	a, b := NewRand(9), NewRand(9)
	for i := range 10000 {
		n := i%1000 + 1
		if i%7 == 0 {
			n = 1<<(bits.UintSize-24) + i // 2^40 + i where int is 64-bit
		}
		if got, want := uintN(a, uint64(n)), b.IntN(n); int(got) != want {
			t.Fatalf("draw %d, n=%d: uintN = %d, IntN = %d", i, n, got, want)
		}
	}
}

// The allocation-free shuffle inside PermCorr draws the same permutations
// as Shuffle with NewRand of the same seed.
func TestShuffleFloatsMatchesShuffle(t *testing.T) {
	for _, seed := range []uint64{0, 3, 1 << 40} {
		rng := NewRand(seed)
		src := rand.NewPCG(seed, pcgStream)
		for _, n := range []int{1, 2, 7, 16, 33} {
			perm := make([]int, n)
			v := make([]float64, n)
			for i := range perm {
				perm[i], v[i] = i, float64(i)
			}
			for range 3 {
				Shuffle(rng, perm)
				shuffleFloats(src, v)
				for i := range perm {
					if float64(perm[i]) != v[i] {
						t.Fatalf("seed %d n %d: Shuffle %v, shuffleFloats %v", seed, n, perm, v)
					}
				}
			}
		}
	}
}

// Shuffle is uniform: 60000 shuffles of 3 items hit the 6 orderings
// equally; χ² with 5 df stays below 20.52 (the 0.001 upper quantile, from
// memory of standard tables).
func TestShuffleUniform(t *testing.T) {
	rng := NewRand(3)
	counts := map[[3]int]int{}
	const trials = 60000
	for range trials {
		p := []int{0, 1, 2}
		Shuffle(rng, p)
		counts[[3]int(p)]++
	}
	if len(counts) != 6 {
		t.Fatalf("%d orderings seen, want 6", len(counts))
	}
	chi2 := 0.0
	for _, c := range counts {
		d := float64(c) - trials/6.0
		chi2 += d * d / (trials / 6.0)
	}
	if chi2 > 20.52 {
		t.Errorf("χ² = %.2f over the 6 orderings; counts %v", chi2, counts)
	}
}

func TestPermP(t *testing.T) {
	// Phipson & Smyth (2010) [memory]: p = (b+1)/(n+1).
	for _, c := range []struct {
		b, n int
		want float64
	}{{0, 999, 0.001}, {999, 999, 1}, {4, 19, 0.25}, {0, 0, 1}} {
		t.Run(fmt.Sprintf("%d/%d", c.b, c.n), func(t *testing.T) {
			checkAbs(t, "PermP", PermP(c.b, c.n), c.want, 1e-15)
		})
	}
}

func normals(rng interface{ NormFloat64() float64 }, n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = rng.NormFloat64()
	}
	return x
}

func TestPermCorr(t *testing.T) {
	rng := NewRand(11)
	x := normals(rng, 40)
	y := make([]float64, 40)
	for i := range y {
		y[i] = 0.3*x[i] + rng.NormFloat64()
	}
	for _, spearman := range []bool{false, true} {
		t.Run(fmt.Sprintf("spearman=%v", spearman), func(t *testing.T) {
			p1 := PermCorr(x, y, spearman, 2000, 5)
			p2 := PermCorr(x, y, spearman, 2000, 5)
			if p1 != p2 {
				t.Errorf("same seed: %g then %g", p1, p2)
			}
			if p3 := PermCorr(x, y, spearman, 2000, 6); p3 == p1 {
				t.Errorf("seeds 5 and 6 both give %g", p1)
			}
			if !(p1 > 0 && p1 <= 1) {
				t.Errorf("p = %g outside (0, 1]", p1)
			}
			// With 2000 permutations the p should be near the exact
			// distribution's, here approximated by the t approximation
			// (n = 40, common practice) within 0.03.
			var r float64
			if spearman {
				r = Spearman(x, y)
			} else {
				r = Pearson(x, y)
			}
			checkAbs(t, "p vs t approximation", p1, PValueT(r, 38), 0.03)
		})
	}
	t.Run("strong", func(t *testing.T) {
		// No shuffle of 50 values reaches r ≈ 1, so p = 1/(N+1).
		z := make([]float64, 50)
		for i := range z {
			z[i] = x[i%40]*2 + 1e-3*float64(i)
		}
		xx := append(slices.Clone(x), x[:10]...)
		for _, spearman := range []bool{false, true} {
			checkAbs(t, "p", PermCorr(xx, z, spearman, 999, 1), 1.0/1000, 1e-15)
		}
	})
	t.Run("exact agreement", func(t *testing.T) {
		// For n = 7 the exact enumeration (checked against numpy in
		// TestScipyExact) is the limit of the permutation p; 20000
		// permutations put it within 0.01 (binomial SE ≈ 0.0015).
		a := []float64{1, 2, 3, 4, 5, 6, 7}
		b := []float64{3, 2, 1, 5, 4, 7, 6}
		pe, _ := ExactSpearmanP(a, b)
		checkAbs(t, "PermCorr vs exact", PermCorr(a, b, true, 20000, 2), pe, 0.01)
		pp, _ := ExactPearsonP(a, b)
		checkAbs(t, "PermCorr vs exact (Pearson)", PermCorr(a, b, false, 20000, 2), pp, 0.01)
	})
}

// Under independence the permutation p is ~uniform: 300 data sets, each
// with its own seed. Kolmogorov–Smirnov distance below 1.95/√300 ≈ 0.113
// (the α = 0.001 critical value, from memory), and the share below 0.05
// within [0.01, 0.10].
func TestPermCorrNullUniform(t *testing.T) {
	const sets = 300
	ps := make([]float64, sets)
	for s := range sets {
		rng := NewRand(uint64(1000 + s))
		x, y := normals(rng, 25), normals(rng, 25)
		ps[s] = PermCorr(x, y, s%2 == 0, 199, uint64(s))
		if !(ps[s] > 0 && ps[s] <= 1) {
			t.Fatalf("p = %g outside (0, 1]", ps[s])
		}
	}
	sort.Float64s(ps)
	ks, below := 0.0, 0
	for i, p := range ps {
		ks = math.Max(ks, math.Max(math.Abs(float64(i+1)/sets-p), math.Abs(float64(i)/sets-p)))
		if p <= 0.05 {
			below++
		}
	}
	if ks > 1.95/math.Sqrt(sets) {
		t.Errorf("KS distance %.3f from uniform", ks)
	}
	if frac := float64(below) / sets; frac < 0.01 || frac > 0.10 {
		t.Errorf("share of p ≤ 0.05 = %.3f", frac)
	}
}

func TestPermCorrMany(t *testing.T) {
	rng := NewRand(21)
	x := normals(rng, 30)
	ys := [][]float64{normals(rng, 30), make([]float64, 30), normals(rng, 30), make([]float64, 30)}
	for i := range ys[1] {
		ys[1][i] = x[i] + 0.8*rng.NormFloat64()
		ys[3][i] = 1 // constant: undefined
	}
	p, pMax := PermCorrMany(x, ys, true, 999, 4)
	for j, y := range ys {
		single := PermCorr(x, y, true, 999, 4)
		checkAbs(t, fmt.Sprintf("target %d: PermCorrMany vs PermCorr", j), p[j], single, 0)
		if j == 3 {
			if !math.IsNaN(pMax[j]) {
				t.Errorf("constant target: pMax = %g", pMax[j])
			}
			continue
		}
		// The max statistic is at least as large as each target's own.
		if pMax[j] < p[j] {
			t.Errorf("target %d: pMax %g < p %g", j, pMax[j], p[j])
		}
	}
	if !(p[1] < 0.01) {
		t.Errorf("correlated target: p = %g", p[1])
	}
}
