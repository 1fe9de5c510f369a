package stats

import (
	"fmt"
	"math"
	"testing"
)

// Check values from /work/shared/REFERENCES.md, sections "Spearman rank
// correlation", "Fisher z, comparisons, partial correlation" and "Multiple
// comparisons". Tolerances are half a unit in the last printed digit.

func seq(n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = float64(i + 1)
	}
	return x
}

func TestReferencesSpearman(t *testing.T) {
	t.Run("ties", func(t *testing.T) {
		// REFERENCES.md [computed with scipy]: ρ = 0.808824, p = 0.05133;
		// the d² shortcut gives 0.814286, which must not be what we return.
		x := []float64{1, 2, 2, 3, 4, 5}
		y := []float64{2, 1, 3, 3, 5, 4}
		r := Spearman(x, y)
		checkAbs(t, "ρ", r, 0.808824, 5e-7)
		checkAbs(t, "p", PValueT(r, 4), 0.05133, 5e-6)
		if math.Abs(r-0.814286) < 1e-3 {
			t.Errorf("ρ = %g matches the d² shortcut", r)
		}
	})
	t.Run("swapped pairs", func(t *testing.T) {
		// REFERENCES.md [computed]: ρ = 0.93939, t-approximation p = 5.48e-5,
		// exact two-sided p = 2.056e-4.
		x := seq(10)
		y := []float64{2, 1, 4, 3, 6, 5, 8, 7, 10, 9}
		r := Spearman(x, y)
		checkAbs(t, "ρ", r, 0.93939, 5e-6)
		checkAbs(t, "t-approximation p", PValueT(r, 8), 5.48e-5, 5e-8)
		p, ok := ExactSpearmanP(x, y)
		if !ok {
			t.Fatal("ExactSpearmanP: ok = false at n = 10")
		}
		checkAbs(t, "exact p", p, 2.056e-4, 5e-8)
	})
}

// criticalRho solves PValueT(ρ, df) = alpha for ρ in (0, 1) by bisection;
// PValueT falls as ρ rises.
func criticalRho(alpha, df float64) float64 {
	lo, hi := 0.0, 1.0
	for range 100 {
		mid := (lo + hi) / 2
		if PValueT(mid, df) > alpha {
			lo = mid
		} else {
			hi = mid
		}
	}
	return (lo + hi) / 2
}

// sumD2 is Σ(i − y_i)² for y a permutation of 1..n.
func sumD2(y []float64) float64 {
	s := 0.0
	for i, v := range y {
		d := float64(i+1) - v
		s += d * d
	}
	return s
}

func TestZarTable(t *testing.T) {
	// Zar (1972) JASA 67:578, table 1 (two-tailed critical ρ); as printed in
	// REFERENCES.md.
	t.Run("t approximation", func(t *testing.T) {
		for _, c := range []struct{ n, alpha, rho float64 }{
			{20, 0.05, 0.447}, {20, 0.01, 0.570},
			{30, 0.05, 0.362}, {30, 0.01, 0.467},
		} {
			t.Run(fmt.Sprintf("n=%g,alpha=%g", c.n, c.alpha), func(t *testing.T) {
				rc := criticalRho(c.alpha, c.n-2)
				checkAbs(t, "critical ρ", rc, c.rho, 0.01)
			})
		}
	})
	// Exact route: at the tabled ρ (an attainable value, Σd² = d2) the exact
	// p is at most α; at the next smaller attainable ρ (Σd² = d2+2) it is
	// above α. The orderings y were found by search; their Σd² is checked.
	t.Run("exact", func(t *testing.T) {
		for _, c := range []struct {
			alpha, rho float64
			d2         float64
			at, below  []float64
		}{
			{0.05, 0.786, 12, []float64{3, 2, 1, 5, 4, 7, 6}, []float64{1, 2, 3, 5, 7, 6, 4}},
			{0.01, 0.929, 4, []float64{2, 1, 4, 3, 5, 6, 7}, []float64{2, 1, 4, 3, 6, 5, 7}},
			{0.05, 0.648, 58, []float64{1, 2, 3, 4, 7, 10, 9, 8, 6, 5}, []float64{1, 2, 3, 4, 8, 9, 10, 6, 7, 5}},
			{0.01, 0.794, 34, []float64{1, 2, 3, 4, 5, 8, 10, 9, 7, 6}, []float64{1, 2, 3, 4, 5, 9, 10, 7, 8, 6}},
		} {
			n := len(c.at)
			t.Run(fmt.Sprintf("n=%d,alpha=%g", n, c.alpha), func(t *testing.T) {
				x := seq(n)
				if sumD2(c.at) != c.d2 || sumD2(c.below) != c.d2+2 {
					t.Fatalf("test data: Σd² = %g, %g, want %g, %g", sumD2(c.at), sumD2(c.below), c.d2, c.d2+2)
				}
				r := Spearman(x, c.at)
				checkAbs(t, "ρ at the tabled value", r, c.rho, 5e-4)
				p, ok := ExactSpearmanP(x, c.at)
				if !ok || !(p <= c.alpha) {
					t.Errorf("exact p at ρ = %.5f: %g (ok %v), want ≤ %g", r, p, ok, c.alpha)
				}
				rb := Spearman(x, c.below)
				pb, ok := ExactSpearmanP(x, c.below)
				if !ok || !(pb > c.alpha) || !(rb < r) {
					t.Errorf("exact p at ρ = %.5f: %g (ok %v), want > %g", rb, pb, ok, c.alpha)
				}
			})
		}
	})
}

// exactCorrelated returns centred vectors x, y, z of length n whose sample
// correlations are exactly rxy, rxz, ryz (to rounding): an orthonormal
// basis of centred random vectors, coloured with the Cholesky factor of
// the target correlation matrix.
func exactCorrelated(n int, rxy, rxz, ryz float64, seed uint64) (x, y, z []float64) {
	rng := NewRand(seed)
	basis := make([][]float64, 3)
	for k := range basis {
		v := make([]float64, n)
		for i := range v {
			v[i] = rng.NormFloat64()
		}
		m := mean(v)
		for i := range v {
			v[i] -= m
		}
		for _, b := range basis[:k] { // Gram–Schmidt
			d := 0.0
			for i := range v {
				d += v[i] * b[i]
			}
			for i := range v {
				v[i] -= d * b[i]
			}
		}
		nrm := 0.0
		for _, e := range v {
			nrm += e * e
		}
		nrm = math.Sqrt(nrm)
		for i := range v {
			v[i] /= nrm
		}
		basis[k] = v
	}
	// Cholesky rows of [[1 rxy rxz] [rxy 1 ryz] [rxz ryz 1]].
	l21 := rxy
	l22 := math.Sqrt(1 - l21*l21)
	l31 := rxz
	l32 := (ryz - l31*l21) / l22
	l33 := math.Sqrt(1 - l31*l31 - l32*l32)
	x, y, z = make([]float64, n), make([]float64, n), make([]float64, n)
	for i := range n {
		e1, e2, e3 := basis[0][i], basis[1][i], basis[2][i]
		x[i] = e1
		y[i] = l21*e1 + l22*e2
		z[i] = l31*e1 + l32*e2 + l33*e3
	}
	return x, y, z
}

func TestReferencesFisher(t *testing.T) {
	t.Run("CI r=.5 n=50", func(t *testing.T) {
		// REFERENCES.md [computed]: 95% CI [.2575, .6833].
		lo, hi := FisherCI(0.5, 50, 0.95, false)
		checkAbs(t, "lo", lo, 0.2575, 5e-5)
		checkAbs(t, "hi", hi, 0.6833, 5e-5)
	})
	t.Run("independent", func(t *testing.T) {
		// REFERENCES.md [computed]: .5 (n=50) vs .3 (n=60): Z = 1.2170, p = .2236.
		z, p := CompareIndependent(0.5, 50, 0.3, 60, false)
		checkAbs(t, "Z", z, 1.2170, 5e-5)
		checkAbs(t, "p", p, 0.2236, 5e-5)
	})
	t.Run("dependent", func(t *testing.T) {
		// REFERENCES.md [computed from Steiger 1980]: .5 vs .3, r_kh=.4, n=100:
		// Z = 2.0349, p = .0419.
		z, p := CompareDependent(0.5, 0.3, 0.4, 100)
		checkAbs(t, "Z", z, 2.0349, 5e-5)
		checkAbs(t, "p", p, 0.0419, 5e-5)
	})
	t.Run("partial", func(t *testing.T) {
		// REFERENCES.md [computed]: r_xy=.6, r_xz=.5, r_yz=.4, n=30 gives
		// .503953, t = 3.0317, p = .00531 (df = n − 3).
		r := PartialR(0.6, 0.5, 0.4)
		checkAbs(t, "PartialR", r, 0.503953, 5e-7)
		x, y, z := exactCorrelated(30, 0.6, 0.5, 0.4, 7)
		checkAbs(t, "data r_xy", Pearson(x, y), 0.6, 1e-12)
		checkAbs(t, "data r_xz", Pearson(x, z), 0.5, 1e-12)
		checkAbs(t, "data r_yz", Pearson(y, z), 0.4, 1e-12)
		rp, df := Partial(x, y, [][]float64{z}, false)
		if df != 27 {
			t.Errorf("df = %d, want 27", df)
		}
		checkAbs(t, "Partial", rp, 0.503953, 5e-7)
		checkAbs(t, "t", rp*math.Sqrt(float64(df)/(1-rp*rp)), 3.0317, 5e-5)
		checkAbs(t, "p", PValueT(rp, float64(df)), 0.00531, 5e-6)
	})
}

func TestReferencesBH(t *testing.T) {
	// Benjamini & Hochberg (1995) JRSS-B 57:289 example, p-values from
	// memory (REFERENCES.md); adjusted values [computed]. At q = .05 the
	// paper rejects 4.
	p := []float64{.0001, .0004, .0019, .0095, .0201, .0278, .0298, .0344, .0459,
		.3240, .4262, .5719, .6528, .7590, 1.0}
	q := BH(p)
	for i, want := range []float64{.0015, .0030, .0095, .03562, .0603} {
		checkAbs(t, fmt.Sprintf("q[%d]", i), q[i], want, 5e-6)
	}
	rejected := 0
	for _, v := range q {
		if v <= 0.05 {
			rejected++
		}
	}
	if rejected != 4 {
		t.Errorf("rejected %d at q = .05, want 4", rejected)
	}
	// Step-up definition (common practice): the largest k with
	// p(k) ≤ k·α/m must be the same 4.
	k := 0
	for i, v := range p {
		if v <= float64(i+1)*0.05/float64(len(p)) {
			k = i + 1
		}
	}
	if k != rejected {
		t.Errorf("step-up k = %d, BH rejected %d", k, rejected)
	}
}
