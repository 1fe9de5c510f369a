package analysis

import (
	"context"
	"math"

	"amplink/core/analysis/connect"
	"amplink/core/spectral"
)

// What a plan shows of itself once it has run. Figures are drawn from the
// results after Finish (core/figures); these accessors give them what the
// results table does not hold: the grid and the wavelet bank, the channels
// an analysis reads, the per-trial window powers behind a row, and the
// envelopes an analysis correlated.

// Recipe returns the recipe the plan was made from.
func (p *Plan) Recipe() *Recipe { return p.r }

// Dataset returns the dataset the plan runs on.
func (p *Plan) Dataset() *Dataset { return p.ds }

// Bank returns the plan's wavelet bank (one kernel per grid frequency).
func (p *Plan) Bank() *spectral.Bank { return p.bank }

// Sides returns the seed and target channels (indices into the epochs) of
// analysis i when it is a trial-window or tf-map analysis, nil otherwise.
func (p *Plan) Sides(i int) (seeds, targets []int) {
	a := &p.r.Analyses[i]
	e := p.ds.Epochs
	if e == nil || (a.Type != TypeTrialWindow && a.Type != TypeTFMap) {
		return nil, nil
	}
	// NewPlan has already resolved both selections without error
	seeds, _ = resolveChannels("", a.Seed.Channel, e.Channels)
	targets, _ = resolveChannels("", a.Target.Channel, e.Channels)
	return seeds, targets
}

// RoundTime removes the floating-point noise of start + k/rate from a time
// in s, keeping nanosecond resolution, as the results table shows times.
func RoundTime(t float64) float64 { return roundTime(t) }

// TrialWindowView is what a trial-window analysis planned.
type TrialWindowView struct{ tw *twPlan }

// TrialWindow returns the view of analysis i, or false when it is not a
// trial-window analysis.
func (p *Plan) TrialWindow(i int) (TrialWindowView, bool) {
	tw, ok := p.finish[i].(*twPlan)
	return TrialWindowView{tw}, ok
}

// Analysis returns the recipe's entry.
func (v TrialWindowView) Analysis() *Analysis { return v.tw.a }

// Seeds and Targets return the channel names of each side, in row order.
func (v TrialWindowView) Seeds() []string   { return refNames(v.tw.seeds) }
func (v TrialWindowView) Targets() []string { return refNames(v.tw.targets) }

func refNames(refs []chanRef) []string {
	out := make([]string, len(refs))
	for i, r := range refs {
		out[i] = r.name
	}
	return out
}

// Kept lists the trials the analysis used (0-based): all of them, or those
// with every covariate.
func (v TrialWindowView) Kept() []int { return v.tw.keep }

// Covariates returns the covariates over the kept trials, one slice each.
func (v TrialWindowView) Covariates() [][]float64 { return v.tw.covs }

// ConditionTrials returns, for each compared condition, positions in Kept.
func (v TrialWindowView) ConditionTrials() [2][]int { return v.tw.conds }

// SeedWindow and TargetWindow return the band (Hz) and time span (s) that
// the window powers really cover: the first and last grid frequency and
// sample time inside the recipe's window.
func (v TrialWindowView) SeedWindow() (freq, time [2]float64)   { return v.tw.seedF, v.tw.seedT }
func (v TrialWindowView) TargetWindow() (freq, time [2]float64) { return v.tw.targF, v.tw.targT }

// Values returns the window power of the named seed (or target) channel
// over the kept trials, from the plan's unit results; nil when the side has
// no such channel.
func (v TrialWindowView) Values(res []UnitResult, name string, seed bool) []float64 {
	refs := v.tw.targets
	if seed {
		refs = v.tw.seeds
	}
	for _, r := range refs {
		if r.name == name {
			return v.tw.values(res, r)
		}
	}
	return nil
}

// Residuals returns x and y (ranked first for Spearman) minus their
// least-squares fit on the covariates and an intercept: the values a
// partial correlation correlates.
func Residuals(x, y []float64, covs [][]float64, spearman bool) (rx, ry []float64) {
	return residualise(x, y, covs, spearman)
}

// Pick returns v at the positions idx.
func Pick(v []float64, idx []int) []float64 { return pick(v, idx) }

// PickCovariates returns each covariate at the positions idx.
func PickCovariates(covs [][]float64, idx []int) [][]float64 { return pickCovs(covs, idx) }

// EnvelopeView is what an envelope or comodulogram analysis planned.
type EnvelopeView struct {
	p  *Plan
	ep *envPlan
}

// Envelope returns the view of analysis i, or false when it is not an
// envelope or comodulogram analysis.
func (p *Plan) Envelope(i int) (EnvelopeView, bool) {
	ep, ok := p.finish[i].(*envPlan)
	return EnvelopeView{p, ep}, ok
}

// Analysis returns the recipe's entry.
func (v EnvelopeView) Analysis() *Analysis { return v.ep.a }

// Names returns the analysis's channel names, in the recipe's order.
func (v EnvelopeView) Names() []string { return v.ep.names }

// Comodulogram reports a comodulogram analysis.
func (v EnvelopeView) Comodulogram() bool { return v.ep.como }

// CrossFrequency reports an analysis with a target band.
func (v EnvelopeView) CrossFrequency() bool { return v.ep.fb != nil }

// SeedFreqs returns the grid frequencies (Hz) of the seed band, and
// TargetFreqs those of the target band (nil without one).
func (v EnvelopeView) SeedFreqs() []float64   { return v.gridFreqs(v.ep.fa) }
func (v EnvelopeView) TargetFreqs() []float64 { return v.gridFreqs(v.ep.fb) }

func (v EnvelopeView) gridFreqs(idx []int) []float64 {
	if idx == nil {
		return nil
	}
	out := make([]float64, len(idx))
	for i, f := range idx {
		out[i] = v.p.freqs[f]
	}
	return out
}

// Trace is a stretch of the two envelopes of one channel pair, binned as
// the analysis bins them.
type Trace struct {
	I, J   int       // channel indices into Names
	Times  []float64 // s, bin centres
	A, B   []float64 // envelope amplitudes, in the channel's unit
	Trial  bool      // the stretch is the first trial (epoched input)
	Length float64   // s covered (continuous input)
	Unit   string    // the data unit of channel I
	OrthB  bool      // B is |b ⊥ a| (pairwise orthogonalisation)
	Before bool      // B is before the symmetric orthogonalisation
}

// Trace returns the envelopes of the first pair (for a cross-frequency
// analysis the first pair of two different channels, when there is one)
// over the first seconds s after the discarded edge of a recording, or
// over the first trial. With pairwise orthogonalisation B is |b ⊥ a|, the
// envelope the analysis correlates with |a|. It returns nil when the
// analysis has no pair or the stretch holds fewer than two bins.
func (v EnvelopeView) Trace(ctx context.Context, seconds float64) (*Trace, error) {
	ep := v.ep
	if len(ep.rows) == 0 {
		return nil, nil
	}
	pr := ep.rows[0]
	if ep.fb != nil {
		for _, r := range ep.rows {
			if r.i != r.j {
				pr = r
				break
			}
		}
	}
	a := ep.a
	h := ep.src.margin
	var from, to, seg int
	var t0 float64
	tr := &Trace{I: pr.i, J: pr.j}
	if ep.epoched {
		e := ep.src.ep
		from, to = h, e.NSamples-h
		t0 = e.Start
		tr.Trial = true
		tr.Unit = e.Channels[ep.chans[pr.i]].Unit
	} else {
		rec := ep.src.rec
		from = h
		to = min(rec.Len()-h, from+int(math.Round(seconds*ep.rate)))
		t0 = rec.Start
		tr.Length = float64(to-from) / ep.rate
		tr.Unit = rec.Channels[ep.chans[pr.i]].Unit
	}
	if to-from < 2*ep.bin {
		return nil, nil
	}
	ci, cj := ep.chans[pr.i], ep.chans[pr.j]
	convs := map[int]*spectral.Convolver{}
	band := func(ch int, freqs []int) ([]complex128, error) {
		x, lo, err := ep.src.cropped(seg, ch, from, to)
		if err != nil {
			return nil, err
		}
		nfft := spectral.GoodSize(len(x) + 2*h)
		c := convs[nfft]
		if c == nil {
			c = v.p.bank.NewConvolver(nfft)
			convs[nfft] = c
		}
		c.Load(x)
		return connect.BandSignal(nil, c, freqs, from-lo, to-lo), nil
	}
	za, err := band(ci, ep.fa)
	if err != nil {
		return nil, err
	}
	fbIdx := ep.fa
	if ep.fb != nil {
		fbIdx = ep.fb
	}
	zb, err := band(cj, fbIdx)
	if err != nil {
		return nil, err
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	bAmp := func(k int) float64 { return math.Hypot(real(zb[k]), imag(zb[k])) }
	switch a.Orthogonalize {
	case OrthPairwise:
		tr.OrthB = true
		bAmp = func(k int) float64 { return connect.OrthAmp(za[k], zb[k]) }
	case OrthSymmetric:
		tr.Before = true
	}
	nb := (to - from) / ep.bin
	tr.Times = make([]float64, nb)
	tr.A, tr.B = make([]float64, nb), make([]float64, nb)
	for b := range nb {
		var sa, sb float64
		for k := b * ep.bin; k < (b+1)*ep.bin; k++ {
			sa += math.Hypot(real(za[k]), imag(za[k]))
			sb += bAmp(k)
		}
		tr.A[b], tr.B[b] = sa/float64(ep.bin), sb/float64(ep.bin)
		tr.Times[b] = roundTime(t0 + (float64(from+b*ep.bin)+float64(ep.bin-1)/2)/ep.rate)
	}
	return tr, nil
}
