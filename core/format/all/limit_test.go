package all_test

import (
	"bytes"
	"errors"
	"fmt"
	"strings"
	"testing"

	"amplink/core/data"
	"amplink/core/format"
	"amplink/core/format/edf"
)

// TestSampleLimit: with data.MaxSampleBytes set (as the browser worker
// sets it), every reader without a cap of its own, and epoching, refuse
// samples beyond it with an error that names the file and wraps
// data.ErrTooLarge; within it, and with no limit, they decode.
func TestSampleLimit(t *testing.T) {
	const n = 3000 // samples per channel
	rec := &data.Recording{Rate: 100, Channels: []data.Channel{{Name: "Cz", Unit: "uV"}, {Name: "Pz", Unit: "uV"}}}
	var cont, ep strings.Builder
	cont.WriteString("time,Cz,Pz\n")
	ep.WriteString("trial,time,Cz,Pz\n")
	for i := 0; i < n; i++ {
		fmt.Fprintf(&cont, "%.2f,%d,%d\n", float64(i)/100, i%7, i%5)
		fmt.Fprintf(&ep, "%d,%.2f,%d,%d\n", i/100+1, float64(i%100)/100, i%7, i%5)
	}
	rec.Samples = [][]float32{make([]float32, n), make([]float32, n)}
	for i := 0; i < n; i++ {
		rec.Samples[0][i], rec.Samples[1][i] = float32(i%7), float32(i%5)
	}
	var eb bytes.Buffer
	if err := edf.Write(&eb, rec, edf.WriteOptions{}); err != nil {
		t.Fatal(err)
	}
	// one long trial: its samples grow before any second trial fixes the
	// trial length
	var one strings.Builder
	one.WriteString("trial,time,Cz,Pz\n")
	for i := 0; i < 3*4096; i++ {
		fmt.Fprintf(&one, "1,%.2f,%d,%d\n", float64(i)/100, i%7, i%5)
	}
	files := []format.File{
		format.Bytes("long.edf", eb.Bytes()),
		format.Bytes("long.csv", []byte(cont.String())),
		format.Bytes("trials.csv", []byte(ep.String())),
	}
	defer func(v int64) { data.MaxSampleBytes = v }(data.MaxSampleBytes)
	t.Run("one-trial.csv", func(t *testing.T) {
		f := format.Bytes("one-trial.csv", []byte(one.String()))
		data.MaxSampleBytes = 0
		if _, err := format.Decode(f, nil); err != nil {
			t.Fatalf("no limit: %v", err)
		}
		data.MaxSampleBytes = 4 * 4096 // 2 channels × 12288 samples do not fit
		if _, err := format.Decode(f, nil); !errors.Is(err, data.ErrTooLarge) || !strings.Contains(err.Error(), "one-trial.csv") {
			t.Fatalf("error %v", err)
		}
	})
	defer func(v int64) { data.MaxSampleBytes = v }(data.MaxSampleBytes)
	for _, f := range files {
		t.Run(f.Name, func(t *testing.T) {
			data.MaxSampleBytes = 0
			if _, err := format.Decode(f, nil); err != nil {
				t.Fatalf("no limit: %v", err)
			}
			data.MaxSampleBytes = 4 * 2 * n // exactly enough
			if _, err := format.Decode(f, nil); err != nil {
				t.Fatalf("limit of exactly the samples: %v", err)
			}
			data.MaxSampleBytes = 4 * n // half
			_, err := format.Decode(f, nil)
			if !errors.Is(err, data.ErrTooLarge) || !strings.Contains(err.Error(), f.Name) || !strings.Contains(err.Error(), "as float32") {
				t.Fatalf("half the samples allowed: error %v", err)
			}
			t.Log(err)
		})
	}
	t.Run("epoching", func(t *testing.T) {
		var evs []data.Event
		for i := 0; i < 20; i++ {
			evs = append(evs, data.Event{Onset: 1 + float64(i), Type: "cue"})
		}
		rec.Name = "long.edf"
		data.MaxSampleBytes = 0
		if _, err := data.Epoch(rec, evs, "cue", 0, 1); err != nil {
			t.Fatal(err)
		}
		data.MaxSampleBytes = 4 * 1000 // 20 epochs × 2 channels × 100 samples do not fit
		_, err := data.Epoch(rec, evs, "cue", 0, 1)
		if !errors.Is(err, data.ErrTooLarge) || !strings.Contains(err.Error(), "long.edf") {
			t.Fatalf("error %v", err)
		}
	})
}
