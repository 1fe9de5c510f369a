package job

import (
	"archive/zip"
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"amplink/app/wire"
	"amplink/core/data"
	"amplink/core/dataset"
	"amplink/core/demo"
	"amplink/core/format"
	"amplink/core/pipeline"
	"amplink/core/recipe"
	"amplink/core/report"
)

func TestUnitsRoundTrip(t *testing.T) {
	cases := []struct {
		name string
		in   []pipeline.UnitResult
	}{
		{"none", nil},
		{"empty values", []pipeline.UnitResult{{ID: 3}}},
		{"special values", []pipeline.UnitResult{{ID: 0, Values: []float64{math.NaN(), math.Inf(1), math.Inf(-1), -0.0, 5e-324, math.MaxFloat64}}}},
		{"several", []pipeline.UnitResult{{ID: 2, Values: []float64{1, 2}}, {ID: 0, Values: []float64{0.1}}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, err := DecodeUnits(EncodeUnits(c.in))
			if err != nil {
				t.Fatal(err)
			}
			if len(got) != len(c.in) {
				t.Fatalf("%d units, want %d", len(got), len(c.in))
			}
			for i := range got {
				if got[i].ID != c.in[i].ID || len(got[i].Values) != len(c.in[i].Values) {
					t.Fatalf("unit %d: %+v, want %+v", i, got[i], c.in[i])
				}
				for k, v := range got[i].Values {
					// bit for bit, NaN and the sign of zero included
					if math.Float64bits(v) != math.Float64bits(c.in[i].Values[k]) {
						t.Errorf("unit %d value %d: %v, want %v", i, k, v, c.in[i].Values[k])
					}
				}
			}
		})
	}
}

// TestUnitsLayout checks the bytes against the layout in units.go, written
// out by hand (little-endian, IEEE 754 binary64: 1.0 = 0x3FF0000000000000).
func TestUnitsLayout(t *testing.T) {
	got := EncodeUnits([]pipeline.UnitResult{{ID: 5, Values: []float64{1}}})
	want := []byte{1, 0, 0, 0, 5, 0, 0, 0, 1, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0xf0, 0x3f}
	if !bytes.Equal(got, want) {
		t.Fatalf("bytes % x, want % x", got, want)
	}
}

func TestDecodeUnitsErrors(t *testing.T) {
	cases := []struct {
		name string
		in   []byte
		want string
	}{
		{"short", []byte{1, 0}, "2 bytes"},
		{"count too big", []byte{0xff, 0xff, 0xff, 0x0f}, "cannot fit"},
		{"values truncated", []byte{1, 0, 0, 0, 0, 0, 0, 0, 2, 0, 0, 0, 1, 2, 3}, "values truncated at byte 12"},
		{"left over", append(EncodeUnits([]pipeline.UnitResult{{ID: 1}}), 9), "1 bytes left over"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := DecodeUnits(c.in)
			if err == nil || !errors.Is(err, ErrUnitBytes) || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error %v, want %q", err, c.want)
			}
		})
	}
}

// FuzzDecodeUnits: any bytes give units or an error, never a panic, and
// what decodes re-encodes to the same bytes.
func FuzzDecodeUnits(f *testing.F) {
	seeds, _ := filepath.Glob(filepath.Join("testdata", "*.units"))
	for _, s := range seeds {
		b, err := os.ReadFile(s)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Add(EncodeUnits([]pipeline.UnitResult{{ID: 1, Values: []float64{math.NaN()}}}))
	f.Fuzz(func(t *testing.T, b []byte) {
		u, err := DecodeUnits(b)
		if err != nil {
			return
		}
		if got := EncodeUnits(u); !bytes.Equal(got, b) {
			t.Fatalf("re-encoding changed the bytes")
		}
	})
}

func TestAssign(t *testing.T) {
	units := []pipeline.Unit{{ID: 0, Cost: 5}, {ID: 1, Cost: 1}, {ID: 2, Cost: 4}, {ID: 3, Cost: 3}, {ID: 4, Cost: 3}}
	cases := []struct {
		name string
		n    int
		want [][]int
	}{
		{"one worker", 1, [][]int{{0, 1, 2, 3, 4}}},
		// longest first onto the least loaded: 5→w0, 4→w1, 3 (id 3)→w1 (4 < 5), 3 (id 4)→w0 (5 < 7), 1→w1 (7 < 8)
		{"two workers", 2, [][]int{{0, 4}, {1, 2, 3}}},
		{"more workers than units", 7, [][]int{{0}, {2}, {3}, {4}, {1}, nil, nil}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := Assign(units, c.n)
			if !reflect.DeepEqual(got, c.want) {
				t.Fatalf("Assign = %v, want %v", got, c.want)
			}
			seen := map[int]bool{}
			for _, l := range got {
				for _, id := range l {
					if seen[id] {
						t.Fatalf("unit %d assigned twice", id)
					}
					seen[id] = true
				}
			}
			if len(seen) != len(units) {
				t.Fatalf("%d of %d units assigned", len(seen), len(units))
			}
		})
	}
}

// replies collects what a Worker posts.
type replies struct {
	reps []wire.Reply
	bufs [][][]byte
}

func (r *replies) post(rep wire.Reply, bufs [][]byte) {
	r.reps = append(r.reps, rep)
	r.bufs = append(r.bufs, bufs)
}

func (r *replies) last(t *testing.T, op string) (wire.Reply, [][]byte) {
	t.Helper()
	if len(r.reps) == 0 {
		t.Fatalf("no reply, want %s", op)
	}
	rep := r.reps[len(r.reps)-1]
	if rep.Op != op {
		t.Fatalf("reply %s (%s), want %s", rep.Op, rep.Error, op)
	}
	return rep, r.bufs[len(r.bufs)-1]
}

// trialsCSV is a small epoched recording (trial,time,C4,Pz; 250 Hz; 16
// trials of −1.5…2 s) whose C4 beta before 0 s and Pz delta after it share
// a per-trial gain, so the two window powers co-vary across trials.
func trialsCSV() []byte {
	var b strings.Builder
	b.WriteString("trial,time,C4,Pz\n")
	const rate = 250.0
	for tr := 0; tr < 16; tr++ {
		a := 1 + float64((tr*7)%11)/5
		for k := 0; k <= 875; k++ {
			tm := -1.5 + float64(k)/rate
			noise := math.Sin(float64(k*13+tr*101)) * 0.3
			c4 := noise + a*math.Sin(2*math.Pi*20*tm)*math.Exp(-math.Pow((tm+0.3)/0.15, 2))
			pz := noise*0.7 + a*math.Sin(2*math.Pi*2.5*tm)*math.Exp(-math.Pow((tm-0.55)/0.3, 2))
			fmt.Fprintf(&b, "%d,%.3f,%.6f,%.6f\n", tr+1, tm, c4, pz)
		}
	}
	return []byte(b.String())
}

const smallRecipe = `{"spectral": {"low": 2, "high": 30, "steps": 10},
 "analyses": [{"id": "w", "type": "trial-window",
   "seed": {"channel": "C4", "time": [-0.5, -0.1], "freq": [15, 25]},
   "target": {"channel": "*", "time": [0.3, 0.8], "freq": [2, 4]},
   "permutations": 200, "randomSeed": 3, "correction": "fdr"}]}`

// TestSplitEqualsRun runs a recording the way the page does — units split
// over W workers, each decoding its own copy of the bytes, then Finish on
// worker 0 — and compares results.csv with pipeline.Run natively: they must
// be byte-identical, whatever W.
func TestSplitEqualsRun(t *testing.T) {
	data := trialsCSV()
	src := wire.Source{Name: "trials.csv"}
	r, err := recipe.Parse([]byte(smallRecipe))
	if err != nil {
		t.Fatal(err)
	}
	ds, err := Open(r, src, Files{"trials.csv": format.Bytes("trials.csv", data)})
	if err != nil {
		t.Fatal(err)
	}
	res, err := pipeline.Run(context.Background(), r, ds, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Rows) == 0 {
		t.Fatal("no rows")
	}
	// the page's table has the recording column, as amplink run writes it
	AddRecording(res, "trials.csv")
	var want bytes.Buffer
	if err := report.WriteCSV(&want, res); err != nil {
		t.Fatal(err)
	}
	wantFiles, err := report.Outputs(res)
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range []int{1, 2, 3} {
		t.Run(strings.Repeat("w", n), func(t *testing.T) {
			workers := make([]*Worker, n)
			var unitBufs [][]byte
			var names []string
			progress := 0
			for k := range workers {
				workers[k] = &Worker{}
				var rp replies
				// each worker gets its own copy, as a transferred buffer is
				workers[k].Handle(context.Background(), wire.Request{Op: wire.OpRun, Seq: 4, Source: src, Recipe: []byte(smallRecipe), Worker: k, Workers: n},
					[]string{"trials.csv"}, [][]byte{append([]byte(nil), data...)}, rp.post)
				_, bufs := rp.last(t, wire.OpUnits)
				for _, rep := range rp.reps {
					if rep.Op == wire.OpProgress {
						progress++
					}
				}
				unitBufs = append(unitBufs, bufs[0])
				names = append(names, "units")
			}
			var rp replies
			workers[0].Handle(context.Background(), wire.Request{Op: wire.OpFinish, Seq: 4}, names, unitBufs, rp.post)
			rep, out := rp.last(t, wire.OpResults)
			if len(out) != 2+len(rep.Figures) || len(rep.Figures) != len(res.Figures) {
				t.Fatalf("%d buffers for %d figures (native %d)", len(out), len(rep.Figures), len(res.Figures))
			}
			if !json.Valid(out[0]) {
				t.Error("buffer 0 is not results.json")
			}
			// buffer 1 is the archive: the CLI's files, byte for byte
			zr, err := zip.NewReader(bytes.NewReader(out[1]), int64(len(out[1])))
			if err != nil {
				t.Fatalf("buffer 1 is not a zip archive: %v", err)
			}
			got := map[string]string{}
			for _, zf := range zr.File {
				rc, _ := zf.Open()
				b, _ := io.ReadAll(rc)
				rc.Close()
				got[zf.Name] = string(b)
			}
			for _, f := range wantFiles {
				if got[f.Name] != string(f.Data) {
					t.Errorf("archive: %s differs from the CLI's (or is missing)", f.Name)
				}
			}
			if len(got) != len(wantFiles) {
				t.Errorf("archive has %d files, the CLI writes %d", len(got), len(wantFiles))
			}
			if rep.ResolvedRecipe != string(res.Recipe) {
				t.Errorf("recipe.json differs from the resolved recipe:\n%s\nwant\n%s", rep.ResolvedRecipe, res.Recipe)
			}
			var phases []string
			for _, r := range rp.reps {
				if r.Op == wire.OpPhase {
					phases = append(phases, r.Phase)
				}
			}
			if want := []string{wire.PhaseCombining, wire.PhaseDrawing, wire.PhasePacking}; !reflect.DeepEqual(phases, want) {
				t.Errorf("finish phases %v, want %v", phases, want)
			}
			for i, f := range res.Figures {
				if string(out[2+i]) != f.SVG || rep.Figures[i].Name != f.Name {
					t.Errorf("figure %d (%s) differs from the native one", i, f.Name)
				}
			}
			if rep.CSV != want.String() {
				t.Fatalf("split results.csv differs from pipeline.Run:\n%s\nwant\n%s", rep.CSV, want.String())
			}
			if progress == 0 {
				t.Error("no progress replies")
			}
		})
	}
	// a finish with a unit missing is refused, not half-done
	var w Worker
	var rp replies
	w.Handle(context.Background(), wire.Request{Op: wire.OpRun, Seq: 5, Source: src, Recipe: []byte(smallRecipe), Workers: 2}, []string{"trials.csv"}, [][]byte{data}, rp.post)
	_, bufs := rp.last(t, wire.OpUnits)
	w.Handle(context.Background(), wire.Request{Op: wire.OpFinish, Seq: 5}, []string{"units"}, bufs[0:1], rp.post)
	if rep, _ := rp.last(t, wire.OpError); !strings.Contains(rep.Error, "unit results for") {
		t.Errorf("finish with half the units: %q", rep.Error)
	}
}

// lowRecipe asks for a 1e-6 Hz wavelet, some 1e9 samples long at 500 Hz.
var lowRecipe = []byte(`{"epochs":{"event":"tone","start":-1.5,"end":2},"spectral":{"low":1e-6,"high":40,"steps":5},"analyses":[{"type":"trial-window","seed":{"channel":"C4","time":[-0.5,-0.1],"freq":[15,25]},"target":{"channel":"Pz","time":[0.3,0.8],"freq":[15,25]}}]}`)

func TestHandleErrors(t *testing.T) {
	csvBad := []byte("trial,time,C4\n1,0,abc\n")
	cases := []struct {
		name  string
		req   wire.Request
		names []string
		bufs  [][]byte
		want  string
	}{
		{"bad recipe", wire.Request{Op: wire.OpRun, Source: wire.Source{Demo: true}, Recipe: []byte(`{"analyses":[{"type":"trial-window","seed":{"channel":"C4","time":[0,1],"freq":[30,20]}}]}`)}, nil, nil, "analyses[0].seed.freq"},
		{"bad file", wire.Request{Op: wire.OpDescribe, Source: wire.Source{Name: "x.csv"}}, []string{"x.csv"}, [][]byte{csvBad}, "x.csv:2"},
		{"missing bytes", wire.Request{Op: wire.OpDescribe, Source: wire.Source{Name: "x.csv"}}, nil, nil, `no bytes for "x.csv"`},
		{"finish without run", wire.Request{Op: wire.OpFinish, Seq: 9}, nil, nil, "finish without a matching run"},
		{"unknown op", wire.Request{Op: "dance"}, nil, nil, `unknown operation "dance"`},
		{"names and buffers", wire.Request{Op: wire.OpDescribe}, []string{"a", "b"}, [][]byte{nil}, "2 file names for 1 buffers"},
		// The page's workers run the same bound: a message, not a crashed worker.
		{"wavelet longer than the data", wire.Request{Op: wire.OpRun, Source: wire.Source{Demo: true}, Recipe: lowRecipe}, nil, nil, "spectral.low: the 1e-06 Hz wavelet"},
		{"power map wavelet longer than the data", wire.Request{Op: wire.OpPower, Source: wire.Source{Demo: true}, Recipe: lowRecipe, Channel: "C4"}, nil, nil, "the 1e-06 Hz wavelet"},
		{"unknown channel", wire.Request{Op: wire.OpPower, Source: wire.Source{Demo: true}, Recipe: demo.Recipe(), Channel: "nope"}, nil, nil, `no channel "nope"`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var w Worker
			var rp replies
			w.Handle(context.Background(), c.req, c.names, c.bufs, rp.post)
			rep, _ := rp.last(t, wire.OpError)
			if !strings.Contains(rep.Error, c.want) {
				t.Fatalf("error %q, want %q", rep.Error, c.want)
			}
		})
	}
}

func TestDescribeDemo(t *testing.T) {
	var w Worker
	var rp replies
	w.Handle(context.Background(), wire.Request{Op: wire.OpDemo, Seq: 1, Source: wire.Source{Demo: true}}, nil, nil, rp.post)
	rep, _ := rp.last(t, wire.OpSummary)
	var s dataset.Summary
	if err := json.Unmarshal(rep.Summary, &s); err != nil {
		t.Fatal(err)
	}
	if s.Trials == 0 || len(s.Channels) == 0 || s.Rate == 0 {
		t.Fatalf("demo summary %+v", s)
	}
	if !bytes.Equal(rep.Recipe, demo.Recipe()) {
		t.Error("the demo summary does not carry the demo recipe")
	}
}

// TestPower draws the check map for one demo channel: an SVG with the
// plot-area geometry the page maps pointer positions through.
func TestPower(t *testing.T) {
	fig, err := Power(wire.Request{Op: wire.OpPower, Source: wire.Source{Demo: true}, Recipe: demo.Recipe(), Channel: "C4"}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"<svg", `id="plot-area"`, `data-xmin="`, `data-ylog="true"`, "beta-to-delta seed"} {
		if !strings.Contains(fig.SVG, want) {
			t.Errorf("power SVG lacks %s", want)
		}
	}
}

// TestTooLarge: a recording beyond the worker's sample budget is refused
// with a message that says what the page holds and where to go instead.
func TestTooLarge(t *testing.T) {
	defer func(v int64) { data.MaxSampleBytes = v }(data.MaxSampleBytes)
	data.MaxSampleBytes = 4096
	var w Worker
	var rp replies
	w.Handle(context.Background(), wire.Request{Op: wire.OpDescribe, Source: wire.Source{Name: "trials.csv"}}, []string{"trials.csv"}, [][]byte{trialsCSV()}, rp.post)
	rep, _ := rp.last(t, wire.OpError)
	for _, want := range []string{"trials.csv", "as float32", "amplink run"} {
		if !strings.Contains(rep.Error, want) {
			t.Errorf("error %q lacks %q", rep.Error, want)
		}
	}
}

// TestPowerFreshForm: the power map needs only a channel and the spectral
// settings, so a form whose analysis is still empty gets its map, and a
// wrong spectral setting is still reported by its field.
func TestPowerFreshForm(t *testing.T) {
	cases := []struct {
		name, recipe, want string
	}{
		{"fresh form", `{"epochs":{"event":"tone","start":-1.5,"end":2},"spectral":{"method":"wavelet"},"analyses":[{"type":"trial-window"}]}`, ""},
		{"one of two analyses complete", `{"epochs":{"event":"tone","start":-1.5,"end":2},"analyses":[{"type":"trial-window","seed":{"channel":"Pz","time":[0.3,0.8],"freq":[2,4]},"target":{"channel":"Pz","time":[0.3,0.8],"freq":[2,4]}},{"type":"envelope"}]}`, ""},
		{"bad spectral setting", `{"epochs":{"event":"tone","start":-1.5,"end":2},"spectral":{"low":30,"high":10},"analyses":[{"type":"trial-window"}]}`, "spectral"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			fig, err := Power(wire.Request{Op: wire.OpPower, Source: wire.Source{Demo: true}, Recipe: []byte(c.recipe), Channel: "Pz"}, nil)
			if c.want != "" {
				if err == nil || !strings.Contains(err.Error(), c.want) {
					t.Fatalf("error %v, want one naming %q", err, c.want)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if !strings.Contains(fig.SVG, "<svg") {
				t.Fatal("no figure")
			}
			if strings.Contains(c.name, "complete") && !strings.Contains(fig.SVG, "a1 seed") {
				t.Error("the complete analysis's window is not outlined")
			}
		})
	}
}

// TestCompanionsByContent: a trials table and a channels table whose names
// say nothing are used when the page names their roles, as
// `amplink run --trials` and a <stem>_channels.tsv are.
func TestCompanionsByContent(t *testing.T) {
	recBytes := trialsCSV()
	var trials strings.Builder
	trials.WriteString("trial,rt\n")
	r, err := recipe.Parse([]byte(smallRecipe))
	if err != nil {
		t.Fatal(err)
	}
	base, err := Open(r, wire.Source{Name: "rec.csv"}, Files{"rec.csv": format.Bytes("rec.csv", recBytes)})
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i < base.Epochs.NTrials; i++ {
		fmt.Fprintf(&trials, "%s,%d\n", dataset.TrialID(base.Epochs, i), 100+i)
	}
	chans := "name\ttype\tunits\tstatus\nC4\tEEG\tuV\tgood\nPz\tEEG\tuV\tbad\n"
	files := Files{
		"rec.csv":     format.Bytes("rec.csv", recBytes),
		"values.txt":  format.Bytes("values.txt", []byte(trials.String())),
		"montage.txt": format.Bytes("montage.txt", []byte(chans)),
	}
	ds, err := Open(r, wire.Source{Name: "rec.csv", TrialsName: "values.txt", ChannelsName: "montage.txt"}, files)
	if err != nil {
		t.Fatal(err)
	}
	if got := ds.Epochs.TrialInfo[3].Extra["rt"]; got != "103" {
		t.Errorf("trial 4's rt = %q, want 103 (from values.txt)", got)
	}
	if data.Lookup(ds.Epochs.Channels, "Pz") >= 0 {
		t.Error("Pz is marked bad in montage.txt but was kept")
	}
	if !strings.Contains(strings.Join(ds.Notes, "; "), "montage.txt") {
		t.Errorf("notes %v do not name montage.txt", ds.Notes)
	}
}

// TestDescribeRecognises: files sent without roles are recognised by their
// content; the reply says what each was taken as, and the roles the user
// sets instead are followed.
func TestDescribeRecognises(t *testing.T) {
	rec := trialsCSV()
	trials := []byte("trial,rt\n1,0.5\n")
	recipeText := []byte(smallRecipe)
	names := []string{"x.dat", "y.dat", "z.dat"}
	bufs := [][]byte{trials, rec, recipeText}
	var w Worker
	var rp replies
	w.Handle(context.Background(), wire.Request{Op: wire.OpDescribe, Seq: 1}, names, bufs, rp.post)
	rep, _ := rp.last(t, wire.OpSummary)
	if want := []string{"trials", "recording", "recipe"}; !reflect.DeepEqual(rep.Roles, want) {
		t.Fatalf("roles %v, want %v", rep.Roles, want)
	}
	if rep.Source == nil || rep.Source.Name != "y.dat" || rep.Source.TrialsName != "x.dat" {
		t.Fatalf("source %+v", rep.Source)
	}
	if rep.RecipeText != smallRecipe {
		t.Errorf("recipe text %q", rep.RecipeText)
	}
	// the user says the first file is a recording too: two recordings
	rp = replies{}
	w.Handle(context.Background(), wire.Request{Op: wire.OpDescribe, Seq: 2, Roles: []string{"recording", "recording", "recipe"}}, names, bufs, rp.post)
	if rep, _ := rp.last(t, wire.OpError); !strings.Contains(rep.Error, "one at a time") {
		t.Errorf("two recordings: %q", rep.Error)
	}
}

// TestPowerWindowsOnce: the demo's four trial-window analyses share one
// seed window on C4; it is outlined once, with every label in one line.
func TestPowerWindowsOnce(t *testing.T) {
	fig, err := Power(wire.Request{Op: wire.OpPower, Source: wire.Source{Demo: true}, Recipe: demo.Recipe(), Channel: "C4"}, nil)
	if err != nil {
		t.Fatal(err)
	}
	// each box has a <title> and a text label
	if n := strings.Count(fig.SVG, "<title>beta-to-delta seed"); n != 1 {
		t.Errorf("the beta-to-delta seed window is outlined %d times", n)
	}
	if !strings.Contains(fig.SVG, "beta-to-delta seed, beta-to-delta-by-outcome seed") {
		t.Error("coinciding windows are not labelled together")
	}
}

// wideCSV is trialsCSV with three more channels (A, B, C: Pz with more
// noise), so that a "*" target has more channels than get a power map
// before the rows exist.
func wideCSV() []byte {
	lines := strings.Split(strings.TrimSpace(string(trialsCSV())), "\n")
	var b strings.Builder
	b.WriteString(lines[0] + ",A,B,C\n")
	for i, l := range lines[1:] {
		f := strings.Split(l, ",")
		pz, _ := strconv.ParseFloat(f[3], 64)
		fmt.Fprintf(&b, "%s,%.6f,%.6f,%.6f\n", l, pz+0.2*math.Sin(float64(i)), pz+0.4*math.Cos(float64(3*i)), 0.5*math.Sin(float64(7*i)))
	}
	return []byte(b.String())
}

// The power maps of the strongest rows (figures.Plan.Late) go out to the
// workers after OpFinish (OpLate, OpDrawUnits) and come back to worker 0
// (OpDraw): results and figures equal pipeline.Run's byte for byte, with
// the maps computed on two workers.
func TestLateFigureUnitsSpread(t *testing.T) {
	data := wideCSV()
	src := wire.Source{Name: "wide.csv"}
	r, err := recipe.Parse([]byte(smallRecipe))
	if err != nil {
		t.Fatal(err)
	}
	ds, err := Open(r, src, Files{"wide.csv": format.Bytes("wide.csv", data)})
	if err != nil {
		t.Fatal(err)
	}
	res, err := pipeline.Run(context.Background(), r, ds, nil)
	if err != nil {
		t.Fatal(err)
	}
	AddRecording(res, "wide.csv")
	var want bytes.Buffer
	if err := report.WriteCSV(&want, res); err != nil {
		t.Fatal(err)
	}
	workers := []*Worker{{}, {}}
	var unitBufs [][]byte
	for k, w := range workers {
		var rp replies
		w.Handle(context.Background(), wire.Request{Op: wire.OpRun, Seq: 6, Source: src, Recipe: []byte(smallRecipe), Worker: k, Workers: 2},
			[]string{"wide.csv"}, [][]byte{append([]byte(nil), data...)}, rp.post)
		_, bufs := rp.last(t, wire.OpUnits)
		unitBufs = append(unitBufs, bufs[0])
	}
	var rp replies
	workers[0].Handle(context.Background(), wire.Request{Op: wire.OpFinish, Seq: 6}, []string{"u0", "u1"}, unitBufs, rp.post)
	late, _ := rp.last(t, wire.OpLate)
	// the seed C4 has its map as a unit; of the targets' three strongest
	// rows one is C4's own, so two maps are late
	if len(late.Late) != 2 {
		t.Fatalf("%d late units, want 2: %+v", len(late.Late), late.Late)
	}
	var drawn [][]byte
	for k, w := range workers {
		var mine []wire.Unit
		for i, u := range late.Late {
			if i%2 == k {
				mine = append(mine, u)
			}
		}
		var rp replies
		w.Handle(context.Background(), wire.Request{Op: wire.OpDrawUnits, Seq: 6, Late: mine}, nil, nil, rp.post)
		rep, bufs := rp.last(t, wire.OpDrawn)
		if rep.Done != len(mine) {
			t.Errorf("worker %d drew %d units, want %d", k, rep.Done, len(mine))
		}
		drawn = append(drawn, bufs[0])
	}
	rp = replies{}
	workers[0].Handle(context.Background(), wire.Request{Op: wire.OpDraw, Seq: 6}, []string{"d0", "d1"}, drawn, rp.post)
	rep, out := rp.last(t, wire.OpResults)
	if rep.CSV != want.String() {
		t.Fatalf("results.csv differs from pipeline.Run:\n%s\nwant\n%s", rep.CSV, want.String())
	}
	if len(rep.Figures) != len(res.Figures) {
		t.Fatalf("%d figures, native %d", len(rep.Figures), len(res.Figures))
	}
	for i, f := range res.Figures {
		if string(out[2+i]) != f.SVG || rep.Figures[i].Name != f.Name {
			t.Errorf("figure %d (%s) differs from the native one", i, f.Name)
		}
	}
	// a second draw has nothing to draw from
	rp = replies{}
	workers[0].Handle(context.Background(), wire.Request{Op: wire.OpDraw, Seq: 6}, nil, nil, rp.post)
	if e, _ := rp.last(t, wire.OpError); !strings.Contains(e.Error, "draw without a matching finish") {
		t.Errorf("second draw: %q", e.Error)
	}
}

// envelopes over the epochs of wideCSV with trial-shuffle surrogates, two
// of them orthogonalised (pairwise: 2 blocks of surrogates per row)
const laterRecipe = `{"spectral": {"low": 2, "high": 30, "steps": 10},
 "analyses": [
  {"id": "orth", "type": "envelope", "channels": ["C4", "Pz", "A", "B"], "freq": [8, 12], "leakageCorrection": "pairwise", "surrogates": 60, "randomSeed": 5},
  {"id": "plain", "type": "envelope", "channels": ["C4", "C"], "freq": [8, 12], "surrogates": 30, "randomSeed": 6}]}`

// The later units (envelope surrogates), listed in every OpUnits reply, go
// out to the workers with every worker's units (OpDrawUnits) and come back
// to worker 0 with OpFinish: results.csv equals pipeline.Run's byte for
// byte, with one worker or three.
func TestLaterUnitsSpread(t *testing.T) {
	data := wideCSV()
	src := wire.Source{Name: "wide.csv"}
	r, err := recipe.Parse([]byte(laterRecipe))
	if err != nil {
		t.Fatal(err)
	}
	ds, err := Open(r, src, Files{"wide.csv": format.Bytes("wide.csv", data)})
	if err != nil {
		t.Fatal(err)
	}
	res, err := pipeline.Run(context.Background(), r, ds, nil)
	if err != nil {
		t.Fatal(err)
	}
	AddRecording(res, "wide.csv")
	var want bytes.Buffer
	if err := report.WriteCSV(&want, res); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(want.String(), "trials-t") {
		t.Fatalf("no envelope rows over epochs:\n%s", want.String())
	}
	for _, n := range []int{1, 3} {
		workers := make([]*Worker, n)
		var unitBufs [][]byte
		var late []wire.Unit
		for k := range workers {
			workers[k] = &Worker{}
			var rp replies
			workers[k].Handle(context.Background(), wire.Request{Op: wire.OpRun, Seq: 8, Source: src, Recipe: []byte(laterRecipe), Worker: k, Workers: n},
				[]string{"wide.csv"}, [][]byte{append([]byte(nil), data...)}, rp.post)
			rep, bufs := rp.last(t, wire.OpUnits)
			unitBufs = append(unitBufs, bufs[0])
			late = rep.Late
		}
		// orth: 6 rows × 2 blocks, plain: 1 row × 1
		if len(late) != 13 {
			t.Fatalf("%d later units, want 13", len(late))
		}
		names := make([]string, n)
		for i := range names {
			names[i] = fmt.Sprintf("units-%d", i)
		}
		var drawn [][]byte
		for k, w := range workers {
			var mine []wire.Unit
			for i, u := range late {
				if i%n == k {
					mine = append(mine, u)
				}
			}
			copies := make([][]byte, n)
			for i, b := range unitBufs {
				copies[i] = append([]byte(nil), b...)
			}
			var rp replies
			w.Handle(context.Background(), wire.Request{Op: wire.OpDrawUnits, Seq: 8, Late: mine}, names, copies, rp.post)
			rep, bufs := rp.last(t, wire.OpDrawn)
			if rep.Done != len(mine) {
				t.Errorf("worker %d computed %d later units, want %d", k, rep.Done, len(mine))
			}
			drawn = append(drawn, bufs[0])
		}
		var rp replies
		all := append(append([][]byte(nil), unitBufs...), drawn...)
		allNames := append([]string(nil), names...)
		for i := range drawn {
			allNames = append(allNames, fmt.Sprintf("later-%d", i))
		}
		workers[0].Handle(context.Background(), wire.Request{Op: wire.OpFinish, Seq: 8}, allNames, all, rp.post)
		rep, _ := rp.last(t, wire.OpResults)
		if rep.CSV != want.String() {
			t.Fatalf("%d workers: results.csv differs from pipeline.Run:\n%s\nwant\n%s", n, rep.CSV, want.String())
		}
	}
}
