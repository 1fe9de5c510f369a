package bids

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"amplink/core/format"
)

// FuzzDecode feeds arbitrary bytes to ReadEvents, ReadChannels,
// ReadElectrodes and ReadCoordSystem, seeded
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
		es, err := ReadElectrodes(format.Bytes("fuzz.tsv", b))
		if err != nil {
			if es != nil || !errors.As(err, &fe) {
				t.Fatalf("electrodes %v with error %v (%T)", es, err, err)
			}
		} else {
			names := map[string]bool{}
			var first *Electrode
			same := true
			for i, e := range es {
				k := strings.ToLower(e.Name)
				if e.Name == "" || names[k] || e.Line < 2 {
					t.Fatalf("electrode %+v", e)
				}
				names[k] = true
				if !e.Placed {
					if e.X != 0 || e.Y != 0 || e.Z != 0 {
						t.Fatalf("unplaced electrode with a position: %+v", e)
					}
					continue
				}
				for _, v := range []float64{e.X, e.Y, e.Z} {
					if math.IsNaN(v) || math.IsInf(v, 0) {
						t.Fatalf("electrode %+v", e)
					}
				}
				if first == nil {
					first = &es[i]
				} else if e.X != first.X || e.Y != first.Y || e.Z != first.Z {
					same = false
				}
			}
			if first != nil && same && countPlaced(es) > 1 {
				t.Fatal("every electrode at one point without an error")
			}
		}
		if _, err := ReadCoordSystem(format.Bytes("fuzz.json", b)); err != nil && !errors.As(err, &fe) {
			t.Fatalf("coordsystem error %v (%T)", err, err)
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

func countPlaced(es []Electrode) int {
	n := 0
	for _, e := range es {
		if e.Placed {
			n++
		}
	}
	return n
}
