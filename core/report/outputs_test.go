package report

import (
	"archive/zip"
	"bytes"
	"io"
	"slices"
	"testing"
)

// TestOutputsZip checks the archive against the file list: every output
// once, under the CLI's layout, with its bytes, and byte-identical archives
// for the same results.
func TestOutputsZip(t *testing.T) {
	res := &Results{
		Rows:    []Row{{Analysis: "a1", Type: "trial-window", Seed: "C4", Target: "Pz", Method: "spearman", N: 10, R: 0.5, P: 0.1}},
		Maps:    []Map{{Name: "a1 Pz/r", RowName: "frequency_hz", ColName: "time_s", RowLabels: []string{"2"}, ColLabels: []string{"0"}, Values: [][]float64{{0.25}}}},
		Figures: []Figure{{Name: "a1_scatter_C4_Pz", Title: "t", SVG: "<svg/>"}},
		Recipe:  []byte("{}\n"),
	}
	files, err := Outputs(res)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, f := range files {
		names = append(names, f.Name)
	}
	want := []string{"results.json", "recipe.json", "maps/a1_Pz_r.csv", "figures/a1_scatter_C4_Pz.svg", "results.csv"}
	if !slices.Equal(names, want) {
		t.Fatalf("outputs %v, want %v", names, want)
	}
	var a, b bytes.Buffer
	if err := WriteZip(&a, files); err != nil {
		t.Fatal(err)
	}
	if err := WriteZip(&b, files); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a.Bytes(), b.Bytes()) {
		t.Error("two archives of the same results differ")
	}
	zr, err := zip.NewReader(bytes.NewReader(a.Bytes()), int64(a.Len()))
	if err != nil {
		t.Fatal(err)
	}
	if len(zr.File) != len(files) || zr.File[0].Name != "results.csv" {
		t.Fatalf("archive has %d entries starting %q", len(zr.File), zr.File[0].Name)
	}
	byName := map[string][]byte{}
	for _, f := range files {
		byName[f.Name] = f.Data
	}
	for _, zf := range zr.File {
		rc, err := zf.Open()
		if err != nil {
			t.Fatal(err)
		}
		got, _ := io.ReadAll(rc)
		rc.Close()
		if !bytes.Equal(got, byName[zf.Name]) {
			t.Errorf("%s: archive bytes differ from the output", zf.Name)
		}
	}
}
