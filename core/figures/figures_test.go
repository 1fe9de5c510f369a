package figures_test

import (
	"bytes"
	"context"
	"encoding/xml"
	"errors"
	"flag"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"sort"
	"strconv"
	"strings"
	"testing"
	"time"

	"amplink/core/data"
	"amplink/core/dataset"
	"amplink/core/demo"
	"amplink/core/figures"
	"amplink/core/internal/synth"
	"amplink/core/pipeline"
	"amplink/core/plot"
	"amplink/core/recipe"
	"amplink/core/report"
)

var updateFigures = flag.Bool("update-figures", false, "rewrite the golden SVG files in testdata/figures")

const figGoldenDir = "../../testdata/figures"

// figRecipe has one analysis of every kind that draws figures, on the
// confounded epochs (channels A–D, trial_type hit/miss, covariate arousal).
const figRecipe = `{
  "spectral": {"low": 4, "high": 30, "steps": 10, "cycles": [3, 6]},
  "analyses": [
    {"id": "tw", "type": "trial-window",
     "seed":   {"channel": "A", "time": [-0.5, -0.1], "freq": [16, 24]},
     "target": {"channel": "*", "time": [0.3, 0.7], "freq": [5, 7]}},
    {"id": "cond", "type": "trial-window", "conditions": {"column": "trial_type", "compare": ["hit", "miss"]},
     "seed":   {"channel": "A", "time": [-0.5, -0.1], "freq": [16, 24]},
     "target": {"channel": "C", "time": [0.3, 0.7], "freq": [5, 7]}},
    {"id": "partial", "type": "trial-window", "method": "pearson", "covariates": ["arousal"],
     "seed":   {"channel": "A", "time": [-0.5, -0.1], "freq": [16, 24]},
     "target": {"channel": "B", "time": [0.3, 0.7], "freq": [5, 7]}},
    {"id": "m", "type": "tf-map", "correction": "cluster", "permutations": 99, "randomSeed": 4, "timeStep": 0.1,
     "seed":   {"channel": "A", "time": [-0.5, -0.1], "freq": [16, 24]},
     "target": {"channel": ["A", "C"], "time": [0.1, 0.9], "freq": [5, 12]}},
    {"id": "env", "type": "envelope", "channels": ["A", "B", "C"], "freq": [16, 24]},
    {"id": "pair", "type": "envelope", "channels": ["A", "B"], "freq": [16, 24]},
    {"id": "x", "type": "envelope", "channels": ["A", "B"], "freq": [16, 24], "targetFreq": [5, 7]},
    {"id": "como", "type": "comodulogram", "channels": ["A", "B"], "freq": [12, 24], "targetFreq": [4, 8]}
  ]
}`

func runFig(t *testing.T, rc string, ds *dataset.Dataset, workers int) (*pipeline.Plan, *report.Results) {
	t.Helper()
	r, err := recipe.Parse([]byte(rc))
	if err != nil {
		t.Fatal(err)
	}
	p, err := pipeline.NewPlan(r, ds)
	if err != nil {
		t.Fatal(err)
	}
	ur, err := p.ComputeAll(context.Background(), workers, nil)
	if err != nil {
		t.Fatal(err)
	}
	res, err := p.Finish(context.Background(), ur)
	if err != nil {
		t.Fatal(err)
	}
	return p, res
}

// checkFigureSVG parses svg with encoding/xml and returns what a figure
// must have: an <svg> root with a viewBox, at least one <text>, and
// element counts by name.
func checkFigureSVG(t *testing.T, name, svg string) map[string]int {
	t.Helper()
	dec := xml.NewDecoder(strings.NewReader(svg))
	count := map[string]int{}
	viewBox := ""
	depth := 0
	for {
		tok, err := dec.Token()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Fatalf("%s: not XML: %v", name, err)
		}
		switch tk := tok.(type) {
		case xml.StartElement:
			if depth == 0 {
				if tk.Name.Local != "svg" {
					t.Errorf("%s: root is <%s>", name, tk.Name.Local)
				}
				for _, a := range tk.Attr {
					if a.Name.Local == "viewBox" {
						viewBox = a.Value
					}
				}
			}
			count[tk.Name.Local]++
			depth++
		case xml.EndElement:
			depth--
		}
	}
	if viewBox == "" {
		t.Errorf("%s: no viewBox", name)
	}
	if count["text"] == 0 {
		t.Errorf("%s: no <text>", name)
	}
	return count
}

func figureNames(res *report.Results) []string {
	var out []string
	for _, f := range res.Figures {
		out = append(out, f.Name)
	}
	return out
}

func figure(t *testing.T, res *report.Results, name string) string {
	t.Helper()
	for _, f := range res.Figures {
		if f.Name == name {
			return f.SVG
		}
	}
	t.Fatalf("no figure %s; have %v", name, figureNames(res))
	return ""
}

func unitsOfKind(p *pipeline.Plan, kind string) []string {
	var out []string
	for _, u := range p.Units() {
		if u.Kind == kind {
			out = append(out, u.Channels...)
		}
	}
	return out
}

// The figure names follow the rules in figures.go; the power maps of the
// "*" analysis are those of the seed and of the targets of its three
// strongest rows, recomputed here from the rows.
func TestFigureNamesAndSVG(t *testing.T) {
	p, res := runFig(t, figRecipe, &dataset.Dataset{Name: "synth", Epochs: synth.Confounded(60)}, 2)
	// Strongest three rows of tw by |r|, table order on ties.
	var tw []report.Row
	for _, r := range res.Rows {
		if r.Analysis == "tw" {
			tw = append(tw, r)
		}
	}
	sort.SliceStable(tw, func(i, j int) bool { return math.Abs(tw[i].R) > math.Abs(tw[j].R) })
	want := []string{"tw_tfpower_A"}
	for _, r := range tw[:3] {
		if r.Target != "A" {
			want = append(want, "tw_tfpower_"+r.Target)
		}
	}
	want = append(want, "tw_scatter_A_A", "tw_scatter_A_B", "tw_scatter_A_C", "tw_scatter_A_D",
		"cond_tfpower_A", "cond_tfpower_C", "cond_scatter_A_C_hit", "cond_scatter_A_C_miss",
		"partial_tfpower_A", "partial_tfpower_B", "partial_scatter_A_B",
		"m_tfpower_A", "m_tfpower_C", "m_tfcorr_A", "m_tfcorr_C",
		"env_matrix", "env_envelopes_A_B",
		"pair_envelopes_A_B",
		"x_matrix", "x_envelopes_A_B",
		"como_comodulogram")
	got := figureNames(res)
	if !slices.Equal(got, want) {
		t.Errorf("figures\n got %v\nwant %v", got, want)
	}
	// One power unit per channel, shared across analyses: A (every seed),
	// C (cond, m), B (partial); tw has more than three targets, so its
	// others are drawn from the rows.
	if u := unitsOfKind(p, figures.KindPower); !slices.Equal(u, []string{"A", "C", "B"}) {
		t.Errorf("tf-power units on %v, want [A C B]", u)
	}
	for _, f := range res.Figures {
		t.Run(f.Name, func(t *testing.T) {
			checkFigureSVG(t, f.Name, f.SVG)
			// The first text is the title line; the caption may add to it
			// and the line may add the statistics.
			first := firstText(t, f.SVG)
			id, _, _ := strings.Cut(f.Name, "_")
			if !strings.HasPrefix(first, id+": ") || !(strings.HasPrefix(first, f.Title) || strings.HasPrefix(f.Title, first)) {
				t.Errorf("title line %q does not go with caption %q", first, f.Title)
			}
		})
	}
}

// firstText returns the character data of the first <text> element.
func firstText(t *testing.T, svg string) string {
	t.Helper()
	dec := xml.NewDecoder(strings.NewReader(svg))
	in := false
	var b strings.Builder
	for {
		tok, err := dec.Token()
		if err != nil {
			t.Fatalf("no <text>: %v", err)
		}
		switch tk := tok.(type) {
		case xml.StartElement:
			in = in || tk.Name.Local == "text"
		case xml.CharData:
			if in {
				b.Write(tk)
			}
		case xml.EndElement:
			if in && tk.Name.Local == "text" {
				return b.String()
			}
		}
	}
}

// fmtR is how plot writes r to three decimals, with a true minus sign.
func fmtR(r float64) string {
	return strings.Replace(strconv.FormatFloat(r, 'f', 3, 64), "-", "−", 1)
}

// What the figures show matches the rows and maps they come from.
func TestFigureContents(t *testing.T) {
	_, res := runFig(t, figRecipe, &dataset.Dataset{Name: "synth", Epochs: synth.Confounded(60)}, 1)
	t.Run("scatter", func(t *testing.T) {
		for _, c := range []struct {
			fig, analysis, target, cond, stat string
		}{
			{"tw_scatter_A_B", "tw", "B", "", "ρ"},
			{"cond_scatter_A_C_hit", "cond", "C", "hit", "ρ"},
			{"cond_scatter_A_C_miss", "cond", "C", "miss", "ρ"},
			{"partial_scatter_A_B", "partial", "B", "", "partial r"},
		} {
			var row report.Row
			for _, r := range res.Rows {
				if r.Analysis == c.analysis && r.Target == c.target && r.Field("condition") == c.cond {
					row = r
					break
				}
			}
			svg := figure(t, res, c.fig)
			n := checkFigureSVG(t, c.fig, svg)["circle"]
			if n != row.N {
				t.Errorf("%s: %d points, want n = %d", c.fig, n, row.N)
			}
			if s := c.stat + " = " + fmtR(row.R); !strings.Contains(svg, s) || !strings.Contains(svg, "n = "+strconv.Itoa(row.N)) {
				t.Errorf("%s: no %q with n = %d in the title", c.fig, s, row.N)
			}
		}
		// Spearman plots ranks; the residual plot of a partial correlation
		// does not.
		if !strings.Contains(figure(t, res, "tw_scatter_A_B"), "(rank)") {
			t.Error("Spearman scatter axes do not say rank")
		}
		if strings.Contains(figure(t, res, "partial_scatter_A_B"), "(rank)") {
			t.Error("Pearson residual scatter says rank")
		}
	})
	t.Run("matrix", func(t *testing.T) {
		var m *report.Map
		for i := range res.Maps {
			if res.Maps[i].Name == "env_r" {
				m = &res.Maps[i]
			}
		}
		svg := figure(t, res, "env_matrix")
		for i, a := range m.RowLabels {
			for j, b := range m.ColLabels {
				if s := a + "–" + b + ": r = " + fmtR(m.Values[i][j]); !strings.Contains(svg, s) {
					t.Errorf("no cell title %q", s)
				}
			}
		}
	})
	t.Run("clusters", func(t *testing.T) {
		// The outline is that of exactly the clusters whose row has
		// p ≤ 0.05: compared with the outline plot.TFCorr draws for the
		// labels picked here from the rows. In this data C has one
		// significant cluster and one that is not (A has none).
		outlineOf := func(svg string) string {
			m := regexp.MustCompile(`<path d="(M[^"]*)" fill="none" stroke="#111111"`).FindStringSubmatch(svg)
			if m == nil {
				return ""
			}
			return m[1]
		}
		nonsig := 0
		for _, ch := range []string{"A", "C"} {
			var sig, all []int
			for _, r := range res.Rows {
				if r.Analysis == "m" && r.Target == ch {
					if k, err := strconv.Atoi(r.Field("cluster")); err == nil {
						all = append(all, k)
						if r.P <= 0.05 {
							sig = append(sig, k)
						} else {
							nonsig++
						}
					}
				}
			}
			var rm, cm *report.Map
			for i := range res.Maps {
				switch res.Maps[i].Name {
				case "m_" + ch + "_r":
					rm = &res.Maps[i]
				case "m_" + ch + "_clusters":
					cm = &res.Maps[i]
				}
			}
			freqs, _ := figures.ParseLabels(rm.RowLabels)
			times, _ := figures.ParseLabels(rm.ColLabels)
			lab := make([][]int, len(cm.Values))
			for i, row := range cm.Values {
				for _, v := range row {
					lab[i] = append(lab[i], int(v))
				}
			}
			svg := figure(t, res, "m_tfcorr_"+ch)
			title := firstText(t, svg)
			opt := plot.TFCorrOptions{Frame: figures.FigFrame(title, 400, 270), ValueName: "ρ"}
			ref, _ := plot.TFCorr(rm.Values, freqs, times, lab, sig, opt)
			if got, want := outlineOf(svg), outlineOf(ref); got != want {
				t.Errorf("map %s: outline %q, want that of clusters %v: %q", ch, got, sig, want)
			}
			if len(all) > len(sig) {
				every, _ := plot.TFCorr(rm.Values, freqs, times, lab, all, opt)
				if outlineOf(every) == outlineOf(ref) {
					t.Errorf("map %s: outlining every cluster draws the same path", ch)
				}
			}
		}
		if nonsig == 0 {
			t.Error("no non-significant cluster: the check above cannot tell the rule apart")
		}
	})
}

// A sine of amplitude A at a grid frequency gives trial-averaged power A²
// away from the edges: the amplitude normalisation of REFERENCES.md
// (computed: A = 3 gives 9.000; float32 samples and the truncated Gaussian
// leave about 2e-5).
func TestFigurePowerMapOfASine(t *testing.T) {
	const rate, amp = 250.0, 3.0
	e := data.NewEpochs(rate, -1, []data.Channel{{Name: "S", Unit: "uV"}}, 4, 501)
	for tr := range e.NTrials {
		x := e.Trial(tr, 0)
		for k := range x {
			x[k] = float32(amp * math.Cos(2*math.Pi*10*e.Time(k)+float64(tr)))
		}
	}
	rc := `{"spectral": {"low": 5, "high": 20, "steps": 3, "cycles": 7},
	  "analyses": [{"id": "s", "type": "trial-window",
	    "seed": {"channel": "S", "time": [-0.2, 0.2], "freq": [9, 11]},
	    "target": {"channel": "S", "time": [-0.2, 0.2], "freq": [9, 11]}}]}`
	p, res := runFig(t, rc, &dataset.Dataset{Name: "sine", Epochs: e}, 1)
	if u := unitsOfKind(p, figures.KindPower); !slices.Equal(u, []string{"S"}) {
		t.Fatalf("tf-power units %v, want [S]", u)
	}
	ur, err := p.Figures.Compute(context.Background(), 0)
	if err != nil {
		t.Fatal(err)
	}
	step := figures.FigPowerStep(e.NSamples)
	cols := (e.NSamples + step - 1) / step
	if len(ur.Values) != 3*cols {
		t.Fatalf("%d values, want 3 × %d", len(ur.Values), cols)
	}
	h := p.Analysis.Bank().Half(1)
	for c := range cols {
		k := c * step
		if k < h || k >= e.NSamples-h {
			continue
		}
		if v := ur.Values[cols+c]; math.Abs(v-amp*amp) > 1e-3 {
			t.Errorf("power at 10 Hz, sample %d = %.9f, want %g", k, v, amp*amp)
		}
	}
	svg := figure(t, res, "s_tfpower_S")
	if !strings.Contains(svg, "power (µV²)") {
		t.Error("the colour bar does not say µV²")
	}
}

// figures: false computes and draws nothing; "powerScale" changes the
// colour scale of the power maps only.
func TestFiguresOffAndScale(t *testing.T) {
	ds := &dataset.Dataset{Name: "synth", Epochs: synth.Confounded(30)}
	base := `"analyses": [{"id": "tw", "type": "trial-window",
	  "seed": {"channel": "A", "time": [-0.5, -0.1], "freq": [16, 24]},
	  "target": {"channel": "B", "time": [0.3, 0.7], "freq": [5, 7]}},
	  {"id": "env", "type": "envelope", "channels": ["A", "B", "C"], "freq": [16, 24]}]}`
	spec := `"spectral": {"low": 4, "high": 30, "steps": 8, "cycles": [3, 6]}, `
	p, res := runFig(t, `{"figures": false, `+spec+base, ds, 2)
	if len(res.Figures) != 0 || len(unitsOfKind(p, figures.KindPower)) != 0 {
		t.Errorf("figures: false gave %d figures and tf-power units on %v", len(res.Figures), unitsOfKind(p, figures.KindPower))
	}
	p2, on := runFig(t, `{"figures": {"enabled": true}, `+spec+base, ds, 2)
	if len(on.Figures) == 0 || len(unitsOfKind(p2, figures.KindPower)) != 2 {
		t.Fatalf("figures on: %v, units %v", figureNames(on), unitsOfKind(p2, figures.KindPower))
	}
	// The results are the same with and without figures.
	if !bytes.Equal(synth.Tables(res), synth.Tables(on)) {
		t.Error("figures change the results")
	}
	_, lin := runFig(t, `{"figures": {"powerScale": "linear"}, `+spec+base, ds, 2)
	for i, f := range on.Figures {
		same := f.SVG == lin.Figures[i].SVG
		if strings.Contains(f.Name, "_tfpower_") == same {
			t.Errorf("%s: log and linear figures identical = %v", f.Name, same)
		}
	}
}

// Continuous input: the envelope figure shows the first stretch, and with
// pairwise orthogonalisation the second trace is the orthogonalised one.
func TestFiguresContinuous(t *testing.T) {
	rc := `{"spectral": {"low": 4, "high": 48, "steps": 23, "cycles": [4, 8]},
	  "analyses": [
	    {"id": "orth", "type": "envelope", "channels": ["S", "L", "G"], "freq": [9, 11], "leakageCorrection": "pairwise"},
	    {"id": "como", "type": "comodulogram", "channels": ["S", "H"], "freq": [6, 14], "targetFreq": [30, 46]}]}`
	_, res := runFig(t, rc, &dataset.Dataset{Name: "env", Recording: synth.Envelopes()}, 2)
	if got, want := figureNames(res), []string{"orth_matrix", "orth_envelopes_S_L", "como_comodulogram"}; !slices.Equal(got, want) {
		t.Fatalf("figures %v, want %v", got, want)
	}
	svg := figure(t, res, "orth_envelopes_S_L")
	checkFigureSVG(t, "orth_envelopes_S_L", svg)
	if !strings.Contains(svg, "L ⊥ S") || !strings.Contains(svg, "first 20 s") {
		t.Error("orthogonalised envelope figure lacks the L ⊥ S trace or the 20 s stretch")
	}
}

// Same input, same figures, whatever the number of workers.
func TestFiguresDeterministic(t *testing.T) {
	ds := &dataset.Dataset{Name: "synth", Epochs: synth.Confounded(40)}
	_, a := runFig(t, figRecipe, ds, 1)
	_, b := runFig(t, figRecipe, ds, 2)
	if len(a.Figures) != len(b.Figures) {
		t.Fatalf("%d and %d figures", len(a.Figures), len(b.Figures))
	}
	for i := range a.Figures {
		if a.Figures[i] != b.Figures[i] {
			t.Errorf("%s differs between runs", a.Figures[i].Name)
		}
	}
}

// goldenRecipe is a small figure set compared byte for byte with
// testdata/figures/<name>.svg; a mismatch writes <name>.svg.got, and
// go test -update-figures rewrites them.
const goldenRecipe = `{
  "spectral": {"low": 4, "high": 30, "steps": 6, "cycles": [3, 6]},
  "analyses": [
    {"id": "g", "type": "trial-window",
     "seed":   {"channel": "A", "time": [-0.5, -0.1], "freq": [16, 24]},
     "target": {"channel": "B", "time": [0.3, 0.7], "freq": [5, 7]}},
    {"id": "e", "type": "envelope", "channels": ["A", "B", "C"], "freq": [16, 24]}
  ]
}`

func TestFiguresGolden(t *testing.T) {
	_, res := runFig(t, goldenRecipe, &dataset.Dataset{Name: "synth", Epochs: synth.Trials(12, 0.8, 2)}, 2)
	if got, want := figureNames(res), []string{"g_tfpower_A", "g_tfpower_B", "g_scatter_A_B", "e_matrix", "e_envelopes_A_B"}; !slices.Equal(got, want) {
		t.Fatalf("figures %v, want %v", got, want)
	}
	// The golden set leaves out the larger power map of A.
	for _, f := range res.Figures[1:] {
		t.Run(f.Name, func(t *testing.T) {
			path := filepath.Join(figGoldenDir, f.Name+".svg")
			if *updateFigures {
				if err := os.MkdirAll(figGoldenDir, 0o755); err != nil {
					t.Fatal(err)
				}
				if err := os.WriteFile(path, []byte(f.SVG), 0o644); err != nil {
					t.Fatal(err)
				}
				return
			}
			want, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("%v (go test -update-figures creates it)", err)
			}
			if !bytes.Equal(want, []byte(f.SVG)) {
				if err := os.WriteFile(path+".got", []byte(f.SVG), 0o644); err != nil {
					t.Fatal(err)
				}
				t.Errorf("differs from %s; wrote %s.got", path, path)
			}
		})
	}
}

// TestFiguresDemoRender writes the demo's figures to $AMPLINK_FIGURES_DEMO
// (skipped when unset) and logs the compute time of each unit kind, so
// that the cost of the power maps can be compared with the analyses.
func TestFiguresDemoRender(t *testing.T) {
	dir := os.Getenv("AMPLINK_FIGURES_DEMO")
	if dir == "" {
		t.Skip("set AMPLINK_FIGURES_DEMO=dir to render the demo figures")
	}
	r, err := recipe.Parse(demo.Recipe())
	if err != nil {
		t.Fatal(err)
	}
	ds := &dataset.Dataset{Name: "demo", Recording: demo.Recording(), Epochs: demo.Epochs()}
	p, err := pipeline.NewPlan(r, ds)
	if err != nil {
		t.Fatal(err)
	}
	// Each unit is timed three times and its fastest run kept, since the
	// machine may be busy.
	byKind := map[string]float64{}
	count := map[string]int{}
	units := p.Units()
	res := make([]pipeline.UnitResult, len(units))
	for i := range units {
		best := math.Inf(1)
		for range 3 {
			t0 := nowSeconds()
			if res[i], err = p.Compute(context.Background(), i); err != nil {
				t.Fatal(err)
			}
			best = min(best, nowSeconds()-t0)
		}
		byKind[units[i].Kind] += best
		count[units[i].Kind]++
	}
	for k, d := range byKind {
		t.Logf("%-16s %3d units %.2f s", k, count[k], d)
	}
	na := len(p.Analysis.Units())
	ar, fr := res[:na], slices.Clone(res[na:])
	for i := range fr {
		fr[i].ID -= na
	}
	out, err := p.Analysis.Finish(context.Background(), ar)
	if err != nil {
		t.Fatal(err)
	}
	best := math.Inf(1)
	for range 3 {
		again := &report.Results{Rows: out.Rows, Maps: out.Maps}
		t0 := nowSeconds()
		if err := p.Figures.Draw(context.Background(), ar, fr, again); err != nil {
			t.Fatal(err)
		}
		best = min(best, nowSeconds()-t0)
		out.Figures = again.Figures
	}
	t.Logf("Draw %.2f s (fastest of 3)", best)
	// The synthetic set adds the figures the demo recipe does not draw
	// (tf-map, comodulogram).
	_, syn := runFig(t, figRecipe, &dataset.Dataset{Name: "synth", Epochs: synth.Confounded(60)}, 2)
	for _, f := range append(out.Figures, syn.Figures...) {
		checkFigureSVG(t, f.Name, f.SVG)
		t.Logf("%-48s %7d bytes", f.Name, len(f.SVG))
		if err := os.WriteFile(filepath.Join(dir, f.Name+".svg"), []byte(f.SVG), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// nowSeconds is for logged durations only; no test asserts on time.
func nowSeconds() float64 { return float64(time.Now().UnixNano()) / 1e9 }

// With more than three channels on both sides, no power map is a unit; the
// maps drawn are those of the seed and target channels of the strongest
// rows (three distinct channels per side, by their largest |r|).
func TestFiguresManyChannels(t *testing.T) {
	rc := `{"spectral": {"low": 4, "high": 30, "steps": 8, "cycles": [3, 6]},
	  "analyses": [{"id": "all", "type": "trial-window",
	    "seed":   {"channel": "*", "time": [-0.5, -0.1], "freq": [16, 24]},
	    "target": {"channel": "*", "time": [0.3, 0.7], "freq": [5, 7]}}]}`
	p, res := runFig(t, rc, &dataset.Dataset{Name: "synth", Epochs: synth.Confounded(30)}, 2)
	if u := unitsOfKind(p, figures.KindPower); len(u) != 0 {
		t.Errorf("tf-power units on %v, want none", u)
	}
	top := func(side func(report.Row) string) []string {
		best := map[string]float64{}
		var order []string
		for _, r := range res.Rows {
			c := side(r)
			if _, ok := best[c]; !ok {
				order = append(order, c)
			}
			best[c] = max(best[c], math.Abs(r.R))
		}
		sort.SliceStable(order, func(i, j int) bool { return best[order[i]] > best[order[j]] })
		return order[:3]
	}
	var want []string
	seen := map[string]bool{}
	for _, c := range append(top(func(r report.Row) string { return r.Seed }), top(func(r report.Row) string { return r.Target })...) {
		if !seen[c] {
			seen[c] = true
			want = append(want, "all_tfpower_"+c)
		}
	}
	var got []string
	scatters := 0
	for _, n := range figureNames(res) {
		switch {
		case strings.Contains(n, "_tfpower_"):
			got = append(got, n)
		case strings.Contains(n, "_scatter_"):
			scatters++
		}
	}
	if !slices.Equal(got, want) {
		t.Errorf("power maps %v, want %v", got, want)
	}
	if scatters != 16 {
		t.Errorf("%d scatters, want one per row (16)", scatters)
	}
}

// The late power maps (chosen from the rows) may be computed anywhere, as
// the page's workers do: passed to Draw, they give the same figures, byte
// for byte, as Draw computing them itself; a result of the wrong size, or
// for no unit, is refused.
func TestFiguresLateUnits(t *testing.T) {
	rc := `{"spectral": {"low": 4, "high": 30, "steps": 8, "cycles": [3, 6]},
	  "analyses": [{"id": "all", "type": "trial-window",
	    "seed":   {"channel": "A", "time": [-0.5, -0.1], "freq": [16, 24]},
	    "target": {"channel": "*", "time": [0.3, 0.7], "freq": [5, 7]}}]}`
	p, want := runFig(t, rc, &dataset.Dataset{Name: "synth", Epochs: synth.Confounded(30)}, 2)
	ctx := context.Background()
	units := p.Units()
	res := make([]pipeline.UnitResult, len(units))
	for i := range units {
		var err error
		if res[i], err = p.Compute(ctx, i); err != nil {
			t.Fatal(err)
		}
	}
	na := len(p.Analysis.Units())
	ar, early := res[:na], slices.Clone(res[na:])
	for i := range early {
		early[i].ID -= na
	}
	out, err := p.Analysis.Finish(ctx, ar)
	if err != nil {
		t.Fatal(err)
	}
	late := p.Figures.Late(out)
	// the seed A has a unit of its own; the targets' three strongest are late
	if len(early) != 1 || len(late) != 3 {
		t.Fatalf("%d early and %d late units, want 1 and 3", len(early), len(late))
	}
	figRes := early
	for _, u := range late {
		if u.ID < len(early) || u.Kind != figures.KindPower {
			t.Fatalf("late unit %+v", u)
		}
		r, err := p.Figures.ComputeUnit(ctx, u)
		if err != nil {
			t.Fatal(err)
		}
		figRes = append(figRes, r)
	}
	if err := p.Figures.Draw(ctx, ar, figRes, out); err != nil {
		t.Fatal(err)
	}
	if len(out.Figures) != len(want.Figures) {
		t.Fatalf("%d figures, want %d", len(out.Figures), len(want.Figures))
	}
	for i := range out.Figures {
		if out.Figures[i] != want.Figures[i] {
			t.Errorf("figure %s differs from the one Draw computed itself", out.Figures[i].Name)
		}
	}
	bad := slices.Clone(figRes)
	bad[len(bad)-1].Values = bad[len(bad)-1].Values[1:]
	if err := p.Figures.Draw(ctx, ar, bad, &report.Results{Rows: out.Rows}); err == nil || !strings.Contains(err.Error(), "values, want") {
		t.Errorf("a short late map: error %v", err)
	}
	extra := append(slices.Clone(figRes), pipeline.UnitResult{ID: len(early) + len(late)})
	if err := p.Figures.Draw(ctx, ar, extra, &report.Results{Rows: out.Rows}); err == nil || !strings.Contains(err.Error(), "out of range") {
		t.Errorf("a result for no unit: error %v", err)
	}
}
