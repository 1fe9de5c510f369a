package connect

import (
	"context"
	"fmt"

	"amplink/core/data"
	"amplink/core/spectral"
)

// TrialPixels returns the single-trial power of one channel of e at every
// pixel of a time-frequency map: rows are the bank frequencies freqs, columns
// the output samples from, from+step, … below to (spectral.TFCols columns).
// The value for trial t, row r and column c is
//
//	dst[(r·cols + c)·e.NTrials + t] = |x_t∗w_freqs[r]|²[from + c·step]
//
// in the square of the signal's unit (µV² for µV), with x_t∗w the
// 'same'-aligned linear convolution of the trial with the
// amplitude-normalised Morlet wavelet (see spectral.Convolver.Analytic). The
// layout is pixel-major, so the across-trial vector of each pixel is
// contiguous, as in WindowPower. Each trial is cropped once to [from, to)
// plus the longest wavelet's half-width on each side (spectral.Crop) and
// transformed once with a Tight FFT of spectral.TightFFTLen; every row reads
// the same spectrum. dst is allocated when nil and must otherwise have
// length len(freqs)·cols·e.NTrials. step < 1 counts as 1.
//
// It returns ctx.Err() if ctx is cancelled, and panics (a programmer error)
// if [from, to) is not inside the epoch or dst has the wrong length.
func TrialPixels(ctx context.Context, dst []float64, bank *spectral.Bank, e *data.Epochs, ch int, freqs []int, from, to, step int) ([]float64, error) {
	step = max(step, 1)
	if from < 0 || to > e.NSamples || to <= from {
		panic(fmt.Sprintf("connect: pixel span [%d,%d) outside the epoch [0,%d)", from, to, e.NSamples))
	}
	cols := spectral.TFCols(from, to, step)
	rows := len(freqs)
	nt := e.NTrials
	n := rows * cols * nt
	if dst == nil {
		dst = make([]float64, n)
	}
	if len(dst) != n {
		panic("connect: dst length mismatch")
	}
	h := bank.MaxHalf(freqs)
	lo, hi := spectral.Crop(e.NSamples, from, to, h)
	conv := bank.NewConvolver(spectral.TightFFTLenStep(hi-lo, from-lo, to-lo, h, step))
	conv.Tight = true
	buf := make([][]float64, rows)
	for r := range buf {
		buf[r] = make([]float64, cols)
	}
	for t := range nt {
		if t%16 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
		}
		conv.Load(e.Trial(t, ch)[lo:hi])
		for r := range buf {
			clear(buf[r])
		}
		spectral.TFPower(buf, conv, freqs, from-lo, to-lo, step)
		for r, row := range buf {
			base := r * cols * nt
			for c, v := range row {
				dst[base+c*nt+t] = v
			}
		}
	}
	return dst, nil
}
