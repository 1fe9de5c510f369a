package bids

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"testing"

	"amplink/core/format"
)

// FuzzDecode feeds arbitrary bytes to ReadEvents and ReadChannels, seeded
// from every file in testdata/bids. Nothing may panic; an error comes with
// nil results and is a *format.Error; results without an error obey the
// rules the readers promise.
func FuzzDecode(f *testing.F) {
	paths, err := filepath.Glob(filepath.Join(dir, "*"))
	if err != nil || len(paths) == 0 {
		f.Fatalf("no seeds in %s: %v", dir, err)
	}
	for _, p := range paths {
		b, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		var fe *format.Error
		evs, err := ReadEvents(format.Bytes("fuzz.tsv", b))
		if err != nil {
			if evs != nil || !errors.As(err, &fe) {
				t.Fatalf("events %v with error %v (%T)", evs, err, err)
			}
		} else {
			if evs == nil {
				t.Fatal("nil events without an error")
			}
			for i, e := range evs {
				if math.IsNaN(e.Onset) || math.IsInf(e.Onset, 0) || !(e.Duration >= 0) || math.IsInf(e.Duration, 0) {
					t.Fatalf("event %d: %+v", i, e)
				}
			}
		}
		chs, err := ReadChannels(format.Bytes("fuzz.tsv", b))
		if err != nil {
			if chs != nil || !errors.As(err, &fe) {
				t.Fatalf("channels %v with error %v (%T)", chs, err, err)
			}
			return
		}
		seen := map[string]bool{}
		for _, c := range chs {
			if c.Name == "" || seen[c.Name] || (c.Status != "" && c.Status != "good" && c.Status != "bad") {
				t.Fatalf("channel %+v", c)
			}
			seen[c.Name] = true
		}
		if len(Bad(chs)) > len(chs) {
			t.Fatal("more bad channels than channels")
		}
	})
}
