package figures_test

import (
	"bytes"
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"

	"amplink/core/dataset"
	"amplink/core/figures"
	"amplink/core/format"
	"amplink/core/format/csv"
	"amplink/core/internal/synth"
	"amplink/core/sensors"
)

// memSib serves sibling files from memory.
type memSib map[string]string

func (m memSib) Open(name string) (format.File, error) {
	if s, ok := m[name]; ok {
		return format.Bytes(name, []byte(s)), nil
	}
	return format.File{}, fmt.Errorf("%s: %w", name, format.ErrNoSibling)
}

const scalpRecipe = `{"spectral": {"low": 4, "high": 30, "steps": 6, "cycles": [3, 6]},
  "analyses": [{"id": "s", "type": "trial-window",
    "seed":   {"channel": "A", "time": [-0.5, -0.1], "freq": [16, 24]},
    "target": {"channel": "*", "time": [0.3, 0.7], "freq": [5, 7]}}]}`

// A scalp map needs four placed channels; with fewer the note says why,
// and the channels without a position are named.
func TestScalpNeedsFourPlaced(t *testing.T) {
	for _, c := range []struct {
		names []string
		map_  bool
		notes []string
	}{
		{[]string{"Fz", "Cz", "Pz", "Oz"}, true, nil},
		{[]string{"FZ", "cz", "T3", "T6"}, true, nil}, // case and the older names
		{[]string{"Fz", "Cz", "Pz", "X"}, false, []string{
			"s: no position for X in the built-in 10-10 positions; left out of the sensor views",
			"s: no scalp map, since only 3 of its 4 channels have a position (at least 4 are needed)"}},
		{[]string{"ch1", "ch2", "ch3", "ch4"}, false, []string{
			"s: no position for ch1, ch2, ch3, ch4 in the built-in 10-10 positions; left out of the sensor views",
			"s: no scalp map, since only 0 of its 4 channels have a position (at least 4 are needed)"}},
	} {
		e := synth.Trials(12, 0.8, 2)
		for i, n := range c.names {
			e.Channels[i].Name = n
		}
		rc := strings.ReplaceAll(scalpRecipe, `"channel": "A"`, `"channel": "`+c.names[0]+`"`)
		_, res := runFig(t, rc, &dataset.Dataset{Name: "synth", Epochs: e}, 1)
		name := "s_scalp_" + c.names[0]
		got := slices.Contains(figureNames(res), name)
		if got != c.map_ {
			t.Errorf("%v: scalp map drawn %v, want %v (figures %v)", c.names, got, c.map_, figureNames(res))
		}
		for _, n := range c.notes {
			if !slices.Contains(res.Warnings, n) {
				t.Errorf("%v: no note %q in %q", c.names, n, res.Warnings)
			}
		}
		if c.map_ {
			for _, f := range res.Figures {
				if f.Name == name {
					for _, n := range c.names {
						if !strings.Contains(f.SVG, `data-channel="`+n+`"`) {
							t.Errorf("%s is not on the map", n)
						}
					}
				}
			}
		}
	}
}

// Positions from <stem>_electrodes.tsv beside the recording replace the
// built-in ones; coordinate systems with x to the nasion are turned.
func TestElectrodesBeside(t *testing.T) {
	e := synth.Trials(12, 0.8, 2)
	for i, n := range []string{"Fz", "Cz", "Pz", "Oz"} {
		e.Channels[i].Name = n
	}
	var b bytes.Buffer
	if err := csv.WriteEpochs(&b, e); err != nil {
		t.Fatal(err)
	}
	rec := format.Bytes("sub-01_eeg.csv", b.Bytes())
	// Fz placed at the right preauricular point in an x-anterior, y-left
	// system: (0, −1, 0) there is x right, (1, 0, 0), here.
	tsv := "name\tx\ty\tz\nFz\t0\t-0.09\t0\nCz\t0\t0\t0.09\nPz\t-0.06\t0\t0.06\nOz\tn/a\tn/a\tn/a\n"
	ds, err := dataset.Open(nil, rec, nil, memSib{"sub-01_electrodes.tsv": tsv, "sub-01_coordsystem.json": `{"EEGCoordinateSystem": "CTF", "EEGCoordinateUnits": "m"}`})
	if err != nil {
		t.Fatal(err)
	}
	el := ds.Electrodes
	if el == nil || el.File != "sub-01_electrodes.tsv" || el.Units != "m" {
		t.Fatalf("electrodes %+v", el)
	}
	if want := "electrode positions from sub-01_electrodes.tsv (3 placed, CTF, m); only their directions from the origin are used"; !slices.Contains(ds.Notes, want) {
		t.Errorf("notes %q lack %q", ds.Notes, want)
	}
	for _, c := range []struct {
		name string
		want sensors.Point
		ok   bool
	}{
		{"Fz", sensors.Point{X: 1}, true},
		{"Cz", sensors.Point{Z: 1}, true},
		{"Pz", sensors.Point{Y: -math.Sqrt2 / 2, Z: math.Sqrt2 / 2}, true}, // x = −0.06 (posterior) → y
		{"Oz", sensors.Point{}, false},                                     // n/a: in the file without a position
	} {
		i := -1
		for k, x := range ds.Epochs.Channels {
			if x.Name == c.name {
				i = k
			}
		}
		p, ok := el.Position(ds.Epochs.Channels[i])
		if ok != c.ok || (ok && math.Hypot(math.Hypot(p.X-c.want.X, p.Y-c.want.Y), p.Z-c.want.Z) > 1e-12) {
			t.Errorf("%s at %+v (%v), want %+v (%v)", c.name, p, ok, c.want, c.ok)
		}
	}
	// An electrode at the origin has no direction: the file and line.
	_, err = dataset.Open(nil, rec, nil, memSib{"sub-01_electrodes.tsv": "name\tx\ty\tz\nFz\t0\t0\t0\nCz\t0\t0\t1\n"})
	if err == nil || err.Error() != `bids: sub-01_electrodes.tsv:2: electrode "Fz" is at the coordinate origin, so it has no direction from the head's centre` {
		t.Errorf("origin: %v", err)
	}
	_, err = dataset.Open(nil, rec, nil, memSib{"sub-01_electrodes.tsv": "name\tx\ty\tz\nFz\t1\t1\t1\nCz\t1\t1\t1\n"})
	if err == nil || !strings.Contains(err.Error(), "sub-01_electrodes.tsv:2: every electrode (lines 2–3) is at the same point") {
		t.Errorf("one point: %v", err)
	}
}

// Envelope networks: without a test the strongest k pairs (k = the number
// of channels, in the title); across bands, arrows from band A to band B.
func TestNetworkFigures(t *testing.T) {
	e := synth.Trials(12, 0.8, 2)
	for i, n := range []string{"Fz", "Cz", "Pz", "Oz"} {
		e.Channels[i].Name = n
	}
	rc := `{"spectral": {"low": 4, "high": 30, "steps": 6, "cycles": [3, 6]},
	  "analyses": [
	    {"id": "same", "type": "envelope", "channels": "*", "freq": [16, 24]},
	    {"id": "cross", "type": "envelope", "channels": "*", "freq": [5, 7], "targetFreq": [16, 24], "correction": "fdr"}]}`
	_, res := runFig(t, rc, &dataset.Dataset{Name: "synth", Epochs: e}, 1)
	get := func(name string) string {
		for _, f := range res.Figures {
			if f.Name == name {
				return f.SVG
			}
		}
		t.Fatalf("no figure %s in %v", name, figureNames(res))
		return ""
	}
	same := get("same_network")
	if !strings.Contains(same, "the 4 strongest pairs") || !strings.Contains(same, "the 4 strongest of 6 pairs (no test in the recipe)") {
		t.Error("the untested network does not say it shows the 4 strongest pairs")
	}
	if n := strings.Count(same, ": r = "); n != 4 {
		t.Errorf("%d lines drawn, want 4", n)
	}
	cross := get("cross_network")
	if !strings.Contains(cross, "arrows: ") || !strings.Contains(cross, "q ≤ 0.05 (fdr)") {
		t.Error("the cross-frequency network has no arrow legend or no test named")
	}
	// every arrow drawn is a row with q ≤ 0.05
	passed := 0
	for _, r := range res.Rows {
		if r.Analysis == "cross" && figures.Significant(r, "q") {
			passed++
			if !strings.Contains(cross, r.Seed+" → "+r.Target+": r = ") {
				t.Errorf("no arrow %s → %s", r.Seed, r.Target)
			}
		}
	}
	if n := strings.Count(cross, " → ") - strings.Count(cross, "arrows: "); n != passed {
		t.Errorf("%d arrows, %d rows pass", n, passed)
	}
}
