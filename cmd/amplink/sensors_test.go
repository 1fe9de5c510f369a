package main

import (
	"bytes"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"amplink/core/data"
	"amplink/core/demo"
	"amplink/core/format/csv"
	"amplink/core/sensors"
)

// sensorRecipe is the demo's beta-to-delta and posterior-alpha analyses
// with fewer permutations and surrogates.
const sensorRecipe = `{
  "epochs": {"event": "tone", "start": -1.5, "end": 2.0},
  "spectral": {"method": "wavelet", "low": 2, "high": 30, "steps": 20, "spacing": "log", "cycles": [3, 10]},
  "analyses": [
    {"id": "beta-to-delta", "type": "trial-window", "method": "spearman",
     "seed":   {"channel": "C4", "time": [-0.5, -0.1], "freq": [15, 25]},
     "target": {"channel": "*",  "time": [0.3, 0.8],   "freq": [1.5, 3.5]},
     "permutations": 1000, "randomSeed": 7, "correction": "fdr"},
    {"id": "posterior-alpha", "type": "envelope", "channels": ["O1", "O2", "P3", "P4"], "freq": [8, 12],
     "leakageCorrection": "pairwise", "envelopeRate": 50, "surrogates": 100, "randomSeed": 7}
  ]
}`

var (
	plotAreaRE = regexp.MustCompile(`id="plot-area"[^>]*data-left="([^"]+)" data-top="([^"]+)" data-width="([^"]+)" data-height="([^"]+)" data-xmin="([^"]+)" data-xmax="([^"]+)" data-ymin="([^"]+)" data-ymax="([^"]+)"`)
	bandRE     = regexp.MustCompile(`<path fill="(#[0-9a-f]{6})" d="([^"]+)"/>`)
	cellRE     = regexp.MustCompile(`M([-0-9.]+) ([-0-9.]+)h([-0-9.]+)v([-0-9.]+)h[-0-9.]+z`)
)

// electrodeAt returns the page position (viewBox units) of a channel's
// marker: the centre of its circle or diamond.
func electrodeAt(t *testing.T, svg, name string) (float64, float64) {
	t.Helper()
	i := strings.Index(svg, `data-channel="`+name+`"`)
	if i < 0 {
		t.Fatalf("no electrode %s", name)
	}
	g := svg[i:]
	g = g[:strings.Index(g, "</g>")]
	if m := regexp.MustCompile(`<circle cx="([^"]+)" cy="([^"]+)"`).FindStringSubmatch(g); m != nil {
		x, _ := strconv.ParseFloat(m[1], 64)
		y, _ := strconv.ParseFloat(m[2], 64)
		return x, y
	}
	t.Fatalf("electrode %s has no marker", name)
	return 0, 0
}

type pageGeom struct{ left, top, width, height, xmin, xmax, ymin, ymax float64 }

func geomOf(t *testing.T, svg string) pageGeom {
	t.Helper()
	m := plotAreaRE.FindStringSubmatch(svg)
	if m == nil {
		t.Fatal("no plot area")
	}
	var v [8]float64
	for i := range v {
		v[i], _ = strconv.ParseFloat(m[i+1], 64)
	}
	return pageGeom{v[0], v[1], v[2], v[3], v[4], v[5], v[6], v[7]}
}

// toPlane maps viewBox units to the page plane of the projection.
func (g pageGeom) toPlane(px, py float64) (float64, float64) {
	return g.xmin + (px-g.left)/g.width*(g.xmax-g.xmin), g.ymax - (py-g.top)/g.height*(g.ymax-g.ymin)
}

// TestRunDemoSensorViews: amplink run on the demo draws the C4 scalp map
// with its peak at Pz and the posterior network with O1–O2 the strongest
// line, every placed channel labelled; an electrodes.tsv beside the demo
// (or given with --electrodes) moves the electrode it moves.
func TestRunDemoSensorViews(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the demo")
	}
	dir := t.TempDir()
	var stdout, stderr bytes.Buffer
	if err := run(&stdout, &stderr, []string{"demo", "--out", dir}); err != nil {
		t.Fatal(err)
	}
	rp := filepath.Join(dir, "sensors.json")
	if err := os.WriteFile(rp, []byte(sensorRecipe), 0o644); err != nil {
		t.Fatal(err)
	}
	in := filepath.Join(dir, "demo_edf.edf")
	runTo := func(out string, extra ...string) map[string]string {
		t.Helper()
		stderr.Reset()
		args := append([]string{"run", "--recipe", rp, "--out", out}, extra...)
		if err := run(&stdout, &stderr, append(args, in)); err != nil {
			t.Fatalf("run: %v\n%s", err, stderr.String())
		}
		figs := map[string]string{}
		for _, n := range []string{"beta-to-delta_scalp_C4.svg", "posterior-alpha_network.svg"} {
			b, err := os.ReadFile(filepath.Join(out, "figures", n))
			if err != nil {
				t.Fatal(err)
			}
			figs[n] = string(b)
		}
		return figs
	}
	figs := runTo(filepath.Join(dir, "out"))
	scalp, network := figs["beta-to-delta_scalp_C4.svg"], figs["posterior-alpha_network.svg"]
	for _, n := range demo.ChannelNames {
		if !strings.Contains(scalp, ">"+n+"</text>") || !strings.Contains(scalp, `data-channel="`+n+`"`) {
			t.Errorf("scalp map: %s is not labelled", n)
		}
	}
	for _, n := range []string{"O1", "O2", "P3", "P4"} {
		if !strings.Contains(network, ">"+n+"</text>") {
			t.Errorf("network: %s is not labelled", n)
		}
	}
	// The planted effect is at Pz (core/demo): the cells of the top colour
	// band of the map lie around Pz's position on the projection.
	g := geomOf(t, scalp)
	// the band of the cell under the Pz marker (each band is one path of
	// cells "Mx yhWvHh−Wz"), and the centre of all the cells of that band
	type cell struct{ x, y, w, h float64 }
	bands := map[string][]cell{}
	for _, m := range bandRE.FindAllStringSubmatch(scalp, -1) {
		for _, c := range cellRE.FindAllStringSubmatch(m[2], -1) {
			var v [4]float64
			for k := range v {
				v[k], _ = strconv.ParseFloat(c[k+1], 64)
			}
			bands[m[1]] = append(bands[m[1]], cell{v[0], v[1], v[2], v[3]})
		}
	}
	px, py := electrodeAt(t, scalp, "Pz")
	top := ""
	for colour, cs := range bands {
		for _, c := range cs {
			if px >= c.x && px < c.x+c.w-0.3 && py >= c.y && py < c.y+c.h-0.3 {
				top = colour
			}
		}
	}
	if top == "" {
		t.Fatal("no map cell under Pz")
	}
	var sx, sy, sw float64
	for _, c := range bands[top] {
		sx += (c.x + c.w/2) * c.w * c.h
		sy += (c.y + c.h/2) * c.w * c.h
		sw += c.w * c.h
	}
	cx, cy := g.toPlane(sx/sw, sy/sw)
	pz, _, _ := sensors.Standard("Pz")
	wx, wy := sensors.Project(pz)
	if d := math.Hypot(cx-wx, cy-wy); d > 0.1 {
		t.Errorf("the band under Pz is centred at (%.2f, %.2f), %.2f from Pz (%.2f, %.2f)", cx, cy, d, wx, wy)
	}
	// Pz is the only significant channel of the demo's effect, drawn
	// filled; C4 is the seed's diamond.
	if pzg := scalp[strings.Index(scalp, `data-channel="Pz"`):]; !strings.Contains(pzg[:strings.Index(pzg, "</g>")], `fill="#222222" stroke`) {
		t.Error("Pz is not marked significant")
	}
	if !strings.Contains(scalp, `aria-label="C4: ρ = `) || !strings.Contains(scalp, "(seed)") {
		t.Error("C4 is not the seed")
	}
	// O1–O2 is the strongest line (drawn last, widest).
	titles := regexp.MustCompile(`<title>([A-Z0-9]+)–([A-Z0-9]+): r = ([^<]+)</title>`).FindAllStringSubmatch(network, -1)
	if len(titles) == 0 {
		t.Fatal("no lines in the network")
	}
	if last := titles[len(titles)-1]; last[1]+"–"+last[2] != "O1–O2" {
		t.Errorf("strongest line %s–%s, want O1–O2 (lines %v)", last[1], last[2], titles)
	}

	// An electrodes.tsv beside the recording: every channel at its built-in
	// position (in mm on a 90 mm sphere), except Pz, moved to where POz is.
	var b strings.Builder
	b.WriteString("name\tx\ty\tz\ttype\n")
	for _, n := range demo.ChannelNames {
		p, _, _ := sensors.Standard(n)
		if n == "Pz" {
			p, _, _ = sensors.Standard("POz")
		}
		fmt.Fprintf(&b, "%s\t%.4f\t%.4f\t%.4f\tEEG\n", n, 90*p.X, 90*p.Y, 90*p.Z)
	}
	side := filepath.Join(dir, "demo_edf_electrodes.tsv")
	if err := os.WriteFile(side, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "demo_edf_coordsystem.json"), []byte(`{"EEGCoordinateSystem": "CapTrak", "EEGCoordinateUnits": "mm"}`), 0o644); err != nil {
		t.Fatal(err)
	}
	moved := runTo(filepath.Join(dir, "moved"))["beta-to-delta_scalp_C4.svg"]
	if !strings.Contains(stderr.String(), "electrode positions from "+side) {
		t.Errorf("no note of the positions' file:\n%s", stderr.String())
	}
	gm := geomOf(t, moved)
	poz, _, _ := sensors.Standard("POz")
	for _, c := range []struct {
		name string
		want sensors.Point
	}{{"Pz", poz}, {"Cz", sensors.Point{X: 0, Y: 0, Z: 1}}} {
		x, y := gm.toPlane(electrodeAt(t, moved, c.name))
		wx, wy := sensors.Project(c.want)
		if math.Hypot(x-wx, y-wy) > 0.01 {
			t.Errorf("with the electrodes.tsv, %s is drawn at (%.3f, %.3f), want (%.3f, %.3f)", c.name, x, y, wx, wy)
		}
	}
	x0, y0 := g.toPlane(electrodeAt(t, scalp, "Pz"))
	x1, y1 := gm.toPlane(electrodeAt(t, moved, "Pz"))
	if math.Hypot(x1-x0, y1-y0) < 0.15 {
		t.Errorf("Pz did not move: (%.3f, %.3f) → (%.3f, %.3f)", x0, y0, x1, y1)
	}
	// The same file given with --electrodes from elsewhere, after the
	// sibling is removed.
	other := filepath.Join(t.TempDir(), "cap_electrodes.tsv")
	os.Rename(side, other)
	flagged := runTo(filepath.Join(dir, "flagged"), "--electrodes", other)["beta-to-delta_scalp_C4.svg"]
	if flagged != moved {
		t.Error("--electrodes draws a different map from the same file beside the recording")
	}
	// A NaN position is refused with the file and line (line 6 is Fz's:
	// the header, then Fp1, Fp2, F7, F3).
	lines := strings.Split(b.String(), "\n")
	f := strings.Split(lines[5], "\t")
	f[3] = "NaN"
	lines[5] = strings.Join(f, "\t")
	if err := os.WriteFile(other, []byte(strings.Join(lines, "\n")), 0o644); err != nil {
		t.Fatal(err)
	}
	err := run(&stdout, &stderr, []string{"run", "--recipe", rp, "--out", filepath.Join(dir, "bad"), "--electrodes", other, in})
	if err == nil || !strings.Contains(err.Error(), other+":6:4: z of electrode \"Fz\" is \"NaN\"") {
		t.Errorf("a NaN position gives %v", err)
	}
}

// TestRunNoPositions: channels named ch1, ch2, … have no position, so no
// scalp map is drawn and the notes say why.
func TestRunNoPositions(t *testing.T) {
	dir := t.TempDir()
	e := data.NewEpochs(100, -1, []data.Channel{{Name: "ch1"}, {Name: "ch2"}, {Name: "ch3"}, {Name: "ch4"}, {Name: "ch5"}}, 12, 201)
	for tr := range e.NTrials {
		for ch := range e.Channels {
			x := e.Trial(tr, ch)
			for k := range x {
				x[k] = float32(math.Sin(float64(k*(ch+1)+tr) * 0.37))
			}
		}
	}
	var b bytes.Buffer
	if err := csv.WriteEpochs(&b, e); err != nil {
		t.Fatal(err)
	}
	in := filepath.Join(dir, "lab.csv")
	os.WriteFile(in, b.Bytes(), 0o644)
	rp := filepath.Join(dir, "r.json")
	os.WriteFile(rp, []byte(`{"spectral": {"low": 3, "high": 30, "steps": 8, "cycles": [3, 6]},
	  "analyses": [{"id": "lab", "type": "trial-window",
	    "seed": {"channel": "ch1", "time": [-0.6, -0.2], "freq": [10, 14]},
	    "target": {"channel": "*", "time": [0.3, 0.7], "freq": [3, 5]}}]}`), 0o644)
	var stdout, stderr bytes.Buffer
	out := filepath.Join(dir, "out")
	if err := run(&stdout, &stderr, []string{"run", "--recipe", rp, "--out", out, in}); err != nil {
		t.Fatalf("run: %v\n%s", err, stderr.String())
	}
	figs, _ := filepath.Glob(filepath.Join(out, "figures", "*_scalp_*"))
	if len(figs) != 0 {
		t.Errorf("scalp maps drawn without positions: %v", figs)
	}
	for _, want := range []string{
		"note: lab: no position for ch1, ch2, ch3, ch4, ch5 in the built-in 10-10 positions; left out of the sensor views",
		"note: lab: no scalp map, since only 0 of its 5 channels have a position (at least 4 are needed)",
	} {
		if !strings.Contains(stderr.String(), want) {
			t.Errorf("stderr lacks %q:\n%s", want, stderr.String())
		}
	}
}
