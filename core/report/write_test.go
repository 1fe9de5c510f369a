package report

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"flag"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata/report")

var goldenDir = filepath.Join("..", "..", "testdata", "report")

// golden compares got with testdata/report/name. A mismatch writes
// name.got next to the golden file; -update rewrites the golden file.
func golden(t *testing.T, name string, got []byte) {
	t.Helper()
	path := filepath.Join(goldenDir, name)
	if *update {
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test -update to create it)", err)
	}
	if !bytes.Equal(got, want) {
		if err := os.WriteFile(path+".got", got, 0o644); err != nil {
			t.Fatal(err)
		}
		t.Errorf("output differs from %s; wrote %s.got", path, path)
	}
}

// sample is a results set that exercises the table rules: NaN and ±Inf
// written empty (null in JSON), extra columns in order of first appearance
// over rows with different Extra sets, and cells that need CSV quoting.
func sample() *Results {
	return &Results{
		Rows: []Row{
			{Analysis: "a1", Type: "trial-window", Seed: "C4", Target: "Pz", Method: "spearman", N: 40, R: 0.4125, P: 0.0082,
				Extra: []Field{{"seed_low_hz", "15"}, {"seed_high_hz", "25"}, {"q", "0.0164"}}},
			{Analysis: "a1", Type: "trial-window", Seed: "C4", Target: "C3,C4", Method: "spearman", N: 40, R: math.NaN(), P: math.NaN(),
				Extra: []Field{{"note", `undefined: "C3,C4" has zero variance`}, {"seed_low_hz", "15"}}},
			{Analysis: "a2", Type: "envelope", Seed: "P3", Target: "P4", Method: "pearson", N: 1200, R: -1e-7, P: math.Inf(1),
				Extra: []Field{{"leakage_correction", "pairwise"}, {"q", ""}, {"band_low_hz", "8"}}},
			{Analysis: "3", Type: "envelope", Seed: "1", Target: "2", Method: "pearson", N: 0, R: 1, P: 0},
			{Analysis: "a4", Type: "envelope", Seed: "O1", Target: "O2", Method: "pearson", N: 7, R: math.Nextafter(0.3, 1), P: 5e-324,
				Extra: []Field{{"note", "two\nlines"}, {"recording", "sub-01_task-rest_eeg.edf"}}},
		},
		Maps:     []Map{{Name: "a1_tfmap"}, {Name: "a3_comodulogram"}},
		Figures:  []Figure{{Name: "a1_scatter", Title: "C4 vs Pz", SVG: "<svg/>"}},
		Warnings: []string{"a2: 3 epochs dropped", `quote "here"`},
		Recipe:   []byte(`{"analyses": [ {"id": "a1"} ]}`),
	}
}

func TestColumns(t *testing.T) {
	cases := []struct {
		name string
		res  *Results
		want []string
	}{
		{"empty", &Results{}, Fixed},
		{"first appearance order", sample(), append(slices.Clone(Fixed),
			"seed_low_hz", "seed_high_hz", "q", "note", "leakage_correction", "band_low_hz", "recording")},
		{"extra named like a fixed column is not repeated", &Results{Rows: []Row{{Extra: []Field{{"r", "x"}, {"z", "1"}}}}},
			append(slices.Clone(Fixed), "z")},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := c.res.Columns(); !slices.Equal(got, c.want) {
				t.Errorf("Columns = %q, want %q", got, c.want)
			}
		})
	}
}

func TestNum(t *testing.T) {
	cases := []struct {
		v    float64
		want string
	}{
		{math.NaN(), ""}, {math.Inf(1), ""}, {math.Inf(-1), ""},
		{0, "0"}, {1, "1"}, {-0.5, "-0.5"}, {math.Nextafter(0.3, 1), "0.30000000000000004"},
		{1e-7, "1e-07"}, {5e-324, "5e-324"}, {123456789012, "1.23456789012e+11"},
	}
	for _, c := range cases {
		t.Run(c.want, func(t *testing.T) {
			if got := Num(c.v); got != c.want {
				t.Errorf("Num(%v) = %q, want %q", c.v, got, c.want)
			}
		})
	}
}

func TestWriteCSVGolden(t *testing.T) {
	cases := []struct {
		name string
		res  *Results
	}{
		{"results.csv", sample()},
		{"results-empty.csv", &Results{}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var buf bytes.Buffer
			if err := WriteCSV(&buf, c.res); err != nil {
				t.Fatal(err)
			}
			golden(t, c.name, buf.Bytes())
		})
	}
}

// The CSV reads back with encoding/csv to the cells of Table: quoting
// of commas, quotes and newlines is undone, and every record has the
// header's width.
func TestWriteCSVRoundTrip(t *testing.T) {
	res := sample()
	var buf bytes.Buffer
	if err := WriteCSV(&buf, res); err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	header, rows := res.Table()
	if len(recs) != len(rows)+1 || !slices.Equal(recs[0], header) {
		t.Fatalf("read %d records, header %q", len(recs), recs[0])
	}
	for i, row := range rows {
		if !slices.Equal(recs[i+1], row) {
			t.Errorf("row %d reads back as %q, want %q", i, recs[i+1], row)
		}
	}
	// Spot checks of the rules, by column name.
	col := func(name string) int { return slices.Index(header, name) }
	checks := []struct {
		row       int
		col, want string
	}{
		{1, "r", ""}, {1, "p", ""}, // NaN
		{2, "p", ""}, // +Inf
		{1, "target", "C3,C4"},
		{1, "note", `undefined: "C3,C4" has zero variance`},
		{0, "note", ""}, // field absent from the row
		{2, "q", ""},    // field present but empty
		{3, "n", "0"},
		{4, "r", "0.30000000000000004"},
		{4, "note", "two\nlines"},
	}
	for _, c := range checks {
		if got := recs[c.row+1][col(c.col)]; got != c.want {
			t.Errorf("row %d %s = %q, want %q", c.row, c.col, got, c.want)
		}
	}
}

func TestWriteJSONGolden(t *testing.T) {
	cases := []struct {
		name string
		res  *Results
	}{
		{"results.json", sample()},
		{"results-empty.json", &Results{}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var buf bytes.Buffer
			if err := WriteJSON(&buf, c.res); err != nil {
				t.Fatal(err)
			}
			golden(t, c.name, buf.Bytes())
		})
	}
}

// The JSON decodes with encoding/json to the documented types: numbers as
// numbers, empty cells as null, names as strings even when they look
// numeric (analysis, seed, target).
func TestWriteJSONTypes(t *testing.T) {
	var buf bytes.Buffer
	if err := WriteJSON(&buf, sample()); err != nil {
		t.Fatal(err)
	}
	var out struct {
		Columns  []string         `json:"columns"`
		Rows     []map[string]any `json:"rows"`
		Maps     []string         `json:"maps"`
		Figures  []map[string]string
		Warnings []string
		Recipe   map[string]any `json:"recipe"`
	}
	if err := json.Unmarshal(buf.Bytes(), &out); err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(out.Columns, sample().Columns()) {
		t.Errorf("columns = %q", out.Columns)
	}
	if len(out.Rows) != 5 {
		t.Fatalf("%d rows", len(out.Rows))
	}
	cases := []struct {
		row  int
		col  string
		want any
	}{
		{0, "n", 40.0}, {0, "r", 0.4125}, {0, "p", 0.0082}, {0, "seed_low_hz", 15.0}, {0, "q", 0.0164},
		{0, "note", nil}, {1, "r", nil}, {1, "p", nil}, {2, "p", nil}, {2, "q", nil},
		{2, "leakage_correction", "pairwise"}, {0, "method", "spearman"},
		{3, "analysis", "3"}, {3, "seed", "1"}, {3, "target", "2"}, {3, "n", 0.0}, {3, "p", 0.0},
		{4, "r", 0.30000000000000004}, {4, "p", 5e-324}, {4, "note", "two\nlines"},
		{1, "target", "C3,C4"},
	}
	for _, c := range cases {
		got, ok := out.Rows[c.row][c.col]
		if !ok {
			t.Errorf("row %d has no %q", c.row, c.col)
			continue
		}
		if got != c.want {
			t.Errorf("row %d %s = %#v, want %#v", c.row, c.col, got, c.want)
		}
	}
	for i, row := range out.Rows {
		if len(row) != len(out.Columns) {
			t.Errorf("row %d has %d keys for %d columns", i, len(row), len(out.Columns))
		}
	}
	if !slices.Equal(out.Maps, []string{"a1_tfmap", "a3_comodulogram"}) {
		t.Errorf("maps = %q", out.Maps)
	}
	if len(out.Figures) != 1 || out.Figures[0]["name"] != "a1_scatter" || out.Figures[0]["title"] != "C4 vs Pz" {
		t.Errorf("figures = %v", out.Figures)
	}
	if len(out.Warnings) != 2 || out.Recipe == nil {
		t.Errorf("warnings %q, recipe %v", out.Warnings, out.Recipe)
	}
}

// An invalid recipe is left out rather than corrupting the JSON.
func TestWriteJSONInvalidRecipe(t *testing.T) {
	res := &Results{Recipe: []byte(`{"analyses": [`)}
	var buf bytes.Buffer
	if err := WriteJSON(&buf, res); err != nil {
		t.Fatal(err)
	}
	var out map[string]any
	if err := json.Unmarshal(buf.Bytes(), &out); err != nil {
		t.Fatalf("invalid JSON: %v\n%s", err, buf.Bytes())
	}
	if _, ok := out["recipe"]; ok {
		t.Errorf("recipe present: %v", out["recipe"])
	}
}

// Text cells that strconv.ParseFloat accepts but that are not JSON numbers
// must stay strings; they must not make WriteJSON fail.
func TestWriteJSONNumberLikeText(t *testing.T) {
	for _, v := range []string{"Inf", "NaN", "-inf", "infinity", "1.", ".5", "007", "+1", "1_0", "0x1p4", "0x10"} {
		t.Run(v, func(t *testing.T) {
			res := &Results{Rows: []Row{{Analysis: "a", N: 1, R: 0.5, P: 0.5, Extra: []Field{{"recording", v}}}}}
			var buf bytes.Buffer
			if err := WriteJSON(&buf, res); err != nil {
				t.Fatalf("WriteJSON: %v", err)
			}
			var out struct{ Rows []map[string]any }
			if err := json.Unmarshal(buf.Bytes(), &out); err != nil {
				t.Fatal(err)
			}
			if got := out.Rows[0]["recording"]; got != v {
				t.Errorf("recording = %#v, want the string %q", got, v)
			}
		})
	}
}

func TestWriteMapCSVGolden(t *testing.T) {
	cases := []struct {
		name string
		m    *Map
	}{
		{"map.csv", &Map{
			Name: "a1_tfmap", RowName: "frequency_hz", ColName: "time_s",
			RowLabels: []string{"4", "8", "16"},
			ColLabels: []string{"-0.5", "0", "0.5", "1"},
			Values: [][]float64{
				{0.1, -0.25, math.NaN(), 1},
				{math.NaN(), math.NaN(), math.NaN(), math.NaN()},
				{1e-9, 0.30000000000000004, math.Inf(-1), -1},
			},
		}},
		{"map-labels.csv", &Map{
			Name: "odd", RowName: "channel", ColName: "channel",
			RowLabels: []string{"C3,C4"},                    // quoted
			ColLabels: []string{`say "x"`, "P4"},            // quoted
			Values:    [][]float64{{1, 2}, {3, math.NaN()}}, // second row has no label
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var buf bytes.Buffer
			if err := WriteMapCSV(&buf, c.m); err != nil {
				t.Fatal(err)
			}
			golden(t, c.name, buf.Bytes())
			// Shape: a header of the column labels after the axis names,
			// one record per row, each as wide as the header.
			recs, err := csv.NewReader(&buf).ReadAll()
			if err != nil {
				t.Fatal(err)
			}
			if len(recs) != len(c.m.Values)+1 {
				t.Fatalf("%d records for %d rows", len(recs), len(c.m.Values))
			}
			if want := append([]string{c.m.RowName + `\` + c.m.ColName}, c.m.ColLabels...); !slices.Equal(recs[0], want) {
				t.Errorf("header %q, want %q", recs[0], want)
			}
			for i, vals := range c.m.Values {
				rec := recs[i+1]
				label := ""
				if i < len(c.m.RowLabels) {
					label = c.m.RowLabels[i]
				}
				if rec[0] != label {
					t.Errorf("row %d label %q, want %q", i, rec[0], label)
				}
				for j, v := range vals {
					if math.IsNaN(v) || math.IsInf(v, 0) {
						if rec[j+1] != "" {
							t.Errorf("row %d col %d = %q, want empty", i, j, rec[j+1])
						}
					} else if rec[j+1] != Num(v) {
						t.Errorf("row %d col %d = %q, want %q", i, j, rec[j+1], Num(v))
					}
				}
			}
		})
	}
}

// Same input, byte-identical output (JSON objects have sorted keys).
func TestWriteDeterministic(t *testing.T) {
	for _, w := range []struct {
		name  string
		write func(*bytes.Buffer) error
	}{
		{"csv", func(b *bytes.Buffer) error { return WriteCSV(b, sample()) }},
		{"json", func(b *bytes.Buffer) error { return WriteJSON(b, sample()) }},
	} {
		t.Run(w.name, func(t *testing.T) {
			var a, b bytes.Buffer
			for range 20 {
				a.Reset()
				b.Reset()
				if err := w.write(&a); err != nil {
					t.Fatal(err)
				}
				if err := w.write(&b); err != nil {
					t.Fatal(err)
				}
				if !bytes.Equal(a.Bytes(), b.Bytes()) {
					t.Fatal("two writes differ")
				}
			}
		})
	}
}

type failWriter struct{}

var errWrite = errors.New("disk full")

func (failWriter) Write([]byte) (int, error) { return 0, errWrite }

// A failing writer's error is returned, not swallowed.
func TestWriteErrors(t *testing.T) {
	cases := []struct {
		name  string
		write func() error
	}{
		{"csv", func() error { return WriteCSV(failWriter{}, sample()) }},
		{"map", func() error {
			return WriteMapCSV(failWriter{}, &Map{RowName: "a", ColName: "b", Values: [][]float64{{1}}})
		}},
		{"json", func() error { return WriteJSON(failWriter{}, sample()) }},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if err := c.write(); !errors.Is(err, errWrite) {
				t.Errorf("err = %v, want %v", err, errWrite)
			}
		})
	}
}

// TestIsJSONNumber checks the number grammar of RFC 8259 section 6, which
// decides whether a cell is written as a JSON number or a string.
func TestIsJSONNumber(t *testing.T) {
	for _, c := range []struct {
		s    string
		want bool
	}{
		{"0", true}, {"-0", true}, {"12", true}, {"0.5", true}, {"-3.25", true},
		{"1e5", true}, {"1E-7", true}, {"2.5e+10", true}, {"-0.0e0", true},
		{"", false}, {"-", false}, {"01", false}, {".5", false}, {"5.", false},
		{"1e", false}, {"1e+", false}, {"+1", false}, {"NaN", false}, {"Inf", false},
		{"1.2.3", false}, {"0x10", false}, {"12a", false}, {" 1", false}, {"C4", false},
	} {
		if got := isJSONNumber(c.s); got != c.want {
			t.Errorf("isJSONNumber(%q) = %v, want %v", c.s, got, c.want)
		}
	}
}

// TableWriter keeps each row's cells those of Row.Cells while consecutive
// rows change their fields (another order, a field given twice, a field
// that is not a column), so streamed tables equal WriteCSV's.
func TestTableWriterCells(t *testing.T) {
	rows := []Row{
		{Analysis: "a", N: 3, R: 0.5, P: math.NaN(), Extra: []Field{{"x", "1"}, {"y", "=2"}}},
		{Analysis: "a", N: 4, R: 0.25, P: 0.5, Extra: []Field{{"x", "3"}, {"y", "4"}}},
		{Analysis: "b", Extra: []Field{{"y", "5"}, {"x", "6"}, {"x", "7"}}},
		{Analysis: "c", Extra: []Field{{"z", "8"}, {"y", "9"}}},
		{Analysis: "d"},
		{Analysis: "e", Extra: []Field{{"x", "10"}}},
	}
	cols := []string{"analysis", "type", "seed", "target", "method", "n", "r", "p", "y", "x"}
	var want bytes.Buffer
	cw := csv.NewWriter(&want)
	cw.Write(cols)
	for i := range rows {
		cw.Write(quoteCells(rows[i].Cells(cols)))
	}
	cw.Flush()
	var got bytes.Buffer
	tw, err := NewTableWriter(&got, cols)
	if err != nil {
		t.Fatal(err)
	}
	for i := range rows {
		if err := tw.Write(&rows[i]); err != nil {
			t.Fatal(err)
		}
	}
	if err := tw.Flush(); err != nil {
		t.Fatal(err)
	}
	if got.String() != want.String() {
		t.Errorf("got\n%s\nwant\n%s", got.String(), want.String())
	}
	if !strings.Contains(got.String(), "b,,,,,0,0,0,5,6\n") || !strings.Contains(got.String(), ",'=2,") {
		t.Errorf("unexpected cells:\n%s", got.String())
	}
}
