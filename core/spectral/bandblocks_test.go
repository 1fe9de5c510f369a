package spectral

import (
	"encoding/json"
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"testing"
)

// bandRef mirrors testdata/spectral/band_ref.json, written by
// testdata/spectral/make_band_ref.py (scipy 1.10.1, numpy 1.24.2; the
// versions are also in the JSON).
type bandRef struct {
	Numpy, Scipy string
	Rate         float64
	Freqs        []float64
	Cycles       []float64
	Halves       []int
	Step         int
	X            []float64
	OaRe         []float64 `json:"oa_re"`
	OaIm         []float64 `json:"oa_im"`
	FftRe        []float64 `json:"fft_re"`
	FftIm        []float64 `json:"fft_im"`
}

// The overlap-save band signal against scipy: the mean over a 5-wavelet
// band of scipy.signal.oaconvolve(x, w, mode="same") (scipy's own block
// convolution) and of scipy.signal.fftconvolve (one transform), every 3rd
// sample (testdata/spectral/make_band_ref.py). Short blocks force many
// blocks, the chosen length one or two; outputs start and end inside the
// edges too.
func TestBandBlocksVsScipy(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "..", "testdata", "spectral", "band_ref.json"))
	if err != nil {
		t.Fatal(err)
	}
	var ref bandRef
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	n := len(ref.X)
	if ref.Scipy == "" || n == 0 || len(ref.OaRe) != (n+ref.Step-1)/ref.Step || len(ref.FftRe) != len(ref.OaRe) {
		t.Fatalf("band_ref.json incomplete: scipy %q, %d samples, %d/%d outputs", ref.Scipy, n, len(ref.OaRe), len(ref.FftRe))
	}
	bank, err := NewBank(ref.Rate, ref.Freqs, ref.Cycles)
	if err != nil {
		t.Fatal(err)
	}
	idx := make([]int, bank.Len())
	for i := range idx {
		idx[i] = i
		if bank.Half(i) != ref.Halves[i] {
			t.Fatalf("Half(%d) = %d, scipy script %d", i, bank.Half(i), ref.Halves[i])
		}
	}
	x := make([]float32, n)
	for k, v := range ref.X {
		x[k] = float32(v)
		if float64(x[k]) != v {
			t.Fatalf("sample %d is not float32-exact", k)
		}
	}
	h := bank.MaxHalf(idx)
	for _, nfft := range []int{256, 1024, 4096, BandBlockLen(h, n)} {
		for _, span := range [][2]int{{0, n}, {h, n - h}, {1234, 4321}, {5999, 6000}, {17, 17}} {
			t.Run(fmt.Sprintf("nfft=%d/%d-%d", nfft, span[0], span[1]), func(t *testing.T) {
				s := bank.NewBandBlocks(idx, nfft)
				z := s.Band(nil, x, span[0], span[1])
				if len(z) != span[1]-span[0] {
					t.Fatalf("%d samples, want %d", len(z), span[1]-span[0])
				}
				checked := 0
				for q, v := range z {
					k := span[0] + q
					if k%ref.Step != 0 {
						continue
					}
					oa := complex(ref.OaRe[k/ref.Step], ref.OaIm[k/ref.Step])
					fc := complex(ref.FftRe[k/ref.Step], ref.FftIm[k/ref.Step])
					if cmplx.Abs(v-oa) > 1e-12 || cmplx.Abs(v-fc) > 1e-12 {
						t.Fatalf("z[%d] = %v, scipy oaconvolve %v, fftconvolve %v", k, v, oa, fc)
					}
					checked++
				}
				if span[1]-span[0] > ref.Step && checked == 0 {
					t.Fatal("no sample checked")
				}
			})
		}
	}
}

// BandBlocks and BandFilter against the one-transform route
// (Convolver.BandAnalytic: the mean of Analytic in
// TestBandAnalyticMatchesMean, Analytic against scipy in
// TestAnalyticVsScipy): random signals, bands of short and long kernels,
// many block lengths, spans touching the edges.
func TestBandBlocksVsOneShot(t *testing.T) {
	bank := testBank(t, 500, 2, 60, 20)
	bands := [][]int{{0}, {5, 6, 7}, {10, 11, 12, 13}, {19}}
	for _, n := range []int{1, 50, 3001, 20000, 70001} {
		x := randomSignal(n, uint64(n))
		for _, idx := range bands {
			h := bank.MaxHalf(idx)
			one := bank.NewConvolver(FFTLen(n, h))
			one.Load(x)
			for _, span := range [][2]int{{0, n}, {min(h, n), max(n-h, min(h, n))}, {n / 3, n / 2}} {
				want := one.BandAnalytic(nil, idx, span[0], span[1])
				top := 0.0
				for _, v := range want {
					top = math.Max(top, cmplx.Abs(v))
				}
				var lens []int
				for l := 4; l <= MaxRadixLen; l *= 4 {
					if l > 2*h {
						lens = append(lens, l)
					}
				}
				for _, nfft := range lens {
					got := bank.NewBandBlocks(idx, nfft).Band(nil, x, span[0], span[1])
					if d := maxDiff(got, want); d > 1e-12*top {
						t.Fatalf("n=%d band %v span %v nfft %d: largest difference %.3g (|z| up to %.3g)", n, idx, span, nfft, d, top)
					}
				}
				f := bank.NewBandFilter()
				got := f.Band(nil, idx, x, span[0], span[1])
				if d := maxDiff(got, want); d > 1e-12*top {
					t.Fatalf("BandFilter n=%d band %v span %v: largest difference %.3g (|z| up to %.3g)", n, idx, span, d, top)
				}
			}
		}
	}
}

func maxDiff(a, b []complex128) float64 {
	if len(a) != len(b) {
		return math.Inf(1)
	}
	d := 0.0
	for k := range a {
		d = math.Max(d, cmplx.Abs(a[k]-b[k]))
	}
	return d
}

func TestBandBlockLen(t *testing.T) {
	for _, c := range []struct{ h, m, want int }{
		// ⌈m/(N−2h)⌉·N·log₂N: 65536 outputs with h = 500 take 22 blocks of
		// 4096 (1 081 344) or 5 of 16384 (1 146 880).
		{500, 65536, 4096},
		{100, 65536, 4096},   // 17 × 4096·12 = 835 584 against 5 × 16384·14
		{1200, 65536, 16384}, // 41 × 4096·12 = 2 015 232 against 5 × 16384·14
		{100, 1000, 4096},    // one block
		{3000, 65536, 16384}, // 4096 keeps none of its samples
		{4096, 65536, 0},     // no block keeps more than half
	} {
		if got := BandBlockLen(c.h, c.m); got != c.want {
			t.Errorf("BandBlockLen(%d, %d) = %d, want %d", c.h, c.m, got, c.want)
		}
	}
}

func TestBandBlocksNoAllocation(t *testing.T) {
	bank := testBank(t, 500, 2, 60, 20)
	idx := []int{8, 9, 10}
	x := randomSignal(30000, 3)
	s := bank.NewBandBlocks(idx, 4096)
	dst := s.Band(nil, x, 100, 29000)
	if a := testing.AllocsPerRun(3, func() { s.Band(dst, x, 100, 29000) }); a != 0 {
		t.Errorf("%.0f allocations per call, want 0", a)
	}
}

func TestBandBlocksBadLength(t *testing.T) {
	bank := testBank(t, 500, 2, 60, 20)
	h := bank.MaxHalf([]int{5})
	for _, nfft := range []int{0, 3, 1000, 8192, 4 * MaxRadixLen, 256} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("NewBandBlocks(nfft = %d, half %d) did not panic", nfft, h)
				}
			}()
			bank.NewBandBlocks([]int{5}, nfft)
		}()
	}
}

// blockFFT against the DFT's definition, X[k] = Σ_j x[j]·exp(∓2πijk/N)
// (common practice), summed directly with the angle reduced modulo N, at
// every k for short lengths and at scattered k for long ones; the error
// bound is that of a transform with exact twiddles (a few 1e-16 × √N·log N).
func TestBlockFFT(t *testing.T) {
	for _, n := range []int{4, 16, 64, 256, 4096, 16384} {
		x := make([]complex128, n)
		for k := range x {
			x[k] = complex(math.Sin(float64(k)), math.Cos(float64(3*k)))
		}
		f := newBlockFFT(n)
		for _, inverse := range []bool{false, true} {
			got := append([]complex128(nil), x...)
			f.transform(got, inverse)
			ks := []int{0, 1, 7, n / 3, n / 2, n - 1}
			if n <= 256 {
				ks = ks[:0]
				for k := range n {
					ks = append(ks, k)
				}
			}
			sign := -1.0
			if inverse {
				sign = 1
			}
			worst := 0.0
			for _, k := range ks {
				var s complex128
				for j, v := range x {
					sn, cs := math.Sincos(sign * 2 * math.Pi * float64((j*k)%n) / float64(n))
					s += v * complex(cs, sn)
				}
				worst = math.Max(worst, cmplx.Abs(got[k]-s))
			}
			if tol := 2e-16 * math.Sqrt(float64(n)) * math.Log2(float64(n)) * 4; worst > tol {
				t.Errorf("n=%d inverse=%v: largest error %.3g, want ≤ %.3g", n, inverse, worst, tol)
			}
		}
	}
}
