// Package synth makes the synthetic recordings that the analysis and figure
// tests share, each with its ground truth planted and documented. They are
// invented data for tests, never the demo's.
package synth

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"

	"amplink/core/data"
	"amplink/core/report"
)

// Trials makes epochs with a planted cross-trial coupling: the amplitude
// of a 20 Hz burst on A before 0 s predicts the amplitude of a 6 Hz burst on
// B after 0 s (log amplitudes correlate at rho); C has a 6 Hz burst of
// independent amplitude, and D is noise only.
func Trials(trials int, rho float64, seed uint64) *data.Epochs {
	b := newBursts(250, -1, 2.5, []string{"A", "B", "C", "D"}, trials, rand.NewPCG(seed, 7))
	for t := range trials {
		b.noise(t)
		z1, z2, z3 := b.rng.NormFloat64(), b.rng.NormFloat64(), b.rng.NormFloat64()
		b.add(t, 0, -0.7, 0, 20, 4*math.Exp(0.5*z1))
		b.add(t, 1, 0.1, 0.9, 6, 4*math.Exp(0.5*(rho*z1+math.Sqrt(1-rho*rho)*z2)))
		b.add(t, 2, 0.1, 0.9, 6, 4*math.Exp(0.5*z3))
	}
	return b.e
}

// Blocks makes 200 Hz epochs from −0.6 to 1.4 s with a planted block in
// time and frequency: the amplitude of a 20 Hz burst on S in −0.5–0 s
// predicts (log amplitudes correlated at 0.85) that of a 6 Hz burst on T in
// 0.2–0.5 s; T has a second 6 Hz burst of independent amplitude in
// 0.75–1.05 s, U a 6 Hz burst of independent amplitude in 0.2–0.5 s, and N
// is noise only.
func Blocks(trials int, seed uint64) *data.Epochs {
	b := newBursts(200, -0.6, 2.0, []string{"S", "T", "U", "N"}, trials, rand.NewPCG(seed, 11))
	const rho = 0.85
	for t := range trials {
		b.noise(t)
		z := b.rng.NormFloat64()
		b.add(t, 0, -0.5, 0, 20, 3*math.Exp(0.5*z))
		b.add(t, 1, 0.2, 0.5, 6, 3*math.Exp(0.5*(rho*z+math.Sqrt(1-rho*rho)*b.rng.NormFloat64())))
		b.add(t, 1, 0.75, 1.05, 6, 3*math.Exp(0.5*b.rng.NormFloat64()))
		b.add(t, 2, 0.2, 0.5, 6, 3*math.Exp(0.5*b.rng.NormFloat64()))
	}
	return b.e
}

// bursts builds epochs of white noise with Hann-windowed sine bursts.
type bursts struct {
	rng *rand.Rand
	e   *data.Epochs
}

func newBursts(rate, start, length float64, names []string, trials int, src rand.Source) *bursts {
	chs := make([]data.Channel, len(names))
	for i, n := range names {
		chs[i] = data.Channel{Name: n}
	}
	return &bursts{rng: rand.New(src), e: data.NewEpochs(rate, start, chs, trials, int(length*rate)+1)}
}

// noise fills every channel of trial t with unit white noise.
func (b *bursts) noise(t int) {
	for c := range b.e.Channels {
		x := b.e.Trial(t, c)
		for k := range x {
			x[k] = float32(b.rng.NormFloat64())
		}
	}
}

// add adds amp·hann(t0…t1)·sin(2πf·t + φ), with a random phase φ, to
// channel ch of trial t.
func (b *bursts) add(t, ch int, t0, t1, f, amp float64) {
	x := b.e.Trial(t, ch)
	ph := b.rng.Float64() * 2 * math.Pi
	for k := range x {
		tt := b.e.Time(k)
		if tt < t0 || tt > t1 {
			continue
		}
		u := (tt - t0) / (t1 - t0)
		x[k] += float32(amp * (0.5 - 0.5*math.Cos(2*math.Pi*u)) * math.Sin(2*math.Pi*f*tt+ph))
	}
}

// Confounded makes epochs where a per-trial covariate drives both the seed
// (A, 20 Hz before 0 s) and the target (B, 6 Hz after 0 s) amplitudes, with
// no direct link, and a condition column: in "hit" trials the seed also
// drives C, in "miss" trials it does not.
func Confounded(trials int) *data.Epochs {
	e := Trials(trials, 0, 5)
	rng := rand.New(rand.NewPCG(8, 8))
	e.TrialInfo = make([]data.Event, trials)
	for t := range trials {
		c := rng.NormFloat64()
		a := 4 * math.Exp(0.5*(0.9*c+0.44*rng.NormFloat64()))
		b := 4 * math.Exp(0.5*(0.9*c+0.44*rng.NormFloat64()))
		cond := "hit"
		if t%2 == 1 {
			cond = "miss"
		}
		cc := 4 * math.Exp(0.5*rng.NormFloat64())
		if cond == "hit" {
			cc = a
		}
		for ch, sp := range []struct{ f, t0, t1, amp float64 }{{20, -0.7, 0, a}, {6, 0.1, 0.9, b}, {6, 0.1, 0.9, cc}} {
			x := e.Trial(t, ch)
			for k := range x {
				tt := e.Time(k)
				x[k] = float32(rng.NormFloat64())
				if tt >= sp.t0 && tt <= sp.t1 {
					u := (tt - sp.t0) / (sp.t1 - sp.t0)
					x[k] += float32(sp.amp * (0.5 - 0.5*math.Cos(2*math.Pi*u)) * math.Sin(2*math.Pi*sp.f*tt))
				}
			}
		}
		cv := strconv.FormatFloat(c, 'f', 6, 64)
		if t%10 == 3 {
			cv = "n/a"
		}
		e.TrialInfo[t] = data.Event{Type: cond, Extra: map[string]string{"arousal": cv}}
	}
	return e
}

// SlowNoise returns a smooth positive amplitude: exp of a moving average of
// white noise (width w samples).
func SlowNoise(rng *rand.Rand, n, w int) []float64 {
	white := make([]float64, n+w)
	for i := range white {
		white[i] = rng.NormFloat64()
	}
	out := make([]float64, n)
	s := 0.0
	for i := range w {
		s += white[i]
	}
	for i := range out {
		out[i] = math.Exp(0.8 * s / math.Sqrt(float64(w)))
		s += white[i+w] - white[i]
	}
	return out
}

// CarrierWalk returns cos(2πft + φ(t)) with a random-walk phase, so two
// carriers made from different generators have independent phases.
func CarrierWalk(rng *rand.Rand, n int, rate, f float64) []float64 {
	out := make([]float64, n)
	ph := 0.0
	for i := range out {
		ph += 0.05 * rng.NormFloat64()
		out[i] = math.Cos(2*math.Pi*f*float64(i)/rate + ph)
	}
	return out
}

// Envelopes builds a 60 s, 200 Hz recording:
//
//	S  a 10 Hz source with a slow envelope
//	L  0.8·S plus independent noise (pure zero-lag leakage of S)
//	G  a 10 Hz signal with S's envelope but an independent phase (genuine coupling)
//	H  a 40 Hz carrier with S's envelope (the same envelope, another frequency)
//	N  noise only
//	F  flat (zero variance)
func Envelopes() *data.Recording {
	const rate = 200.0
	rec := &data.Recording{Name: "env", Rate: rate}
	for i, x := range EnvelopeSignals(rand.New(rand.NewPCG(42, 1)), 12000, rate) {
		rec.Channels = append(rec.Channels, data.Channel{Name: EnvelopeNames[i]})
		rec.Samples = append(rec.Samples, x)
	}
	rec.Channels = append(rec.Channels, data.Channel{Name: "F"})
	rec.Samples = append(rec.Samples, make([]float32, 12000))
	return rec
}

// EnvelopeNames are the channels EnvelopeSignals returns, in order.
var EnvelopeNames = []string{"S", "L", "G", "H", "N"}

// EnvelopeSignals returns n samples at rate of the channels S, L, G, H and N
// described at Envelopes, drawn from rng.
func EnvelopeSignals(rng *rand.Rand, n int, rate float64) [][]float32 {
	env := SlowNoise(rng, n, 200)
	cs := CarrierWalk(rng, n, rate, 10)
	cg := CarrierWalk(rng, n, rate, 10)
	ch := CarrierWalk(rng, n, rate, 40)
	out := make([][]float32, len(EnvelopeNames))
	for c := range out {
		out[c] = make([]float32, n)
	}
	for i := range n {
		s := env[i] * cs[i]
		out[0][i] = float32(s + 0.1*rng.NormFloat64())
		out[1][i] = float32(0.8*s + 0.3*rng.NormFloat64())
		out[2][i] = float32(env[i]*cg[i] + 0.1*rng.NormFloat64())
		out[3][i] = float32(env[i]*ch[i] + 0.1*rng.NormFloat64())
		out[4][i] = float32(rng.NormFloat64())
	}
	return out
}

// Tables writes the results table and every map of res as one text, for
// tests that compare two runs byte for byte.
func Tables(res *report.Results) []byte {
	var b bytes.Buffer
	report.WriteCSV(&b, res)
	for i := range res.Maps {
		fmt.Fprintf(&b, "\n# maps/%s.csv\n", res.Maps[i].Name)
		report.WriteMapCSV(&b, &res.Maps[i])
	}
	return b.Bytes()
}
