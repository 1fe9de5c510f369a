package csv

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"testing"

	"amplink/core/format"
)

// FuzzDecode feeds arbitrary bytes to Decode and DecodeTrials, seeded from
// every file in testdata/csv. It checks that nothing panics, that an error
// comes with nil data and is a *format.Error, that data returned without an
// error is consistent and finite, and that it survives a write/read round trip.
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
		d, err := Decode(format.Bytes("fuzz.csv", b))
		if err != nil {
			var fe *format.Error
			if d != nil || !errors.As(err, &fe) {
				t.Fatalf("error %v (%T) with data %v", err, err, d)
			}
		} else {
			checkData(t, d)
		}
		tab, err := DecodeTrials(format.Bytes("fuzz.csv", b))
		if err != nil {
			if tab != nil {
				t.Fatalf("table with error %v", err)
			}
			return
		}
		if len(tab.Rows) == 0 || len(tab.Columns) < 2 {
			t.Fatalf("table %d×%d", len(tab.Rows), len(tab.Columns))
		}
		for _, r := range tab.Rows {
			if len(r) != len(tab.Columns) || r[0] == "" {
				t.Fatalf("row %q for columns %q", r, tab.Columns)
			}
		}
	})
}

func checkData(t *testing.T, d *format.Data) {
	t.Helper()
	if (d.Epochs == nil) == (d.Recording == nil) {
		t.Fatalf("want exactly one of epochs and recording: %+v", d)
	}
	var buf bytes.Buffer
	if e := d.Epochs; e != nil {
		if err := e.Validate(); err != nil {
			t.Fatal(err)
		}
		finite(t, e.Data)
		if err := WriteEpochs(&buf, e); err != nil {
			t.Fatalf("write: %v", err)
		}
		g, err := Decode(format.Bytes("again.csv", buf.Bytes()))
		if err != nil {
			t.Fatalf("reading back: %v\n%s", err, buf.Bytes())
		}
		if !reflect.DeepEqual(g.Epochs.Data, e.Data) || !reflect.DeepEqual(g.Epochs.Channels, e.Channels) ||
			!reflect.DeepEqual(g.Epochs.TrialInfo, e.TrialInfo) || !near(g.Epochs.Rate, e.Rate) {
			t.Fatalf("round trip changed the epochs")
		}
		return
	}
	r := d.Recording
	if !(r.Rate > 0) || math.IsInf(r.Rate, 0) || len(r.Channels) == 0 || len(r.Samples) != len(r.Channels) || r.Len() < 2 {
		t.Fatalf("recording rate %v, %d channels, %d rows, %d samples", r.Rate, len(r.Channels), len(r.Samples), r.Len())
	}
	for _, s := range r.Samples {
		if len(s) != r.Len() {
			t.Fatalf("ragged channels")
		}
		finite(t, s)
	}
	if err := WriteRecording(&buf, r); err != nil {
		t.Fatalf("write: %v", err)
	}
	g, err := Decode(format.Bytes("again.csv", buf.Bytes()))
	if err != nil {
		t.Fatalf("reading back: %v\n%s", err, buf.Bytes())
	}
	if !reflect.DeepEqual(g.Recording.Samples, r.Samples) || !reflect.DeepEqual(g.Recording.Channels, r.Channels) || !near(g.Recording.Rate, r.Rate) {
		t.Fatalf("round trip changed the recording")
	}
}

func near(a, b float64) bool { return math.Abs(a-b) <= 1e-6*b }

func finite(t *testing.T, v []float32) {
	t.Helper()
	for i, x := range v {
		if math.IsNaN(float64(x)) || math.IsInf(float64(x), 0) {
			t.Fatalf("value %d is %v", i, x)
		}
	}
}
