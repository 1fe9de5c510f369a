package spectral

import (
	"math"
	"testing"
)

// TFPower with a step that divides the FFT length folds the spectrum; it
// must give the same map as reading every step-th sample of Analytic.
func TestTFPowerFoldedMatchesAnalytic(t *testing.T) {
	bank := testBank(t, 250, 3, 40, 12)
	x := randomSignal(700, 3)
	for _, tc := range []struct{ from, to, step int }{
		{0, 700, 5}, {100, 650, 10}, {333, 334, 4}, {1, 699, 25}, {250, 600, 2},
	} {
		half := bank.MaxHalf(nil)
		nfft := TightFFTLenStep(len(x), tc.from, tc.to, half, tc.step)
		if nfft%tc.step != 0 {
			t.Fatalf("TightFFTLenStep = %d is not a multiple of %d", nfft, tc.step)
		}
		c := bank.NewConvolver(nfft)
		c.Tight = true
		c.Load(x)
		idx := []int{0, 4, 11}
		got := TFPower(nil, c, idx, tc.from, tc.to, tc.step)
		for r, i := range idx {
			y := c.Analytic(nil, i, tc.from, tc.to)
			for col := range got[r] {
				v := y[col*tc.step]
				want := real(v)*real(v) + imag(v)*imag(v)
				if math.Abs(got[r][col]-want) > 1e-9*math.Max(1, want) {
					t.Fatalf("from %d step %d freq %d col %d: folded %.12g, direct %.12g", tc.from, tc.step, i, col, got[r][col], want)
				}
			}
		}
	}
}
