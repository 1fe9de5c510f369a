package connect

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
	"time"

	"amplink/core/data"
	"amplink/core/spectral"
)

// wpEpochs returns seeded epochs: channel c of trial t is noise plus a 10 Hz
// and a 22 Hz component whose amplitudes vary from trial to trial.
func wpEpochs(trials, chans, samples int, rate float64) *data.Epochs {
	rng := rand.New(rand.NewPCG(21, 1))
	chs := make([]data.Channel, chans)
	for i := range chs {
		chs[i].Name = fmt.Sprintf("W%d", i)
	}
	e := data.NewEpochs(rate, -0.5, chs, trials, samples)
	for t := range trials {
		for c := range chans {
			a, b := 1+rng.Float64(), 2*rng.Float64()
			x := e.Trial(t, c)
			for k := range x {
				tt := float64(k) / rate
				x[k] = float32(a*math.Cos(2*math.Pi*10*tt+float64(c)) + b*math.Sin(2*math.Pi*22*tt) + 0.5*rng.NormFloat64())
			}
		}
	}
	return e
}

// wpDirect evaluates the definition of window power in the time domain:
// the mean over f in freqs and n in [from, to) of |Σ_k x[k]·w_f[n−k+H]|²,
// with w_f from spectral.Kernel (2H+1 taps) and x zero outside the epoch.
func wpDirect(x []float32, rate float64, freqs, cycles []float64, from, to int) float64 {
	sum := 0.0
	for i, f := range freqs {
		w := spectral.Kernel(nil, rate, f, cycles[i])
		h := (len(w) - 1) / 2
		for n := from; n < to; n++ {
			var y complex128
			for k := max(0, n-h); k <= min(len(x)-1, n+h); k++ {
				y += complex(float64(x[k]), 0) * w[n-k+h]
			}
			sum += real(y)*real(y) + imag(y)*imag(y)
		}
	}
	return sum / float64(len(freqs)*(to-from))
}

func TestWindowPowerDirect(t *testing.T) {
	const rate, ns, nt = 200.0, 300, 4
	// 3 Hz with 7 cycles has H = 298: the kernel is longer than the epoch.
	freqs := []float64{3, 8, 10, 12, 20, 22, 40}
	cycles := []float64{7, 4, 5, 6, 7, 7, 8}
	bank, err := spectral.NewBank(rate, freqs, cycles)
	if err != nil {
		t.Fatal(err)
	}
	e := wpEpochs(nt, 3, ns, rate)
	spans := []Span{
		{From: 0, To: 20, Freqs: []int{1, 2}},       // at the start edge
		{From: 3, To: 41, Freqs: []int{4}},          // near the start edge
		{From: 280, To: 300, Freqs: []int{3, 4, 5}}, // at the end edge
		{From: 250, To: 299, Freqs: []int{6}},       // near the end edge
		{From: 140, To: 170, Freqs: []int{1, 2, 3}}, // mid-epoch
		{From: 150, To: 151, Freqs: []int{2}},       // one sample
		{From: 0, To: 300, Freqs: []int{2, 5}},      // the whole epoch
		{From: 100, To: 200, Freqs: []int{0}},       // kernel longer than the epoch
		{From: 0, To: 10, Freqs: []int{0, 6}},       // long and short kernels together
		{From: 120, To: 160, Freqs: []int{0, 1, 2, 3, 4, 5, 6}},
	}
	for _, ch := range []int{0, 2} {
		got, err := WindowPower(context.Background(), nil, bank, nil, e, ch, spans)
		if err != nil {
			t.Fatal(err)
		}
		if len(got) != len(spans)*nt {
			t.Fatalf("len = %d, want %d", len(got), len(spans)*nt)
		}
		for s, sp := range spans {
			var fs, cs []float64
			for _, i := range sp.Freqs {
				fs, cs = append(fs, freqs[i]), append(cs, cycles[i])
			}
			t.Run(fmt.Sprintf("ch%d/[%d,%d)/%v", ch, sp.From, sp.To, fs), func(t *testing.T) {
				for tr := range nt {
					want := wpDirect(e.Trial(tr, ch), rate, fs, cs, sp.From, sp.To)
					if v := got[s*nt+tr]; math.Abs(v-want) > 1e-9*math.Max(1, want) {
						t.Errorf("trial %d: WindowPower = %.15g, direct %.15g", tr, v, want)
					}
				}
			})
		}
	}
}

// A reused dst is overwritten in place and gives the same values.
func TestWindowPowerDst(t *testing.T) {
	bank, err := spectral.NewBank(100, []float64{10}, []float64{5})
	if err != nil {
		t.Fatal(err)
	}
	e := wpEpochs(3, 1, 120, 100)
	spans := []Span{{From: 10, To: 50, Freqs: []int{0}}, {From: 60, To: 119, Freqs: []int{0}}}
	want, err := WindowPower(context.Background(), nil, bank, nil, e, 0, spans)
	if err != nil {
		t.Fatal(err)
	}
	dst := make([]float64, len(want))
	for i := range dst {
		dst[i] = math.NaN()
	}
	got, err := WindowPower(context.Background(), dst, bank, nil, e, 0, spans)
	if err != nil {
		t.Fatal(err)
	}
	if &got[0] != &dst[0] {
		t.Error("dst was not reused")
	}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("dst[%d] = %v, want %v", i, got[i], want[i])
		}
	}
	t.Run("wrong length panics with the package prefix", func(t *testing.T) {
		defer func() {
			p := recover()
			if s, _ := p.(string); !strings.HasPrefix(s, "connect: ") {
				t.Errorf("panic %v, want a connect: programmer-error panic", p)
			}
		}()
		_, _ = WindowPower(context.Background(), make([]float64, 5), bank, nil, e, 0, spans)
	})
}

func TestWindowPowerCancel(t *testing.T) {
	bank, err := spectral.NewBank(100, []float64{10}, []float64{5})
	if err != nil {
		t.Fatal(err)
	}
	e := wpEpochs(40, 1, 100, 100)
	spans := []Span{{From: 20, To: 80, Freqs: []int{0}}}
	cases := []struct {
		name string
		ctx  func() context.Context
		want error
	}{
		{"cancelled", func() context.Context {
			ctx, cancel := context.WithCancel(context.Background())
			cancel()
			return ctx
		}, context.Canceled},
		{"deadline passed", func() context.Context {
			// A deadline in the past (the zero time), not a wall-clock wait.
			ctx, cancel := context.WithDeadline(context.Background(), time.Time{})
			t.Cleanup(cancel)
			return ctx
		}, context.DeadlineExceeded},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, err := WindowPower(c.ctx(), nil, bank, nil, e, 0, spans)
			if !errors.Is(err, c.want) {
				t.Errorf("err = %v (result %d values), want %v", err, len(got), c.want)
			}
		})
	}
}

// A cosine of amplitude A at a wavelet's frequency has power A² away from
// the edges [REFERENCES.md, "Complex Morlet wavelet": A = 3 gives 9.000,
// computed].
func TestWindowPowerCosine(t *testing.T) {
	const rate, ns = 250.0, 500
	bank, err := spectral.NewBank(rate, []float64{6, 10, 25}, []float64{4, 7, 7})
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name string
		amp  float64
		fi   int
	}{
		{"A=3 at 10 Hz", 3, 1},
		{"A=0.5 at 6 Hz", 0.5, 0},
		{"A=2 at 25 Hz", 2, 2},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			e := data.NewEpochs(rate, 0, []data.Channel{{Name: "A"}}, 1, ns)
			f := bank.Freq(c.fi)
			for k, x := 0, e.Trial(0, 0); k < ns; k++ {
				x[k] = float32(c.amp * math.Cos(2*math.Pi*f*float64(k)/rate+0.4))
			}
			h := bank.Half(c.fi)
			got, err := WindowPower(context.Background(), nil, bank, nil, e, 0, []Span{{From: h, To: ns - h, Freqs: []int{c.fi}}})
			if err != nil {
				t.Fatal(err)
			}
			if want := c.amp * c.amp; math.Abs(got[0]-want) > 1e-3*want {
				t.Errorf("power %.6f, want A² = %.6f", got[0], want)
			}
		})
	}
}
