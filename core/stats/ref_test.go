package stats

import (
	"fmt"
	"math"
	"testing"
)

// Tolerances against scipy: 1e-10 absolute on correlations and statistics,
// 1e-8 relative on p-values.
const (
	tolR = 1e-10
	tolP = 1e-8
)

// TestScipyCorrelation compares Ranks, Spearman, Pearson and PValueT with
// scipy.stats.rankdata, spearmanr and pearsonr (ref.json, made by
// testdata/stats/make_ref.py with the scipy/numpy versions recorded there).
func TestScipyCorrelation(t *testing.T) {
	ref := loadRef(t)
	for _, c := range ref.Corr {
		t.Run(c.Name, func(t *testing.T) {
			df := float64(len(c.X) - 2)
			// scipy rankdata(method="average")
			for i, r := range Ranks(nil, c.X) {
				checkAbs(t, fmt.Sprintf("rank x[%d]", i), r, c.RanksX[i], 0)
			}
			for i, r := range Ranks(nil, c.Y) {
				checkAbs(t, fmt.Sprintf("rank y[%d]", i), r, c.RanksY[i], 0)
			}
			// scipy spearmanr correlation and pvalue (t approximation)
			rs := Spearman(c.X, c.Y)
			checkAbs(t, "Spearman", rs, c.SpearmanR, tolR)
			checkRel(t, "Spearman p", PValueT(rs, df), c.SpearmanP, tolP)
			// scipy pearsonr statistic and pvalue
			rp := Pearson(c.X, c.Y)
			checkAbs(t, "Pearson", rp, c.PearsonR, tolR)
			checkRel(t, "Pearson p", PValueT(rp, df), c.PearsonP, tolP)
		})
	}
}

// TestScipyPValueT compares PValueT with 2·scipy.stats.t.sf(|t|, df).
func TestScipyPValueT(t *testing.T) {
	for _, c := range loadRef(t).PValueT {
		t.Run(fmt.Sprintf("r=%g,df=%g", c.R, c.DF), func(t *testing.T) {
			checkRel(t, "PValueT", PValueT(c.R, c.DF), c.P, tolP)
		})
	}
}

// TestScipyExact compares ExactSpearmanP and ExactPearsonP with full
// enumeration of the n! pairings in numpy (itertools.permutations).
func TestScipyExact(t *testing.T) {
	for _, c := range loadRef(t).Exact {
		t.Run(c.Name, func(t *testing.T) {
			ps, ok := ExactSpearmanP(c.X, c.Y)
			if !ok {
				t.Fatal("ExactSpearmanP: ok = false")
			}
			checkAbs(t, "ExactSpearmanP", ps, c.SpearmanP, 1e-15)
			checkAbs(t, "Spearman count", ps*float64(c.Total), float64(c.SpearmanCount), 1e-6)
			pp, ok := ExactPearsonP(c.X, c.Y)
			if !ok {
				t.Fatal("ExactPearsonP: ok = false")
			}
			checkAbs(t, "ExactPearsonP", pp, c.PearsonP, 1e-15)
		})
	}
}

// TestScipyPartial compares Partial with pearsonr of numpy.linalg.lstsq
// residuals (ranked with scipy rankdata first for Spearman), and its p with
// 2·t.sf(|t|, n−2−k).
func TestScipyPartial(t *testing.T) {
	for _, c := range loadRef(t).Partial {
		t.Run(fmt.Sprintf("n=%d,k=%d,spearman=%v", c.N, c.K, c.Spearman), func(t *testing.T) {
			r, df := Partial(c.X, c.Y, c.Covs, c.Spearman)
			if df != c.DF {
				t.Errorf("df = %d, want %d", df, c.DF)
			}
			checkAbs(t, "Partial r", r, c.R, tolR)
			checkRel(t, "Partial p", PValueT(r, float64(df)), c.P, tolP)
		})
	}
}

// TestScipyTTest compares OneSampleT with scipy.stats.ttest_1samp and
// WelchT with ttest_ind(equal_var=False); df from the Welch–Satterthwaite
// formula in numpy.
func TestScipyTTest(t *testing.T) {
	for i, c := range loadRef(t).TTest {
		t.Run(fmt.Sprintf("%s-%d", c.Kind, i), func(t *testing.T) {
			var tv, df, p float64
			if c.Kind == "one" {
				tv, df, p = OneSampleT(c.X)
			} else {
				tv, df, p = WelchT(c.X, c.Y)
			}
			checkAbs(t, "t", tv, c.T, tolR)
			checkAbs(t, "df", df, c.DF, 1e-9)
			checkRel(t, "p", p, c.P, tolP)
		})
	}
}

// TestScipyMultiple compares BH and Bonferroni with the definitions written
// out in numpy (make_ref.py), including NaN p-values, which are excluded
// from m.
func TestScipyMultiple(t *testing.T) {
	for _, c := range loadRef(t).Multiple {
		t.Run(c.Name, func(t *testing.T) {
			p := nan(c.P)
			q, bonf := BH(p), Bonferroni(p)
			for i, want := range nan(c.BH) {
				checkAbs(t, fmt.Sprintf("BH[%d]", i), q[i], want, 1e-14)
			}
			for i, want := range nan(c.Bonferroni) {
				checkAbs(t, fmt.Sprintf("Bonferroni[%d]", i), bonf[i], want, 1e-14)
			}
		})
	}
}

// TestScipyFisher compares FisherCI, CompareIndependent and
// CompareDependent with the formulas evaluated with scipy.stats.norm
// (ppf, sf) in make_ref.py.
func TestScipyFisher(t *testing.T) {
	ref := loadRef(t)
	for _, c := range ref.FisherCI {
		t.Run(fmt.Sprintf("ci r=%g n=%d level=%g", c.R, c.N, c.Level), func(t *testing.T) {
			lo, hi := FisherCI(c.R, c.N, c.Level, false)
			checkAbs(t, "lo", lo, c.Lo, tolR)
			checkAbs(t, "hi", hi, c.Hi, tolR)
			lo, hi = FisherCI(c.R, c.N, c.Level, true)
			checkAbs(t, "lo (Spearman)", lo, c.LoS, tolR)
			checkAbs(t, "hi (Spearman)", hi, c.HiS, tolR)
		})
	}
	for _, c := range ref.CompareIndependent {
		t.Run(fmt.Sprintf("independent %g/%d vs %g/%d spearman=%v", c.R1, c.N1, c.R2, c.N2, c.Spearman), func(t *testing.T) {
			z, p := CompareIndependent(c.R1, c.N1, c.R2, c.N2, c.Spearman)
			checkAbs(t, "z", z, c.Z, tolR)
			checkRel(t, "p", p, c.P, tolP)
		})
	}
	for _, c := range ref.CompareDependent {
		t.Run(fmt.Sprintf("dependent %g %g %g n=%d", c.Rjk, c.Rjh, c.Rkh, c.N), func(t *testing.T) {
			z, p := CompareDependent(c.Rjk, c.Rjh, c.Rkh, c.N)
			checkAbs(t, "z", z, c.Z, tolR)
			checkRel(t, "p", p, c.P, tolP)
		})
	}
	if math.IsNaN(FisherZ(0.5)) {
		t.Error("FisherZ(0.5) is NaN")
	}
}
