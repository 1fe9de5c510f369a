package connect

import (
	"context"

	"amplink/core/data"
	"amplink/core/spectral"
)

// Span is one time-frequency window in samples and grid indices: output
// samples [From, To) of the epoch, and the bank frequencies Freqs.
type Span struct {
	From, To int
	Freqs    []int
}

// WindowPower returns, for one channel of e, the power of each span in each
// trial: dst[s*e.NTrials+t] is the mean of |x_t∗w_f|² over f in spans[s].Freqs
// and samples [From, To). Only the input needed for each span (the span plus
// the longest wavelet's half-width on each side) is convolved, with an FFT
// length of small prime factors; the forward transform of a segment is shared
// by all frequencies of the span. dst is allocated when nil.
func WindowPower(ctx context.Context, dst []float64, bank *spectral.Bank, e *data.Epochs, ch int, spans []Span) ([]float64, error) {
	n := len(spans) * e.NTrials
	if dst == nil {
		dst = make([]float64, n)
	}
	if len(dst) != n {
		panic("connect: dst length mismatch")
	}
	convs := map[int]*spectral.Convolver{}
	type crop struct{ lo, hi, nfft int }
	crops := make([]crop, len(spans))
	for s, sp := range spans {
		h := bank.MaxHalf(sp.Freqs)
		lo, hi := spectral.Crop(e.NSamples, sp.From, sp.To, h)
		// Only the window's own samples are read, so the FFT need only keep
		// those free of wrap-around (Convolver.Tight).
		nfft := spectral.TightFFTLen(hi-lo, sp.From-lo, sp.To-lo, h)
		// A power of two up to 1.5× longer runs gonum's radix
		// kernels, about 1.5× faster at these lengths than a mixed-radix one.
		if p2 := spectral.PowerOfTwo(nfft); p2 <= spectral.MaxRadixLen && p2*2 <= nfft*3 {
			nfft = p2
		}
		crops[s] = crop{lo, hi, nfft}
		if convs[nfft] == nil {
			c := bank.NewConvolver(nfft)
			c.Tight = true
			convs[nfft] = c
		}
	}
	for t := 0; t < e.NTrials; t++ {
		if t%16 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
		}
		x := e.Trial(t, ch)
		for s, sp := range spans {
			c := crops[s]
			conv := convs[c.nfft]
			conv.Load(x[c.lo:c.hi])
			sum := 0.0
			for _, f := range sp.Freqs {
				sum += conv.MeanPower(f, sp.From-c.lo, sp.To-c.lo)
			}
			dst[s*e.NTrials+t] = sum / float64(len(sp.Freqs))
		}
	}
	return dst, nil
}
