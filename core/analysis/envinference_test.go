package analysis

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"amplink/core/data"
	"amplink/core/internal/synth"
	"amplink/core/recipe"
	"amplink/core/report"
)

// nullPairsRecording returns 2·pairs channels of independent 10 Hz
// activity (a slow, strongly autocorrelated amplitude on a random-walk
// phase, plus a little white noise), 100 Hz, secs long: every pair of
// channels is a null pair.
func nullPairsRecording(pairs int, secs float64, seed uint64) *data.Recording {
	const rate = 100.0
	n := int(secs * rate)
	rng := rand.New(rand.NewPCG(seed, 7))
	rec := &data.Recording{Name: "null", Rate: rate}
	for c := range 2 * pairs {
		env := synth.SlowNoise(rng, n, 100)
		car := synth.CarrierWalk(rng, n, rate, 10)
		x := make([]float32, n)
		for i := range x {
			x[i] = float32(env[i]*car[i] + 0.1*rng.NormFloat64())
		}
		rec.Channels = append(rec.Channels, data.Channel{Name: fmt.Sprintf("C%d", c)})
		rec.Samples = append(rec.Samples, x)
	}
	return rec
}

// nullPairsRecipe has one envelope analysis per disjoint pair of channels.
func nullPairsRecipe(pairs, surrogates int, orth string) string {
	var b strings.Builder
	b.WriteString(`{"spectral": {"low": 6, "high": 14, "steps": 5, "cycles": [5, 5]}, "figures": {"enabled": false}, "analyses": [`)
	for k := range pairs {
		if k > 0 {
			b.WriteString(",")
		}
		fmt.Fprintf(&b, `{"id": "p%d", "type": "envelope", "channels": ["C%d", "C%d"], "freq": [8, 12], "leakageCorrection": %s, "envelopeRate": 10, "surrogates": %d, "randomSeed": %d}`, k, 2*k, 2*k+1, orth, surrogates, k+1)
	}
	b.WriteString("]}")
	return b.String()
}

// nullPairsEpochs cuts nullPairsRecording into trials of secs seconds.
func nullPairsEpochs(pairs, trials int, secs float64, seed uint64) *data.Epochs {
	rec := nullPairsRecording(pairs, float64(trials)*secs, seed)
	ns := int(secs * rec.Rate)
	e := data.NewEpochs(rec.Rate, 0, rec.Channels, trials, ns)
	for t := range trials {
		for c := range rec.Channels {
			copy(e.Trial(t, c), rec.Samples[c][t*ns:(t+1)*ns])
		}
	}
	return e
}

// TestSurrogateCalibration checks the false-positive rate of p_surr under
// the null, for plain, pairwise and symmetric envelopes: independent
// pairs of strongly autocorrelated alpha envelopes, time-shift surrogates
// on a recording and trial-shuffle surrogates on epochs. With S = 19
// surrogates, p_surr = (b + 1)/20 ≤ 0.05 exactly when no surrogate reaches
// the observed |r|, which under the null happens with probability 1/20
// (Phipson & Smyth 2010). Over N independent null pairs the count of
// p_surr ≤ 0.05 is binomial, so the rate must lie within
// 0.05 ± 3·√(0.05·0.95/N) (the binomial standard error, common practice;
// ±0.038 for N = 300, a two-sided miss probability of 0.3 % for a
// calibrated test). On the code before the surrogates were
// re-orthogonalised, pairwise time-shift surrogates gave 0.12 here.
func TestSurrogateCalibration(t *testing.T) {
	const pairs, surrogates = 300, 19
	rec := nullPairsRecording(pairs, 60, 1)
	ep := nullPairsEpochs(pairs, 12, 5, 2)
	for _, c := range []struct {
		name string
		ds   *Dataset
		orth string
	}{
		{"recording/plain", &Dataset{Name: "null", Recording: rec}, `"none"`},
		{"recording/pairwise", &Dataset{Name: "null", Recording: rec}, `"pairwise"`},
		{"recording/symmetric", &Dataset{Name: "null", Recording: rec}, `"symmetric"`},
		{"epochs/plain", &Dataset{Name: "null", Epochs: ep}, `"none"`},
		{"epochs/pairwise", &Dataset{Name: "null", Epochs: ep}, `"pairwise"`},
		{"epochs/symmetric", &Dataset{Name: "null", Epochs: ep}, `"symmetric"`},
	} {
		t.Run(c.name, func(t *testing.T) {
			res := runSynthDS(t, nullPairsRecipe(pairs, surrogates, c.orth), c.ds)
			hits, n := 0, 0
			for _, r := range res.Rows {
				p, err := parseF(field(r, "p_surr"))
				if err != nil || math.IsNaN(p) {
					t.Fatalf("%s: p_surr %q", r.Analysis, field(r, "p_surr"))
				}
				n++
				if p <= 0.05 {
					hits++
				}
			}
			rate := float64(hits) / float64(n)
			band := 3 * math.Sqrt(0.05*0.95/float64(n))
			t.Logf("%s: %d of %d null pairs with p_surr ≤ 0.05 (%.3f); band 0.05 ± %.3f", c.name, hits, n, rate, band)
			if math.Abs(rate-0.05) > band {
				t.Errorf("false-positive rate %.3f outside 0.05 ± %.3f", rate, band)
			}
		})
	}
}

// The symmetric correction on a pure zero-lag leakage pair (L = 0.8·S plus
// noise) and on a genuinely coupled pair (G: S's envelope on an independent
// phase). Common practice (Colclough et al. 2015, NeuroImage 117:439, their
// simulations): the closest orthogonal set leaves leakage near 0 and keeps
// envelope coupling with independent phases.
func TestSymmetricLeakageAndCoupling(t *testing.T) {
	res := runSynthDS(t, `{
  "spectral": {"low": 4, "high": 48, "steps": 23, "cycles": [4, 8]},
  "analyses": [
    {"id": "leak", "type": "envelope", "channels": ["S", "L"], "freq": [9, 11], "leakageCorrection": "symmetric"},
    {"id": "coupled", "type": "envelope", "channels": ["S", "G"], "freq": [9, 11], "leakageCorrection": "symmetric"},
    {"id": "set", "type": "envelope", "channels": ["S", "L", "G", "N"], "freq": [9, 11], "leakageCorrection": "symmetric"}
  ]
}`, &Dataset{Name: "env", Recording: envRecording()})
	// In a set of four, the closest orthonormal set rescaled row by row
	// (the variant this replaced) left S–L at 0.38, S–G at 0.77 and a
	// spurious L–G of 0.51.
	for _, c := range []struct {
		seed, target string
		lo, hi       float64
	}{{"S", "L", -0.1, 0.1}, {"S", "G", 0.9, 1}, {"L", "G", -0.1, 0.1}, {"S", "N", -0.1, 0.1}} {
		if r := rowFor(t, res, "set", c.seed, c.target).R; r < c.lo || r > c.hi {
			t.Errorf("set of four: %s–%s r = %.4f, want in [%g, %g]", c.seed, c.target, r, c.lo, c.hi)
		}
	}
	leak, coupled := rowFor(t, res, "leak", "S", "L").R, rowFor(t, res, "coupled", "S", "G").R
	t.Logf("symmetric: leakage pair r = %.4f, coupled pair r = %.4f", leak, coupled)
	if math.Abs(leak) > 0.1 {
		t.Errorf("leakage pair r = %.4f, want |r| < 0.1", leak)
	}
	if coupled < 0.9 {
		t.Errorf("coupled pair r = %.4f, want > 0.9", coupled)
	}
}

// The edge margin is the widest wavelet of the analysed band, not of the
// grid: with a 1 Hz grid from 4 Hz, 5 cycles and an 8–12 Hz band, the
// widest band wavelet (8 Hz) has σt = 5/(2π·8) s and a half-length of
// ⌈4σt·rate⌉ = 80 samples at 200 Hz (the Morlet support of ±4σt, common
// practice; REFERENCES.md "Complex Morlet wavelet"), where the grid's
// widest (4 Hz) needs 160. Concatenated 2 s epochs keep 400 − 2·80 samples
// each.
func TestEnvelopeMarginFromBand(t *testing.T) {
	const trials, ns, rate = 6, 400, 200.0
	rng := rand.New(rand.NewPCG(5, 5))
	chs := []data.Channel{{Name: "A"}, {Name: "B"}}
	e := data.NewEpochs(rate, -1, chs, trials, ns)
	for tr := range trials {
		for c := range chs {
			x := e.Trial(tr, c)
			for i := range x {
				x[i] = float32(math.Cos(2*math.Pi*10*float64(i)/rate+float64(c)) + rng.NormFloat64())
			}
		}
	}
	res := runSynth(t, `{
  "spectral": {"low": 4, "high": 40, "steps": 37, "spacing": "linear", "cycles": [5, 5]},
  "analyses": [{"id": "band", "type": "envelope", "channels": ["A", "B"], "freq": [8, 12], "trials": "concatenate"}]
}`, e)
	row := rowFor(t, res, "band", "A", "B")
	half := int(math.Ceil(4 * 5 / (2 * math.Pi * 8) * rate))
	if half != 80 {
		t.Fatalf("test arithmetic: half = %d", half)
	}
	if want := trials * (ns - 2*half); row.N != want {
		t.Errorf("n = %d, want %d (%d trials × (%d − 2·%d))", row.N, want, trials, ns, half)
	}
	if got, want := field(row, "edge_discard_s"), report.Num(2*float64(half)/rate); got != want {
		t.Errorf("edge_discard_s = %s, want %s", got, want)
	}
}

// segment only adds a time course: the recording's r, n, n_eff and p are
// those of all the retained samples (Pearson over every sample, by
// definition, whatever the segments), and the time course holds only the
// full segments.
func TestSegmentKeepsRecordingValues(t *testing.T) {
	rec := envRecording()
	res := runSynthDS(t, `{
  "spectral": {"low": 4, "high": 48, "steps": 23, "cycles": [4, 8]},
  "analyses": [
    {"id": "whole", "type": "envelope", "channels": ["S", "G", "N"], "freq": [9, 11], "leakageCorrection": "pairwise"},
    {"id": "segs", "type": "envelope", "channels": ["S", "G", "N"], "freq": [9, 11], "leakageCorrection": "pairwise", "segment": 7}
  ]
}`, &Dataset{Name: "env", Recording: rec})
	for _, pair := range [][2]string{{"S", "G"}, {"S", "N"}, {"G", "N"}} {
		w, s := rowFor(t, res, "whole", pair[0], pair[1]), rowFor(t, res, "segs", pair[0], pair[1])
		// The band signals of each unit come from their own (cropped)
		// convolution, so values agree to rounding, not bit for bit.
		we, _ := parseF(field(w, "n_eff"))
		se, _ := parseF(field(s, "n_eff"))
		if w.N != s.N || math.Abs(w.R-s.R) > 1e-12 || math.Abs(we-se) > 1e-9*we || math.Abs(w.P-s.P) > 1e-9*w.P {
			t.Errorf("%s–%s: whole n %d r %.15g n_eff %s p %g; with segment n %d r %.15g n_eff %s p %g",
				pair[0], pair[1], w.N, w.R, field(w, "n_eff"), w.P, s.N, s.R, field(s, "n_eff"), s.P)
		}
	}
	for _, m := range res.Maps {
		if m.Name == "segs_timecourse" {
			// 60 s less the margins holds 8 full segments of 7 s.
			if len(m.ColLabels) != 8 || len(m.Values[0]) != 8 {
				t.Errorf("time course has %d columns, want the 8 full segments", len(m.ColLabels))
			}
			return
		}
	}
	t.Error("no time course map")
}

// envelope: "log-power" correlates ln of the binned power (checked against
// numpy in core/connect TestEnvelopeKindsNumpy) and says so in its own
// column. Common practice (Hipp et al. 2012, Nat Neurosci 15:884, who
// correlate log power envelopes): leakage still gives a high plain r and an
// orthogonalised r near 0; genuine envelope coupling stays high.
func TestLogPowerEnvelope(t *testing.T) {
	res := runSynthDS(t, `{
  "spectral": {"low": 4, "high": 48, "steps": 23, "cycles": [4, 8]},
  "analyses": [
    {"id": "amp", "type": "envelope", "channels": ["S", "L", "G"], "freq": [9, 11], "envelopeRate": 20},
    {"id": "logp", "type": "envelope", "channels": ["S", "L", "G"], "freq": [9, 11], "envelopeRate": 20, "envelope": "log-power"},
    {"id": "logo", "type": "envelope", "channels": ["S", "L", "G"], "freq": [9, 11], "envelopeRate": 20, "envelope": "log-power", "leakageCorrection": "pairwise"}
  ]
}`, &Dataset{Name: "env", Recording: envRecording()})
	amp, logp := rowFor(t, res, "amp", "S", "G"), rowFor(t, res, "logp", "S", "G")
	if field(amp, "envelope") != "amplitude" || field(logp, "envelope") != "log-power" {
		t.Errorf("envelope columns %q, %q", field(amp, "envelope"), field(logp, "envelope"))
	}
	if amp.R == logp.R {
		t.Errorf("log-power r equals the amplitude r (%v): the option is not used", amp.R)
	}
	if r := rowFor(t, res, "logp", "S", "L").R; r < 0.8 {
		t.Errorf("log-power S–L (leakage) r = %.3f, want > 0.8", r)
	}
	if r := rowFor(t, res, "logo", "S", "L").R; math.Abs(r) > 0.15 {
		t.Errorf("orthogonalised log-power S–L (leakage) r = %.3f, want |r| < 0.15", r)
	}
	if logp.R < 0.8 || rowFor(t, res, "logo", "S", "G").R < 0.6 {
		t.Errorf("log-power S–G r = %.3f, orthogonalised %.3f; want > 0.8 and > 0.6", logp.R, rowFor(t, res, "logo", "S", "G").R)
	}
	if _, err := recipe.Parse([]byte(`{"analyses": [{"id": "x", "type": "envelope", "channels": "*", "freq": [8, 12], "envelope": "power"}]}`)); err == nil || !strings.Contains(err.Error(), "analyses[0].envelope") {
		t.Errorf("bad envelope kind: err = %v", err)
	}
}

// p_surr_se is PermSE(p_surr, surrogates) (core/stats, checked against
// scipy.stats.binom).
func TestSurrogateSE(t *testing.T) {
	res := runSynthDS(t, envRecipe, &Dataset{Name: "env", Recording: envRecording()})
	row := rowFor(t, res, "orth", "S", "N")
	p, _ := parseF(field(row, "p_surr"))
	if got, want := field(row, "p_surr_se"), report.Num(math.Sqrt(p*(1-p)/99)); got != want {
		t.Errorf("p_surr_se = %q, want %q (p_surr %v, 99 surrogates)", got, want, p)
	}
}
