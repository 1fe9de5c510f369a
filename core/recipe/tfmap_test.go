package recipe

import (
	"context"
	"math"
	"math/rand/v2"
	"strconv"
	"testing"

	"amplink/core/data"
)

// blockTrials makes epochs (200 Hz, −0.6 to 1.4 s) in which the amplitude of
// a 20 Hz burst on S before 0 s drives the amplitude of a 6 Hz burst on T in
// 0.2–0.5 s only (log amplitudes correlate at 0.85). T also carries a 6 Hz
// burst of independent amplitude in 0.75–1.05 s, U a 6 Hz burst of
// independent amplitude in 0.2–0.5 s, and N is noise only.
func blockTrials(trials int, seed uint64) *data.Epochs {
	const rate = 200.0
	rng := rand.New(rand.NewPCG(seed, 11))
	chs := []data.Channel{{Name: "S"}, {Name: "T"}, {Name: "U"}, {Name: "N"}}
	e := data.NewEpochs(rate, -0.6, chs, trials, int(2.0*rate)+1)
	burst := func(x []float32, t0, t1, f, amp float64) {
		ph := rng.Float64() * 2 * math.Pi
		for k := range x {
			tt := e.Time(k)
			if tt < t0 || tt > t1 {
				continue
			}
			u := (tt - t0) / (t1 - t0)
			x[k] += float32(amp * (0.5 - 0.5*math.Cos(2*math.Pi*u)) * math.Sin(2*math.Pi*f*tt+ph))
		}
	}
	const rho = 0.85
	for t := range trials {
		for c := range chs {
			x := e.Trial(t, c)
			for k := range x {
				x[k] = float32(rng.NormFloat64())
			}
		}
		z := rng.NormFloat64()
		burst(e.Trial(t, 0), -0.5, 0, 20, 3*math.Exp(0.5*z))
		burst(e.Trial(t, 1), 0.2, 0.5, 6, 3*math.Exp(0.5*(rho*z+math.Sqrt(1-rho*rho)*rng.NormFloat64())))
		burst(e.Trial(t, 1), 0.75, 1.05, 6, 3*math.Exp(0.5*rng.NormFloat64()))
		burst(e.Trial(t, 2), 0.2, 0.5, 6, 3*math.Exp(0.5*rng.NormFloat64()))
	}
	return e
}

const blockRecipe = `{
  "spectral": {"low": 2, "high": 30, "steps": 15, "spacing": "linear", "cycles": [3, 6]},
  "analyses": [
    {"id": "m", "type": "tf-map",
     "seed":   {"channel": "S", "time": [-0.4, -0.1], "freq": [18, 22]},
     "target": {"channel": ["T", "U", "N"], "time": [-0.2, 1.1], "freq": [4, 14]},
     "permutations": 199, "randomSeed": 5, "correction": "cluster", "timeStep": 0.04}
  ]
}`

func TestTFMapScratch(t *testing.T) {
	res := runSynth(t, blockRecipe, blockTrials(60, 1))
	for _, r := range res.Rows {
		t.Logf("%s %s r=%.3f p=%.3g %v", r.Seed, r.Target, r.R, r.P, r.Extra[4:14])
	}
	for _, m := range res.Maps {
		t.Logf("%s %dx%d", m.Name, len(m.Values), len(m.Values[0]))
	}
	_ = context.Background
}

func TestTFMapScratch2(t *testing.T) {
	res := runSynth(t, blockRecipe, blockTrials(60, 1))
	for _, m := range res.Maps[:3] {
		t.Logf("%s %v", m.Name, m.ColLabels)
		for i, row := range m.Values {
			s := ""
			for _, v := range row {
				s += " " + strconv.FormatFloat(v, 'f', 2, 64)
			}
			t.Logf("%s:%s", m.RowLabels[i], s)
		}
	}
}
