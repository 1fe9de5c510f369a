package spectral

import (
	"math/cmplx"
	"testing"
)

// BandAnalytic equals the mean of Analytic over the band's wavelets.
func TestBandAnalyticMatchesMean(t *testing.T) {
	bank := testBank(t, 250, 3, 40, 16)
	x := randomSignal(900, 5)
	for _, idx := range [][]int{{7}, {6, 7, 8, 9}, {0, 5, 15}} {
		h := bank.MaxHalf(idx)
		for _, tight := range []bool{false, true} {
			nfft := FFTLen(len(x), h)
			if tight {
				nfft = TightFFTLen(len(x), h, len(x)-h, h)
			}
			c := bank.NewConvolver(nfft)
			c.Tight = tight
			c.Load(x)
			from, to := h, len(x)-h
			got := c.BandAnalytic(nil, idx, from, to)
			want := make([]complex128, to-from)
			for _, i := range idx {
				for k, v := range c.Analytic(nil, i, from, to) {
					want[k] += v / complex(float64(len(idx)), 0)
				}
			}
			for k := range got {
				if cmplx.Abs(got[k]-want[k]) > 1e-10 {
					t.Fatalf("band %v tight %v sample %d: %v, mean of wavelets %v", idx, tight, k, got[k], want[k])
				}
			}
			// A later single-wavelet call is not confused by the band result.
			a := c.Analytic(nil, idx[0], from, from+1)[0]
			c.BandAnalytic(nil, idx, from, to)
			if b := c.Analytic(nil, idx[0], from, from+1)[0]; a != b {
				t.Fatalf("Analytic after BandAnalytic changed: %v vs %v", a, b)
			}
		}
	}
}
