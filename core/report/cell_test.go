package report

import (
	"bytes"
	"strings"
	"testing"
)

// TestCSVNeutralisesFormulas guards results.csv and the maps against cells a
// spreadsheet would execute: a leading =, +, -, @, tab or carriage return
// gets an apostrophe (common practice, OWASP "CSV injection"), numbers stay
// numbers, and reading the table back gives the names as they were.
func TestCSVNeutralisesFormulas(t *testing.T) {
	for _, tc := range []struct{ in, want string }{
		{"=1+2", "'=1+2"},
		{"+A", "'+A"},
		{"-A", "'-A"},
		{"@SUM(A1)", "'@SUM(A1)"},
		{"\tx", "'\tx"},
		{"\rx", "'\rx"},
		{"'=x", "''=x"}, // an apostrophe already there stays invertible
		{"-0.5", "-0.5"},
		{"-1e-07", "-1e-07"},
		{"-Inf", "'-Inf"},
		{"C4", "C4"},
		{"'C4", "'C4"},
		{"", ""},
	} {
		if got := QuoteCell(tc.in); got != tc.want {
			t.Errorf("QuoteCell(%q) = %q, want %q", tc.in, got, tc.want)
		}
		if back := UnquoteCell(QuoteCell(tc.in)); back != tc.in {
			t.Errorf("UnquoteCell(QuoteCell(%q)) = %q", tc.in, back)
		}
	}
	res := &Results{Rows: []Row{{Analysis: "a", Type: "trial-window", Seed: "=1+2", Target: "@x", Method: "spearman", N: 10, R: -0.5, P: 0.1}}}
	var b bytes.Buffer
	if err := WriteCSV(&b, res); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "\na,trial-window,'=1+2,'@x,spearman,10,-0.5,") {
		t.Fatalf("results.csv:\n%s", b.String())
	}
	back, err := ReadCSV(&b, "results.csv")
	if err != nil {
		t.Fatal(err)
	}
	if back.Rows[0].Seed != "=1+2" || back.Rows[0].Target != "@x" || back.Rows[0].R != -0.5 {
		t.Fatalf("read back %+v", back.Rows[0])
	}
	var m bytes.Buffer
	if err := WriteMapCSV(&m, &Map{Name: "m", RowName: "ch", ColName: "ch", RowLabels: []string{"-Fz"}, ColLabels: []string{"=A"}, Values: [][]float64{{-0.25}}}); err != nil {
		t.Fatal(err)
	}
	if want := "ch\\ch,'=A\n'-Fz,-0.25\n"; m.String() != want {
		t.Fatalf("map CSV %q, want %q", m.String(), want)
	}
}
