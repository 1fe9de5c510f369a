package spectral

import (
	"encoding/json"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
)

// refData mirrors testdata/spectral/ref.json, written by
// testdata/spectral/make_ref.py (numpy 1.24.2, scipy 1.10.1; versions are
// recorded in the file).
type refData struct {
	Numpy string    `json:"numpy"`
	Scipy string    `json:"scipy"`
	Rate  float64   `json:"rate"`
	X     []float64 `json:"x"`
	Cases []struct {
		Freq     float64   `json:"freq"`
		Cycles   float64   `json:"cycles"`
		Half     int       `json:"half"`
		KernelRe []float64 `json:"kernel_re"`
		KernelIm []float64 `json:"kernel_im"`
		SameRe   []float64 `json:"same_re"`
		SameIm   []float64 `json:"same_im"`
	} `json:"cases"`
	Frequencies []struct {
		Low    float64   `json:"low"`
		High   float64   `json:"high"`
		Steps  int       `json:"steps"`
		Log    []float64 `json:"log"`
		Linear []float64 `json:"linear"`
	} `json:"frequencies"`
	Cycles []struct {
		N      int       `json:"n"`
		C0     float64   `json:"c0"`
		C1     float64   `json:"c1"`
		Values []float64 `json:"values"`
	} `json:"cycles"`
	NextFastLen []struct {
		N    int `json:"n"`
		Good int `json:"good"`
	} `json:"next_fast_len_real"`
}

var refPath = filepath.Join("..", "..", "testdata", "spectral", "ref.json")

func loadRef(t testing.TB) *refData {
	t.Helper()
	b, err := os.ReadFile(refPath)
	if err != nil {
		t.Fatal(err)
	}
	var r refData
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatalf("%s: %v", refPath, err)
	}
	if len(r.X) == 0 || len(r.Cases) == 0 {
		t.Fatalf("%s: no reference data", refPath)
	}
	return &r
}

func near(a, b, tol float64) bool { return math.Abs(a-b) <= tol }

func relNear(a, b, tol float64) bool { return math.Abs(a-b) <= tol*math.Max(1, math.Abs(b)) }

func TestMorletWidths(t *testing.T) {
	// REFERENCES.md "Complex Morlet wavelet", check f = 10 Hz, n = 7 [computed].
	const f, n = 10.0, 7.0
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"SigmaT", SigmaT(f, n), 0.111408},
		{"FWHM_t", FWHM(SigmaT(f, n)), 0.262347},
		{"SigmaF", SigmaF(f, n), 1.428571},
		{"FWHM_f", FWHM(SigmaF(f, n)), 3.364029},
	} {
		t.Run(c.name, func(t *testing.T) {
			if !near(c.got, c.want, 5e-7) {
				t.Errorf("got %.7f, want %.6f", c.got, c.want)
			}
		})
	}
	// REFERENCES.md: FWHM_t·FWHM_f = 4 ln2/π ≈ 0.8825 (Gaussian algebra), for any f and n.
	for _, c := range []struct{ f, n float64 }{{10, 7}, {3, 3}, {40, 9}, {123.4, 2.5}} {
		t.Run(fmt.Sprintf("product/f=%g,n=%g", c.f, c.n), func(t *testing.T) {
			got := FWHM(SigmaT(c.f, c.n)) * FWHM(SigmaF(c.f, c.n))
			if want := 4 * math.Ln2 / math.Pi; !near(got, want, 1e-12) || !near(got, 0.8825, 5e-5) {
				t.Errorf("FWHM_t·FWHM_f = %.12f, want 4 ln2/π = %.12f ≈ 0.8825", got, want)
			}
		})
	}
}

func TestHalf(t *testing.T) {
	// H = ceil(4·σt·rate), matching math.ceil in testdata/spectral/make_ref.py
	// (numpy 1.24.2); hand values: 4·7/(2π·10)·1000 = 445.63 → 446.
	ref := loadRef(t)
	for _, c := range ref.Cases {
		t.Run(fmt.Sprintf("f=%g,n=%g", c.Freq, c.Cycles), func(t *testing.T) {
			if got := Half(ref.Rate, c.Freq, c.Cycles); got != c.Half {
				t.Errorf("Half = %d, numpy %d", got, c.Half)
			}
		})
	}
	t.Run("hand", func(t *testing.T) {
		if got := Half(1000, 10, 7); got != 446 {
			t.Errorf("Half(1000, 10, 7) = %d, want 446", got)
		}
	})
}

func TestKernelVsNumpy(t *testing.T) {
	// Kernel taps against the numpy construction in testdata/spectral/make_ref.py.
	ref := loadRef(t)
	for _, c := range ref.Cases {
		t.Run(fmt.Sprintf("f=%g,n=%g", c.Freq, c.Cycles), func(t *testing.T) {
			w := Kernel(nil, ref.Rate, c.Freq, c.Cycles)
			if len(w) != len(c.KernelRe) {
				t.Fatalf("len = %d, numpy %d", len(w), len(c.KernelRe))
			}
			for k, v := range w {
				want := complex(c.KernelRe[k], c.KernelIm[k])
				if cmplx.Abs(v-want) > 1e-14 {
					t.Fatalf("w[%d] = %v, numpy %v", k, v, want)
				}
			}
		})
	}
	t.Run("reuse", func(t *testing.T) {
		buf := make([]complex128, 0, 1000)
		w := Kernel(buf, 500, 10, 5)
		if &w[0] != &buf[:1][0] {
			t.Error("Kernel did not reuse dst with enough capacity")
		}
	})
}

func TestAnalyticVsScipy(t *testing.T) {
	// y = scipy.signal.fftconvolve(x, w, mode='same'), scipy 1.10.1,
	// testdata/spectral/make_ref.py. x is float32-representable, so Load and
	// LoadFloat64 see the same values.
	ref := loadRef(t)
	x32 := make([]float32, len(ref.X))
	for j, v := range ref.X {
		x32[j] = float32(v)
	}
	n := len(ref.X)
	for _, c := range ref.Cases {
		bank, err := NewBank(ref.Rate, []float64{c.Freq}, []float64{c.Cycles})
		if err != nil {
			t.Fatal(err)
		}
		minLen := FFTLen(n, bank.Half(0))
		// The last length is only enough with Tight set (full range: n+H).
		for _, nfft := range []int{minLen, GoodSize(minLen + 97), n + 2*bank.Half(0), TightFFTLen(n, 0, n, bank.Half(0)), n + bank.Half(0)} {
			for _, load := range []string{"float32", "float64"} {
				t.Run(fmt.Sprintf("f=%g,n=%g/nfft=%d/%s", c.Freq, c.Cycles, nfft, load), func(t *testing.T) {
					conv := bank.NewConvolver(nfft)
					conv.Tight = nfft < n+2*bank.Half(0)
					if load == "float32" {
						conv.Load(x32)
					} else {
						conv.LoadFloat64(ref.X)
					}
					y := conv.Analytic(nil, 0, 0, n)
					var sumPow float64
					for j, v := range y {
						want := complex(c.SameRe[j], c.SameIm[j])
						if cmplx.Abs(v-want) > 1e-9 {
							t.Fatalf("y[%d] = %v, scipy %v", j, v, want)
						}
						sumPow += real(want)*real(want) + imag(want)*imag(want)
					}
					// A sub-range, and MeanPower over the whole signal.
					sub := conv.Analytic(nil, 0, 40, 77)
					for j, v := range sub {
						if want := complex(c.SameRe[40+j], c.SameIm[40+j]); cmplx.Abs(v-want) > 1e-9 {
							t.Fatalf("sub-range y[%d] = %v, scipy %v", 40+j, v, want)
						}
					}
					if got, want := conv.MeanPower(0, 0, n), sumPow/float64(n); !relNear(got, want, 1e-9) {
						t.Errorf("MeanPower = %.12g, scipy mean |y|² = %.12g", got, want)
					}
				})
			}
		}
	}
}

func TestCosineAmplitude(t *testing.T) {
	// REFERENCES.md "Amplitude normalisation": a cosine of amplitude A = 3 gives
	// |x∗w| = 3.000 and power 9.000 away from the edges [computed].
	grid, err := Frequencies(3, 40, 28, "log")
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		rate, f, n, phase float64
	}{
		{250, grid[0], 3, 0},
		{250, grid[13], 7, 0.4},
		{500, grid[20], 5, 1.1},
		{500, grid[27], 12, -2},
		{1000, grid[6], 9, 0.7},
		{1000, grid[27], 3, 3},
		{2048, 80, 7, 0.2},
	} {
		t.Run(fmt.Sprintf("rate=%g,f=%.3f,n=%g", c.rate, c.f, c.n), func(t *testing.T) {
			bank, err := NewBank(c.rate, []float64{c.f}, []float64{c.n})
			if err != nil {
				t.Fatal(err)
			}
			h := bank.Half(0)
			n := 2*h + 400
			x := make([]float32, n)
			for j := range x {
				x[j] = float32(3 * math.Cos(2*math.Pi*c.f*float64(j)/c.rate+c.phase))
			}
			conv := bank.NewConvolver(FFTLen(n, h))
			conv.Load(x)
			for j, v := range conv.Analytic(nil, 0, h, n-h) {
				if a := cmplx.Abs(v); !near(a, 3, 1e-3) {
					t.Fatalf("|y[%d]| = %.6f, want 3.000", h+j, a)
				}
			}
			if p := conv.MeanPower(0, h, n-h); !near(p, 9, 1e-3) {
				t.Errorf("power = %.6f, want 9.000", p)
			}
		})
	}
}

func TestFrequencies(t *testing.T) {
	// numpy.geomspace / numpy.linspace (numpy 1.24.2), testdata/spectral/ref.json.
	ref := loadRef(t)
	for _, g := range ref.Frequencies {
		for _, sp := range []string{"log", "linear"} {
			want := g.Log
			if sp == "linear" {
				want = g.Linear
			}
			t.Run(fmt.Sprintf("%s/%g-%g/%d", sp, g.Low, g.High, g.Steps), func(t *testing.T) {
				got, err := Frequencies(g.Low, g.High, g.Steps, sp)
				if err != nil {
					t.Fatal(err)
				}
				if len(got) != len(want) {
					t.Fatalf("len = %d, numpy %d", len(got), len(want))
				}
				for i := range got {
					if !relNear(got[i], want[i], 1e-13) {
						t.Errorf("f[%d] = %.15g, numpy %.15g", i, got[i], want[i])
					}
				}
				// Inclusive of both ends, exactly (common practice for recipe grids).
				if got[0] != g.Low || got[len(got)-1] != g.High {
					t.Errorf("ends %v, %v; want exactly %v, %v", got[0], got[len(got)-1], g.Low, g.High)
				}
			})
		}
	}
	for _, c := range []struct {
		name          string
		low, high     float64
		steps         int
		spacing       string
		want          []float64 // hand values, common practice
		errSubstrings []string
	}{
		{name: "steps=1 log", low: 7, high: 40, steps: 1, spacing: "log", want: []float64{7}},
		{name: "steps=1 linear", low: 7, high: 40, steps: 1, spacing: "linear", want: []float64{7}},
		{name: "octaves", low: 2, high: 16, steps: 4, spacing: "log", want: []float64{2, 4, 8, 16}},
		{name: "integers", low: 1, high: 5, steps: 5, spacing: "linear", want: []float64{1, 2, 3, 4, 5}},
		{name: "low=high", low: 10, high: 10, steps: 3, spacing: "log", want: []float64{10, 10, 10}},
		{name: "low zero", low: 0, high: 40, steps: 5, spacing: "log", errSubstrings: []string{"low", "0"}},
		{name: "low negative", low: -2.5, high: 40, steps: 5, spacing: "linear", errSubstrings: []string{"-2.5"}},
		{name: "low NaN", low: math.NaN(), high: 40, steps: 5, spacing: "log", errSubstrings: []string{"NaN"}},
		{name: "high Inf", low: 1, high: math.Inf(1), steps: 5, spacing: "log", errSubstrings: []string{"+Inf"}},
		{name: "high below low", low: 30, high: 20, steps: 5, spacing: "log", errSubstrings: []string{"20", "30"}},
		{name: "steps zero", low: 3, high: 40, steps: 0, spacing: "log", errSubstrings: []string{"steps 0"}},
		{name: "steps negative", low: 3, high: 40, steps: -4, spacing: "log", errSubstrings: []string{"-4"}},
		{name: "unknown spacing", low: 3, high: 40, steps: 5, spacing: "geometric", errSubstrings: []string{`"geometric"`}},
		{name: "empty spacing", low: 3, high: 40, steps: 5, spacing: "", errSubstrings: []string{`""`}},
	} {
		t.Run(c.name, func(t *testing.T) {
			got, err := Frequencies(c.low, c.high, c.steps, c.spacing)
			if c.errSubstrings != nil {
				if err == nil {
					t.Fatalf("got %v, want an error", got)
				}
				for _, s := range c.errSubstrings {
					if !strings.Contains(err.Error(), s) {
						t.Errorf("error %q does not name %q", err, s)
					}
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if len(got) != len(c.want) {
				t.Fatalf("got %v, want %v", got, c.want)
			}
			for i := range got {
				if !relNear(got[i], c.want[i], 1e-14) {
					t.Errorf("got %v, want %v", got, c.want)
				}
			}
		})
	}
}

func TestCycles(t *testing.T) {
	// c_i = c0·(c1/c0)^(i/(n−1)) is numpy.geomspace(c0, c1, n) (numpy 1.24.2),
	// testdata/spectral/ref.json.
	ref := loadRef(t)
	for _, c := range ref.Cycles {
		t.Run(fmt.Sprintf("n=%d,%g-%g", c.N, c.C0, c.C1), func(t *testing.T) {
			got := Cycles(c.N, c.C0, c.C1)
			if len(got) != len(c.Values) {
				t.Fatalf("len = %d, numpy %d", len(got), len(c.Values))
			}
			for i := range got {
				if !relNear(got[i], c.Values[i], 1e-13) {
					t.Errorf("c[%d] = %.15g, numpy %.15g", i, got[i], c.Values[i])
				}
			}
			if got[0] != c.C0 || got[len(got)-1] != c.C1 {
				t.Errorf("ends %v, %v; want exactly %v, %v", got[0], got[len(got)-1], c.C0, c.C1)
			}
		})
	}
	for _, c := range []struct {
		name   string
		n      int
		c0, c1 float64
		want   []float64 // hand values
	}{
		{"n=1", 1, 4, 9, []float64{4}},
		{"n=0", 0, 4, 9, nil},
		{"n=-3", -3, 4, 9, nil},
		{"sqrt", 3, 3, 12, []float64{3, 6, 12}},
	} {
		t.Run(c.name, func(t *testing.T) {
			got := Cycles(c.n, c.c0, c.c1)
			if len(got) != len(c.want) {
				t.Fatalf("got %v, want %v", got, c.want)
			}
			for i := range got {
				if !relNear(got[i], c.want[i], 1e-14) {
					t.Errorf("got %v, want %v", got, c.want)
				}
			}
		})
	}
}

func TestGoodSize(t *testing.T) {
	// scipy.fft.next_fast_len(n, real=True) (scipy 1.10.1) returns the
	// smallest 5-smooth length ≥ n; testdata/spectral/ref.json.
	ref := loadRef(t)
	for _, c := range ref.NextFastLen {
		t.Run(fmt.Sprint(c.N), func(t *testing.T) {
			if got := GoodSize(c.N); got != c.Good {
				t.Errorf("GoodSize(%d) = %d, scipy %d", c.N, got, c.Good)
			}
		})
	}
	t.Run("n<=1", func(t *testing.T) {
		for _, n := range []int{0, -5} {
			if got := GoodSize(n); got != 1 {
				t.Errorf("GoodSize(%d) = %d, want 1", n, got)
			}
		}
	})
}

// randomSignal returns n seeded standard normal samples.
func randomSignal(n int, seed uint64) []float32 {
	r := rand.New(rand.NewPCG(seed, 0x5eed))
	x := make([]float32, n)
	for j := range x {
		x[j] = float32(r.NormFloat64())
	}
	return x
}

func testBank(t testing.TB, rate float64, low, high float64, steps int) *Bank {
	t.Helper()
	f, err := Frequencies(low, high, steps, "log")
	if err != nil {
		t.Fatal(err)
	}
	b, err := NewBank(rate, f, Cycles(steps, 3, 9))
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func TestCrop(t *testing.T) {
	// Property of linear convolution (common practice): output samples
	// [from,to) depend only on x[from−H, to+H). The full-length result is itself
	// checked against scipy in TestAnalyticVsScipy.
	const rate, n = 500.0, 1250
	bank := testBank(t, rate, 3, 40, 12)
	x := randomSignal(n, 7)
	full := bank.NewConvolver(FFTLen(n, bank.MaxHalf(nil)))
	full.Load(x)
	for _, c := range []struct {
		name     string
		from, to int
		idx      []int
	}{
		{"middle all", 500, 800, nil},
		{"middle high band", 600, 750, []int{8, 9, 10, 11}},
		{"start", 0, 150, []int{0, 1}},
		{"end", 1100, 1250, nil},
		{"single sample", 625, 626, []int{5}},
		{"whole", 0, n, []int{3}},
	} {
		t.Run(c.name, func(t *testing.T) {
			idx := c.idx
			if idx == nil {
				for i := range bank.Len() {
					idx = append(idx, i)
				}
			}
			h := bank.MaxHalf(idx)
			lo, hi := Crop(n, c.from, c.to, h)
			if lo != max(0, c.from-h) || hi != min(n, c.to+h) {
				t.Fatalf("Crop = [%d,%d)", lo, hi)
			}
			crop := bank.NewConvolver(FFTLen(hi-lo, h))
			tight := bank.NewConvolver(TightFFTLen(hi-lo, c.from-lo, c.to-lo, h))
			tight.Tight = true
			crop.Load(x[lo:hi])
			tight.Load(x[lo:hi])
			for _, i := range idx {
				want := full.Analytic(nil, i, c.from, c.to)
				for _, cv := range []*Convolver{crop, tight} {
					got := cv.Analytic(nil, i, c.from-lo, c.to-lo)
					for j := range want {
						if cmplx.Abs(got[j]-want[j]) > 1e-12 {
							t.Fatalf("nfft %d tight %v freq %d sample %d: cropped %v, full %v", cv.Len(), cv.Tight, i, c.from+j, got[j], want[j])
						}
					}
					if a, b := cv.MeanPower(i, c.from-lo, c.to-lo), full.MeanPower(i, c.from, c.to); !relNear(a, b, 1e-12) {
						t.Errorf("nfft %d freq %d: cropped power %g, full %g", cv.Len(), i, a, b)
					}
				}
			}
		})
	}
}

func TestSpectrumCache(t *testing.T) {
	bank := testBank(t, 250, 4, 30, 6)
	// Against the DFT definition W[k] = Σ_j w[j]·exp(−i2πjk/nfft) (common practice).
	t.Run("values", func(t *testing.T) {
		const i, nfft = 5, 120
		w := bank.Kernel(i)
		got := bank.Spectrum(i, nfft)
		for k := range nfft {
			var want complex128
			for j, v := range w {
				want += v * cmplx.Exp(complex(0, -2*math.Pi*float64(j*k)/nfft))
			}
			if cmplx.Abs(got[k]-want) > 1e-12 {
				t.Fatalf("W[%d] = %v, DFT %v", k, got[k], want)
			}
		}
	})
	t.Run("identical slice", func(t *testing.T) {
		a := bank.Spectrum(2, 512)
		b := bank.Spectrum(2, 512)
		if &a[0] != &b[0] || len(a) != len(b) {
			t.Error("repeated key returned a different slice")
		}
		if c := bank.Spectrum(2, 540); &c[0] == &a[0] || len(c) != 540 {
			t.Error("different FFT length shared a slice")
		}
		if d := bank.Spectrum(3, 512); &d[0] == &a[0] {
			t.Error("different wavelet shared a slice")
		}
	})
	// Run with go test -race: many goroutines ask for the same keys at once and
	// must all see one slice per key.
	t.Run("concurrent", func(t *testing.T) {
		const workers = 8
		sizes := []int{300, 320, 360, 375}
		ptrs := make([][]*complex128, workers)
		var wg sync.WaitGroup
		for g := range workers {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for _, nfft := range sizes {
					for i := range bank.Len() {
						ptrs[g] = append(ptrs[g], &bank.Spectrum(i, nfft)[0])
					}
				}
			}()
		}
		wg.Wait()
		for g := 1; g < workers; g++ {
			for k := range ptrs[0] {
				if ptrs[g][k] != ptrs[0][k] {
					t.Fatalf("goroutine %d key %d: a second slice was computed", g, k)
				}
			}
		}
	})
	// Convolvers in parallel give the same results as one alone (race detector).
	t.Run("parallel convolvers", func(t *testing.T) {
		x := randomSignal(200, 3)
		nfft := FFTLen(len(x), bank.MaxHalf(nil))
		ref := bank.NewConvolver(nfft)
		ref.Load(x)
		want := make([]float64, bank.Len())
		for i := range want {
			want[i] = ref.MeanPower(i, 0, len(x))
		}
		var wg sync.WaitGroup
		errs := make(chan string, 4)
		for range 4 {
			wg.Add(1)
			go func() {
				defer wg.Done()
				c := bank.NewConvolver(nfft)
				c.Load(x)
				for i := range want {
					if got := c.MeanPower(i, 0, len(x)); got != want[i] {
						errs <- fmt.Sprintf("freq %d: %g != %g", i, got, want[i])
						return
					}
				}
			}()
		}
		wg.Wait()
		close(errs)
		for e := range errs {
			t.Error(e)
		}
	})
}

func TestTFPower(t *testing.T) {
	const rate, n = 250.0, 400
	bank := testBank(t, rate, 6, 30, 5)
	idx := []int{1, 3, 4}
	h := bank.MaxHalf(idx)
	conv := bank.NewConvolver(FFTLen(n, h))
	for _, c := range []struct{ from, to, step int }{{0, n, 1}, {50, 351, 4}, {10, 20, 0}, {100, 101, 7}} {
		t.Run(fmt.Sprintf("%d-%d/%d", c.from, c.to, c.step), func(t *testing.T) {
			var m [][]float64
			want := make([][]float64, len(idx))
			for trial := range 3 {
				x := randomSignal(n, uint64(10+trial))
				conv.Load(x)
				m = TFPower(m, conv, idx, c.from, c.to, c.step)
				// Against |Analytic|², itself checked against scipy.
				for r, i := range idx {
					y := conv.Analytic(nil, i, 0, n)
					step := max(c.step, 1)
					if trial == 0 {
						want[r] = make([]float64, TFCols(c.from, c.to, c.step))
					}
					for col := range want[r] {
						v := y[c.from+col*step]
						want[r][col] += real(v)*real(v) + imag(v)*imag(v)
					}
				}
			}
			if len(m) != len(idx) {
				t.Fatalf("%d rows, want %d", len(m), len(idx))
			}
			for r := range m {
				if len(m[r]) != len(want[r]) || len(m[r]) == 0 {
					t.Fatalf("row %d: %d columns, want %d", r, len(m[r]), len(want[r]))
				}
				for col := range m[r] {
					if !relNear(m[r][col], want[r][col], 1e-12) {
						t.Fatalf("[%d][%d] = %g, want %g", r, col, m[r][col], want[r][col])
					}
				}
			}
		})
	}
	t.Run("cosine", func(t *testing.T) {
		// REFERENCES.md: amplitude 3 gives power 9.000 away from the edges.
		f := bank.Freq(3)
		x := make([]float32, n)
		var m [][]float64
		for trial := range 4 {
			for j := range x {
				x[j] = float32(3 * math.Cos(2*math.Pi*f*float64(j)/rate+float64(trial)))
			}
			conv.Load(x)
			m = TFPower(m, conv, []int{3}, bank.Half(3), n-bank.Half(3), 3)
		}
		for col, v := range m[0] {
			if !near(v/4, 9, 1e-3) {
				t.Fatalf("col %d: mean power %.6f, want 9.000", col, v/4)
			}
		}
	})
}

func TestWithin(t *testing.T) {
	// Inclusive ranges (DESIGN.md recipe contract: "Ranges are inclusive").
	f, _ := Frequencies(5, 40, 8, "linear") // 5, 10, …, 40
	bank, err := NewBank(250, f, Cycles(8, 3, 9))
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		lo, hi float64
		want   []int
	}{
		{10, 20, []int{1, 2, 3}},
		{10.000000001, 19.999999999, []int{1, 2, 3}},
		{11, 14, nil},
		{0, 100, []int{0, 1, 2, 3, 4, 5, 6, 7}},
		{40, 40, []int{7}},
	} {
		t.Run(fmt.Sprintf("%g-%g", c.lo, c.hi), func(t *testing.T) {
			got := bank.Within(c.lo, c.hi)
			if fmt.Sprint(got) != fmt.Sprint(c.want) {
				t.Errorf("Within(%g, %g) = %v, want %v", c.lo, c.hi, got, c.want)
			}
		})
	}
}

func TestNewBankErrors(t *testing.T) {
	for _, c := range []struct {
		name          string
		rate          float64
		freqs, cycles []float64
		want          string
	}{
		{"rate zero", 0, []float64{10}, []float64{7}, "rate 0"},
		{"rate NaN", math.NaN(), []float64{10}, []float64{7}, "NaN"},
		{"no frequencies", 250, nil, nil, "no frequencies"},
		{"length mismatch", 250, []float64{10, 20}, []float64{7}, "2 frequencies but 1"},
		{"negative frequency", 250, []float64{10, -3}, []float64{7, 7}, "frequency 1 (-3 Hz)"},
		{"at Nyquist", 250, []float64{125}, []float64{7}, "125 Hz"},
		{"zero cycles", 250, []float64{10, 20}, []float64{7, 0}, "cycle count 1 (0)"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := NewBank(c.rate, c.freqs, c.cycles)
			if err == nil {
				t.Fatal("no error")
			}
			if !strings.Contains(err.Error(), c.want) || !strings.HasPrefix(err.Error(), "spectral: ") {
				t.Errorf("error %q, want it to contain %q", err, c.want)
			}
		})
	}
}

func TestPanics(t *testing.T) {
	bank := testBank(t, 250, 4, 30, 3)
	h := bank.Half(0)
	for _, c := range []struct {
		name string
		f    func()
		want string
	}{
		{"before load", func() { bank.NewConvolver(1000).MeanPower(0, 0, 1) }, "before Load"},
		{"would wrap", func() {
			c := bank.NewConvolver(100 + 2*h - 1)
			c.Load(randomSignal(100, 1))
			c.Analytic(nil, 0, 0, 100)
		}, "would wrap"},
		{"too long", func() { bank.NewConvolver(50).Load(randomSignal(51, 1)) }, "longer than FFT length"},
		{"range", func() {
			c := bank.NewConvolver(FFTLen(100, h))
			c.Load(randomSignal(100, 1))
			c.Analytic(nil, 0, 10, 101)
		}, "[10,101)"},
		{"tight wrap start", func() {
			c := bank.NewConvolver(400 + h - 1)
			c.Tight = true
			c.Load(randomSignal(400, 1))
			c.Analytic(nil, 0, 0, 50) // sample 0 needs 400+H
		}, "would wrap"},
		{"tight wrap end", func() {
			c := bank.NewConvolver(400)
			c.Tight = true
			c.Load(randomSignal(400, 1))
			c.MeanPower(0, h, 401-h)
		}, "would wrap"},
		{"wavelet index", func() {
			c := bank.NewConvolver(1000)
			c.Load(randomSignal(100, 1))
			c.MeanPower(3, 0, 10)
		}, "index 3"},
		{"spectrum index", func() { bank.Spectrum(3, 1024) }, "index 3"},
		{"spectrum short", func() { bank.Spectrum(0, 2*h) }, "shorter than kernel"},
		{"map shape", func() {
			c := bank.NewConvolver(FFTLen(100, h))
			c.Load(randomSignal(100, 1))
			TFPower(make([][]float64, 1), c, []int{0, 1}, 0, 10, 1)
		}, "1 rows for 2"},
	} {
		t.Run(c.name, func(t *testing.T) {
			defer func() {
				r := recover()
				s, _ := r.(string)
				if !strings.HasPrefix(s, "spectral: ") || !strings.Contains(s, c.want) {
					t.Errorf("panic %v, want \"spectral: …%s…\"", r, c.want)
				}
			}()
			c.f()
		})
	}
	t.Run("shorter fits", func(t *testing.T) {
		// Exactly len(x)+2H is enough: no panic.
		c := bank.NewConvolver(400 + 2*h)
		c.Load(randomSignal(400, 1))
		if p := c.MeanPower(0, 0, 400); !(p > 0) {
			t.Errorf("power %v", p)
		}
		if p := c.MeanPower(0, 5, 5); !math.IsNaN(p) {
			t.Errorf("empty range power %v, want NaN", p)
		}
		// With Tight, 400+H covers the whole range, and 400 covers [H, 400−H).
		want := c.MeanPower(0, h, 400-h)
		for _, nfft := range []int{400 + h, 400} {
			c.Reset(nfft)
			c.Tight = true
			c.Load(randomSignal(400, 1))
			if nfft == 400+h {
				c.MeanPower(0, 0, 400)
			}
			if p := c.MeanPower(0, h, 400-h); !relNear(p, want, 1e-12) {
				t.Errorf("nfft %d: power %v, want %v", nfft, p, want)
			}
		}
	})
}

func TestNoAllocs(t *testing.T) {
	bank := testBank(t, 500, 15, 25, 10)
	x := randomSignal(1250, 2)
	c := bank.NewConvolver(FFTLen(len(x), bank.MaxHalf(nil)))
	dst := make([]complex128, 300)
	idx := []int{0, 9}
	c.Load(x)
	m := TFPower(nil, c, idx, 0, 1250, 5)
	run := func() {
		c.Load(x)
		for i := range bank.Len() {
			c.MeanPower(i, 400, 700)
		}
		c.Analytic(dst, 4, 100, 400)
		TFPower(m, c, idx, 0, 1250, 5)
	}
	run()
	if a := testing.AllocsPerRun(5, run); a != 0 {
		t.Errorf("%v allocations per run after warm-up, want 0", a)
	}
}

func TestDeterministic(t *testing.T) {
	bank := testBank(t, 250, 4, 30, 4)
	x := randomSignal(300, 9)
	var first []complex128
	for k := range 2 {
		b2, _ := NewBank(bank.Rate(), []float64{bank.Freq(2)}, []float64{bank.Cycles(2)})
		c := b2.NewConvolver(FFTLen(len(x), b2.Half(0)))
		c.Load(x)
		y := c.Analytic(nil, 0, 0, len(x))
		if k == 0 {
			first = y
			continue
		}
		for j := range y {
			if math.Float64bits(real(y[j])) != math.Float64bits(real(first[j])) || math.Float64bits(imag(y[j])) != math.Float64bits(imag(first[j])) {
				t.Fatalf("sample %d differs between runs", j)
			}
		}
	}
}

func FuzzFrequencies(f *testing.F) {
	f.Add(3.0, 40.0, 28, "log")
	f.Add(1.0, 5.0, 5, "linear")
	f.Add(0.0, 1.0, 1, "geo")
	f.Add(5.0, 1.0, 3, "log")
	f.Add(3.0, 103.0, 1, "linear")
	f.Fuzz(func(t *testing.T, low, high float64, steps int, spacing string) {
		if steps > 1<<16 {
			steps = 1 << 16
		}
		got, err := Frequencies(low, high, steps, spacing)
		if err != nil {
			if got != nil {
				t.Fatalf("values %v with error %v", got, err)
			}
			return
		}
		if len(got) != steps || got[0] != low || (steps > 1 && got[len(got)-1] != high) {
			t.Fatalf("Frequencies(%v, %v, %d, %q) = %v", low, high, steps, spacing, got)
		}
		for i, v := range got {
			if !(v > 0) || math.IsInf(v, 0) || (i > 0 && v < got[i-1]*(1-1e-12)) {
				t.Fatalf("f[%d] = %v not positive, finite and ascending: %v", i, v, got)
			}
		}
	})
}
