package analysis

import (
	"context"

	"amplink/core/analysis/connect"
	"amplink/core/spectral"
)

// An envelope unit's computation: the band signals of one trial or chunk,
// corrected for leakage when the recipe asks, binned into envelopes, and
// reduced to running co-moments (plus the series that Spearman r, the
// effective n and the surrogates need).

// compute does one unit: band signals of every channel over the span,
// binned envelopes, and the co-moments of every term.
func (ep *envPlan) compute(ctx context.Context, p *Plan, seg int, span [2]int) ([]float64, error) {
	a := ep.a
	n := len(ep.chans)
	var za, zb [][]complex128
	// Overlap-save blocks for a chunk, one transform for a short trial
	// (spectral.BandFilter).
	filter := p.bank.NewBandFilter()
	// A streamed recording: the unit's span with its margins, read once
	// for every channel it uses; x then stands for the whole channel, of
	// which only [off, off+len(block)) is there.
	var held map[int][]float32
	off := 0
	if ep.src.streamed() {
		lo, hi := spectral.Crop(ep.src.rec.Len(), span[0], span[1], ep.src.margin)
		chs := ep.unitChannels()
		b, err := ep.src.block(chs, lo, hi)
		if err != nil {
			return nil, err
		}
		held, off = make(map[int][]float32, len(chs)), lo
		for i, c := range chs {
			held[c] = b[i]
		}
	}
	band := func(ch int, freqs []int) []complex128 {
		if held != nil {
			// the same crop as below, read from the file
			return filter.Band(nil, freqs, held[ch], span[0]-off, span[1]-off)
		}
		x := ep.src.samples(seg, ch)
		lo, hi := spectral.Crop(len(x), span[0], span[1], ep.src.margin)
		return filter.Band(nil, freqs, x[lo:hi], span[0]-lo, span[1]-lo)
	}
	if ep.como {
		// One series per frequency on the first (seed) and last (target) channel.
		for _, f := range ep.fa {
			za = append(za, band(ep.chans[0], []int{f}))
		}
		for _, f := range ep.fb {
			za = append(za, band(ep.chans[len(ep.chans)-1], []int{f}))
		}
	} else {
		for _, c := range ep.chans {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
			za = append(za, band(c, ep.fa))
			if ep.fb != nil {
				zb = append(zb, band(c, ep.fb))
			}
		}
	}
	var raw [][]complex128 // the band signals before a symmetric correction
	if ep.storeZ {
		raw = append(raw, za...)
	}
	if a.Orthogonalize == OrthSymmetric {
		if err := ep.symmetric(za); err != nil {
			return nil, err
		}
	}
	// Binned envelopes (connect.Envelope, connect.OrthEnvelopes).
	series := make([][]float64, ep.nSeries+len(ep.chans)*(len(ep.chans)-1))
	for i, z := range za {
		series[i] = connect.Envelope(nil, z, ep.bin, nil, ep.kind)
	}
	for i, z := range zb {
		series[n+i] = connect.Envelope(nil, z, ep.bin, nil, ep.kind)
	}
	if a.Orthogonalize == OrthPairwise {
		// Every ordered pair at once, blocked by time (series[ep.orthSeries(i,
		// j)] is series[n+connect.OrthIndex(n, i, j)]).
		connect.OrthEnvelopes(series[n:n+n*(n-1)], za, ep.bin, nil, ep.kind, nil)
	}
	out := make([]float64, 0, 6*len(ep.terms))
	for _, t := range ep.terms {
		var mo connect.Moments
		xs, ys := series[t.x], series[t.y]
		for k := range xs {
			mo.Add(xs[k], ys[k])
		}
		out = mo.Flat(out)
	}
	if ep.store {
		for s := range ep.storedSeries() {
			out = append(out, series[s]...)
		}
	}
	for _, z := range raw {
		for _, v := range z {
			out = append(out, real(v), imag(v))
		}
	}
	return out, nil
}

// unitChannels lists the channels a unit's band signals come from, in the
// order compute uses them.
func (ep *envPlan) unitChannels() []int {
	if ep.como {
		first, last := ep.chans[0], ep.chans[len(ep.chans)-1]
		if first == last {
			return []int{first}
		}
		return []int{first, last}
	}
	return ep.chans
}

// symmetric replaces the band signals by their closest orthogonal set
// (connect.SymmetricCorrect).
func (ep *envPlan) symmetric(z [][]complex128) error {
	out, err := connect.SymmetricCorrect(z, nil)
	if err != nil {
		return ferr(ep.path+".leakageCorrection", "%v; drop a channel (for example one of an average-referenced set) or use pairwise orthogonalisation", err)
	}
	copy(z, out)
	return nil
}

// unitParts splits a unit's values into the co-moments of each term and the
// stored series.
func (ep *envPlan) unitParts(u int, v []float64) (mo []connect.Moments, series [][]float64, raw [][]complex128) {
	for t := range ep.terms {
		mo = append(mo, connect.MomentsFrom(v[6*t:]))
	}
	if ep.storeZ {
		m := ep.uspans[u][1] - ep.uspans[u][0]
		z := v[len(v)-2*m*len(ep.chans):]
		v = v[:len(v)-len(z)]
		for c := range ep.chans {
			zc := make([]complex128, m)
			for k := range zc {
				zc[k] = complex(z[2*(c*m+k)], z[2*(c*m+k)+1])
			}
			raw = append(raw, zc)
		}
	}
	if ep.store {
		rest := v[6*len(ep.terms):]
		ns := ep.storedSeries()
		l := len(rest) / ns
		for s := range ns {
			series = append(series, rest[s*l:(s+1)*l])
		}
	}
	return mo, series, raw
}
