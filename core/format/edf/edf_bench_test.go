package edf

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"testing"

	"amplink/core/data"
	"amplink/core/format"
)

// benchFile writes a 64-channel, 1 kHz, 60 s recording (3.84 M samples).
func benchFile(b *testing.B, bdf bool) ([]byte, int) {
	b.Helper()
	const nc, rate, secs = 64, 1000, 60
	r := &data.Recording{Name: "bench", Rate: rate}
	rng := rand.New(rand.NewPCG(1, 2))
	for c := 0; c < nc; c++ {
		r.Channels = append(r.Channels, data.Channel{Name: fmt.Sprintf("E%d", c+1), Type: "EEG", Unit: "uV"})
		s := make([]float32, rate*secs)
		for k := range s {
			s[k] = float32(20*math.Sin(2*math.Pi*10*float64(k)/rate) + 5*rng.NormFloat64())
		}
		r.Samples = append(r.Samples, s)
	}
	for k := 0; k < secs; k++ {
		r.Events = append(r.Events, data.Event{Onset: float64(k) + 0.5, Type: "tone"})
	}
	var buf bytes.Buffer
	if err := Write(&buf, r, WriteOptions{BDF: bdf}); err != nil {
		b.Fatal(err)
	}
	return buf.Bytes(), nc * rate * secs
}

// BenchmarkDecode reports throughput and the bytes allocated per decoded
// sample. Figures on the 2-core build machine (Go 1.26, amd64):
// EDF ≈ 4.0 B/sample (the float32 samples plus a 256 KiB read buffer) at
// about 300-400 MB/s; BDF the same bytes per sample.
func BenchmarkDecode(b *testing.B) {
	for _, bdf := range []bool{false, true} {
		name := "edf"
		if bdf {
			name = "bdf"
		}
		b.Run(name+"/64ch-1kHz-60s", func(b *testing.B) {
			file, samples := benchFile(b, bdf)
			f := format.Bytes("bench."+name, file)
			b.SetBytes(int64(len(file)))
			b.ReportAllocs()
			var ms0, ms1 runtime.MemStats
			runtime.ReadMemStats(&ms0)
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				rec, _, err := Decode(f)
				if err != nil {
					b.Fatal(err)
				}
				if rec.Len()*len(rec.Channels) != samples {
					b.Fatalf("%d samples", rec.Len()*len(rec.Channels))
				}
			}
			b.StopTimer()
			runtime.ReadMemStats(&ms1)
			b.ReportMetric(float64(ms1.TotalAlloc-ms0.TotalAlloc)/float64(b.N)/float64(samples), "B/sample")
		})
	}
}

// BenchmarkWrite reports the writer's throughput.
func BenchmarkWrite(b *testing.B) {
	file, _ := benchFile(b, false)
	rec, _, err := Decode(format.Bytes("bench.edf", file))
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(len(file)))
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		var buf bytes.Buffer
		buf.Grow(len(file))
		if err := Write(&buf, rec, WriteOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}
