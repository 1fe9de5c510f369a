package spectral

import (
	"math"
	"math/cmplx"
	"testing"
)

// The radix-2/4 inverse used for power-of-two lengths agrees with gonum's
// CmplxFFT (the path for every other length) to rounding, up to the longest
// length it is used for.
func TestRadixInverse(t *testing.T) {
	bank := testBank(t, 500, 2, 60, 8)
	for _, n := range []int{512, 1024, 2048, 4096, 8192, MaxRadixLen} { // radix-2 (odd powers) and radix-4 (even powers)
		x := randomSignal(n/2, uint64(n))
		c := bank.NewConvolver(n)
		c.Tight = true
		c.Load(x)
		got := c.Analytic(nil, 3, 0, len(x))
		// The same through CmplxFFT: a length that is not a power of two but
		// keeps the requested samples free of wrap-around.
		ref := bank.NewConvolver(GoodSize(n + 1))
		if ref.Len()&(ref.Len()-1) == 0 {
			ref = bank.NewConvolver(GoodSize(n+1) + 1)
		}
		ref.Tight = true
		ref.Load(x)
		want := ref.Analytic(nil, 3, 0, len(x))
		scale := 0.0
		for _, v := range want {
			scale = math.Max(scale, cmplx.Abs(v))
		}
		for k := range got {
			if cmplx.Abs(got[k]-want[k]) > 1e-11*scale {
				t.Fatalf("n = %d, sample %d: radix %v, CmplxFFT %v", n, k, got[k], want[k])
			}
		}
	}
	if PowerOfTwo(400) != 512 || PowerOfTwo(512) != 512 || PowerOfTwo(1) != 1 || PowerOfTwo(513) != 1024 {
		t.Error("PowerOfTwo")
	}
}
