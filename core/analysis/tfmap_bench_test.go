package analysis

import (
	"context"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"amplink/core/data"
	"amplink/core/recipe"
)

// BenchmarkTFMapClusterTest is the inference stage of a demo-sized tf-map:
// 19 target maps of 25×50 pixels over 180 trials, 1000 shuffles (the pixel
// powers are made directly, so only the statistics are timed).
func BenchmarkTFMapClusterTest(b *testing.B) {
	const n, rows, cols, maps, perms = 180, 25, 50, 19, 1000
	rng := rand.New(rand.NewPCG(1, 1))
	seed := make([]float64, n)
	for i := range seed {
		seed[i] = math.Exp(rng.NormFloat64())
	}
	var pix [][]float64
	for range maps {
		pix = append(pix, smoothPixels(rng, n, rows, cols))
	}
	b.ResetTimer()
	for range b.N {
		s := newTFStats(seed, pix, rows, cols, true)
		if _, err := s.clusterTest(context.Background(), 0.05, perms, 1); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*perms*maps*rows*cols), "ns/pixel-shuffle")
}

// BenchmarkTFMapRun is a whole demo-like tf-map run: 20 channels of 3.5 s
// noise epochs at 250 Hz, 180 trials, a 2–80 Hz 36-step log grid, the seed
// against all 19 other channels over 4–30 Hz × −0.5–0.5 s (19×50 pixels),
// 1000 shuffles, on GOMAXPROCS goroutines.
func BenchmarkTFMapRun(b *testing.B) {
	const trials, chans, rate = 180, 20, 250.0
	rng := rand.New(rand.NewPCG(2, 2))
	chs := make([]data.Channel, chans)
	var names []string
	for i := range chs {
		chs[i].Name = "E" + strconv.Itoa(i)
		if i > 0 {
			names = append(names, `"`+chs[i].Name+`"`)
		}
	}
	e := data.NewEpochs(rate, -1.5, chs, trials, int(3.5*rate))
	for i := range e.Data {
		e.Data[i] = float32(rng.NormFloat64())
	}
	r, err := recipe.Parse([]byte(`{"figures": false,
  "spectral": {"low": 2, "high": 80, "steps": 36, "spacing": "log", "cycles": [3, 10]},
  "analyses": [{"id": "m", "type": "tf-map", "correction": "cluster", "permutations": 1000, "randomSeed": 7,
    "seed": {"channel": "E0", "time": [-0.5, -0.1], "freq": [15, 25]},
    "target": {"channel": [` + strings.Join(names, ",") + `], "time": [-0.5, 0.5], "freq": [4, 30]}}]}`))
	if err != nil {
		b.Fatal(err)
	}
	ds := &Dataset{Name: "bench", Epochs: e}
	b.ResetTimer()
	for range b.N {
		res, err := Run(context.Background(), r, ds, nil)
		if err != nil {
			b.Fatal(err)
		}
		if len(res.Maps) != 3*(chans-1) {
			b.Fatalf("%d maps", len(res.Maps))
		}
	}
}
