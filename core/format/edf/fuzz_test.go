package edf

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"amplink/core/format"
)

// FuzzDecode is seeded from every .edf and .bdf file in testdata/edf. It
// checks that Decode never panics, that errors carry a position, and that a
// decoded recording is consistent with its header and identical on a second
// decode.
func FuzzDecode(f *testing.F) {
	paths, _ := filepath.Glob(filepath.Join(dir, "*"))
	seeded := 0
	for _, p := range paths {
		if ext := filepath.Ext(p); ext != ".edf" && ext != ".bdf" {
			continue
		}
		b, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
		seeded++
	}
	if seeded < 10 {
		f.Fatalf("only %d seeds in %s", seeded, dir)
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		rec, h, err := decodeBytes("fuzz.edf", b)
		if err != nil {
			var fe *format.Error
			if !errors.As(err, &fe) || fe.File != "fuzz.edf" || fe.Offset < 0 || fe.Offset > int64(len(b)) {
				t.Fatalf("error without a valid position: %v", err)
			}
			if !errors.Is(err, format.ErrSyntax) && !errors.Is(err, format.ErrTruncated) && !errors.Is(err, format.ErrUnsupported) {
				t.Fatalf("error wraps no sentinel: %v", err)
			}
			return
		}
		if rec.Rate <= 0 || len(rec.Channels) == 0 || len(rec.Samples) != len(rec.Channels) {
			t.Fatalf("rate %v, %d channels, %d sample rows", rec.Rate, len(rec.Channels), len(rec.Samples))
		}
		names := map[string]bool{}
		for c, ch := range rec.Channels {
			if ch.Name == "" || names[ch.Name] {
				t.Fatalf("channel %d name %q empty or repeated", c, ch.Name)
			}
			names[ch.Name] = true
			if len(rec.Samples[c]) != rec.Len() {
				t.Fatalf("channel %d has %d samples, channel 0 %d", c, len(rec.Samples[c]), rec.Len())
			}
		}
		if h.HeaderBytes+h.Records*h.RecordBytes+h.Trailing != int64(len(b)) {
			t.Fatalf("header %d + %d×%d + %d ≠ %d bytes", h.HeaderBytes, h.Records, h.RecordBytes, h.Trailing, len(b))
		}
		if rec.Len()%int(h.Records) != 0 {
			t.Fatalf("%d samples for %d records", rec.Len(), h.Records)
		}
		for i := 1; i < len(rec.Events); i++ {
			if rec.Events[i].Onset < rec.Events[i-1].Onset {
				t.Fatalf("events out of order at %d", i)
			}
		}
		rec2, _, err := decodeBytes("fuzz.edf", b)
		if err != nil {
			t.Fatalf("second decode: %v", err)
		}
		if strings.Join(rec.Notes, "|") != strings.Join(rec2.Notes, "|") || len(rec.Events) != len(rec2.Events) {
			t.Fatal("second decode differs")
		}
		for c := range rec.Samples {
			for k := range rec.Samples[c] {
				if a, b := rec.Samples[c][k], rec2.Samples[c][k]; a != b && a == a {
					t.Fatalf("second decode differs at %d,%d", c, k)
				}
			}
		}
	})
}
