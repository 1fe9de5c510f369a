package spectral_test

import (
	"fmt"
	"math"

	"amplink/core/spectral"
)

func ExampleConvolver_MeanPower() {
	const rate = 500.0
	freqs, _ := spectral.Frequencies(8, 12, 3, "linear")
	bank, _ := spectral.NewBank(rate, freqs, spectral.Cycles(len(freqs), 5, 7))

	// A 10 Hz cosine of amplitude 3 µV.
	x := make([]float32, 1000)
	for j := range x {
		x[j] = float32(3 * math.Cos(2*math.Pi*10*float64(j)/rate))
	}
	h := bank.MaxHalf(nil)
	conv := bank.NewConvolver(spectral.FFTLen(len(x), h))
	conv.Load(x)
	fmt.Printf("%.0f Hz: %.3f µV²\n", bank.Freq(1), conv.MeanPower(1, h, len(x)-h))
	// Output: 10 Hz: 9.000 µV²
}
