package spectral

import (
	"fmt"
	"math/cmplx"
	"testing"
)

func TestStreamVsScipy(t *testing.T) {
	// scipy.signal.fftconvolve(x, w, mode='same'), scipy 1.10.1,
	// testdata/spectral/make_ref.py; short blocks force several chunks.
	ref := loadRef(t)
	for _, c := range ref.Cases {
		bank, err := NewBank(ref.Rate, []float64{c.Freq}, []float64{c.Cycles})
		if err != nil {
			t.Fatal(err)
		}
		for _, nfft := range []int{2*bank.Half(0) + 7, 2*bank.Half(0) + 101, 0} {
			t.Run(fmt.Sprintf("f=%g,n=%g/nfft=%d", c.Freq, c.Cycles, nfft), func(t *testing.T) {
				s := bank.NewStream(0, nfft)
				next := 0
				s.RunFloat64(ref.X, func(start int, y []complex128) {
					if start != next {
						t.Fatalf("chunk starts at %d, want %d", start, next)
					}
					for q, v := range y {
						want := complex(c.SameRe[start+q], c.SameIm[start+q])
						if cmplx.Abs(v-want) > 1e-9 {
							t.Fatalf("y[%d] = %v, scipy %v", start+q, v, want)
						}
					}
					next += len(y)
				})
				if next != len(ref.X) {
					t.Errorf("chunks covered %d samples, want %d", next, len(ref.X))
				}
			})
		}
	}
}

func TestStreamVsOneShot(t *testing.T) {
	// The one-shot Convolver result is checked against scipy in TestAnalyticVsScipy.
	const rate = 500.0
	bank := testBank(t, rate, 2, 120, 4)
	for _, n := range []int{0, 1, 17, 3000, 9001} {
		x := randomSignal(n, uint64(n)+1)
		for i := range bank.Len() {
			h := bank.Half(i)
			var want []complex128
			if n > 0 {
				one := bank.NewConvolver(FFTLen(n, h))
				one.Load(x)
				want = one.Analytic(nil, i, 0, n)
			}
			short := 2*h + 1 // one output sample per FFT
			if n > 100 {
				short = 2*h + 97
			}
			for _, nfft := range []int{short, GoodSize(2*h + 500), 0} {
				t.Run(fmt.Sprintf("n=%d/f=%.1f/nfft=%d", n, bank.Freq(i), nfft), func(t *testing.T) {
					s := bank.NewStream(i, nfft)
					next, chunks := 0, 0
					s.Run(x, func(start int, y []complex128) {
						if start != next || len(y) == 0 || len(y) > s.Block() {
							t.Fatalf("chunk [%d,+%d) after %d (block %d)", start, len(y), next, s.Block())
						}
						if start+len(y) < n && len(y) != s.Block() {
							t.Fatalf("inner chunk of %d samples, want %d", len(y), s.Block())
						}
						for q, v := range y {
							if cmplx.Abs(v-want[start+q]) > 1e-10 {
								t.Fatalf("y[%d] = %v, one-shot %v", start+q, v, want[start+q])
							}
						}
						next += len(y)
						chunks++
					})
					if next != n {
						t.Errorf("covered %d samples, want %d", next, n)
					}
					if wantChunks := (n + s.Block() - 1) / s.Block(); chunks != wantChunks {
						t.Errorf("%d chunks, want %d", chunks, wantChunks)
					}
				})
			}
		}
	}
}

func TestStreamNoAllocs(t *testing.T) {
	// Memory does not grow with the signal: Run allocates nothing.
	bank := testBank(t, 500, 8, 12, 2)
	s := bank.NewStream(1, 0)
	var sum float64
	fn := func(start int, y []complex128) {
		for _, v := range y {
			sum += real(v)
		}
	}
	for _, n := range []int{1000, 30000} {
		x := randomSignal(n, 4)
		if a := testing.AllocsPerRun(2, func() { s.Run(x, fn) }); a != 0 {
			t.Errorf("n=%d: %v allocations per Run, want 0", n, a)
		}
	}
}

func TestStreamPanics(t *testing.T) {
	bank := testBank(t, 250, 4, 30, 3)
	for _, c := range []struct {
		name string
		f    func()
	}{
		{"index", func() { bank.NewStream(3, 0) }},
		{"short", func() { bank.NewStream(0, 2*bank.Half(0)) }},
	} {
		t.Run(c.name, func(t *testing.T) {
			defer func() {
				if s, _ := recover().(string); len(s) < 10 || s[:10] != "spectral: " {
					t.Errorf("panic %q, want a \"spectral: \" message", s)
				}
			}()
			c.f()
		})
	}
}
