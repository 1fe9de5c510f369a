package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

// TestRunAgainstScipy checks the whole trial-window path (CSV reader, grid,
// wavelets, cropped FFT convolution, window means, Spearman, t p-value)
// against an independent implementation from the definitions: numpy 1.24.2 /
// scipy 1.10.1 (fftconvolve mode="same" on whole epochs, spearmanr), made by
// testdata/cli/make_ref.py from testdata/cli/small.csv.
func TestRunAgainstScipy(t *testing.T) {
	var ref struct {
		Rows []struct {
			Seed, Target string
			R, P         float64
			N            int
		}
	}
	b, err := os.ReadFile(filepath.Join("..", "..", "testdata", "cli", "small_ref.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	in := writeFixture(t, dir)
	rp := filepath.Join(dir, "r.json")
	os.WriteFile(rp, []byte(fixtureRecipe), 0o644)
	var stdout, stderr bytes.Buffer
	if err := run(&stdout, &stderr, []string{"run", "--recipe", rp, "--out", dir, in}); err != nil {
		t.Fatal(err)
	}
	f, _ := os.Open(filepath.Join(dir, "results.csv"))
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]int{}
	for i, c := range recs[0] {
		col[c] = i
	}
	if len(recs)-1 != len(ref.Rows) {
		t.Fatalf("%d rows, reference has %d", len(recs)-1, len(ref.Rows))
	}
	for i, want := range ref.Rows {
		got := recs[i+1]
		r, _ := strconv.ParseFloat(got[col["r"]], 64)
		p, _ := strconv.ParseFloat(got[col["p"]], 64)
		if got[col["seed"]] != want.Seed || got[col["target"]] != want.Target || got[col["n"]] != strconv.Itoa(want.N) {
			t.Errorf("row %d is %v, reference %+v", i, got[:6], want)
		}
		if math.Abs(r-want.R) > 1e-9 {
			t.Errorf("%s→%s: r = %.12f, scipy %.12f", want.Seed, want.Target, r, want.R)
		}
		if math.Abs(p-want.P) > 1e-9*math.Max(1, want.P) && math.Abs(p-want.P)/want.P > 1e-8 {
			t.Errorf("%s→%s: p = %.6g, scipy %.6g", want.Seed, want.Target, p, want.P)
		}
	}
}
