package spectral

import (
	"errors"
	"math"
	"testing"
)

// TestNewBankRefusesWaveletLongerThanData guards the bound checked before any
// kernel is built: a rate, lowest frequency or cycle count from a hostile
// file must give an error, not an allocation of gigabytes or an int
// overflow. Lengths follow Taps = 2·⌈4·n/(2πf)·rate⌉ + 1 (the kernel
// definition in morlet.go).
func TestNewBankRefusesWaveletLongerThanData(t *testing.T) {
	cases := []struct {
		name   string
		rate   float64
		freqs  []float64
		cycles []float64
		maxLen int
		ok     bool
		index  int
	}{
		// 2 Hz, 3 cycles at 500 Hz: σt = 0.2387 s, H = ⌈477.5⌉ = 478, 957 taps.
		{"fits", 500, []float64{2, 20}, []float64{3, 10}, 957, true, 0},
		{"one sample short", 500, []float64{2, 20}, []float64{3, 10}, 956, false, 0},
		// A 256-byte file claiming 1e9 Hz: 64 samples, a kernel of ~1e9 taps.
		{"sidecar at 1e9 Hz", 1e9, []float64{2, 20}, []float64{3, 10}, 64, false, 0},
		// A WAV header claiming 4294967295 Hz.
		{"wav at 2^32-1 Hz", 4294967295, []float64{2, 40}, []float64{3, 10}, 234, false, 0},
		// spectral.low = 1e-6 Hz: H ≈ 9.5e8 at 500 Hz.
		{"low 1e-6 Hz", 500, []float64{1e-6, 20}, []float64{3, 10}, 15000, false, 0},
		// A rate whose half-length overflows every int.
		{"rate 1e300", 1e300, []float64{2}, []float64{3}, 1 << 30, false, 0},
		// 100 cycles at the top of the grid make the last wavelet the longest.
		{"cycles at the top", 1000, []float64{10, 40}, []float64{3, 1e4}, 5000, false, 1},
		// No data limit, but the absolute MaxTaps bound.
		{"beyond MaxTaps", 1e6, []float64{0.5}, []float64{10}, math.MaxInt, false, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			b, err := NewBankFor(c.rate, c.freqs, c.cycles, c.maxLen)
			if c.ok {
				if err != nil {
					t.Fatalf("NewBankFor: %v", err)
				}
				if got := len(b.Kernel(0)); got != 957 {
					t.Fatalf("kernel 0 has %d taps, want 957", got)
				}
				return
			}
			var le *LengthError
			if !errors.As(err, &le) {
				t.Fatalf("err = %v, want a *LengthError", err)
			}
			if le.Index != c.index {
				t.Errorf("Index = %d, want %d (%v)", le.Index, c.index, err)
			}
			if b != nil {
				t.Errorf("a bank was built")
			}
		})
	}
}

// TestHalfPanicsOutOfRange guards the explicit bound in Half: an unchecked
// absurd length is a programming error with the package prefix, never a
// silently wrapped int.
func TestHalfPanicsOutOfRange(t *testing.T) {
	defer func() {
		if recover() == nil {
			t.Fatal("Half(1e300, 2, 3) did not panic")
		}
	}()
	Half(1e300, 2, 3)
}
