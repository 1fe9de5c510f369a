package app

import (
	"bytes"
	"compress/flate"
	"encoding/base64"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"amplink/core/demo"
	"amplink/core/recipe"
)

// TestFragmentRoundTrip: a shared link gives back the very bytes it was
// made from.
func TestFragmentRoundTrip(t *testing.T) {
	cases := []struct {
		name string
		in   []byte
	}{
		{"demo recipe", demo.Recipe()},
		{"tiny", []byte(`{"analyses":[]}`)},
		{"unicode", []byte(`{"analyses":[{"id":"µ-β"}]}`)},
		{"empty", []byte{}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			frag := EncodeFragment(c.in)
			if !strings.HasPrefix(frag, FragmentKey) {
				t.Fatalf("fragment %q lacks %q", frag, FragmentKey)
			}
			// base64url alphabet only (RFC 4648 §5), no padding
			if strings.ContainsAny(frag[len(FragmentKey):], "+/=") {
				t.Fatalf("fragment %q is not unpadded base64url", frag)
			}
			got, err := DecodeFragment("#" + frag)
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(got, c.in) {
				t.Fatalf("round trip gave %q, want %q", got, c.in)
			}
		})
	}
}

// TestFragmentIndependent decodes with the standard library directly
// (RFC 1951 raw DEFLATE inside RFC 4648 §5 base64url), not through
// DecodeFragment, so the link format is what the doc says.
func TestFragmentIndependent(t *testing.T) {
	in := demo.Recipe()
	frag := EncodeFragment(in)
	raw, err := base64.RawURLEncoding.DecodeString(strings.TrimPrefix(frag, "r="))
	if err != nil {
		t.Fatal(err)
	}
	var out bytes.Buffer
	out.ReadFrom(flate.NewReader(bytes.NewReader(raw)))
	if !bytes.Equal(out.Bytes(), in) {
		t.Fatal("the fragment is not raw DEFLATE of the recipe")
	}
	if len(frag) >= len(in) {
		t.Errorf("fragment %d bytes for a %d-byte recipe: no compression", len(frag), len(in))
	}
}

func TestFragmentErrors(t *testing.T) {
	var big bytes.Buffer
	w, _ := flate.NewWriter(&big, flate.BestCompression)
	w.Write(bytes.Repeat([]byte(" "), maxRecipe+10))
	w.Close()
	cases := []struct {
		name, frag, want string
	}{
		{"no key", "#x=abc", "no shared recipe"},
		{"bad base64", "#r=@@@", "shared link: illegal base64"},
		{"not deflate", "#r=" + base64.RawURLEncoding.EncodeToString([]byte{0xff, 0xff, 0xff}), "shared link:"},
		{"too long", "#r=" + base64.RawURLEncoding.EncodeToString(big.Bytes()), "longer than"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := DecodeFragment(c.frag)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error %v, want %q", err, c.want)
			}
		})
	}
	if _, err := DecodeFragment("#nothing"); !errors.Is(err, ErrNoRecipe) {
		t.Errorf("want ErrNoRecipe, got %v", err)
	}
}

// TestFormDemo fills the form from the demo recipe: the recipe the form
// builds must resolve to the same recipe as the original.
func TestFormDemo(t *testing.T) {
	f, err := FormFromJSON(demo.Recipe())
	if err != nil {
		t.Fatal(err)
	}
	want, err := recipe.Parse(demo.Recipe())
	if err != nil {
		t.Fatal(err)
	}
	got, key, err := f.Validate()
	if err != nil {
		t.Fatalf("form recipe invalid at %q: %v", key, err)
	}
	if !bytes.Equal(got.JSON(), want.JSON()) {
		t.Fatalf("form recipe resolves to\n%s\nwant\n%s", got.JSON(), want.JSON())
	}
	if v := f.get("analyses.0.seed.time.0"); v != "-0.5" {
		t.Errorf("seed start %q, want -0.5", v)
	}
	if v := f.get("analyses.0.target.channel"); v != "*" {
		t.Errorf("target channel %q, want *", v)
	}
}

// TestFormRoundTrip: form → JSON → form is the identity, which is what
// makes a shared link restore every setting.
func TestFormRoundTrip(t *testing.T) {
	f := NewForm()
	vals := map[string]string{
		"epochs.enabled": "on", "epochs.event": "tone", "epochs.start": "-1", "epochs.end": "2.0",
		"spectral.low": "3", "spectral.high": "40", "spectral.steps": "28", "spectral.spacing": "linear",
		"spectral.cycles.0": "3", "spectral.cycles.1": "9", "spectral.tolerance": "1e-8",
		"analyses.0.id": "w1", "analyses.0.method": "pearson",
		"analyses.0.seed.channel": "C4", "analyses.0.seed.time.0": "-0.5", "analyses.0.seed.time.1": "-0.1",
		"analyses.0.seed.freq.0": "15", "analyses.0.seed.freq.1": "25",
		"analyses.0.target.channel": "P3, P4", "analyses.0.target.time.0": "0.3", "analyses.0.target.time.1": "0.8",
		"analyses.0.target.freq.0": "1.5", "analyses.0.target.freq.1": "3.5",
		"analyses.0.permutations": "1000", "analyses.0.randomSeed": "7", "analyses.0.correction": "fdr",
		"analyses.0.covariates": "rt", "analyses.0.conditions.column": "trial_type",
		"analyses.0.conditions.compare.0": "hit", "analyses.0.conditions.compare.1": "miss",
	}
	for k, v := range vals {
		f.set(k, v)
	}
	f.AddAnalysis(recipe.TypeEnvelope)
	for k, v := range map[string]string{
		"analyses.1.channels": "P3, P4, O1", "analyses.1.freq.0": "8", "analyses.1.freq.1": "12",
		"analyses.1.leakageCorrection": "symmetric", "analyses.1.trials": "concatenate",
	} {
		f.set(k, v)
	}
	g, err := FormFromJSON(f.JSON())
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(f.Values, g.Values) || f.Analyses != g.Analyses {
		t.Fatalf("round trip changed the form:\n%v\n%v", f.sortedKeys(), g.sortedKeys())
	}
	// and through a link
	b, err := DecodeFragment(EncodeFragment(f.JSON()))
	if err != nil {
		t.Fatal(err)
	}
	h, _ := FormFromJSON(b)
	if !reflect.DeepEqual(f.Values, h.Values) {
		t.Fatal("a link did not restore every setting")
	}
}

// TestFormKeepsTolerance: a recipe file's window-power tolerance survives
// the form (before the field existed, the page dropped it and ran every
// recipe at the default).
func TestFormKeepsTolerance(t *testing.T) {
	for _, tol := range []string{"0", "1e-08", "0.001"} {
		f, err := FormFromJSON([]byte(`{"spectral": {"low": 2, "high": 60, "tolerance": ` + tol + `}, "analyses": [{"type": "envelope", "channels": ["A", "B"], "freq": [8, 12]}]}`))
		if err != nil {
			t.Fatal(err)
		}
		r, err := recipe.Parse(f.JSON())
		if err != nil {
			t.Fatal(err)
		}
		want, _ := strconv.ParseFloat(tol, 64)
		if got := r.Spectral.WindowTolerance(); got != want {
			t.Errorf("tolerance %s: the form's recipe has %g", tol, got)
		}
	}
}

// TestFormErrors: the message recipe.Parse gives is shown at the input its
// field path names.
func TestFormErrors(t *testing.T) {
	cases := []struct {
		name    string
		set     map[string]string
		wantKey string
		wantMsg string
	}{
		{"reversed band", map[string]string{"analyses.0.seed.freq.0": "30", "analyses.0.seed.freq.1": "20"}, "analyses.0.seed.freq.0", "analyses[0].seed.freq"},
		{"not a number", map[string]string{"analyses.0.target.time.1": "soon"}, "analyses.0.target.time.1", "analyses[0].target.time[1]"},
		{"bad spacing", map[string]string{"spectral.steps": "0"}, "spectral.steps", "spectral.steps"},
		{"epochs without event", map[string]string{"epochs.event": ""}, "epochs.event", "epochs.event"},
		{"cluster on a window analysis", map[string]string{"analyses.0.correction": "cluster"}, "analyses.0.correction", "analyses[0].correction"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f, err := FormFromJSON(demo.Recipe())
			if err != nil {
				t.Fatal(err)
			}
			for k, v := range c.set {
				f.set(k, v)
			}
			_, key, err := f.Validate()
			if err == nil {
				t.Fatal("no error")
			}
			if key != c.wantKey {
				t.Errorf("error %q shown at %q, want %q", err, key, c.wantKey)
			}
			if !strings.HasPrefix(err.Error(), c.wantMsg) {
				t.Errorf("error %q does not name %s", err, c.wantMsg)
			}
		})
	}
}

func TestKeyFor(t *testing.T) {
	f := NewForm()
	cases := []struct{ msg, want string }{
		{"analyses[0].seed.channel: no channel \"X\" in demo", "analyses.0.seed.channel"},
		{"analyses[0].seed: is required", "analyses.0.seed.channel"},
		{"analyses[0].seed.time[1]: must be a number", "analyses.0.seed.time.1"},
		{"spectral.high: 80 Hz is at or above the Nyquist frequency", "spectral.high"},
		{"demo.csv:3:2: not a number", ""},
		{"analyses[3].seed.channel: x", ""},
	}
	for _, c := range cases {
		t.Run(c.msg, func(t *testing.T) {
			if got := f.KeyFor(c.msg); got != c.want {
				t.Errorf("KeyFor = %q, want %q", got, c.want)
			}
		})
	}
}

func TestRemoveAnalysis(t *testing.T) {
	f := NewForm()
	f.set("analyses.0.id", "a")
	f.AddAnalysis(recipe.TypeEnvelope)
	f.set("analyses.1.id", "b")
	f.AddAnalysis(recipe.TypeTrialWindow)
	f.set("analyses.2.id", "c")
	f.RemoveAnalysis(1)
	if f.Analyses != 2 || f.get("analyses.0.id") != "a" || f.get("analyses.1.id") != "c" || f.get("analyses.1.type") != recipe.TypeTrialWindow {
		t.Fatalf("after removing analysis 1: %d analyses, %v", f.Analyses, f.Values)
	}
	f.RemoveAnalysis(0)
	f.RemoveAnalysis(0) // the last one stays
	if f.Analyses != 1 || f.get("analyses.0.id") != "c" {
		t.Fatalf("after removing analysis 0 twice: %d, %v", f.Analyses, f.Values)
	}
}

func TestRecipePath(t *testing.T) {
	cases := map[string]string{
		"analyses.0.seed.time.1": "analyses[0].seed.time[1]",
		"spectral.cycles.0":      "spectral.cycles[0]",
		"epochs.event":           "epochs.event",
		"analyses.12.id":         "analyses[12].id",
	}
	for in, want := range cases {
		t.Run(in, func(t *testing.T) {
			if got := RecipePath(in); got != want {
				t.Errorf("RecipePath(%q) = %q, want %q", in, got, want)
			}
		})
	}
}

// TestTableSort uses the page's sort on a results.csv in testdata.
func TestTableSort(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("testdata", "results.csv"))
	if err != nil {
		t.Fatal(err)
	}
	tab, err := ParseTable(string(b))
	if err != nil {
		t.Fatal(err)
	}
	rc, tc := tab.Col("r"), tab.Col("target")
	cases := []struct {
		name string
		col  int
		desc bool
		want []string // the target column after sorting
	}{
		{"r ascending, empty last", rc, false, []string{"O1", "Pz", "Fz", "Cz"}},
		{"r descending, empty last", rc, true, []string{"Fz", "Pz", "O1", "Cz"}},
		{"text ascending", tc, false, []string{"Cz", "Fz", "O1", "Pz"}},
		{"no column keeps order", -1, false, []string{"Fz", "Pz", "Cz", "O1"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var got []string
			for _, row := range tab.Sorted(c.col, c.desc) {
				got = append(got, row[tc])
			}
			if !reflect.DeepEqual(got, c.want) {
				t.Errorf("order %v, want %v", got, c.want)
			}
		})
	}
	if _, err := ParseTable("a,b\n1,2,3\n"); err == nil || !strings.Contains(err.Error(), "results.csv") {
		t.Errorf("ragged CSV: error %v", err)
	}
}

func TestIdentityText(t *testing.T) {
	cases := []struct {
		name, csv, want string
	}{
		{"ones", "analysis,type,seed,target,method,n,r,p\nidentity,trial-window,C4,C4,spearman,40,1,0\n", "passed"},
		{"not one", "analysis,type,seed,target,method,n,r,p\nidentity,trial-window,C4,C4,spearman,40,0.99,0\n", "FAILED"},
		{"undefined", "analysis,type,seed,target,method,n,r,p\nidentity,trial-window,C4,C4,spearman,40,,\n", "undefined"},
		{"no rows", "analysis,type,seed,target,method,n,r,p\n", "no results"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tab, err := ParseTable(c.csv)
			if err != nil {
				t.Fatal(err)
			}
			if got := identityText(tab); !strings.Contains(got, c.want) {
				t.Errorf("%q lacks %q", got, c.want)
			}
		})
	}
}

// TestGeometry maps viewBox positions back to data on linear and log axes:
// the inverse of the documented core/plot mapping (plot/doc.go), checked
// at hand-computed points (common practice: corners and centre).
func TestGeometry(t *testing.T) {
	attrs := map[string]string{
		"left": "50", "top": "20", "width": "200", "height": "100",
		"xmin": "-1", "xmax": "1", "ymin": "2", "ymax": "32", "xlog": "false", "ylog": "true",
		"view-width": "300", "view-height": "150",
	}
	g, ok := parseGeometry(func(k string) string { return attrs[k] })
	if !ok {
		t.Fatal("geometry did not parse")
	}
	// the SVG drawn at twice its viewBox size, 10 px from the page corner
	box := [4]float64{10, 10, 600, 300}
	cases := []struct {
		name         string
		cx, cy       float64
		wantX, wantY float64
	}{
		{"top left", 10 + 2*50, 10 + 2*20, -1, 32},
		{"bottom right", 10 + 2*250, 10 + 2*120, 1, 2},
		// centre: x = 0; y = 10^((log10 2 + log10 32)/2) = 8
		{"centre", 10 + 2*150, 10 + 2*70, 0, 8},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			x, y := g.toData(c.cx, c.cy, box)
			if math.Abs(x-c.wantX) > 1e-12 || math.Abs(y-c.wantY) > 1e-12 {
				t.Errorf("toData = (%g, %g), want (%g, %g)", x, y, c.wantX, c.wantY)
			}
		})
	}
	delete(attrs, "width")
	if _, ok := parseGeometry(func(k string) string { return attrs[k] }); ok {
		t.Error("geometry without a width parsed")
	}
}

// TestFormJSONIsJSON: whatever the inputs hold, the form gives valid JSON
// (strings for numbers that do not parse).
func TestFormJSONIsJSON(t *testing.T) {
	f := NewForm()
	for _, fd := range analysisFields {
		f.set("analyses.0."+fd.Key, `"quoted" \ back, slash`)
	}
	var v any
	if err := json.Unmarshal(f.JSON(), &v); err != nil {
		t.Fatalf("form JSON does not parse: %v\n%s", err, f.JSON())
	}
}

// FuzzDecodeFragment: a link from anywhere gives a recipe or an error,
// never a panic, and what decodes re-encodes to a link that decodes to the
// same bytes.
func FuzzDecodeFragment(f *testing.F) {
	b, err := os.ReadFile(filepath.Join("testdata", "demo.fragment"))
	if err != nil {
		f.Fatal(err)
	}
	f.Add(string(b))
	f.Add("#r=")
	f.Add("r=AAAA")
	f.Fuzz(func(t *testing.T, frag string) {
		out, err := DecodeFragment(frag)
		if err != nil {
			return
		}
		again, err := DecodeFragment(EncodeFragment(out))
		if err != nil || !bytes.Equal(again, out) {
			t.Fatalf("re-encoded link does not decode to the same recipe: %v", err)
		}
	})
}

// FuzzFormFromJSON: any dropped JSON fills a form or gives an error, and a
// filled form always yields valid JSON.
func FuzzFormFromJSON(f *testing.F) {
	b, err := os.ReadFile(filepath.Join("testdata", "demo-recipe.json"))
	if err != nil {
		f.Fatal(err)
	}
	f.Add(b)
	f.Add([]byte(`{"analyses": [{"seed": {"time": [1, "x"]}}]}`))
	f.Fuzz(func(t *testing.T, in []byte) {
		form, err := FormFromJSON(in)
		if err != nil {
			return
		}
		if !json.Valid(form.JSON()) {
			t.Fatalf("form JSON invalid: %s", form.JSON())
		}
	})
}

// TestFragmentFromZlib reads a link made by Python's zlib (raw DEFLATE,
// wbits −15, level 9; Python 3.11.2, zlib 1.2.13) and
// base64.urlsafe_b64encode without padding:
// testdata/demo.fragment holds core/demo/recipe.json encoded that way.
func TestFragmentFromZlib(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("testdata", "demo.fragment"))
	if err != nil {
		t.Fatal(err)
	}
	got, err := DecodeFragment(string(b))
	if err != nil {
		t.Fatal(err)
	}
	want, _ := os.ReadFile(filepath.Join("testdata", "demo-recipe.json"))
	if !bytes.Equal(got, want) {
		t.Fatal("the zlib-made link does not decode to the recipe")
	}
}

// TestRowsHTML: the cells are escaped, so a channel or note holding markup
// shows as text and cannot add elements to the page.
func TestRowsHTML(t *testing.T) {
	got := RowsHTML([][]string{{"a1", "C4", "<img src=x onerror=alert(1)>"}, {"b&c", `"q"`, ""}}, Rows{Cols: []int{0, 1, 2}})
	want := `<tr><td>a1</td><td>C4</td><td>&lt;img src=x onerror=alert(1)&gt;</td></tr>` +
		`<tr><td>b&amp;c</td><td>&#34;q&#34;</td><td></td></tr>`
	if got != want {
		t.Fatalf("RowsHTML:\n%s\nwant\n%s", got, want)
	}
	if RowsHTML(nil, Rows{Cols: []int{0}}) != "" {
		t.Error("no rows should give no text")
	}
	if got := RowsHTML([][]string{{"a", "b", "c"}}, Rows{Cols: []int{2, 0}}); got != "<tr><td>c</td><td>a</td></tr>" {
		t.Errorf("columns 2 and 0: %s", got)
	}
	// grouped, formatted, significant rows marked, full values in titles
	h := []string{"analysis", "r", "p", "q"}
	rows := [][]string{{"a1", "0.123456789", "0.00001234", "0.0004"}, {"a1", "-0.5", "0.2", "0.3"}, {"a2", "0.25", "0.01", ""}}
	got = RowsHTML(rows, Rows{Header: h, Cols: []int{0, 1, 2, 3}, Group: true, Heads: map[string]string{"a1": "Does it?"}, Notes: map[string]string{"a1": "p: t"}})
	for _, w := range []string{
		`<tr class="group"><th scope="colgroup" colspan="4"><span class="gname">a1</span> Does it?<small>p: t</small></th></tr>`,
		`<tr class="sig"><td>a1</td><td title="0.123456789">0.123</td><td title="0.00001234">&lt; 0.0001</td><td title="0.0004">0.000400 <abbr class="mark" title="significant">✱</abbr></td></tr>`,
		`<tr><td>a1</td><td title="-0.5">-0.500</td>`,
		`<span class="gname">a2</span>`,
		`<td title="0.01">0.0100 <abbr class="mark"`,
	} {
		if !strings.Contains(got, w) {
			t.Errorf("RowsHTML lacks %s in\n%s", w, got)
		}
	}
	if strings.Count(got, `class="group"`) != 2 {
		t.Errorf("want 2 headings: %s", got)
	}
}

// TestCell: the shown precision of each kind of column; no shown number
// has more than 5 significant digits.
func TestCell(t *testing.T) {
	cases := []struct{ col, in, want string }{
		{"r", "0.98765432", "0.988"},
		{"r", "-0.0001", "0.000"},
		{"r", "1", "1.000"},
		{"p", "0.000049", "< 0.0001"},
		{"p", "0.0001", "0.000100"},
		{"p", "0.0123456", "0.0123"},
		{"q", "0.99999", "1.00"},
		{"p_perm", "0.000999", "0.000999"},
		{"n", "180", "180"},
		{"seed_fmin", "15.234567", "15.23"},
		{"seed_tmin", "-0.498", "-0.498"},
		{"mass", "123.456789", "123.5"},
		{"note", "1.23456789 s", "1.23456789 s"},
		{"p_method", "t", "t"},
		{"r", "", ""},
	}
	for _, c := range cases {
		if got := Cell(c.col, c.in); got != c.want {
			t.Errorf("Cell(%s, %s) = %q, want %q", c.col, c.in, got, c.want)
		}
	}
}

// TestVisible: the page shows the fixed eight columns and the other
// columns with a value, leaving out the per-analysis settings; asked for
// every column, it shows them all.
func TestVisible(t *testing.T) {
	tb := Table{
		Header: []string{"analysis", "type", "seed", "target", "method", "n", "r", "p", "seed_from_s", "p_perm", "q", "note", "df"},
		Rows: [][]string{
			{"a", "trial-window", "C4", "Pz", "spearman", "40", "0.5", "0.001", "-0.5", "", "0.01", "", "38"},
			{"a", "trial-window", "C4", "Oz", "spearman", "40", "0.1", "0.5", "-0.5", "", "0.5", "", "38"},
		},
	}
	want := []int{0, 1, 2, 3, 4, 5, 6, 7, 10} // q has values; p_perm and note are empty; seed_from_s and df are details
	if got := tb.Visible(false); !reflect.DeepEqual(got, want) {
		t.Errorf("main columns %v, want %v", got, want)
	}
	if got := tb.Visible(true); len(got) != len(tb.Header) {
		t.Errorf("every column: %v", got)
	}
}

// TestFormFigures: the figures setting survives the form both ways, and
// the recipe the form writes draws figures exactly when the recipe it was
// filled from did (the default draws them).
func TestFormFigures(t *testing.T) {
	const tw = `"analyses": [{"type": "trial-window", "seed": {"channel": "C4", "time": [-0.5, 0], "freq": [15, 25]}, "target": {"channel": "Pz", "time": [0.2, 0.6], "freq": [2, 4]}}]`
	for _, c := range []struct {
		in    string
		draw  bool
		scale string
	}{
		{`{` + tw + `}`, true, "log"},
		{`{"figures": true, ` + tw + `}`, true, "log"},
		{`{"figures": false, ` + tw + `}`, false, "log"},
		{`{"figures": {"enabled": false}, ` + tw + `}`, false, "log"},
		{`{"figures": {"powerScale": "linear"}, ` + tw + `}`, true, "linear"},
	} {
		f, err := FormFromJSON([]byte(c.in))
		if err != nil {
			t.Fatal(err)
		}
		r, err := recipe.Parse(f.JSON())
		if err != nil {
			t.Fatalf("%s: %v", c.in, err)
		}
		if r.Figures.Enabled != c.draw || r.Figures.PowerScale != c.scale {
			t.Errorf("%s: the form's recipe has figures %+v, want enabled %v, scale %s", c.in, r.Figures, c.draw, c.scale)
		}
	}
	if r, err := recipe.Parse(NewForm().JSON()); err == nil && !r.Figures.Enabled {
		t.Error("a new form does not draw figures")
	}
}

// TestFormLeakageCorrection: "none" and an absent key both show as none and
// write no key; a dropped recipe or link with a renamed key gets the error
// that names the new one, not a silently dropped setting.
func TestFormLeakageCorrection(t *testing.T) {
	const env = `{"analyses": [{"type": "envelope", "channels": ["O1", "O2"], "freq": [8, 12]%s}]}`
	for _, c := range []struct{ in, form, key string }{
		{"", "", ""},
		{`, "leakageCorrection": "none"`, "", ""},
		{`, "leakageCorrection": "pairwise"`, "pairwise", `"leakageCorrection":"pairwise"`},
		{`, "leakageCorrection": "symmetric"`, "symmetric", `"leakageCorrection":"symmetric"`},
	} {
		f, err := FormFromJSON([]byte(fmt.Sprintf(env, c.in)))
		if err != nil {
			t.Fatal(err)
		}
		if got := f.get("analyses.0.leakageCorrection"); got != c.form {
			t.Errorf("%s: form holds %q, want %q", c.in, got, c.form)
		}
		js := string(f.JSON())
		if c.key == "" && strings.Contains(js, "leakageCorrection") || c.key != "" && !strings.Contains(js, c.key) {
			t.Errorf("%s: the form writes %s", c.in, js)
		}
	}
	for _, c := range []struct{ in, want string }{
		{`, "orthogonalize": true`, `analyses[0].orthogonalize: this key is now "leakageCorrection"`},
		{`, "clusterThreshold": 0.01`, `analyses[0].clusterThreshold: this key is now "clusterFormingP"`},
	} {
		_, err := FormFromJSON([]byte(fmt.Sprintf(env, c.in)))
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want %q", c.in, err, c.want)
		}
	}
}
