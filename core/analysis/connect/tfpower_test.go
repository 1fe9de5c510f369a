package connect

import (
	"context"
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"testing"

	"amplink/core/data"
	"amplink/core/spectral"
)

// randEpochs returns seeded noise epochs with a 10 Hz component.
func randEpochs(trials, chans, samples int, rate float64) *data.Epochs {
	rng := rand.New(rand.NewPCG(5, 5))
	chs := make([]data.Channel, chans)
	for i := range chs {
		chs[i].Name = string(rune('A' + i))
	}
	e := data.NewEpochs(rate, -0.5, chs, trials, samples)
	for i := range e.Data {
		e.Data[i] = float32(rng.NormFloat64() + 2*math.Sin(2*math.Pi*10*float64(i%samples)/rate))
	}
	return e
}

// TrialPixels equals reading the 'same'-aligned convolution of the whole,
// uncropped trial (Analytic with the default, wrap-free FFT length) at every
// pixel.
func TestTrialPixelsMatchesAnalytic(t *testing.T) {
	const rate = 200.0
	e := randEpochs(7, 3, 400, rate)
	freqs := spectral.Frequencies
	fs, _ := freqs(3, 40, 12, "log")
	bank, err := spectral.NewBank(rate, fs, spectral.Cycles(len(fs), 3, 8))
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name           string
		ch             int
		rows           []int
		from, to, step int
	}{
		{"interior", 1, []int{2, 3, 4, 5}, 150, 260, 4},
		{"one pixel", 0, []int{7}, 200, 201, 4},
		{"every sample", 2, []int{0, 11}, 120, 180, 1},
		{"left edge", 0, []int{0, 1, 2}, 0, 60, 3},
		{"right edge", 2, []int{1, 9}, 330, 400, 7},
		{"step below one", 1, []int{4}, 50, 70, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := TrialPixels(context.Background(), nil, bank, e, tc.ch, tc.rows, tc.from, tc.to, tc.step)
			if err != nil {
				t.Fatal(err)
			}
			step := max(tc.step, 1)
			cols := spectral.TFCols(tc.from, tc.to, step)
			if len(got) != len(tc.rows)*cols*e.NTrials {
				t.Fatalf("%d values, want %d", len(got), len(tc.rows)*cols*e.NTrials)
			}
			conv := bank.NewConvolver(spectral.FFTLen(e.NSamples, bank.MaxHalf(nil)))
			var y []complex128
			for tr := range e.NTrials {
				conv.Load(e.Trial(tr, tc.ch))
				for r, f := range tc.rows {
					y = conv.Analytic(y, f, 0, e.NSamples)
					for c := range cols {
						v := y[tc.from+c*step]
						want := real(v)*real(v) + imag(v)*imag(v)
						g := got[(r*cols+c)*e.NTrials+tr]
						// Wavelet power from the full-length FFT: tolerance 1e-10 relative.
						if math.Abs(g-want) > 1e-10*math.Max(want, 1e-3) {
							t.Errorf("trial %d row %d col %d: %.15g, Analytic %.15g", tr, r, c, g, want)
						}
					}
				}
			}
		})
	}
}

type pixelRef struct {
	Rate           float64
	Freqs, Cycles  []float64
	From, To, Step int
	X              [][]float64
	Power          [][][]float64 // [trial][freq][col]
}

// TrialPixels equals |scipy.signal.fftconvolve(x, w, 'same')|² read at the
// pixel samples (scipy 1.10.1, numpy 1.24.2; testdata/tfmap/make_ref.py).
func TestTrialPixelsMatchesScipy(t *testing.T) {
	b, err := os.ReadFile("../../../testdata/tfmap/ref.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct{ Pixels pixelRef }
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	pr := ref.Pixels
	e := data.NewEpochs(pr.Rate, 0, []data.Channel{{Name: "A"}, {Name: "B"}}, len(pr.X), len(pr.X[0]))
	for tr, x := range pr.X {
		for k, v := range x {
			e.Trial(tr, 1)[k] = float32(v) // exact: the script rounded to float32
		}
	}
	bank, err := spectral.NewBank(pr.Rate, pr.Freqs, pr.Cycles)
	if err != nil {
		t.Fatal(err)
	}
	got, err := TrialPixels(context.Background(), nil, bank, e, 1, []int{0, 1}, pr.From, pr.To, pr.Step)
	if err != nil {
		t.Fatal(err)
	}
	nt := e.NTrials
	cols := spectral.TFCols(pr.From, pr.To, pr.Step)
	if cols != len(pr.Power[0][0]) {
		t.Fatalf("%d columns, scipy read %d", cols, len(pr.Power[0][0]))
	}
	for tr := range nt {
		for r := range pr.Freqs {
			for c, want := range pr.Power[tr][r] {
				if g := got[(r*cols+c)*nt+tr]; math.Abs(g-want) > 1e-10*math.Max(want, 1e-3) {
					t.Errorf("trial %d, %g Hz, col %d: %.15g, scipy %.15g", tr, pr.Freqs[r], c, g, want)
				}
			}
		}
	}
}

func TestTrialPixelsCancel(t *testing.T) {
	e := randEpochs(4, 1, 200, 200)
	bank, _ := spectral.NewBank(200, []float64{10}, []float64{5})
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := TrialPixels(ctx, nil, bank, e, 0, []int{0}, 50, 150, 2); err == nil {
		t.Error("a cancelled context gave no error")
	}
}
