package stats

import (
	"math"
	"testing"
)

// Undefined inputs give NaN (never a panic); the expected values follow
// from the definitions in the doc comments (common practice).
func TestUndefined(t *testing.T) {
	nan := math.NaN()
	one := []float64{1}
	flat := []float64{2, 2, 2, 2}
	inc := []float64{1, 2, 3, 4}
	withNaN := []float64{1, nan, 3, 4}
	cases := []struct {
		name string
		got  float64
		want float64
	}{
		{"Pearson n=1", Pearson(one, one), nan},
		{"Pearson constant", Pearson(flat, inc), nan},
		{"Pearson NaN", Pearson(withNaN, inc), nan},
		{"Pearson perfect", Pearson(inc, []float64{2, 4, 6, 8}), 1},
		{"Pearson perfect negative", Pearson(inc, []float64{8, 6, 4, 2}), -1},
		{"Spearman constant", Spearman(inc, flat), nan},
		{"Spearman monotone", Spearman(inc, []float64{1, 10, 100, 1000}), 1},
		{"PValueT NaN r", PValueT(nan, 10), nan},
		{"PValueT df=0", PValueT(0.3, 0), nan},
		{"PValueT r=1", PValueT(1, 10), 0},
		{"PValueT r=-1", PValueT(-1, 10), 0},
		{"PValueT r=0", PValueT(0, 10), 1},
		{"FisherZ r=2", FisherZ(2), nan},
		{"FisherZ r=1", FisherZ(1), math.Inf(1)},
		{"PartialR r_xz=1", PartialR(0.5, 1, 0.3), nan},
		{"OneSampleT constant", first(OneSampleT(flat)), nan},
		{"OneSampleT n=1", first(OneSampleT(one)), nan},
		{"WelchT n=1", first(WelchT(one, inc)), nan},
		{"WelchT both constant", first(WelchT(flat, flat)), nan},
		{"EffectiveN constant", EffectiveN(flat, inc), nan},
		{"PermCorr constant", PermCorr(flat, inc, true, 10, 1), nan},
		{"PermCorr zero permutations", PermCorr(inc, inc, true, 0, 1), nan},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) { checkAbs(t, c.name, c.got, c.want, 1e-15) })
	}
	t.Run("FisherCI", func(t *testing.T) {
		for _, c := range []struct {
			r     float64
			n     int
			level float64
		}{{0.5, 3, 0.95}, {0.5, 10, 1}, {0.5, 10, 0}, {nan, 10, 0.95}, {1.5, 10, 0.95}} {
			lo, hi := FisherCI(c.r, c.n, c.level, false)
			if !math.IsNaN(lo) || !math.IsNaN(hi) {
				t.Errorf("FisherCI(%g, %d, %g) = %g, %g, want NaN", c.r, c.n, c.level, lo, hi)
			}
		}
	})
	t.Run("Compare n<=3", func(t *testing.T) {
		if z, _ := CompareIndependent(0.5, 3, 0.2, 40, false); !math.IsNaN(z) {
			t.Errorf("CompareIndependent n1=3: z = %g", z)
		}
		if z, _ := CompareDependent(0.5, 0.2, 0.1, 3); !math.IsNaN(z) {
			t.Errorf("CompareDependent n=3: z = %g", z)
		}
	})
	t.Run("Exact n>10", func(t *testing.T) {
		if p, ok := ExactSpearmanP(seq(11), seq(11)); ok || !math.IsNaN(p) {
			t.Errorf("ExactSpearmanP n=11 = %g, %v", p, ok)
		}
		if p, ok := ExactPearsonP(seq(11), seq(11)); ok || !math.IsNaN(p) {
			t.Errorf("ExactPearsonP n=11 = %g, %v", p, ok)
		}
		if p, ok := ExactPearsonP([]float64{1, 2, math.Inf(1)}, []float64{1, 2, 3}); !ok || !math.IsNaN(p) {
			t.Errorf("ExactPearsonP with +Inf = %g, %v", p, ok)
		}
		if p, ok := ExactSpearmanP(flat, inc); !ok || !math.IsNaN(p) {
			t.Errorf("ExactSpearmanP constant = %g, %v", p, ok)
		}
	})
	t.Run("Partial", func(t *testing.T) {
		x := []float64{1, 3, 2, 5, 4, 6}
		y := []float64{2, 1, 4, 3, 6, 5}
		z := []float64{1, 1, 2, 2, 3, 3}
		if r, df := Partial(x, y, [][]float64{z, z}, false); !math.IsNaN(r) || df != 2 {
			t.Errorf("collinear covariates: r = %g, df = %d, want NaN, 2", r, df)
		}
		if r, df := Partial(x[:3], y[:3], [][]float64{z[:3]}, false); !math.IsNaN(r) || df != 0 {
			t.Errorf("df = 0: r = %g, df = %d", r, df)
		}
		r0, df0 := Partial(x, y, nil, true)
		if r0 != Spearman(x, y) || df0 != 4 {
			t.Errorf("no covariates: r = %g, df = %d, want Spearman %g, 4", r0, df0, Spearman(x, y))
		}
	})
	t.Run("BH empty and all NaN", func(t *testing.T) {
		if q := BH(nil); len(q) != 0 {
			t.Errorf("BH(nil) = %v", q)
		}
		for _, v := range BH([]float64{nan, nan}) {
			if !math.IsNaN(v) {
				t.Errorf("BH(NaN) = %g", v)
			}
		}
	})
}

func first(a, _, _ float64) float64 { return a }

func TestRanks(t *testing.T) {
	nan := math.NaN()
	for _, c := range []struct {
		name string
		x    []float64
		want []float64
	}{
		// Average ranks by hand (common practice: "fractional ranking").
		{"empty", nil, []float64{}},
		{"distinct", []float64{30, 10, 20}, []float64{3, 1, 2}},
		{"ties", []float64{5, 1, 5, 5, 0}, []float64{4, 2, 4, 4, 1}},
		{"all tied", []float64{7, 7, 7, 7}, []float64{2.5, 2.5, 2.5, 2.5}},
		{"NaN skipped", []float64{3, nan, 1}, []float64{2, nan, 1}},
		{"infinities", []float64{math.Inf(1), 0, math.Inf(-1)}, []float64{3, 2, 1}},
	} {
		t.Run(c.name, func(t *testing.T) {
			got := Ranks(nil, c.x)
			if len(got) != len(c.want) {
				t.Fatalf("len = %d, want %d", len(got), len(c.want))
			}
			for i := range got {
				checkAbs(t, "rank", got[i], c.want[i], 0)
			}
			dst := make([]float64, len(c.x))
			if out := Ranks(dst, c.x); len(out) > 0 && &out[0] != &dst[0] {
				t.Error("Ranks did not use dst")
			}
		})
	}
}

func TestPanics(t *testing.T) {
	for _, c := range []struct {
		name string
		f    func()
	}{
		{"Pearson", func() { Pearson([]float64{1, 2}, []float64{1}) }},
		{"Spearman", func() { Spearman([]float64{1, 2}, []float64{1}) }},
		{"Ranks", func() { Ranks(make([]float64, 1), []float64{1, 2}) }},
		{"ExactSpearmanP", func() { ExactSpearmanP([]float64{1, 2}, []float64{1}) }},
		{"Partial", func() { Partial([]float64{1, 2}, []float64{1, 2}, [][]float64{{1}}, false) }},
		{"PermCorr", func() { PermCorr([]float64{1, 2}, []float64{1}, false, 5, 1) }},
		{"PermP", func() { PermP(5, 4) }},
		{"Clusters", func() { Clusters([][]float64{{1}}, -1) }},
		{"EffectiveN", func() { EffectiveN([]float64{1, 2}, []float64{1}) }},
	} {
		t.Run(c.name, func(t *testing.T) {
			defer func() {
				r := recover()
				s, _ := r.(string)
				if len(s) < 7 || s[:7] != "stats: " {
					t.Errorf("panic %v, want a \"stats: \" message", r)
				}
			}()
			c.f()
		})
	}
}
