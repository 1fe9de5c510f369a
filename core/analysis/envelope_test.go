package analysis

import (
	"math"
	"strings"
	"testing"

	"amplink/core/data"
	"amplink/core/internal/synth"
	"amplink/core/recipe"
	"amplink/core/report"
	"amplink/core/stats"
)

// envRecording is synth.Envelopes: S, L (leakage of S), G (S's envelope,
// another phase), H (S's envelope at 40 Hz), N (noise) and F (flat).
func envRecording() *data.Recording { return synth.Envelopes() }

const envRecipe = `{
  "spectral": {"low": 4, "high": 48, "steps": 23, "cycles": [4, 8]},
  "analyses": [
    {"id": "plain", "type": "envelope", "channels": ["S", "L", "G", "N", "F"], "freq": [9, 11]},
    {"id": "orth", "type": "envelope", "channels": ["S", "L", "G", "N", "F"], "freq": [9, 11], "leakageCorrection": "pairwise", "surrogates": 99, "randomSeed": 2},
    {"id": "sym", "type": "envelope", "channels": ["S", "G", "N"], "freq": [9, 11], "leakageCorrection": "symmetric"},
    {"id": "cross", "type": "envelope", "channels": ["S", "H"], "freq": [9, 11], "targetFreq": [38, 42], "envelopeRate": 20},
    {"id": "como", "type": "comodulogram", "channels": ["S", "H"], "freq": [6, 14], "targetFreq": [30, 46]},
    {"id": "segs", "type": "envelope", "channels": ["S", "G"], "freq": [9, 11], "segment": 10}
  ]
}`

func TestEnvelopeFactsOfTheTrade(t *testing.T) {
	rec := envRecording()
	res := runSynthDS(t, envRecipe, &Dataset{Name: "env", Recording: rec})
	get := func(a, s, tg string) report.Row { return rowFor(t, res, a, s, tg) }
	// Common practice: pure zero-lag leakage gives a high plain AEC and an
	// orthogonalised AEC near 0.
	if r := get("plain", "S", "L").R; r < 0.8 {
		t.Errorf("plain AEC S–L (leakage) = %.3f, want > 0.8", r)
	}
	if r := get("orth", "S", "L").R; math.Abs(r) > 0.15 {
		t.Errorf("orthogonalised AEC S–L (leakage) = %.3f, want |r| < 0.15", r)
	}
	// Common practice: genuine envelope coupling with independent phase is
	// high in both forms.
	if r := get("plain", "S", "G").R; r < 0.8 {
		t.Errorf("plain AEC S–G = %.3f, want > 0.8", r)
	}
	if r := get("orth", "S", "G").R; r < 0.6 {
		t.Errorf("orthogonalised AEC S–G = %.3f, want > 0.6", r)
	}
	if r := get("sym", "S", "G").R; r < 0.6 {
		t.Errorf("symmetric-orthogonalised AEC S–G = %.3f, want > 0.6", r)
	}
	// Noise is not coupled; the surrogate p says so.
	if r := get("orth", "S", "N"); math.Abs(r.R) > 0.2 || field(r, "p_surr") == "" {
		t.Errorf("orthogonalised AEC S–N = %.3f (p_surr %q), want |r| < 0.2 with a surrogate p", r.R, field(r, "p_surr"))
	}
	if p := field(get("orth", "S", "G"), "p_surr"); p != report.Num(0.01) {
		t.Errorf("orthogonalised S–G surrogate p = %s, want the floor 1/100", p)
	}
	// A flat channel gives an undefined r with a note, not NaN arithmetic.
	f := get("plain", "S", "F")
	if !math.IsNaN(f.R) || !strings.Contains(field(f, "note"), "undefined") {
		t.Errorf("flat channel: r = %v, note %q", f.R, field(f, "note"))
	}
	// Common practice: the same envelope on 10 Hz and 40 Hz carriers gives an
	// envelope correlation near 1 while the raw signals hardly correlate.
	if r := get("cross", "S", "H").R; r < 0.9 {
		t.Errorf("cross-frequency AEC S(10 Hz)–H(40 Hz) = %.3f, want > 0.9", r)
	}
	x, y := make([]float64, rec.Len()), make([]float64, rec.Len())
	for i := range x {
		x[i], y[i] = float64(rec.Samples[0][i]), float64(rec.Samples[3][i])
	}
	if r := stats.Pearson(x, y); math.Abs(r) > 0.05 {
		t.Errorf("raw S–H correlation = %.3f, want near 0", r)
	}
	// The comodulogram peaks at the planted pair of frequencies.
	c := get("como", "S", "H")
	fa, _ := parseF(field(c, "band_low_hz"))
	fb, _ := parseF(field(c, "target_band_low_hz"))
	if math.Abs(fa-10) > 1.5 || math.Abs(fb-40) > 4 || c.R < 0.8 {
		t.Errorf("comodulogram peak r = %.3f at %g × %g Hz, want > 0.8 near 10 × 40 Hz", c.R, fa, fb)
	}
	// Segments give a time course.
	var tc *report.Map
	for i := range res.Maps {
		if res.Maps[i].Name == "segs_timecourse" {
			tc = &res.Maps[i]
		}
	}
	if tc == nil || len(tc.ColLabels) < 5 || len(tc.Values) != 1 {
		t.Fatalf("time course map missing or wrong: %+v", tc)
	}
	// Edge discard is reported.
	if v := field(get("plain", "S", "L"), "edge_discard_s"); v == "" || v == "0" {
		t.Errorf("edge_discard_s = %q", v)
	}
}

func TestEnvelopeErrors(t *testing.T) {
	rec := envRecording()
	dup := &data.Recording{Name: "dup", Rate: rec.Rate, Channels: []data.Channel{{Name: "A"}, {Name: "B"}, {Name: "C"}}}
	a, b := rec.Samples[0], rec.Samples[2]
	s := make([]float32, len(a))
	for i := range s {
		s[i] = a[i] + b[i]
	}
	dup.Samples = [][]float32{a, b, s}
	tests := []struct {
		name, recipe string
		ds           *Dataset
		want         string
	}{
		{"rank deficient", `{"spectral":{"low":4,"high":48,"steps":23},"analyses":[{"type":"envelope","channels":"*","freq":[9,11],"leakageCorrection":"symmetric"}]}`,
			&Dataset{Name: "dup", Recording: dup}, "analyses[0].leakageCorrection: the channels' band signals are linearly dependent"},
		{"no epochs", `{"spectral":{"low":4,"high":48,"steps":23},"analyses":[{"type":"envelope","channels":"*","freq":[9,11],"over":"epochs"}]}`,
			&Dataset{Name: "env", Recording: rec}, "analyses[0].over: env has no epochs"},
		{"one channel", `{"spectral":{"low":4,"high":48,"steps":23},"analyses":[{"type":"envelope","channels":["S"],"freq":[9,11]}]}`,
			&Dataset{Name: "env", Recording: rec}, "analyses[0].channels: needs at least two channels"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r, err := recipe.Parse([]byte(tc.recipe))
			if err != nil {
				t.Fatal(err)
			}
			_, err = Run(t.Context(), r, tc.ds, nil)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want %q", err, tc.want)
			}
		})
	}
}
