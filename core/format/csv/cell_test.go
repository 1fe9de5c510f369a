package csv

import (
	"bytes"
	"strings"
	"testing"

	"amplink/core/data"
	"amplink/core/format"
)

// Every CSV the project writes guards cells a spreadsheet would run as a
// formula with a leading apostrophe (common practice, OWASP "CSV
// injection": =, +, -, @, tab, carriage return), and the reader takes it off
// again, so a recording whose channels are named like formulas writes a
// safe file and reads back with the same names. Numbers are never touched.
func TestWriteGuardsFormulasAndReadsThemBack(t *testing.T) {
	names := []string{"=1+2", "+A", "-B", "@SUM(A1)", "'=x", "C4", "-1"}
	rec := &data.Recording{Name: "f.csv", Rate: 100}
	for _, n := range names {
		rec.Channels = append(rec.Channels, data.Channel{Name: n})
		rec.Samples = append(rec.Samples, []float32{-1.5, 2, 3})
	}
	var b bytes.Buffer
	if err := WriteRecording(&b, rec); err != nil {
		t.Fatal(err)
	}
	header, _, _ := strings.Cut(b.String(), "\n")
	if want := `time,'=1+2,'+A,'-B,'@SUM(A1),''=x,C4,-1`; header != want {
		t.Errorf("header %q, want %q", header, want)
	}
	if !strings.Contains(b.String(), ",-1.5,") {
		t.Errorf("a negative sample was guarded: %q", b.String())
	}
	d, err := Decode(format.Bytes("f.csv", b.Bytes()))
	if err != nil {
		t.Fatal(err)
	}
	for i, c := range d.Recording.Channels {
		if c.Name != names[i] {
			t.Errorf("channel %d reads back as %q, want %q", i, c.Name, names[i])
		}
	}
}
