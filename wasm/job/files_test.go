package job

import (
	"errors"
	"testing"

	"amplink/core/format"
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
