// Package demo simulates the built-in demonstration recording: a 19-channel
// 10-20 EEG at 500 Hz from a tone-detection vigilance session with 180 tones.
//
// The data are invented (simulated) and exist only to show the tool working.
// Every effect is planted with a known ground truth:
//
//   - Across trials, pre-tone beta power at C4 (a 20 Hz burst between −0.6
//     and 0 s) predicts post-tone delta power at Pz (2.5 Hz, 0.1 to 1.0 s):
//     the log amplitudes share a correlation of 0.7. Fz carries an evoked
//     delta of its own whose amplitude is independent of C4 beta (an absent
//     coupling). Parts of the C4 and Pz bursts spread to their neighbours.
//   - Over time, posterior alpha (10 Hz) sources in the left and right
//     hemisphere (O1, O2) have slowly varying envelopes that co-vary
//     (correlation of the log envelopes 0.8) with independent phases. Half of
//     each source leaks at zero lag into P3 and P4.
//   - A low-beta (16 Hz) envelope at T7 co-varies with a high-gamma (70 Hz)
//     envelope at T8.
//
// The background is independent 1/f (pink) noise of 8 µV RMS per channel.
// The generator is deterministic: the same build gives the same samples.
package demo

import (
	"math"
	"math/rand/v2"
	"strconv"
	"sync"

	"gonum.org/v1/gonum/dsp/fourier"

	"amplink/core/data"
)

// Parameters of the simulation.
const (
	Rate   = 500.0 // Hz
	NTones = 180
	// EpochStart and EpochEnd bound the demo epochs around each tone (s).
	EpochStart = -1.5
	EpochEnd   = 2.0
	// CouplingLogAmp is the planted correlation between the log amplitudes of
	// C4 pre-tone beta and Pz post-tone delta.
	CouplingLogAmp = 0.7
)

// ChannelNames lists the 19 channels of the 10-20 system used by the demo.
var ChannelNames = []string{"Fp1", "Fp2", "F7", "F3", "Fz", "F4", "F8", "T7", "C3", "Cz", "C4", "T8", "P7", "P3", "Pz", "P4", "P8", "O1", "O2"}

var (
	once sync.Once
	rec  *data.Recording
)

// Recording returns the simulated continuous recording with its tone events.
// The result is shared: callers must not modify it.
func Recording() *data.Recording {
	once.Do(func() { rec = Simulate(Options{Seed: 20261201, Tones: NTones, Coupling: CouplingLogAmp}) })
	return rec
}

// Options vary the simulated session. The demo recording is
// Options{Seed: 20261201, Tones: NTones, Coupling: CouplingLogAmp}.
type Options struct {
	Seed  uint64 // seeds the PCG generator, with Tones
	Tones int    // the number of tones, at least 1
	// Coupling is the correlation, in [0, 1], between the log amplitudes of
	// C4 pre-tone beta and Pz post-tone delta.
	Coupling float64
	// Channels, when not nil, lists the channels to simulate (a subset of
	// ChannelNames, in that order); the others are left out and their noise
	// is never drawn, so a subset is not the same draw as the full set.
	Channels []string
}

// Epochs returns the demo cut into epochs around every tone, as the demo
// recipe does.
func Epochs() *data.Epochs {
	e, err := data.Epoch(Recording(), nil, "tone", EpochStart, EpochEnd)
	if err != nil {
		panic("demo: " + err.Error())
	}
	e.Name = "demo"
	return e
}

func index(name string) int {
	for i, n := range ChannelNames {
		if n == name {
			return i
		}
	}
	panic("demo: no channel " + name)
}

// Simulate generates a session of the demo's scenario with every planted
// effect, varied by o. It panics on Tones < 1 or a Coupling outside [0, 1]
// (a programming error).
func Simulate(o Options) *data.Recording {
	if o.Tones < 1 || !(o.Coupling >= 0 && o.Coupling <= 1) {
		panic("demo: bad options")
	}
	rng := rand.New(rand.NewPCG(o.Seed, uint64(o.Tones)))
	// Tone times: the first at 4 s, then every 3 to 4 s.
	onsets := make([]float64, o.Tones)
	t := 4.0
	for k := range onsets {
		onsets[k] = math.Round(t*Rate) / Rate
		t += 3 + rng.Float64()
	}
	dur := math.Ceil((onsets[o.Tones-1]+5)/16) * 16
	n := int(dur * Rate)
	nch := len(ChannelNames)
	keep := make([]bool, nch)
	for c := range keep {
		keep[c] = o.Channels == nil
	}
	for _, name := range o.Channels {
		keep[index(name)] = true
	}
	sig := make([][]float64, nch)
	for c := range sig {
		if keep[c] {
			sig[c] = pink(rng, n, 8)
		}
	}
	add := func(name string, gain float64, s []float64) {
		d := sig[index(name)]
		if d == nil {
			return // a channel left out
		}
		for i, v := range s {
			d[i] += gain * v
		}
	}

	// Cross-trial effect: C4 beta burst before the tone predicts Pz delta after it.
	beta := make([]float64, n)
	delta := make([]float64, n)
	fzDelta := make([]float64, n)
	events := make([]data.Event, o.Tones)
	rc := o.Coupling
	for k, on := range onsets {
		z1, z2, z3 := rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()
		a := 5 * math.Exp(0.5*z1)
		b := 8 * math.Exp(0.5*(rc*z1+math.Sqrt(1-rc*rc)*z2))
		c := 6 * math.Exp(0.5*z3)
		burst(beta, on-0.6, on, 19+2*rng.Float64(), a, rng.Float64()*2*math.Pi)
		burst(delta, on+0.1, on+1.0, 2.5, b, rng.Float64()*2*math.Pi)
		burst(fzDelta, on+0.1, on+1.0, 2.5, c, rng.Float64()*2*math.Pi)
		rt := 0.32 + 0.12*math.Exp(0.4*rng.NormFloat64())
		outcome := "hit"
		if rng.Float64() < 0.18 {
			outcome = "miss"
		}
		events[k] = data.Event{Onset: on, Duration: 0.1, Type: "tone", Extra: map[string]string{
			"response_time": formatMs(rt), "outcome": outcome,
		}}
		if outcome == "miss" {
			events[k].Extra["response_time"] = "n/a"
		}
	}
	add("C4", 1, beta)
	add("Cz", 0.3, beta)
	add("C3", 0.1, beta)
	add("Pz", 1, delta)
	add("P3", 0.3, delta)
	add("P4", 0.3, delta)
	add("Fz", 1, fzDelta)

	// Posterior alpha: co-varying envelopes, independent phases, zero-lag leakage.
	shared := slow(rng, n, 0.2)
	left := envelope(shared, slow(rng, n, 0.2), 0.8, 0.6)
	right := envelope(shared, slow(rng, n, 0.2), 0.8, 0.6)
	sL := carrier(rng, n, 10, 1, 7, left)
	sR := carrier(rng, n, 10.5, 1, 7, right)
	add("O1", 1, sL)
	add("P3", 0.5, sL)
	add("O2", 1, sR)
	add("P4", 0.5, sR)

	// Temporal cross-frequency: T7 low-beta envelope with T8 high-gamma envelope.
	s3 := slow(rng, n, 0.3)
	add("T7", 1, carrier(rng, n, 16, 1, 5, envelope(s3, s3, 1, 0.7)))
	add("T8", 1, carrier(rng, n, 70, 2, 3, envelope(s3, slow(rng, n, 0.3), 0.85, 0.7)))

	r := &data.Recording{Name: "demo", Format: "simulated", Rate: Rate, Events: events}
	for c, name := range ChannelNames {
		if !keep[c] {
			continue
		}
		r.Channels = append(r.Channels, data.Channel{Name: name, Type: "EEG", Unit: "uV"})
		s := make([]float32, n)
		for i, v := range sig[c] {
			s[i] = float32(v)
		}
		r.Samples = append(r.Samples, s)
	}
	r.Notes = []string{"simulated demo data: a tone-detection vigilance session with planted effects"}
	return r
}

func formatMs(rt float64) string {
	// Response times in seconds with millisecond resolution.
	return strconv.FormatFloat(math.Round(rt*1000)/1000, 'f', -1, 64)
}

// burst adds a Hann-tapered sinusoid of amplitude amp between t0 and t1 s.
func burst(dst []float64, t0, t1, f, amp, phase float64) {
	i0 := int(math.Round(t0 * Rate))
	i1 := int(math.Round(t1 * Rate))
	for i := max(i0, 0); i < i1 && i < len(dst); i++ {
		u := float64(i-i0) / float64(i1-i0)
		w := 0.5 - 0.5*math.Cos(2*math.Pi*u)
		dst[i] += amp * w * math.Sin(2*math.Pi*f*float64(i)/Rate+phase)
	}
}

// pink returns 1/f noise (power ∝ 1/f above 0.5 Hz) with the given RMS.
func pink(rng *rand.Rand, n int, rms float64) []float64 {
	return shaped(rng, n, rms, func(f float64) float64 {
		if f < 0.5 {
			f = 0.5
		}
		return 1 / math.Sqrt(f)
	})
}

// slow returns zero-mean, unit-variance noise low-passed with a Gaussian
// response of the given width in Hz.
func slow(rng *rand.Rand, n int, width float64) []float64 {
	return shaped(rng, n, 1, func(f float64) float64 {
		if f == 0 {
			return 0
		}
		return math.Exp(-f * f / (2 * width * width))
	})
}

func shaped(rng *rand.Rand, n int, rms float64, gain func(f float64) float64) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = rng.NormFloat64()
	}
	fft := fourier.NewFFT(n)
	c := fft.Coefficients(nil, x)
	for k := range c {
		c[k] *= complex(gain(fft.Freq(k)*Rate), 0)
	}
	c[0] = 0
	y := fft.Sequence(x, c)
	mean, ss := 0.0, 0.0
	for _, v := range y {
		mean += v
	}
	mean /= float64(n)
	for i := range y {
		y[i] -= mean
		ss += y[i] * y[i]
	}
	s := rms / math.Sqrt(ss/float64(n))
	for i := range y {
		y[i] *= s
	}
	return y
}

// envelope returns exp(depth·(w·a + √(1−w²)·b)), a positive slowly varying
// amplitude whose log shares weight w with a.
func envelope(a, b []float64, w, depth float64) []float64 {
	out := make([]float64, len(a))
	v := math.Sqrt(1 - w*w)
	for i := range out {
		out[i] = math.Exp(depth * (w*a[i] + v*b[i]))
	}
	return out
}

// carrier returns amp·env(t)·cos(2πft + φ(t)), with φ a random walk whose
// diffusion gives a spectral line width of about width Hz, so that its
// phase is independent of every other carrier.
func carrier(rng *rand.Rand, n int, f, width, amp float64, env []float64) []float64 {
	out := make([]float64, n)
	step := math.Sqrt(2 * math.Pi * width / Rate)
	phase := rng.Float64() * 2 * math.Pi
	for i := range out {
		phase += step * rng.NormFloat64()
		out[i] = amp * env[i] * math.Cos(2*math.Pi*f*float64(i)/Rate+phase)
	}
	return out
}
