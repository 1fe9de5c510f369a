package analysis

import (
	"bytes"
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"amplink/core/data"
	"amplink/core/internal/synth"
	"amplink/core/recipe"
	"amplink/core/report"
	"amplink/core/stats"
)

// blockTrials makes epochs (200 Hz, −0.6 to 1.4 s) in which the amplitude of
// a 20 Hz burst on S before 0 s drives the amplitude of a 6 Hz burst on T in
// 0.2–0.5 s only (log amplitudes correlate at 0.85). T also carries a 6 Hz
// burst of independent amplitude in 0.75–1.05 s, U a 6 Hz burst of
// independent amplitude in 0.2–0.5 s, and N is noise only.
func blockTrials(trials int, seed uint64) *data.Epochs { return synth.Blocks(trials, seed) }

const blockRecipe = `{"figures": false,
  "spectral": {"low": 2, "high": 30, "steps": 15, "spacing": "linear", "cycles": [3, 6]},
  "analyses": [
    {"id": "m", "type": "tf-map",
     "seed":   {"channel": "S", "time": [-0.4, -0.1], "freq": [18, 22]},
     "target": {"channel": ["T", "U", "N"], "time": [-0.2, 1.1], "freq": [4, 14]},
     "permutations": 199, "randomSeed": 5, "correction": "cluster", "timeStep": 0.04}
  ]
}`

// tfRows returns the rows of analysis id.
func tfRows(res *report.Results, id string) []report.Row {
	var out []report.Row
	for _, r := range res.Rows {
		if r.Analysis == id {
			out = append(out, r)
		}
	}
	return out
}

func mapNamed(t *testing.T, res *report.Results, name string) report.Map {
	t.Helper()
	for _, m := range res.Maps {
		if m.Name == name {
			return m
		}
	}
	t.Fatalf("no map %s", name)
	return report.Map{}
}

func labelIndex(t *testing.T, labels []string, v float64) int {
	t.Helper()
	for i, l := range labels {
		if l == report.Num(v) {
			return i
		}
	}
	t.Fatalf("no label %v in %v", v, labels)
	return -1
}

// A planted block of coupled pixels is found by the cluster test, and
// nothing else is (Maris & Oostenveld 2007: the cluster p controls the
// family-wise error over clusters; common practice).
func TestTFMapFindsPlantedBlock(t *testing.T) {
	res := runSynth(t, blockRecipe, blockTrials(60, 2))
	var sig []report.Row
	labels := map[string]bool{}
	for _, r := range tfRows(res, "m") {
		if c := field(r, "cluster"); c != "" {
			if labels[c] {
				t.Errorf("cluster label %s used twice", c)
			}
			labels[c] = true
		}
		if r.P <= 0.05 {
			sig = append(sig, r)
		}
	}
	if len(sig) != 1 {
		t.Fatalf("%d significant clusters, want exactly 1 (the planted block): %+v", len(sig), sig)
	}
	c := sig[0]
	num := func(name string) float64 {
		v, err := parseF(field(c, name))
		if err != nil {
			t.Fatalf("%s = %q: %v", name, field(c, name), err)
		}
		return v
	}
	if c.Target != "T" || field(c, "sign") != "positive" || field(c, "p_method") != "cluster" {
		t.Errorf("significant cluster on %s, sign %s, p_method %s; want T, positive, cluster", c.Target, field(c, "sign"), field(c, "p_method"))
	}
	// All 199 shuffles fall short of a strong planted block: p = 1/200 (Phipson & Smyth 2010).
	if c.P != 1.0/200 {
		t.Errorf("planted cluster p = %v, want 1/200", c.P)
	}
	// The block is 6 Hz × 0.2–0.5 s; the 6 Hz wavelet (σt ≈ 0.09 s) and the
	// short burst's bandwidth smear it by about 0.15 s and a few Hz.
	if from, to := num("target_from_s"), num("target_to_s"); from > 0.2 || to < 0.48 || from < 0 || to > 0.7 {
		t.Errorf("cluster spans %g–%g s, want it to cover 0.2–0.48 s and stay within 0–0.7 s", from, to)
	}
	if low, high := num("target_low_hz"), num("target_high_hz"); low > 6 || high < 6 {
		t.Errorf("cluster spans %g–%g Hz, want it to cover 6 Hz", low, high)
	}
	if c.R < 0.4 || num("mass") <= 0 || num("size") < 20 {
		t.Errorf("cluster mean r %.3f, mass %s, size %s", c.R, field(c, "mass"), field(c, "size"))
	}
	if field(c, "note") != clusterNote {
		t.Errorf("note %q", field(c, "note"))
	}
	// The labels map marks every 6 Hz pixel of 0.2–0.48 s with the cluster.
	lm := mapNamed(t, res, "m_T_clusters")
	row := labelIndex(t, lm.RowLabels, 6)
	id, _ := parseF(field(c, "cluster"))
	for j, l := range lm.ColLabels {
		tt, _ := parseF(l)
		if tt >= 0.2 && tt <= 0.48 && lm.Values[row][j] != id {
			t.Errorf("6 Hz at %s s has label %v, want %v", l, lm.Values[row][j], id)
		}
	}
	if lm.RowName != "freq_hz" || lm.ColName != "time_s" || len(lm.RowLabels) != 6 || len(lm.ColLabels) != 33 {
		t.Errorf("labels map %s × %s, %d × %d; want freq_hz × time_s, 6 × 33", lm.RowName, lm.ColName, len(lm.RowLabels), len(lm.ColLabels))
	}
	for _, name := range []string{"m_T_r", "m_T_p", "m_U_r", "m_U_p", "m_U_clusters", "m_N_r", "m_N_p", "m_N_clusters"} {
		mapNamed(t, res, name)
	}
}

// smoothPixels returns trials × pixels of exp(3×3-smoothed white noise), a
// cheap stand-in for power maps with correlated neighbours, pixel-major.
func smoothPixels(rng *rand.Rand, n, rows, cols int) []float64 {
	out := make([]float64, rows*cols*n)
	w := make([]float64, rows*cols)
	for t := range n {
		for i := range w {
			w[i] = rng.NormFloat64()
		}
		for i := range rows {
			for j := range cols {
				s, k := 0.0, 0.0
				for di := -1; di <= 1; di++ {
					for dj := -1; dj <= 1; dj++ {
						if a, b := i+di, j+dj; a >= 0 && a < rows && b >= 0 && b < cols {
							s += w[a*cols+b]
							k++
						}
					}
				}
				out[(i*cols+j)*n+t] = math.Exp(s / math.Sqrt(k))
			}
		}
	}
	return out
}

// Under the null the family-wise false-alarm rate is close to α: the
// fraction of null datasets with any cluster p ≤ 0.05 (the maximum taken over
// three maps) lies in [0.01, 0.10] (Maris & Oostenveld 2007; the binomial
// s.d. over 200 datasets is 0.015).
func TestTFMapNullFalseAlarmRate(t *testing.T) {
	const datasets, n, rows, cols, maps = 200, 20, 4, 6, 3
	rng := rand.New(rand.NewPCG(99, 1))
	for _, spearman := range []bool{true, false} {
		t.Run(strconv.FormatBool(spearman), func(t *testing.T) {
			alarms := 0
			for d := range datasets {
				seed := make([]float64, n)
				for i := range seed {
					seed[i] = math.Exp(rng.NormFloat64())
				}
				var pix [][]float64
				for range maps {
					pix = append(pix, smoothPixels(rng, n, rows, cols))
				}
				s := newTFStats(seed, pix, rows, cols, spearman)
				cl, err := s.clusterTest(context.Background(), 0.05, 99, uint64(d+1))
				if err != nil {
					t.Fatal(err)
				}
				for _, p := range cl.p {
					if p <= 0.05 {
						alarms++
						break
					}
				}
			}
			rate := float64(alarms) / datasets
			t.Logf("false-alarm rate %.3f", rate)
			if rate < 0.01 || rate > 0.10 {
				t.Errorf("false-alarm rate %.3f over %d null datasets, want within [0.01, 0.10] around α = 0.05", rate, datasets)
			}
		})
	}
}

type clusterRef struct {
	Method        string
	N, Rows, Cols int
	Alpha, Tcrit  float64
	Seed          []float64
	Pixels        [][]float64
	R, P, T       [][]*float64
	Clusters      []struct {
		Sign   int
		Pixels [][2]int
		Sum    float64
	}
}

// The observed stage of the cluster test equals scipy: per-pixel
// spearmanr/pearsonr r and p, t, the critical t (scipy.stats.t.ppf) and the
// 4-connected clusters of scipy.ndimage.label with their Σt (scipy 1.10.1,
// numpy 1.24.2; testdata/tfmap/make_ref.py).
func TestTFMapStatsMatchScipy(t *testing.T) {
	b, err := os.ReadFile("../../testdata/tfmap/ref.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct{ Clusters []clusterRef }
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	for _, c := range ref.Clusters {
		t.Run(c.Method, func(t *testing.T) {
			var flat []float64
			for _, px := range c.Pixels {
				flat = append(flat, px...)
			}
			s := newTFStats(c.Seed, [][]float64{flat}, c.Rows, c.Cols, c.Method == "spearman")
			cl, err := s.clusterTest(context.Background(), c.Alpha, 0, 1)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(cl.tcrit-c.Tcrit) > 1e-10 {
				t.Errorf("critical t %.15g, scipy %.15g", cl.tcrit, c.Tcrit)
			}
			df := float64(c.N - 2)
			for i := range c.Rows {
				for j := range c.Cols {
					px := i*c.Cols + j
					r, tt := s.r[0][px], cl.t[0][px]
					if c.R[i][j] == nil {
						if !math.IsNaN(r) || !math.IsNaN(tt) {
							t.Errorf("pixel %d,%d: r %v t %v, scipy undefined", i, j, r, tt)
						}
						continue
					}
					if math.Abs(r-*c.R[i][j]) > 1e-12 {
						t.Errorf("pixel %d,%d: r %.15g, scipy %.15g", i, j, r, *c.R[i][j])
					}
					if p := stats.PValueT(r, df); math.Abs(p-*c.P[i][j]) > 1e-9*math.Max(*c.P[i][j], 1e-6) {
						t.Errorf("pixel %d,%d: p %.15g, scipy %.15g", i, j, p, *c.P[i][j])
					}
					if math.Abs(tt-*c.T[i][j]) > 1e-9*math.Max(1, math.Abs(*c.T[i][j])) {
						t.Errorf("pixel %d,%d: t %.15g, scipy %.15g", i, j, tt, *c.T[i][j])
					}
				}
			}
			if len(cl.sums) != len(c.Clusters) {
				t.Fatalf("%d clusters, scipy %d", len(cl.sums), len(c.Clusters))
			}
			used := map[int]bool{}
			best := 0.0
			for _, rc := range c.Clusters {
				k := cl.labels[0][rc.Pixels[0][0]][rc.Pixels[0][1]]
				if k == 0 || used[k] {
					t.Fatalf("scipy cluster at %v has label %d", rc.Pixels[0], k)
				}
				used[k] = true
				size := 0
				for _, row := range cl.labels[0] {
					for _, v := range row {
						if v == k {
							size++
						}
					}
				}
				for _, px := range rc.Pixels {
					if cl.labels[0][px[0]][px[1]] != k {
						t.Errorf("pixel %v: label %d, want %d with the rest of its scipy cluster", px, cl.labels[0][px[0]][px[1]], k)
					}
				}
				if size != len(rc.Pixels) {
					t.Errorf("cluster %d has %d pixels, scipy %d", k, size, len(rc.Pixels))
				}
				if got := cl.sums[k-1]; math.Abs(got-rc.Sum) > 1e-9*math.Abs(rc.Sum) || (got > 0) != (rc.Sign > 0) {
					t.Errorf("cluster %d mass %.12g, scipy %.12g (sign %d)", k, got, rc.Sum, rc.Sign)
				}
				best = math.Max(best, math.Abs(rc.Sum))
			}
			// The allocation-free search of the permutation loop agrees.
			if got := newClusterScratch(c.Rows, c.Cols).maxAbsSum(cl.t[0], cl.tcrit); math.Abs(got-best) > 1e-9*best {
				t.Errorf("max |mass| %.12g, scipy %.12g", got, best)
			}
		})
	}
}

// The permutation loop's cluster search equals stats.MaxAbsClusterSum on
// random maps with NaN pixels.
func TestClusterScratchMatchesStats(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 3))
	for _, sh := range [][2]int{{1, 1}, {1, 9}, {7, 1}, {5, 8}, {12, 30}} {
		t.Run(fmt.Sprintf("%dx%d", sh[0], sh[1]), func(t *testing.T) {
			sc := newClusterScratch(sh[0], sh[1])
			for trial := range 50 {
				v := make([]float64, sh[0]*sh[1])
				for i := range v {
					v[i] = 2 * rng.NormFloat64()
					if rng.IntN(20) == 0 {
						v[i] = math.NaN()
					}
				}
				grid := make([][]float64, sh[0])
				for i := range grid {
					grid[i] = v[i*sh[1] : (i+1)*sh[1]]
				}
				thr := rng.Float64() * 2
				want := stats.MaxAbsClusterSum(grid, thr)
				if got := sc.maxAbsSum(v, thr); math.Abs(got-want) > 1e-12*math.Max(1, want) {
					t.Errorf("map %d: %.15g, stats.MaxAbsClusterSum %.15g", trial, got, want)
				}
			}
		})
	}
}

// Identical seed and target windows give r = 1 exactly (common practice): the
// map pixel at the seed's own channel, time and frequency is the one-pixel
// seed window.
func TestTFMapIdenticalWindow(t *testing.T) {
	e := synthTrials(30, 0.6, 6)
	for _, method := range []string{"spearman", "pearson"} {
		t.Run(method, func(t *testing.T) {
			res := runSynth(t, `{"spectral": {"low": 4, "high": 40, "steps": 19, "spacing": "linear", "cycles": [3, 8]},
  "analyses": [{"id": "id", "type": "tf-map", "method": "`+method+`",
    "seed":   {"channel": "A", "time": [-0.3, -0.3], "freq": [20, 20]},
    "target": {"channel": ["B", "A"], "time": [-0.4, 0.2], "freq": [16, 24]}}]}`, e)
			m := mapNamed(t, res, "id_A_r")
			i, j := labelIndex(t, m.RowLabels, 20), labelIndex(t, m.ColLabels, -0.3)
			r := m.Values[i][j]
			// Spearman ranks the two (equal to rounding) vectors identically: exactly 1.
			if method == "spearman" && r != 1 || math.Abs(r-1) > 1e-12 {
				t.Errorf("r at the seed pixel = %.17g, want 1", r)
			}
			for ii, row := range m.Values {
				for jj, v := range row {
					if (ii != i || jj != j) && v > 0.999999 {
						t.Errorf("r = %v at %s Hz, %s s, away from the seed pixel", v, m.RowLabels[ii], m.ColLabels[jj])
					}
				}
			}
			peak := rowFor(t, res, "id", "A", "A")
			if peak.R != r || field(peak, "target_from_s") != "-0.3" || field(peak, "target_low_hz") != "20" || peak.P != 0 {
				t.Errorf("peak row r %v p %v at %s s, %s Hz; want the seed pixel", peak.R, peak.P, field(peak, "target_from_s"), field(peak, "target_low_hz"))
			}
			if b := rowFor(t, res, "id", "A", "B"); b.R >= 0.999 {
				t.Errorf("another channel peaks at r = %v", b.R)
			}
		})
	}
}

const tfSmallRecipe = `{"figures": false, "spectral": {"low": 4, "high": 30, "steps": 6, "cycles": [3, 6]},
  "analyses": [
    {"id": "f", "type": "tf-map", "correction": "fdr", "timeStep": 0.1,
     "seed": {"channel": "A", "time": [-0.5, -0.1], "freq": [16, 24]},
     "target": {"channel": ["B", "D"], "time": [0.2, 0.8], "freq": [5, 12]}},
    {"id": "c", "type": "tf-map", "correction": "cluster", "permutations": 99, "randomSeed": 4, "timeStep": 0.1,
     "seed": {"channel": "A", "time": [-0.5, -0.1], "freq": [16, 24]},
     "target": {"channel": ["B", "D"], "time": [0.2, 0.8], "freq": [5, 12]}}
  ]}`

func writeAll(res *report.Results) []byte { return synth.Tables(res) }

// Same recipe and data give byte-identical results and maps, whatever the
// number of goroutines, and the shared target maps are computed once.
func TestTFMapDeterministic(t *testing.T) {
	e := synthTrials(25, 0.8, 3)
	r, err := recipe.Parse([]byte(tfSmallRecipe))
	if err != nil {
		t.Fatal(err)
	}
	ds := &Dataset{Name: "synth", Epochs: e}
	var outs [][]byte
	for _, w := range []int{1, 2, 3} {
		p, err := NewPlan(r, ds)
		if err != nil {
			t.Fatal(err)
		}
		if got := len(p.Units()); got != 3 {
			t.Errorf("%d units, want 3 (one seed window, two shared target maps)", got)
		}
		ur, err := p.ComputeAll(context.Background(), w, nil)
		if err != nil {
			t.Fatal(err)
		}
		res, err := p.Finish(context.Background(), ur)
		if err != nil {
			t.Fatal(err)
		}
		outs = append(outs, writeAll(res))
	}
	if !bytes.Equal(outs[0], outs[1]) || !bytes.Equal(outs[0], outs[2]) {
		t.Error("results differ across runs and worker counts")
	}
	// A different randomSeed draws different shuffles (the null changes).
	rng := rand.New(rand.NewPCG(1, 2))
	seed := make([]float64, 20)
	for i := range seed {
		seed[i] = rng.NormFloat64()
	}
	s := newTFStats(seed, [][]float64{smoothPixels(rng, 20, 3, 4)}, 3, 4, true)
	a, _ := s.clusterTest(context.Background(), 0.5, 50, 1)
	a2, _ := s.clusterTest(context.Background(), 0.5, 50, 1)
	b, _ := s.clusterTest(context.Background(), 0.5, 50, 2)
	if !slices.Equal(a.null, a2.null) || !slices.Equal(a.p, a2.p) {
		t.Error("the same randomSeed gave different nulls")
	}
	if slices.Equal(a.null, b.null) {
		t.Error("randomSeed 1 and 2 gave the same null")
	}
}

var updateTFMap = flag.Bool("update-tfmap", false, "rewrite testdata/tfmap/small.golden")

// The results table and maps of a small run match testdata/tfmap/small.golden;
// a mismatch writes small.golden.got next to it (go test -update-tfmap
// rewrites it).
func TestTFMapGolden(t *testing.T) {
	res := runSynth(t, tfSmallRecipe, synthTrials(25, 0.8, 3))
	got := writeAll(res)
	path := filepath.Join("..", "..", "testdata", "tfmap", "small.golden")
	if *updateTFMap {
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test -update-tfmap to create it)", err)
	}
	if !bytes.Equal(got, want) {
		if err := os.WriteFile(path+".got", got, 0o644); err != nil {
			t.Fatal(err)
		}
		t.Errorf("output differs from %s; wrote %s.got", path, path)
	}
}

func TestTFMapErrors(t *testing.T) {
	e := synthTrials(10, 0.5, 2)
	const seed = `"seed":{"channel":"A","time":[-0.5,-0.1],"freq":[16,24]}`
	const target = `"target":{"channel":"B","time":[0,0.5],"freq":[5,7]}`
	tests := []struct{ name, recipe, want string }{
		{"cluster without permutations", `{"analyses":[{"type":"tf-map","correction":"cluster",` + seed + `,` + target + `}]}`,
			`analyses[0].permutations: the cluster test needs trial shuffles: set permutations (for example 1000), not 0`},
		{"two seeds", `{"analyses":[{"type":"tf-map","seed":{"channel":["A","C"],"time":[-0.5,-0.1],"freq":[16,24]},` + target + `}]}`,
			`analyses[0].seed.channel: a tf-map takes one seed channel, not 2; use one analysis per seed`},
		{"all seeds", `{"analyses":[{"type":"tf-map","seed":{"channel":"*","time":[-0.5,-0.1],"freq":[16,24]},` + target + `}]}`,
			`analyses[0].seed.channel: a tf-map takes one seed channel, not 4; use one analysis per seed`},
		{"unknown target", `{"analyses":[{"type":"tf-map",` + seed + `,"target":{"channel":["B","Q"],"time":[0,0.5],"freq":[5,7]}}]}`,
			`analyses[0].target.channel[1]: no channel "Q"; channels are: A, B, C, D`},
		{"repeated target", `{"analyses":[{"type":"tf-map",` + seed + `,"target":{"channel":["B","C","b"],"time":[0,0.5],"freq":[5,7]}}]}`,
			`analyses[0].target.channel[2]: "B" is listed twice (it names output maps)`},
		{"target outside epoch", `{"analyses":[{"type":"tf-map",` + seed + `,"target":{"channel":"B","time":[0,3],"freq":[5,7]}}]}`,
			`analyses[0].target.time: [0, 3] s lies outside the epoch (-1 to 1.5 s)`},
		{"no grid freq", `{"spectral":{"low":3,"high":40,"steps":10},"analyses":[{"type":"tf-map",` + seed + `,"target":{"channel":"B","time":[0,0.5],"freq":[5.5,6.5]}}]}`,
			`analyses[0].target.freq: no grid frequency lies in [5.5, 6.5] Hz (grid 3–40 Hz)`},
		{"covariates", `{"analyses":[{"type":"tf-map","covariates":["rt"],` + seed + `,` + target + `}]}`,
			`analyses[0].covariates: are not available for tf-map analyses; a trial-window analysis gives partial correlations`},
		{"conditions", `{"analyses":[{"type":"tf-map","conditions":{"compare":["a","b"]},` + seed + `,` + target + `}]}`,
			`analyses[0].conditions: are not available for tf-map analyses; a trial-window analysis compares conditions`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r, err := recipe.Parse([]byte(tc.recipe))
			if err != nil {
				t.Fatal(err)
			}
			_, err = NewPlan(r, &Dataset{Name: "synth", Epochs: e})
			if err == nil || err.Error() != tc.want {
				t.Errorf("error %v\nwant  %s", err, tc.want)
			}
		})
	}
	t.Run("too few trials", func(t *testing.T) {
		r, _ := recipe.Parse([]byte(`{"analyses":[{"type":"tf-map",` + seed + `,` + target + `}]}`))
		_, err := NewPlan(r, &Dataset{Name: "synth", Epochs: synthTrials(2, 0.5, 2)})
		if want := "analyses[0]: needs at least 3 trials to correlate, synth has 2"; err == nil || err.Error() != want {
			t.Errorf("error %v, want %s", err, want)
		}
	})
	t.Run("continuous", func(t *testing.T) {
		r, _ := recipe.Parse([]byte(`{"analyses":[{"type":"tf-map",` + seed + `,` + target + `}]}`))
		rec := &data.Recording{Name: "rec", Rate: 250, Channels: []data.Channel{{Name: "A"}}, Samples: [][]float32{make([]float32, 1000)}}
		_, err := NewPlan(r, &Dataset{Name: "rec", Recording: rec})
		if err == nil || !strings.HasPrefix(err.Error(), `analyses[0]: tf-map analyses need trials, but rec is continuous`) {
			t.Errorf("error %v", err)
		}
	})
	t.Run("map too large", func(t *testing.T) {
		r, _ := recipe.Parse([]byte(`{"spectral":{"low":3,"high":40,"steps":400,"spacing":"linear"},"analyses":[{"type":"tf-map","timeStep":0.001,` + seed +
			`,"target":{"channel":"*","time":[-1,1.5],"freq":[3,40]}}]}`))
		p, err := NewPlan(r, &Dataset{Name: "synth", Epochs: synthTrials(70, 0.5, 2)})
		want := "analyses[0].timeStep: 4 channels × 400×626 pixels × 70 trials need 534 MB; raise timeStep, narrow target.time or target.freq, or select fewer target channels"
		if err == nil || err.Error() != want {
			t.Errorf("error %v\nwant  %s (plan %v)", err, want, p != nil)
		}
	})
	t.Run("warnings", func(t *testing.T) {
		r, _ := recipe.Parse([]byte(`{"analyses":[{"type":"tf-map","timeStep":0.001,"permutations":10,` + seed + `,` + target + `}]}`))
		p, err := NewPlan(r, &Dataset{Name: "synth", Epochs: e})
		if err != nil {
			t.Fatal(err)
		}
		w := strings.Join(p.Warnings(), "\n")
		for _, s := range []string{
			`analyses[0].permutations: a tf-map uses permutations only with correction "cluster"; they are ignored here`,
			`analyses[0].timeStep: 0.001 s is less than one sample at 250 Hz; the map takes every sample`,
		} {
			if !strings.Contains(w, s) {
				t.Errorf("warnings %q lack %q", w, s)
			}
		}
	})
}

// The permutation loop allocates nothing per shuffle (gonum's Gemm makes a
// few small allocations per batch of permBatch shuffles), and it stops on a
// cancelled context.
func TestTFMapClusterLoop(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	seed := make([]float64, 40)
	for i := range seed {
		seed[i] = rng.NormFloat64()
	}
	s := newTFStats(seed, [][]float64{smoothPixels(rng, 40, 10, 20), smoothPixels(rng, 40, 10, 20)}, 10, 20, true)
	allocs := func(perms int) float64 {
		return testing.AllocsPerRun(2, func() {
			if _, err := s.clusterTest(context.Background(), 0.05, perms, 1); err != nil {
				t.Fatal(err)
			}
		})
	}
	if few, many := allocs(permBatch), allocs(11*permBatch); many-few >= 10*permBatch {
		t.Errorf("%v allocations for %d shuffles, %v for %d: at least one per shuffle", few, permBatch, many, 11*permBatch)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := s.clusterTest(ctx, 0.05, 100, 1); err == nil {
		t.Error("a cancelled context gave no error")
	}
}
