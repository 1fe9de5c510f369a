package main

import (
	"bytes"
	"encoding/csv"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

// One recipe gives the same results from every input route of the demo:
// epoched CSV, float32 epochs, continuous CSV with events.tsv, EDF+ with
// annotations and WAV with channels.tsv and events.tsv. EDF stores 16-bit
// samples, so its r may differ by quantisation only.
func TestDemoRoutesAgree(t *testing.T) {
	if testing.Short() {
		t.Skip("writes and reads the whole demo five times")
	}
	dir := t.TempDir()
	var stdout, stderr bytes.Buffer
	if err := run(&stdout, &stderr, []string{"demo", "--out", dir}); err != nil {
		t.Fatal(err)
	}
	rp := filepath.Join(dir, "routes.json")
	os.WriteFile(rp, []byte(`{
  "epochs": {"event": "tone", "start": -1.5, "end": 2.0},
  "spectral": {"low": 2, "high": 40, "steps": 20, "cycles": [3, 8]},
  "analyses": [
    {"id": "tw", "type": "trial-window", "seed": {"channel": "C4", "time": [-0.5, -0.1], "freq": [15, 25]},
     "target": {"channel": ["Pz", "Fz", "O1"], "time": [0.3, 0.8], "freq": [1.5, 3.5]}},
    {"id": "env", "type": "envelope", "channels": ["O1", "O2", "P3"], "freq": [8, 12], "leakageCorrection": "pairwise", "over": "epochs"}
  ]
}`), 0o644)
	routes := []string{"demo_epochs.csv", "demo_epochs.f32", "demo_continuous.csv", "demo_edf.edf", "demo_wav.wav"}
	results := map[string][]float64{}
	for _, f := range routes {
		out := filepath.Join(dir, "out-"+f)
		if err := run(&stdout, &stderr, []string{"run", "--recipe", rp, "--out", out, filepath.Join(dir, f)}); err != nil {
			t.Fatalf("%s: %v", f, err)
		}
		fh, err := os.Open(filepath.Join(out, "results.csv"))
		if err != nil {
			t.Fatal(err)
		}
		recs, err := csv.NewReader(fh).ReadAll()
		fh.Close()
		if err != nil {
			t.Fatal(err)
		}
		for _, rec := range recs[1:] {
			r, err := strconv.ParseFloat(rec[6], 64)
			if err != nil {
				t.Fatalf("%s: row %v has no r", f, rec)
			}
			results[f] = append(results[f], r)
		}
	}
	ref := results[routes[0]]
	if len(ref) != 3+3 {
		t.Fatalf("%d rows, want 6", len(ref))
	}
	for _, f := range routes[1:] {
		tol := 1e-12
		if f == "demo_edf.edf" {
			tol = 2e-3 // 16-bit quantisation
		}
		for i, r := range results[f] {
			if math.Abs(r-ref[i]) > tol {
				t.Errorf("%s row %d: r = %.9f, epoched CSV gives %.9f", f, i, r, ref[i])
			}
		}
	}
}
