package report

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// goldenCompare compares got with testdata/group/<name>; on a mismatch it
// writes got next to the golden file as <name>.got.
func goldenCompare(t *testing.T, name string, got []byte) {
	t.Helper()
	path := filepath.Join("..", "..", "testdata", "group", name)
	want, err := os.ReadFile(path)
	if err != nil || !bytes.Equal(got, want) {
		if werr := os.WriteFile(path+".got", got, 0o644); werr != nil {
			t.Log(werr)
		}
		if err != nil {
			t.Fatalf("%v (wrote %s.got)", err, path)
		}
		t.Fatalf("%s differs from the golden file; wrote %s.got", name, path)
	}
}

// sampleResults has the awkward cells: NaN r and p, a comma, a quote, a
// newline, non-ASCII channel names and rows with different extra fields.
func sampleResults() *Results {
	return &Results{Rows: []Row{
		{Analysis: "a1", Type: "trial-window", Seed: "C4", Target: "P3", Method: "spearman", N: 40, R: 0.25472747497219134, P: 0.0001234,
			Extra: []Field{{Name: "seed_from_s", Value: "-0.5"}, {Name: "note", Value: ""}, {Name: "recording", Value: "sub-01.edf"}}},
		{Analysis: "a1", Type: "trial-window", Seed: "C4", Target: "Fp1, left", Method: "spearman", N: 40, R: math.NaN(), P: math.NaN(),
			Extra: []Field{{Name: "note", Value: "undefined: a window's power does not vary across trials"}, {Name: "recording", Value: "sub-01.edf"}}},
		{Analysis: "a2", Type: "envelope", Seed: "Öz", Target: `"T7"`, Method: "pearson", N: 12000, R: -1e-7, P: 1,
			Extra: []Field{{Name: "leakage_correction", Value: "pairwise"}, {Name: "note", Value: "line one\nline two"}, {Name: "recording", Value: "sub-02.edf"}}},
		{Analysis: "a3", Type: "comodulogram", Seed: "C3", Target: "C4", Method: "pearson", N: 0, R: 1, P: math.NaN()},
	}}
}

func TestReadCSVRoundTrip(t *testing.T) {
	res := sampleResults()
	var b bytes.Buffer
	if err := WriteCSV(&b, res); err != nil {
		t.Fatal(err)
	}
	goldenCompare(t, "roundtrip.csv", b.Bytes())
	back, err := ReadCSV(bytes.NewReader(b.Bytes()), "roundtrip.csv")
	if err != nil {
		t.Fatal(err)
	}
	if len(back.Rows) != len(res.Rows) {
		t.Fatalf("read %d rows, want %d", len(back.Rows), len(res.Rows))
	}
	cols := res.Columns()
	if got := strings.Join(back.Columns(), ","); got != strings.Join(cols, ",") {
		t.Errorf("columns %s, want %s", got, strings.Join(cols, ","))
	}
	for i := range res.Rows {
		w, g := &res.Rows[i], &back.Rows[i]
		if !sameFloat(w.R, g.R) || !sameFloat(w.P, g.P) || w.N != g.N {
			t.Errorf("row %d: n r p = %d %v %v, want %d %v %v", i, g.N, g.R, g.P, w.N, w.R, w.P)
		}
		if a, b := strings.Join(g.Cells(cols), "|"), strings.Join(w.Cells(cols), "|"); a != b {
			t.Errorf("row %d cells\n%s\nwant\n%s", i, a, b)
		}
		// Every non-fixed column is an Extra field, in header order.
		if len(g.Extra) != len(cols)-len(Fixed) {
			t.Errorf("row %d has %d extra fields, want %d", i, len(g.Extra), len(cols)-len(Fixed))
		}
	}
	// Rows start on lines 2, 3, 4 and 6: the third row's note spans two lines.
	_, lines, err := ReadCSVLines(bytes.NewReader(b.Bytes()), "roundtrip.csv")
	if err != nil {
		t.Fatal(err)
	}
	if got := fmt.Sprint(lines); got != "[2 3 4 6]" {
		t.Errorf("row lines %s, want [2 3 4 6]", got)
	}
	var again bytes.Buffer
	if err := WriteCSV(&again, back); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(again.Bytes(), b.Bytes()) {
		t.Errorf("rewritten table differs:\n%s\nwant\n%s", again.Bytes(), b.Bytes())
	}
}

// TestReadCSVRunOutput reads a table written by `amplink run`
// (testdata/cli/small_results.csv) and writes it back unchanged.
func TestReadCSVRunOutput(t *testing.T) {
	path := filepath.Join("..", "..", "testdata", "cli", "small_results.csv")
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	res, err := ReadCSV(bytes.NewReader(want), path)
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Rows) == 0 {
		t.Fatal("no rows")
	}
	var b bytes.Buffer
	if err := WriteCSV(&b, res); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(b.Bytes(), want) {
		t.Errorf("rewritten table differs from %s", path)
	}
}

func sameFloat(a, b float64) bool { return a == b || (math.IsNaN(a) && math.IsNaN(b)) }

func TestReadCSVReorderedColumns(t *testing.T) {
	in := "\xef\xbb\xbfrecording,p,r,n,method,target,seed,type,analysis\r\nx.edf,,0.5,7,pearson,B,A,envelope,e1\r\n"
	res, err := ReadCSV(strings.NewReader(in), "t.csv")
	if err != nil {
		t.Fatal(err)
	}
	r := res.Rows[0]
	if r.Analysis != "e1" || r.Type != "envelope" || r.Seed != "A" || r.Target != "B" || r.Method != "pearson" || r.N != 7 || r.R != 0.5 || !math.IsNaN(r.P) || r.Recording() != "x.edf" {
		t.Errorf("row %+v", r)
	}
}

func TestReadCSVErrors(t *testing.T) {
	const head = "analysis,type,seed,target,method,n,r,p,note\n"
	tests := []struct {
		name, in, want string
	}{
		{"empty", "", "t.csv:1:1: empty table: no header line"},
		{"missing column", "analysis,type,seed,target,method,n,r\n", `t.csv:1:1: missing column "p"`},
		{"repeated column", "analysis,type,seed,target,method,n,r,p,r\n", `t.csv:1:40: column "r" repeats column 7`},
		{"ragged short", head + "a,b,c,d,e,1,0.5,0.1,x\na,b,c,d,e,1,0.5\n", "t.csv:3:13: 7 cells, the header has 9"},
		{"ragged long", head + "a,b,c,d,e,1,0.5,0.1,x,y\n", "t.csv:2:23: 10 cells, the header has 9"},
		{"n not an integer", head + "a,b,c,d,e,1.5,0.5,0.1,\n", `t.csv:2:11: n: "1.5" is not an integer`},
		{"n empty", head + "a,b,c,d,e,,0.5,0.1,\n", `t.csv:2:11: n: "" is not an integer`},
		{"r not a number", head + "a,b,c,d,e,3,abc,0.1,\n", `t.csv:2:13: r: "abc" is not a finite number`},
		{"p infinite", head + "a,b,c,d,e,3,0.2,Inf,\n", `t.csv:2:17: p: "Inf" is not a finite number`},
		{"bad quote", head + "a,b,c,d,e,3,0.2,0.1,\"x\"y\n", "t.csv:2:23: extraneous or missing \" in quoted-field"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadCSV(strings.NewReader(tc.in), "t.csv")
			if err == nil || err.Error() != tc.want {
				t.Fatalf("error %v, want %q", err, tc.want)
			}
			if !errors.Is(err, ErrFormat) {
				t.Errorf("error does not wrap ErrFormat")
			}
		})
	}
}

// TestReadCSVInvalidFiles reads the invalid-*.csv fixtures, which also
// seed the fuzz test.
func TestReadCSVInvalidFiles(t *testing.T) {
	tests := []struct{ file, want string }{
		{"invalid-ragged.csv", "invalid-ragged.csv:3:"},
		{"invalid-n.csv", `invalid-n.csv:2:`},
		{"invalid-no-p.csv", `invalid-no-p.csv:1:1: missing column "p"`},
	}
	for _, tc := range tests {
		t.Run(tc.file, func(t *testing.T) {
			b, err := os.ReadFile(filepath.Join("..", "..", "testdata", "group", tc.file))
			if err != nil {
				t.Fatal(err)
			}
			_, err = ReadCSV(bytes.NewReader(b), tc.file)
			if err == nil || !strings.HasPrefix(err.Error(), tc.want) {
				t.Fatalf("error %v, want prefix %q", err, tc.want)
			}
		})
	}
}

// FuzzReadCSV checks that ReadCSV never panics and that whatever it
// accepts survives WriteCSV and a second ReadCSV unchanged. Seeds: the
// tables in testdata/group and testdata/cli.
func FuzzReadCSV(f *testing.F) {
	for _, dir := range []string{"group", "cli"} {
		paths, _ := filepath.Glob(filepath.Join("..", "..", "testdata", dir, "*.csv"))
		for _, p := range paths {
			if b, err := os.ReadFile(p); err == nil {
				f.Add(b)
			}
		}
	}
	f.Fuzz(func(t *testing.T, in []byte) {
		res, err := ReadCSV(bytes.NewReader(in), "fuzz.csv")
		if err != nil {
			if !strings.HasPrefix(err.Error(), "fuzz.csv:") {
				t.Fatalf("error without the name: %v", err)
			}
			return
		}
		var b1 bytes.Buffer
		if err := WriteCSV(&b1, res); err != nil {
			t.Fatal(err)
		}
		back, err := ReadCSV(bytes.NewReader(b1.Bytes()), "again.csv")
		if err != nil {
			t.Fatalf("re-reading the written table: %v\n%q", err, b1.Bytes())
		}
		if len(back.Rows) != len(res.Rows) {
			t.Fatalf("%d rows, then %d", len(res.Rows), len(back.Rows))
		}
		var b2 bytes.Buffer
		if err := WriteCSV(&b2, back); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(b1.Bytes(), b2.Bytes()) {
			t.Fatalf("not stable:\n%q\n%q", b1.Bytes(), b2.Bytes())
		}
	})
}
