package edf

import (
	"bytes"
	"flag"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
	"time"

	"amplink/core/data"
	"amplink/core/format"
)

var update = flag.Bool("update", false, "rewrite golden files and generated testdata/edf files")

const dir = "../../../testdata/edf"

func readFile(t testing.TB, name string) []byte {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, name))
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// golden compares got with testdata/edf/name; a mismatch writes name.got
// next to it, and -update rewrites the golden file.
func golden(t *testing.T, name string, got []byte) {
	t.Helper()
	path := filepath.Join(dir, name)
	if *update {
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run with -update to create it)", err)
	}
	if !bytes.Equal(got, want) {
		_ = os.WriteFile(path+".got", got, 0o644)
		t.Errorf("%s differs from the golden file; see %s.got", name, path)
	}
}

// fixture is the recording written to ours.edf and ours.bdf: 3 channels at
// 250 Hz for 4.5 s (so the last 1 s record is padded), with 3 events.
func fixture() *data.Recording {
	const rate, n = 250, 1125
	r := &data.Recording{
		Name: "fixture", Rate: rate,
		Channels: []data.Channel{
			{Name: "Fz", Label: "EEG Fz", Type: "EEG", Unit: "uV"},
			{Name: "Cz", Type: "EEG", Unit: "µV"},
			{Name: "noise", Unit: "mV"},
		},
	}
	rng := rand.New(rand.NewPCG(7, 1))
	r.Samples = make([][]float32, 3)
	for c := range r.Samples {
		r.Samples[c] = make([]float32, n)
	}
	for k := 0; k < n; k++ {
		tt := float64(k) / rate
		r.Samples[0][k] = float32(80 * math.Sin(2*math.Pi*6*tt))
		r.Samples[1][k] = float32(300*(tt-math.Floor(tt)) - 150)
		r.Samples[2][k] = float32(0.2 * rng.NormFloat64())
	}
	r.Events = []data.Event{
		{Onset: 0.5, Duration: 0.25, Type: "tone"},
		{Onset: 2.004, Type: "button"},
		{Onset: 3.75, Duration: 0.1, Type: "tone"},
	}
	return r
}

var fixtureStart = time.Date(2024, 5, 6, 7, 8, 9, 0, time.UTC)

func writeFixture(t testing.TB, bdf bool) []byte {
	t.Helper()
	var b bytes.Buffer
	if err := Write(&b, fixture(), WriteOptions{BDF: bdf, Start: fixtureStart}); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

func decodeBytes(name string, b []byte) (*data.Recording, *Header, error) {
	return Decode(format.Bytes(name, b))
}
