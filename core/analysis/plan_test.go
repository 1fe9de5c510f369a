package analysis

import (
	"context"
	"math"
	"math/cmplx"
	"strconv"
	"strings"
	"testing"

	"amplink/core/data"
	"amplink/core/internal/synth"
	"amplink/core/recipe"
	"amplink/core/report"
	"amplink/core/spectral"
)

// synthTrials and confounded are synth.Trials and synth.Confounded.
func synthTrials(trials int, rho float64, seed uint64) *data.Epochs {
	return synth.Trials(trials, rho, seed)
}

func confounded(trials int) *data.Epochs { return synth.Confounded(trials) }

const synthRecipe = `{
  "spectral": {"low": 3, "high": 40, "steps": 24, "cycles": [3, 8]},
  "analyses": [
    {"id": "tw", "type": "trial-window",
     "seed":   {"channel": "A", "time": [-0.5, -0.1], "freq": [16, 24]},
     "target": {"channel": "*", "time": [0.3, 0.7], "freq": [5, 7]},
     "permutations": 499, "randomSeed": 3, "correction": "fdr"},
    {"id": "same", "type": "trial-window", "method": "pearson",
     "seed":   {"channel": ["A", "B"], "time": [-0.5, -0.1], "freq": [16, 24]},
     "target": {"channel": ["A", "B"], "time": [-0.5, -0.1], "freq": [16, 24]}}
  ]
}`

func runSynth(t *testing.T, rc string, e *data.Epochs) *report.Results {
	t.Helper()
	return runSynthDS(t, rc, &Dataset{Name: "synth", Epochs: e})
}

func parseF(s string) (float64, error) { return strconv.ParseFloat(s, 64) }

func runSynthDS(t *testing.T, rc string, ds *Dataset) *report.Results {
	t.Helper()
	r, err := recipe.Parse([]byte(rc))
	if err != nil {
		t.Fatal(err)
	}
	res, err := Run(context.Background(), r, ds, nil)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

func rowFor(t *testing.T, res *report.Results, analysis, seed, target string) report.Row {
	t.Helper()
	for _, r := range res.Rows {
		if r.Analysis == analysis && r.Seed == seed && r.Target == target {
			return r
		}
	}
	t.Fatalf("no row %s %s→%s", analysis, seed, target)
	return report.Row{}
}

func TestTrialWindowFindsPlantedCoupling(t *testing.T) {
	res := runSynth(t, synthRecipe, synthTrials(80, 0.8, 1))
	// Common practice: a planted cross-trial coupling is found, and an absent
	// one is not.
	ab := rowFor(t, res, "tw", "A", "B")
	if ab.R < 0.5 || ab.P > 1e-4 {
		t.Errorf("planted A→B: r = %.3f, p = %.2g; want r > 0.5, p < 1e-4", ab.R, ab.P)
	}
	if pp := field(ab, "p_perm"); pp != report.Num(1.0/500) {
		t.Errorf("planted A→B: p_perm = %s, want the floor 1/500", pp)
	}
	for _, target := range []string{"C", "D"} {
		r := rowFor(t, res, "tw", "A", target)
		if math.Abs(r.R) > 0.3 || r.P < 0.01 {
			t.Errorf("absent A→%s: r = %.3f, p = %.3g; want |r| < 0.3 and p > 0.01", target, r.R, r.P)
		}
	}
	if len(res.Rows) != 4+4 {
		t.Errorf("%d rows, want 4 (tw) + 4 (same)", len(res.Rows))
	}
	// Common practice: identical seed and target windows give r = 1 exactly.
	for _, ch := range []string{"A", "B"} {
		if r := rowFor(t, res, "same", ch, ch); r.R != 1 {
			t.Errorf("identical windows on %s: r = %v, want exactly 1", ch, r.R)
		}
	}
	// FDR q is at least p and present on every row of the corrected analysis.
	for _, r := range res.Rows {
		if r.Analysis == "tw" && field(r, "q") == "" {
			t.Errorf("row %s→%s has no q", r.Seed, r.Target)
		}
	}
}

// The window power equals a direct time-domain evaluation of the definition:
// the mean over band frequencies and window samples of |Σ x[k] w[n−k+H]|².
func TestWindowPowerMatchesDefinition(t *testing.T) {
	e := synthTrials(5, 0.5, 9)
	r, err := recipe.Parse([]byte(synthRecipe))
	if err != nil {
		t.Fatal(err)
	}
	p, err := NewPlan(r, &Dataset{Name: "synth", Epochs: e})
	if err != nil {
		t.Fatal(err)
	}
	u := p.units[0]
	res, err := p.Compute(context.Background(), 0)
	if err != nil {
		t.Fatal(err)
	}
	sp := u.spans[0]
	for tr := range e.NTrials {
		x := e.Trial(tr, u.ch)
		sum := 0.0
		for _, fi := range sp.Freqs {
			w := spectral.Kernel(nil, e.Rate, p.freqs[fi], p.cycles[fi])
			h := (len(w) - 1) / 2
			for n := sp.From; n < sp.To; n++ {
				var y complex128
				for k := range x {
					if j := n - k + h; j >= 0 && j < len(w) {
						y += complex(float64(x[k]), 0) * w[j]
					}
				}
				sum += real(y * cmplx.Conj(y))
			}
		}
		want := sum / float64(len(sp.Freqs)*(sp.To-sp.From))
		if got := res.Values[tr]; math.Abs(got-want) > 1e-9*want {
			t.Errorf("trial %d: window power %.12g, direct %.12g", tr, got, want)
		}
	}
}

func TestPlanErrors(t *testing.T) {
	e := synthTrials(10, 0.5, 2)
	tests := []struct{ name, recipe, want string }{
		{"unknown channel", `{"analyses":[{"type":"trial-window","seed":{"channel":"Q","time":[0,0.5],"freq":[5,7]},"target":{"channel":"A","time":[0,0.5],"freq":[5,7]}}]}`,
			`analyses[0].seed.channel: no channel "Q"; channels are: A, B, C, D`},
		{"unknown in list", `{"analyses":[{"type":"trial-window","seed":{"channel":"A","time":[0,0.5],"freq":[5,7]},"target":{"channel":["A","Z"],"time":[0,0.5],"freq":[5,7]}}]}`,
			`analyses[0].target.channel[1]: no channel "Z"`},
		{"outside epoch", `{"analyses":[{"type":"trial-window","seed":{"channel":"A","time":[-2,0],"freq":[5,7]},"target":{"channel":"A","time":[0,0.5],"freq":[5,7]}}]}`,
			"analyses[0].seed.time: [-2, 0] s lies outside the epoch (-1 to 1.5 s)"},
		{"no grid freq", `{"spectral":{"low":3,"high":40,"steps":10},"analyses":[{"type":"trial-window","seed":{"channel":"A","time":[0,0.5],"freq":[41,45]},"target":{"channel":"A","time":[0,0.5],"freq":[5,7]}}]}`,
			"analyses[0].seed.freq: no grid frequency lies in [41, 45] Hz (grid 3–40 Hz)"},
		{"above nyquist", `{"spectral":{"low":3,"high":125,"steps":10},"analyses":[{"type":"trial-window","seed":{"channel":"A","time":[0,0.5],"freq":[5,7]},"target":{"channel":"A","time":[0,0.5],"freq":[5,7]}}]}`,
			"spectral.high: 125 Hz is at or above the Nyquist frequency 125 Hz"},
		// 626-sample epochs at 250 Hz: 1e-6 Hz with 3 cycles needs ~4.8e8 taps.
		{"wavelet longer than the data", `{"spectral":{"low":1e-6,"high":40,"steps":10},"analyses":[{"type":"trial-window","seed":{"channel":"A","time":[0,0.5],"freq":[5,7]},"target":{"channel":"A","time":[0,0.5],"freq":[5,7]}}]}`,
			"spectral.low: the 1e-06 Hz wavelet with 3 cycles would be 9.55e+08 samples long (3.82e+06 s at 250 Hz), longer than the 626 samples of the data (synth)"},
		{"top wavelet longer than the data", `{"spectral":{"low":3,"high":40,"steps":10,"cycles":[3,100]},"analyses":[{"type":"trial-window","seed":{"channel":"A","time":[0,0.5],"freq":[5,7]},"target":{"channel":"A","time":[0,0.5],"freq":[5,7]}}]}`,
			"spectral.cycles: the 22.49 Hz wavelet with 45.9 cycles would be 651 samples long (2.6 s at 250 Hz), longer than the 626 samples"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r, err := recipe.Parse([]byte(tc.recipe))
			if err != nil {
				t.Fatal(err)
			}
			_, err = NewPlan(r, &Dataset{Name: "synth", Epochs: e})
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want %q", err, tc.want)
			}
		})
	}
}

func TestEdgeWarning(t *testing.T) {
	e := synthTrials(10, 0.5, 2)
	r, err := recipe.Parse([]byte(`{"spectral":{"low":3,"high":40,"steps":10},"analyses":[{"type":"trial-window","seed":{"channel":"A","time":[-1,-0.8],"freq":[3,4]},"target":{"channel":"A","time":[0,0.5],"freq":[5,7]}}]}`))
	if err != nil {
		t.Fatal(err)
	}
	p, err := NewPlan(r, &Dataset{Name: "synth", Epochs: e})
	if err != nil {
		t.Fatal(err)
	}
	w := strings.Join(p.Warnings(), "\n")
	if !strings.Contains(w, "analyses[0].seed: the 3 Hz wavelet") || !strings.Contains(w, "runs past the epoch edge") {
		t.Errorf("warnings %q lack the edge warning for the seed", w)
	}
	if strings.Contains(w, "analyses[0].target") {
		t.Errorf("target window well inside the epoch was warned about: %q", w)
	}
}

// The same recipe and data give identical results, whatever the number of
// goroutines (determinism).
func TestDeterministicAcrossWorkers(t *testing.T) {
	e := synthTrials(40, 0.6, 4)
	r, _ := recipe.Parse([]byte(synthRecipe))
	ds := &Dataset{Name: "synth", Epochs: e}
	var outs []string
	for _, w := range []int{1, 2, 5} {
		p, err := NewPlan(r, ds)
		if err != nil {
			t.Fatal(err)
		}
		ur, err := p.ComputeAll(context.Background(), w, nil)
		if err != nil {
			t.Fatal(err)
		}
		res, err := p.Finish(context.Background(), ur)
		if err != nil {
			t.Fatal(err)
		}
		var b strings.Builder
		report.WriteCSV(&b, res)
		outs = append(outs, b.String())
	}
	if outs[0] != outs[1] || outs[0] != outs[2] {
		t.Errorf("results differ across worker counts")
	}
}

func TestCancel(t *testing.T) {
	e := synthTrials(40, 0.6, 4)
	r, _ := recipe.Parse([]byte(synthRecipe))
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Run(ctx, r, &Dataset{Name: "synth", Epochs: e}, nil); err == nil {
		t.Error("a cancelled run returned no error")
	}
}

func TestCovariatesAndConditions(t *testing.T) {
	e := confounded(120)
	res := runSynth(t, `{
  "spectral": {"low": 3, "high": 40, "steps": 24, "cycles": [3, 8]},
  "analyses": [
    {"id": "plain", "type": "trial-window", "seed": {"channel": "A", "time": [-0.5, -0.1], "freq": [16, 24]},
     "target": {"channel": "B", "time": [0.3, 0.7], "freq": [5, 7]}},
    {"id": "partial", "type": "trial-window", "covariates": ["arousal", "trial"], "permutations": 199,
     "seed": {"channel": "A", "time": [-0.5, -0.1], "freq": [16, 24]},
     "target": {"channel": "B", "time": [0.3, 0.7], "freq": [5, 7]}},
    {"id": "cond", "type": "trial-window", "conditions": {"column": "trial_type", "compare": ["hit", "miss"]}, "permutations": 199,
     "seed": {"channel": "A", "time": [-0.5, -0.1], "freq": [16, 24]},
     "target": {"channel": "C", "time": [0.3, 0.7], "freq": [5, 7]}}
  ]
}`, e)
	plain := rowFor(t, res, "plain", "A", "B")
	partial := rowFor(t, res, "partial", "A", "B")
	// Common practice: a shared driver makes seed and target correlate; the
	// partial correlation on the driver removes it.
	if plain.R < 0.4 {
		t.Errorf("confounded plain r = %.3f, want > 0.4", plain.R)
	}
	if math.Abs(partial.R) > 0.2 {
		t.Errorf("partial r = %.3f, want near 0", partial.R)
	}
	// 12 of 120 trials lack the covariate; df = n − 2 − k.
	if partial.N != 108 || field(partial, "df") != "104" || !strings.Contains(field(partial, "note"), "12 trials left out") {
		t.Errorf("partial n = %d, df = %s, note %q", partial.N, field(partial, "df"), field(partial, "note"))
	}
	var hit, miss, diff report.Row
	for _, r := range res.Rows {
		if r.Analysis == "cond" {
			switch field(r, "condition") {
			case "hit":
				hit = r
			case "miss":
				miss = r
			case "hit-miss":
				diff = r
			}
		}
	}
	if hit.N != 60 || miss.N != 60 {
		t.Fatalf("condition sizes %d, %d", hit.N, miss.N)
	}
	if hit.R < 0.6 || math.Abs(miss.R) > 0.3 {
		t.Errorf("r(hit) = %.3f, r(miss) = %.3f; want the coupling only in hit", hit.R, miss.R)
	}
	if diff.P > 0.01 || field(diff, "p_perm") != report.Num(1.0/200) {
		t.Errorf("difference p = %.3g, p_perm = %s", diff.P, field(diff, "p_perm"))
	}
}

func TestCovariateErrors(t *testing.T) {
	e := confounded(30)
	for _, tc := range []struct{ recipe, want string }{
		{`{"analyses":[{"type":"trial-window","covariates":["rt"],"seed":{"channel":"A","time":[0,0.5],"freq":[5,7]},"target":{"channel":"B","time":[0,0.5],"freq":[5,7]}}]}`,
			`analyses[0].covariates[0]: no per-trial column "rt"; columns are: arousal, trial, trial_type`},
		{`{"analyses":[{"type":"trial-window","conditions":{"compare":["hit","false-alarm"]},"seed":{"channel":"A","time":[0,0.5],"freq":[5,7]},"target":{"channel":"B","time":[0,0.5],"freq":[5,7]}}]}`,
			`analyses[0].conditions.compare[1]: no trial has trial_type = "false-alarm"; values are: "hit" (15), "miss" (15)`},
	} {
		r, err := recipe.Parse([]byte(tc.recipe))
		if err != nil {
			t.Fatal(err)
		}
		_, err = NewPlan(r, &Dataset{Name: "synth", Epochs: e})
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("error %v, want %q", err, tc.want)
		}
	}
}
