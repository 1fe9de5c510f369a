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
//
// With forms (see Forms), a span whose quadratic form pays is computed
// through it (see Form.Power) within the forms' tolerance, and by FFT for
// any trial whose error bound the form's ranks cannot meet; when the first
// formPilot trials of a span cost more through the form (the ranks they
// needed, and the FFT for those that fell back) than the FFT route would
// have, the rest of the channel's trials take the FFT directly. Either way
// the values depend only on the channel's data and the recipe, never on
// other units or goroutines. A nil forms gives the FFT route throughout.
func WindowPower(ctx context.Context, dst []float64, bank *spectral.Bank, forms *Forms, e *data.Epochs, ch int, spans []Span) ([]float64, error) {
	n := len(spans) * e.NTrials
	if dst == nil {
		dst = make([]float64, n)
	}
	if len(dst) != n {
		panic("connect: dst length mismatch")
	}
	convs := map[int]*spectral.Convolver{}
	type crop struct {
		lo, hi, nfft int
		form         *Form
		fftCost      float64 // fftRouteCost of the span
		formCost     float64 // the form's cost so far, in the same units
	}
	crops := make([]crop, len(spans))
	var buf []float64
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
		crops[s] = crop{lo: lo, hi: hi, nfft: nfft, fftCost: fftRouteCost(nfft, len(sp.Freqs))}
		if convs[nfft] == nil {
			c := bank.NewConvolver(nfft)
			c.Tight = true
			convs[nfft] = c
		}
	}
	// The forms are asked for in an order that starts at this channel's
	// span, so that concurrent units build different windows' forms.
	for i := range spans {
		s := (ch + i) % len(spans)
		c := &crops[s]
		c.form = forms.get(bank, e.NSamples, spans[s], c.nfft)
		if c.form != nil && len(buf) < c.form.Len() {
			buf = make([]float64, c.form.Len())
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
			c := &crops[s]
			if c.form != nil {
				p, r, ok := c.form.Power(x, buf)
				c.formCost += float64(r * c.form.Len())
				if !ok {
					c.formCost += c.fftCost
				}
				if t == formPilot-1 && c.formCost > formPilot*c.fftCost {
					c.form = nil
				}
				if ok {
					dst[s*e.NTrials+t] = p
					continue
				}
			}
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

// formPilot is the number of trials after which a span whose form mostly
// falls back to the FFT gives the form up for the rest of the channel.
const formPilot = 16
