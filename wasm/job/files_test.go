package job

import (
	"errors"
	"testing"

	"amplink/core/format"
	"amplink/core/format/all"
)

// A picked electrodes.tsv under any name serves as the recording's
// <stem>_electrodes.tsv when it is the only one; two are ambiguous.
func TestFilesElectrodesFallback(t *testing.T) {
	cap := format.Bytes("cap_electrodes.tsv", []byte("name\tx\ty\tz\n"))
	fs := Files{"rec.edf": format.Bytes("rec.edf", nil), "cap_electrodes.tsv": cap}
	got, err := fs.Open("rec_electrodes.tsv")
	if err != nil || got.Name != "cap_electrodes.tsv" {
		t.Errorf("got %q, %v", got.Name, err)
	}
	if _, err := fs.Open("rec_coordsystem.json"); !errors.Is(err, format.ErrNoSibling) {
		t.Errorf("coordsystem: %v", err)
	}
	if _, err := fs.Open("rec_channels.tsv"); !errors.Is(err, format.ErrNoSibling) {
		t.Errorf("channels: %v", err)
	}
	fs["other_electrodes.tsv"] = format.Bytes("other_electrodes.tsv", nil)
	if _, err := fs.Open("rec_electrodes.tsv"); !errors.Is(err, format.ErrNoSibling) {
		t.Errorf("two electrodes files: %v", err)
	}
}

// An electrodes table is recognised by its columns whatever its name, and
// serves as the recording's positions, as a channels table serves as its
// channels.
func TestElectrodesByContent(t *testing.T) {
	pos := format.Bytes("positions.tsv", []byte("name\tx\ty\tz\nC4\t0.71\t0\t0.71\nPz\t0\t-0.71\t0.71\n"))
	rec := format.Bytes("trials.csv", trialsCSV())
	list := []format.File{rec, pos}
	roles := Recognise(list)
	if roles[1] != string(all.Electrodes) {
		t.Fatalf("positions.tsv taken as %s", roles[1])
	}
	src, _, err := SourceFor(list, roles)
	if err != nil {
		t.Fatal(err)
	}
	ds, err := Open(nil, src, Files{"trials.csv": rec, "positions.tsv": pos})
	if err != nil {
		t.Fatal(err)
	}
	if ds.Electrodes == nil || ds.Electrodes.File != "positions.tsv" {
		t.Errorf("positions from %+v, want positions.tsv", ds.Electrodes)
	}
}
