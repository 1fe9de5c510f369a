package workload

import (
	"fmt"
	"math"
	"math/rand/v2"

	"amplink/core/data"
)

// stream is the PCG stream constant of every generator here ("amplink").
const stream = 0x616d706c696e6b

// Standard trial-window workload: 32 channels × 200 trials of 2.5 s epochs
// (−1.0 to 1.5 s) at 500 Hz.
const (
	StdChannels = 32
	StdTrials   = 200
	StdRate     = 500.0 // Hz
	StdStart    = -1.0  // s
	StdSamples  = 1250  // 2.5 s at 500 Hz
)

// Names returns n channel names "E01", "E02", … (two digits up to 99).
func Names(n int) []data.Channel {
	chs := make([]data.Channel, n)
	for i := range chs {
		chs[i] = data.Channel{Name: fmt.Sprintf("E%02d", i+1), Type: "EEG", Unit: "uV"}
	}
	return chs
}

// ar1 fills dst with a unit-variance AR(1) process x[k] = φ·x[k−1] + √(1−φ²)·e[k],
// e standard normal, started from its stationary distribution.
func ar1(dst []float64, phi float64, rng *rand.Rand) {
	s := math.Sqrt(1 - phi*phi)
	x := rng.NormFloat64()
	for k := range dst {
		x = phi*x + s*rng.NormFloat64()
		dst[k] = x
	}
}

// Epochs returns the standard epochs with the given number of trials
// (StdTrials for the standard workload), in µV: EpochsN with StdChannels.
func Epochs(trials int, seed uint64) *data.Epochs { return EpochsN(StdChannels, trials, seed) }

// EpochsN returns the standard epochs with nch channels (at least 4) and the
// given number of trials, in µV. With nch = StdChannels they are the standard
// workload's epochs, bit for bit.
//
// Every channel carries unit-variance AR(1) background (φ = 0.9 at 500 Hz),
// 30% of which is shared by all channels (volume conduction), plus 0.5 µV
// white noise. Planted cross-trial structure, with a trial latent
// u_t = exp(0.6·N(0,1)), in four blocks of channels (channel c, counted from
// 0, is in block ⌊4c/nch⌋; the channels named are those of 32 channels):
//   - block 0 (channels 1–8) has a 20 Hz burst centred at −0.25 s (Gaussian envelope,
//     σ = 0.08 s) of amplitude 3·√u_t µV and random phase;
//   - block 1 (channels 9–16) has a 6 Hz burst centred at 0.45 s (σ = 0.1 s) of
//     amplitude 3·√v_t µV, with log v_t = 0.7·log u_t + 0.71·0.6·N(0,1),
//     so their target-window power follows the seed power of block 0;
//   - block 2 (channels 17–24) has a 6 Hz burst of independent amplitude;
//   - block 3 (channels 25–32) is background only.
func EpochsN(nch, trials int, seed uint64) *data.Epochs {
	if nch < 4 {
		panic("workload: EpochsN needs at least 4 channels")
	}
	rng := rand.New(rand.NewPCG(seed, stream))
	e := data.NewEpochs(StdRate, StdStart, Names(nch), trials, StdSamples)
	e.Name = "workload"
	bg := make([]float64, StdSamples)
	common := make([]float64, StdSamples)
	for t := range trials {
		lu := 0.6 * rng.NormFloat64()
		lv := 0.7*lu + 0.71*0.6*rng.NormFloat64()
		li := 0.6 * rng.NormFloat64()
		ar1(common, 0.9, rng)
		for c := range nch {
			ar1(bg, 0.9, rng)
			var amp, f, mid, sd float64
			switch 4 * c / nch {
			case 0:
				amp, f, mid, sd = 3*math.Exp(lu/2), 20, -0.25, 0.08
			case 1:
				amp, f, mid, sd = 3*math.Exp(lv/2), 6, 0.45, 0.1
			case 2:
				amp, f, mid, sd = 3*math.Exp(li/2), 6, 0.45, 0.1
			}
			ph := 2 * math.Pi * rng.Float64()
			x := e.Trial(t, c)
			for k := range x {
				v := 0.7*bg[k] + 0.3*common[k] + 0.5*rng.NormFloat64()
				if amp > 0 {
					tt := StdStart + float64(k)/StdRate
					d := (tt - mid) / sd
					v += amp * math.Exp(-d*d/2) * math.Cos(2*math.Pi*f*tt+ph)
				}
				x[k] = float32(v)
			}
		}
	}
	return e
}

// StdRecipe is the standard trial-window recipe: 40 log-spaced frequencies
// from 2 to 60 Hz with 3 to 10 cycles, and every channel's 15–25 Hz power in
// −0.4 to −0.1 s against every channel's 4–8 Hz power in 0.3 to 0.6 s,
// Spearman across trials: 32 × 32 = 1024 rows. Figures are off, so that the
// run does the same work as testdata/bench/compare_numpy.py; StdRecipeFigures
// is the same analysis with the default figures.
const StdRecipe = `{
  "figures": false,
` + stdBody

// StdRecipeFigures is StdRecipe with the default figures (trial-averaged
// power maps over the whole epoch and every grid frequency, scatter plots).
const StdRecipeFigures = "{\n" + stdBody

const stdBody = `  "spectral": {"method": "wavelet", "low": 2, "high": 60, "steps": 40, "spacing": "log", "cycles": [3, 10]},
  "analyses": [
    {"id": "beta-theta", "type": "trial-window", "method": "spearman",
     "seed":   {"channel": "*", "time": [-0.4, -0.1], "freq": [15, 25]},
     "target": {"channel": "*", "time": [0.3, 0.6],   "freq": [4, 8]}}
  ]
}
`

// EnvelopeRecipe is the all-pairs pairwise-orthogonalised 8–12 Hz envelope
// correlation over the whole recording, envelopes binned to 10 Hz, on the
// same 40-frequency grid as StdRecipe.
const EnvelopeRecipe = `{
  "spectral": {"method": "wavelet", "low": 2, "high": 60, "steps": 40, "spacing": "log", "cycles": [3, 10]},
  "analyses": [
    {"id": "alpha-orth", "type": "envelope", "method": "pearson", "channels": "*", "freq": [8, 12],
     "leakageCorrection": "pairwise", "envelopeRate": 10, "over": "recording"}
  ]
}
`

// Continuous returns a continuous recording of nch channels, seconds long at
// rate Hz, in µV, built in a fixed order from one generator.
//
// Four alpha sources, each a 10 Hz carrier with a slowly drifting phase and a
// log-normal amplitude envelope that varies on a scale of about 1 s, feed the
// channels: channel c takes source c mod 4 at full weight and source
// (c+1) mod 4 at weight 0.5 delayed by a quarter cycle (25 ms), so
// neighbouring groups share envelopes at a non-zero lag, which survives
// orthogonalisation. Each channel adds unit-variance AR(1) background
// (φ = 0.95 per 1 ms, scaled to the rate) and 0.5 µV white noise.
func Continuous(nch int, rate, seconds float64, seed uint64) *data.Recording {
	rng := rand.New(rand.NewPCG(seed, stream+1))
	n := int(math.Round(seconds * rate))
	const nsrc = 4
	src := make([][]float32, nsrc)
	// Envelope and phase drift: AR(1) with a 1 s and a 2 s time constant.
	aEnv := math.Exp(-1 / rate)
	aPh := math.Exp(-1 / (2 * rate))
	for s := range src {
		src[s] = make([]float32, n)
		le, dp := rng.NormFloat64(), 0.0
		ph := 2 * math.Pi * rng.Float64()
		se, sp := math.Sqrt(1-aEnv*aEnv), math.Sqrt(1-aPh*aPh)
		for k := range src[s] {
			le = aEnv*le + se*rng.NormFloat64()
			dp = aPh*dp + sp*rng.NormFloat64()
			ph += 2*math.Pi*10/rate + 0.02*dp
			src[s][k] = float32(2 * math.Exp(0.5*le) * math.Cos(ph))
		}
	}
	delay := int(math.Round(0.025 * rate))
	phi := math.Pow(0.95, 1000/rate)
	sbg := math.Sqrt(1 - phi*phi)
	r := &data.Recording{Name: "workload-continuous", Rate: rate, Channels: Names(nch), Samples: make([][]float32, nch)}
	for c := range nch {
		x := make([]float32, n)
		a, b := src[c%nsrc], src[(c+1)%nsrc]
		bg := rng.NormFloat64()
		for k := range x {
			bg = phi*bg + sbg*rng.NormFloat64()
			v := float64(a[k]) + 0.5*rng.NormFloat64() + bg
			if k >= delay {
				v += 0.5 * float64(b[k-delay])
			}
			x[k] = float32(v)
		}
		r.Samples[c] = x
	}
	return r
}
