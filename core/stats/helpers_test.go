package stats

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// testdataDir is the module's testdata directory for this package.
var testdataDir = filepath.Join("..", "..", "testdata", "stats")

// within reports whether got is within tol of want (absolute); two NaNs
// match.
func within(got, want, tol float64) bool {
	if math.IsNaN(want) || math.IsNaN(got) {
		return math.IsNaN(want) && math.IsNaN(got)
	}
	if got == want { // also equal infinities
		return true
	}
	return math.Abs(got-want) <= tol
}

// withinRel reports whether got is within tol·|want| of want; two NaNs
// match.
func withinRel(got, want, tol float64) bool {
	return within(got, want, tol*math.Abs(want))
}

func checkAbs(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if !within(got, want, tol) {
		t.Errorf("%s = %.12g, want %.12g (±%g)", what, got, want, tol)
	}
}

func checkRel(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if !withinRel(got, want, tol) {
		t.Errorf("%s = %.12g, want %.12g (relative ±%g)", what, got, want, tol)
	}
}

// refFile is testdata/stats/ref.json, written by testdata/stats/make_ref.py.
type refFile struct {
	Scipy string `json:"scipy"`
	Numpy string `json:"numpy"`
	Corr  []struct {
		Name      string    `json:"name"`
		X         []float64 `json:"x"`
		Y         []float64 `json:"y"`
		SpearmanR float64   `json:"spearman_r"`
		SpearmanP float64   `json:"spearman_p"`
		PearsonR  float64   `json:"pearson_r"`
		PearsonP  float64   `json:"pearson_p"`
		RanksX    []float64 `json:"ranks_x"`
		RanksY    []float64 `json:"ranks_y"`
	} `json:"corr"`
	PValueT []struct {
		R, DF, T, P float64
	} `json:"pvalue_t"`
	Exact []struct {
		Name          string    `json:"name"`
		X             []float64 `json:"x"`
		Y             []float64 `json:"y"`
		SpearmanP     float64   `json:"spearman_p"`
		SpearmanCount int       `json:"spearman_count"`
		PearsonP      float64   `json:"pearson_p"`
		PearsonCount  int       `json:"pearson_count"`
		Total         int       `json:"total"`
	} `json:"exact"`
	Partial []struct {
		N, K     int
		Spearman bool
		X, Y     []float64
		Covs     [][]float64
		R        float64
		DF       int
		P        float64
	} `json:"partial"`
	TTest []struct {
		Kind     string
		X, Y     []float64
		T, DF, P float64
	} `json:"ttest"`
	Multiple []struct {
		Name       string
		P          []*float64
		BH         []*float64 `json:"bh"`
		Bonferroni []*float64
	} `json:"multiple"`
	FisherCI []struct {
		R     float64
		N     int
		Level float64
		Lo    float64 `json:"lo"`
		Hi    float64 `json:"hi"`
		LoS   float64 `json:"lo_s"`
		HiS   float64 `json:"hi_s"`
	} `json:"fisher_ci"`
	CompareIndependent []struct {
		R1       float64 `json:"r1"`
		N1       int     `json:"n1"`
		R2       float64 `json:"r2"`
		N2       int     `json:"n2"`
		Spearman bool
		Z, P     float64
	} `json:"compare_independent"`
	CompareDependent []struct {
		Rjk, Rjh, Rkh float64
		N             int
		Z, P          float64
	} `json:"compare_dependent"`
}

func loadRef(tb testing.TB) *refFile {
	tb.Helper()
	b, err := os.ReadFile(filepath.Join(testdataDir, "ref.json"))
	if err != nil {
		tb.Fatal(err)
	}
	var ref refFile
	if err := json.Unmarshal(b, &ref); err != nil {
		tb.Fatalf("ref.json: %v", err)
	}
	if ref.Scipy == "" || ref.Numpy == "" || len(ref.Corr) == 0 {
		tb.Fatal("ref.json: missing versions or cases")
	}
	return &ref
}

// nan turns JSON null into NaN.
func nan(v []*float64) []float64 {
	out := make([]float64, len(v))
	for i, p := range v {
		if p == nil {
			out[i] = math.NaN()
		} else {
			out[i] = *p
		}
	}
	return out
}
