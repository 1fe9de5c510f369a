package all

import (
	"slices"
	"testing"

	"amplink/core/format"
)

// TestRegistered checks that importing all registers the formats and that
// CSV text reaches the csv fallback through format.Decode.
func TestRegistered(t *testing.T) {
	for _, name := range []string{"bdf", "csv", "edf", "f32", "mp3", "wav"} {
		if !slices.Contains(format.Names(), name) {
			t.Errorf("format %q is not registered; have %v", name, format.Names())
		}
	}
	d, err := format.Decode(format.Bytes("x.txt", []byte("time,Fz\n0,1\n0.5,2\n")), nil)
	if err != nil {
		t.Fatal(err)
	}
	if d.Recording == nil || d.Recording.Format != "csv" || d.Recording.Rate != 2 {
		t.Errorf("got %+v, want a 2 Hz csv recording", d.Recording)
	}
}
