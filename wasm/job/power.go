package job

import (
	"encoding/json"
	"errors"
	"fmt"

	"amplink/app/wire"
	"amplink/core/data"
	"amplink/core/dataset"
	"amplink/core/demo"
	"amplink/core/plot"
	"amplink/core/recipe"
	"amplink/core/spectral"
)

// maxPowerCols bounds the columns of the check map: a column every
// ⌈samples/maxPowerCols⌉ samples is enough to see where power sits.
const maxPowerCols = 300

// demoDataset is the demo recording, cut as r asks (or as the demo recipe
// does when r is nil).
func demoDataset(r *recipe.Recipe) (*dataset.Dataset, error) {
	if r == nil {
		var err error
		if r, err = recipe.Parse(demo.Recipe()); err != nil {
			return nil, fmt.Errorf("demo recipe: %w", err)
		}
	}
	rec := demo.Recording()
	ds := &dataset.Dataset{Name: "demo", Format: rec.Format, Recording: rec, Notes: append([]string(nil), rec.Notes...)}
	if r.Epochs != nil {
		ep, err := data.Epoch(rec, nil, r.Epochs.Event, r.Epochs.Start, r.Epochs.End)
		if err != nil {
			return nil, err
		}
		ep.Name = "demo"
		ds.Epochs = ep
	}
	return ds, nil
}

// Power computes the trial-averaged time-frequency power of one channel
// with the recipe's spectral settings,
//
//	P(f, t) = (1/N) Σ_trials |x ∗ w_f|²(t)   (µV², or the square of the data unit)
//
// and draws it with plot.TFPower, outlining the recipe's windows on that
// channel. The seed and target windows can then be chosen on it.
func Power(req wire.Request, files Files) (*wire.Figure, error) {
	r, err := PowerRecipe(req.Recipe)
	if err != nil {
		return nil, err
	}
	ds, err := Open(r, req.Source, files)
	if err != nil {
		return nil, err
	}
	e := ds.Epochs
	if e == nil {
		return nil, errors.New("epochs: the power map needs trials; " + ds.Name + " is continuous, so tick \"Cut continuous data into epochs\" and name the event")
	}
	ch := data.Lookup(e.Channels, req.Channel)
	if ch < 0 {
		return nil, fmt.Errorf("%s: no channel %q", ds.Name, req.Channel)
	}
	sp := r.Spectral
	freqs, err := spectral.Frequencies(sp.Low, sp.High, sp.Steps, sp.Spacing)
	if err != nil {
		return nil, fmt.Errorf("spectral: %v", err)
	}
	if sp.High >= e.Rate/2 {
		return nil, fmt.Errorf("spectral.high: %g Hz is at or above the Nyquist frequency %g Hz of %s", sp.High, e.Rate/2, ds.Name)
	}
	bank, err := spectral.NewBankFor(e.Rate, freqs, spectral.Cycles(len(freqs), sp.Cycles[0], sp.Cycles[1]), e.NSamples)
	if err != nil {
		return nil, fmt.Errorf("spectral: %v", err)
	}
	idx := make([]int, len(freqs))
	for i := range idx {
		idx[i] = i
	}
	n := e.NSamples
	conv := bank.NewConvolver(spectral.FFTLen(n, bank.MaxHalf(idx)))
	step := max(1, (n+maxPowerCols-1)/maxPowerCols)
	var pow [][]float64
	for t := 0; t < e.NTrials; t++ {
		conv.Load(e.Trial(t, ch))
		pow = spectral.TFPower(pow, conv, idx, 0, n, step)
	}
	for _, row := range pow {
		for j := range row {
			row[j] /= float64(e.NTrials)
		}
	}
	times := make([]float64, spectral.TFCols(0, n, step))
	for j := range times {
		times[j] = e.Time(j * step)
	}
	var wins []plot.Window
	for _, a := range r.Analyses {
		for _, w := range []struct {
			label string
			win   *recipe.Window
		}{{a.ID + " seed", a.Seed}, {a.ID + " target", a.Target}} {
			if w.win == nil || !names(w.win.Channel, req.Channel) {
				continue
			}
			wins = addWindow(wins, plot.Window{Label: w.label, T0: w.win.Time[0], T1: w.win.Time[1], F0: w.win.Freq[0], F1: w.win.Freq[1]})
		}
	}
	unit := "µV²"
	if u := e.Channels[ch].Unit; u != "" && u != "uV" && u != "µV" {
		unit = u + "²"
	}
	title := fmt.Sprintf("%s: power, mean of %d trials", req.Channel, e.NTrials)
	svg, _ := plot.TFPower(pow, freqs, times, plot.TFPowerOptions{
		Frame:       plot.Frame{Title: title, Width: 640, Height: 360},
		LogColour:   true,
		Windows:     wins,
		ColourLabel: "power",
		ColourUnit:  unit,
	})
	return &wire.Figure{Name: "power-" + req.Channel, Title: title, SVG: svg}, nil
}

// names reports whether a window's channel selection includes ch.
func names(sel []string, ch string) bool {
	for _, s := range sel {
		if s == "*" || s == ch {
			return true
		}
	}
	return false
}

// PowerRecipe reads the settings the power map needs (epochs, spectral)
// from a recipe whose analyses may still be unfinished: the map needs no
// analysis, only the windows to outline of those analyses that are complete.
// Errors in the settings themselves are reported as Parse reports them.
func PowerRecipe(b []byte) (*recipe.Recipe, error) {
	if r, err := recipe.Parse(b); err == nil {
		return r, nil
	}
	var top map[string]any
	if err := json.Unmarshal(b, &top); err != nil {
		return recipe.Parse(b) // Parse names what is wrong with the JSON
	}
	list, _ := top["analyses"].([]any)
	var keep []any
	for _, a := range list {
		top["analyses"] = []any{a}
		one, _ := json.Marshal(top)
		if _, err := recipe.Parse(one); err == nil {
			keep = append(keep, a)
		}
	}
	// ids must stay unique once the analyses that failed are left out
	placeholder := len(keep) == 0
	if placeholder {
		keep = []any{map[string]any{"type": recipe.TypeEnvelope, "channels": "*", "freq": []any{8, 12}}}
	}
	top["analyses"] = keep
	again, _ := json.Marshal(top)
	r, err := recipe.Parse(again)
	if err != nil {
		return nil, err
	}
	if placeholder {
		r.Analyses = nil
	}
	return r, nil
}

// addWindow adds a window to outline, or its label to a window already
// there with the same bounds, so coinciding windows get one box and one
// label ("a1 seed, a2 seed") rather than labels printed over each other.
func addWindow(wins []plot.Window, w plot.Window) []plot.Window {
	for i := range wins {
		v := &wins[i]
		if v.T0 == w.T0 && v.T1 == w.T1 && v.F0 == w.F0 && v.F1 == w.F1 {
			v.Label += ", " + w.Label
			return wins
		}
	}
	return append(wins, w)
}
