package recipe

import (
	"strings"
	"testing"
)

const goodRecipe = `{
  "epochs":   {"event": "tone", "start": -1.0, "end": 1.5},
  "spectral": {"method": "wavelet", "low": 3, "high": 40, "steps": 28, "spacing": "log", "cycles": [3, 9]},
  "analyses": [
    {"id": "a1", "type": "trial-window", "method": "spearman",
     "seed":   {"channel": "C4", "time": [-0.5, -0.1], "freq": [15, 25]},
     "target": {"channel": "*",  "time": [0.3, 0.8],   "freq": [1.5, 3.5]},
     "permutations": 1000, "randomSeed": 1, "correction": "fdr"},
    {"id": "a2", "type": "envelope", "channels": ["P3", "P4", "O1"], "freq": [8, 12],
     "leakageCorrection": "pairwise", "method": "pearson"},
    {"id": "a3", "type": "envelope", "channels": ["C3", "C4"], "freq": [15, 25], "targetFreq": [60, 80]}
  ]
}`

// The recipe form in DESIGN.md must parse as written (a contract).
func TestParseDesignExample(t *testing.T) {
	r, err := Parse([]byte(goodRecipe))
	if err != nil {
		t.Fatal(err)
	}
	if r.Epochs == nil || r.Epochs.Event != "tone" || r.Epochs.Start != -1 || r.Epochs.End != 1.5 {
		t.Errorf("epochs = %+v", r.Epochs)
	}
	if r.Spectral.Steps != 28 || r.Spectral.Cycles != [2]float64{3, 9} {
		t.Errorf("spectral = %+v", r.Spectral)
	}
	a := r.Analyses[0]
	if a.Seed.Channel[0] != "C4" || a.Target.Channel[0] != "*" || a.Permutations != 1000 || a.Correction != "fdr" {
		t.Errorf("a1 = %+v", a)
	}
	if r.Analyses[1].Orthogonalize != OrthPairwise || r.Analyses[1].Method != "pearson" {
		t.Errorf("a2 = %+v", r.Analyses[1])
	}
	if r.Analyses[2].TargetFreq == nil || r.Analyses[2].TargetFreq[1] != 80 {
		t.Errorf("a3 = %+v", r.Analyses[2])
	}
	// The resolved recipe parses back to the same thing.
	r2, err := Parse(r.JSON())
	if err != nil {
		t.Fatalf("resolved recipe does not parse: %v\n%s", err, r.JSON())
	}
	if string(r2.JSON()) != string(r.JSON()) {
		t.Errorf("resolved recipe is not stable:\n%s\n%s", r.JSON(), r2.JSON())
	}
}

func TestParseDefaults(t *testing.T) {
	r, err := Parse([]byte(`{"analyses":[{"type":"trial-window","seed":{"channel":"A","time":[0,1],"freq":[4,8]},"target":{"channel":["B","C"],"time":[0,1],"freq":[4,8]}}]}`))
	if err != nil {
		t.Fatal(err)
	}
	a := r.Analyses[0]
	if a.ID != "a1" || a.Method != "spearman" || a.Correction != "none" || a.Level != 0.95 || a.RandomSeed != 1 {
		t.Errorf("defaults: %+v", a)
	}
	if r.Spectral.Spacing != "log" || r.Spectral.Low != 2 || r.Spectral.High != 40 {
		t.Errorf("spectral defaults: %+v", r.Spectral)
	}
	if len(a.Target.Channel) != 2 {
		t.Errorf("target channels %v", a.Target.Channel)
	}
	if r.Spectral.Tolerance != nil || r.Spectral.WindowTolerance() != 1e-10 {
		t.Errorf("tolerance %v (%g), want absent and 1e-10", r.Spectral.Tolerance, r.Spectral.WindowTolerance())
	}
	// An absent tolerance stays out of the resolved recipe, so recipes and
	// their outputs from before the key are unchanged.
	if strings.Contains(string(r.JSON()), "tolerance") {
		t.Errorf("resolved recipe names a tolerance it was not given:\n%s", r.JSON())
	}
}

// spectral.tolerance is kept as given, 0 included (the FFT route
// everywhere), and written back into the resolved recipe.
func TestParseTolerance(t *testing.T) {
	for _, c := range []struct {
		in   string
		want float64
	}{{"0", 0}, {"1e-8", 1e-8}, {"0.001", 1e-3}} {
		r, err := Parse([]byte(`{"spectral":{"tolerance":` + c.in + `},"analyses":[{"type":"trial-window","seed":{"channel":"A","time":[0,1],"freq":[4,8]},"target":{"channel":"B","time":[0,1],"freq":[4,8]}}]}`))
		if err != nil {
			t.Fatal(err)
		}
		if got := r.Spectral.WindowTolerance(); got != c.want || r.Spectral.Tolerance == nil {
			t.Errorf("%s: tolerance %g, want %g", c.in, got, c.want)
		}
		r2, err := Parse(r.JSON())
		if err != nil {
			t.Fatal(err)
		}
		if r2.Spectral.WindowTolerance() != c.want {
			t.Errorf("%s: after a round trip %g", c.in, r2.Spectral.WindowTolerance())
		}
	}
}

func TestParseErrors(t *testing.T) {
	win := `"seed":{"channel":"A","time":[0,1],"freq":[4,8]},"target":{"channel":"B","time":[0,1],"freq":[4,8]}`
	tests := []struct {
		name, in, want string
	}{
		{"empty", ``, "empty recipe"},
		// Hostile recipes: every refusal has a position.
		{"trailing brace", `{"analyses":[{"type":"trial-window",` + win + `}]}}`, "line 1, column 139: unexpected data after the recipe object"},
		{"trailing bracket", `{"analyses":[{"type":"trial-window",` + win + `}]}]`, "line 1, column 139: unexpected data after the recipe object"},
		{"duplicate key", "{\"analyses\":[{\"type\":\"trial-window\",\"permutations\":1000,\n" + win + `,"permutations":0}]}`, `line 2, column 101: key "permutations" appears twice in one object`},
		{"duplicate top-level key", `{"analyses":[],"analyses":[]}`, `line 1, column 16: key "analyses" appears twice in one object`},
		{"unexpected end", "{\"spectral\": {\"low\": 2,\n \"high\": 20", "line 2, column 12: the recipe ends early"},
		{"only a BOM", "\uFEFF", "empty recipe"},
		{"syntax", "{\n  \"analyses\": [,]\n}", "line 2, column 16"},
		{"not object", `[1]`, "recipe: must be a JSON object"},
		{"unknown top key", `{"analyses":[{"type":"trial-window",` + win + `}],"epoch":{}}`, `unknown key "epoch"`},
		{"unknown analysis key", `{"analyses":[{"type":"trial-window",` + win + `,"permutation":10}]}`, `analyses[0]: unknown key "permutation"`},
		{"unknown window key", `{"analyses":[{"type":"trial-window","seed":{"channel":"A","time":[0,1],"freq":[4,8],"chan":"x"},"target":{"channel":"B","time":[0,1],"freq":[4,8]}}]}`, `analyses[0].seed: unknown key "chan"`},
		{"reversed time", `{"analyses":[{"type":"trial-window","seed":{"channel":"A","time":[1,0],"freq":[4,8]},"target":{"channel":"B","time":[0,1],"freq":[4,8]}}]}`, "analyses[0].seed.time: range is reversed: [1, 0]"},
		{"reversed freq", `{"analyses":[{"type":"trial-window",` + win + `},{"type":"trial-window","seed":{"channel":"A","time":[0,1],"freq":[8,4]},"target":{"channel":"B","time":[0,1],"freq":[4,8]}}]}`, "analyses[1].seed.freq: range is reversed: [8, 4]"},
		{"no analyses", `{}`, "analyses: is required"},
		{"bad type", `{"analyses":[{"type":"coherence"}]}`, `analyses[0].type: "coherence" is not an analysis type`},
		{"bad method", `{"analyses":[{"type":"trial-window","method":"kendall",` + win + `}]}`, `analyses[0].method: "kendall" is not a method`},
		{"missing seed", `{"analyses":[{"type":"trial-window","target":{"channel":"B","time":[0,1],"freq":[4,8]}}]}`, "analyses[0].seed: is required"},
		{"missing time", `{"analyses":[{"type":"trial-window","seed":{"channel":"A","freq":[4,8]},"target":{"channel":"B","time":[0,1],"freq":[4,8]}}]}`, "analyses[0].seed.time: is required"},
		{"time not pair", `{"analyses":[{"type":"trial-window","seed":{"channel":"A","time":[0],"freq":[4,8]},"target":{"channel":"B","time":[0,1],"freq":[4,8]}}]}`, "analyses[0].seed.time: must be a list of two numbers"},
		{"channel twice", `{"analyses":[{"type":"trial-window","seed":{"channel":["A","A"],"time":[0,1],"freq":[4,8]},"target":{"channel":"B","time":[0,1],"freq":[4,8]}}]}`, `analyses[0].seed.channel[1]: channel "A" is listed twice`},
		{"bad spacing", `{"spectral":{"spacing":"octave"},"analyses":[{"type":"trial-window",` + win + `}]}`, `spectral.spacing: "octave" is not a spacing`},
		{"low zero", `{"spectral":{"low":0},"analyses":[{"type":"trial-window",` + win + `}]}`, "spectral.low: must be above 0 Hz"},
		{"tolerance negative", `{"spectral":{"tolerance":-1e-9},"analyses":[{"type":"trial-window",` + win + `}]}`, "spectral.tolerance: -1e-09 is outside 0–0.001"},
		{"tolerance too loose", `{"spectral":{"tolerance":0.5},"analyses":[{"type":"trial-window",` + win + `}]}`, "spectral.tolerance: 0.5 is outside 0–0.001"},
		{"tolerance text", `{"spectral":{"tolerance":"tight"},"analyses":[{"type":"trial-window",` + win + `}]}`, "spectral.tolerance: must be a number"},
		{"steps fraction", `{"spectral":{"steps":2.5},"analyses":[{"type":"trial-window",` + win + `}]}`, "spectral.steps: must be a whole number"},
		{"cluster on window", `{"analyses":[{"type":"trial-window","correction":"cluster",` + win + `}]}`, `analyses[0].correction: "cluster" applies to tf-map analyses only`},
		{"bad correction", `{"analyses":[{"type":"trial-window","correction":"holm",` + win + `}]}`, `analyses[0].correction: "holm" is not a correction`},
		{"epochs reversed", `{"epochs":{"event":"x","start":1,"end":0},"analyses":[{"type":"trial-window",` + win + `}]}`, "epochs.end: 0 s is not after start 1 s"},
		{"duplicate id", `{"analyses":[{"id":"x","type":"trial-window",` + win + `},{"id":"x","type":"trial-window",` + win + `}]}`, `analyses[1].id: "x" is used twice`},
		{"permutations negative", `{"analyses":[{"type":"trial-window","permutations":-5,` + win + `}]}`, "analyses[0].permutations: must be between 0 and 1000000"},
		{"leakage bad", `{"analyses":[{"type":"envelope","channels":"*","freq":[8,12],"leakageCorrection":"yes"}]}`, `analyses[0].leakageCorrection: "yes" is not a correction; use "none", "pairwise" or "symmetric"`},
		{"leakage bool", `{"analyses":[{"type":"envelope","channels":"*","freq":[8,12],"leakageCorrection":true}]}`, `analyses[0].leakageCorrection: must be "none", "pairwise" or "symmetric"`},
		// keys of older recipes: an error that names the new key
		{"old orthogonalize", `{"analyses":[{"type":"envelope","channels":"*","freq":[8,12],"orthogonalize":true}]}`, `analyses[0].orthogonalize: this key is now "leakageCorrection": "none", "pairwise" (was true) or "symmetric"`},
		{"old orthogonalize symmetric", `{"analyses":[{"type":"trial-window",` + win + `},{"type":"envelope","channels":"*","freq":[8,12],"orthogonalize":"symmetric"}]}`, `analyses[1].orthogonalize: this key is now "leakageCorrection"`},
		{"old clusterThreshold", `{"analyses":[{"type":"tf-map","correction":"cluster","clusterThreshold":0.01,` + win + `}]}`, `analyses[0].clusterThreshold: this key is now "clusterFormingP"`},
		{"clusterFormingP range", `{"analyses":[{"type":"tf-map","clusterFormingP":1.5,` + win + `}]}`, `analyses[0].clusterFormingP: must be a p-value between 0 and 1`},
		{"envelope no freq", `{"analyses":[{"type":"envelope","channels":"*"}]}`, "analyses[0].freq: is required"},
		{"envelope window key", `{"analyses":[{"type":"envelope","channels":"*","freq":[8,12],"seed":{}}]}`, `analyses[0]: unknown key "seed"`},
		{"trailing data", `{"analyses":[{"type":"trial-window",` + win + `}]} {}`, "unexpected data after the recipe object"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Parse([]byte(tc.in))
			if err == nil {
				t.Fatalf("no error; want %q", tc.want)
			}
			if !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %q does not contain %q", err, tc.want)
			}
		})
	}
}

// TestCheckBands guards the recipe-only band check the command line runs
// before it opens any data, so that the error names the recipe file.
func TestCheckBands(t *testing.T) {
	win := func(f string) string {
		return `{"channel":"A","time":[0,1],"freq":` + f + `}`
	}
	for _, tc := range []struct{ name, in, want string }{
		{"ok", `{"analyses":[{"type":"trial-window","seed":` + win("[4,8]") + `,"target":` + win("[4,8]") + `}]}`, ""},
		{"seed above the grid", `{"analyses":[{"type":"trial-window","seed":` + win("[41,45]") + `,"target":` + win("[4,8]") + `}]}`,
			"analyses[0].seed.freq: no grid frequency lies in [41, 45] Hz (grid 2–40 Hz)"},
		{"tf-map target between grid points", `{"spectral":{"low":2,"high":40,"steps":3},"analyses":[{"type":"tf-map","seed":` + win("[2,3]") + `,"target":` + win("[10,11]") + `}]}`,
			"analyses[0].target.freq: no grid frequency lies in [10, 11] Hz (grid 2–40 Hz)"},
		{"envelope target band", `{"analyses":[{"type":"envelope","channels":["A","B"],"freq":[8,12],"targetFreq":[60,80]}]}`,
			"analyses[0].targetFreq: no grid frequency lies in [60, 80] Hz (grid 2–40 Hz)"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r, err := Parse([]byte(tc.in))
			if err != nil {
				t.Fatal(err)
			}
			err = CheckBands(r)
			if tc.want == "" {
				if err != nil {
					t.Fatal(err)
				}
				return
			}
			if err == nil || err.Error() != tc.want {
				t.Fatalf("got %v, want %s", err, tc.want)
			}
		})
	}
}
