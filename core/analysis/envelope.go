package analysis

import (
	"context"
	"fmt"
	"math"
	"strconv"

	"amplink/core/analysis/connect"
	"amplink/core/data"
	"amplink/core/report"
	"amplink/core/spectral"
	"amplink/core/stats"
)

// maxStoredValues bounds the envelope samples one analysis keeps for
// spearman, effective sample sizes and surrogates (8 bytes each).
const maxStoredValues = 64 << 20

// chunkLen is the number of retained samples one continuous unit covers.
const chunkLen = 1 << 16

// envSource is where an envelope analysis reads its samples: segments of
// one channel, each a trial or a chunk of the recording.
type envSource struct {
	rec    *data.Recording
	ep     *data.Epochs
	margin int // samples discarded at each data edge
}

func (s envSource) samples(seg, ch int) []float32 {
	if s.ep != nil {
		return s.ep.Trial(seg, ch)
	}
	return s.rec.Samples[ch]
}

// envPlan is an envelope or comodulogram analysis.
type envPlan struct {
	a       *Analysis
	path    string
	src     envSource
	rate    float64
	chans   []int
	names   []string
	fa, fb  []int // band grid indices (fb: the target band, or nil)
	bin     int   // samples per envelope bin
	epoched bool
	terms   []term // correlated series pairs, in output order
	rows    []pairRow
	units   []int    // plan unit ids, in time order
	spans   [][2]int // continuous: retained output span of each unit
	store   bool     // units return their binned series
	storeOr bool     // ... including orthogonalised series
	nSeries int
	como    bool
	freqs   []float64
	discard float64 // s discarded at the edges of each trial or of the recording
	kind    connect.EnvKind
	storeZ  bool     // units also return the band signals (orthogonalised surrogates)
	uspans  [][2]int // span of every unit, in unit order
	segLen  int      // samples per segment of the time course (0: none)
}

// term is one pair of series to correlate: series indices into the unit's
// stored layout (channel envelopes first, then target-band envelopes, then
// orthogonalised envelopes).
type term struct{ x, y int }

// pairRow is one output row: the mean of r over its terms.
type pairRow struct {
	seed, target string
	i, j         int // channel indices into chans
	terms        []int
}

func (p *Plan) planEnvelope(path string, a *Analysis) (finisher, error) {
	ep := &envPlan{a: a, path: path, como: a.Type == TypeComodulogram, freqs: p.freqs}
	if ep.como && a.Method == "spearman" {
		return nil, ferr(path+".method", "comodulograms use pearson (running sums over time)")
	}
	over := a.Over
	if over == "" {
		over = "recording"
		if p.ds.Recording == nil {
			over = "epochs"
		}
	}
	var chs []data.Channel
	switch {
	case over == "epochs" && p.ds.Epochs != nil:
		ep.src.ep = p.ds.Epochs
		ep.epoched = true
		chs = p.ds.Epochs.Channels
		ep.rate = p.ds.Epochs.Rate
	case over == "recording" && p.ds.Recording != nil:
		ep.src.rec = p.ds.Recording
		chs = p.ds.Recording.Channels
		ep.rate = p.ds.Recording.Rate
	case over == "epochs":
		return nil, ferr(path+".over", "%s has no epochs: add an \"epochs\" block to the recipe", p.ds.Name)
	default:
		return nil, ferr(path+".over", "%s is already epoched; use \"epochs\"", p.ds.Name)
	}
	var err error
	if ep.chans, err = resolveChannels(path+".channels", a.Channels, chs); err != nil {
		return nil, err
	}
	for _, c := range ep.chans {
		ep.names = append(ep.names, chs[c].Name)
	}
	if !ep.como && len(ep.chans) < 2 && a.TargetFreq == nil {
		return nil, ferr(path+".channels", "needs at least two channels (or a targetFreq band for one channel)")
	}
	if a.Orthogonalize == OrthSymmetric && a.Segment > 0 {
		return nil, ferr(path+".segment", "is not available with symmetric orthogonalisation, whose weights need the whole recording")
	}
	if a.Orthogonalize == OrthSymmetric && len(ep.chans) < 2 {
		return nil, ferr(path+".leakageCorrection", "symmetric orthogonalisation needs at least two channels")
	}
	switch {
	case ep.como:
		band := [2]float64{p.freqs[0], p.freqs[len(p.freqs)-1]}
		if a.Freq != nil {
			band = *a.Freq
		}
		if ep.fa, err = freqIndices(path+".freq", band, p.freqs); err != nil {
			return nil, err
		}
		band = [2]float64{p.freqs[0], p.freqs[len(p.freqs)-1]}
		if a.TargetFreq != nil {
			band = *a.TargetFreq
		}
		if ep.fb, err = freqIndices(path+".targetFreq", band, p.freqs); err != nil {
			return nil, err
		}
	default:
		if ep.fa, err = freqIndices(path+".freq", *a.Freq, p.freqs); err != nil {
			return nil, err
		}
		if a.TargetFreq != nil {
			if ep.fb, err = freqIndices(path+".targetFreq", *a.TargetFreq, p.freqs); err != nil {
				return nil, err
			}
		}
	}
	// The margin is the widest wavelet of the band(s) analysed (MaxHalf(nil)
	// would be the whole grid's).
	half := p.bank.MaxHalf(ep.fa)
	if ep.fb != nil {
		half = max(half, p.bank.MaxHalf(ep.fb))
	}
	if a.Envelope == "log-power" {
		ep.kind = connect.LogPower
	}
	ep.src.margin = half
	ep.discard = 2 * float64(half) / ep.rate
	ep.bin = 1
	if a.EnvelopeRate > 0 {
		if a.EnvelopeRate > ep.rate {
			return nil, ferr(path+".envelopeRate", "%g Hz is above the sample rate %g Hz", a.EnvelopeRate, ep.rate)
		}
		ep.bin = max(1, int(math.Round(ep.rate/a.EnvelopeRate)))
	}
	ep.layout()
	// Units: one per trial, or one per chunk of the recording.
	var total int // retained samples per series
	if ep.epoched {
		e := ep.src.ep
		keep := e.NSamples - 2*half
		if keep/ep.bin < 3 {
			return nil, ferr(path, "the epochs (%g s) are too short for the %s Hz wavelet: %.3g s is discarded at each edge", float64(e.NSamples)/e.Rate, fmtHz(p.freqs[ep.fa[0]]), float64(half)/e.Rate)
		}
		total = e.NTrials * (keep / ep.bin)
		if a.Orthogonalize == OrthSymmetric && keep < len(ep.chans) {
			return nil, ferr(path+".leakageCorrection", "symmetric orthogonalisation needs more samples per trial (%d) than channels (%d)", keep, len(ep.chans))
		}
		for t := range e.NTrials {
			ep.units = append(ep.units, p.envUnit(ep, t, [2]int{half, e.NSamples - half}))
		}
	} else {
		n := ep.src.rec.Len()
		lo, hi := half, n-half
		if (hi-lo)/ep.bin < 3 {
			return nil, ferr(path, "%s (%g s) is too short for the %s Hz wavelet", p.ds.Name, float64(n)/ep.rate, fmtHz(p.freqs[ep.fa[0]]))
		}
		if a.Orthogonalize == OrthSymmetric && hi-lo < len(ep.chans) {
			return nil, ferr(path+".leakageCorrection", "symmetric orthogonalisation needs more samples (%d) than channels (%d)", hi-lo, len(ep.chans))
		}
		step := chunkLen / ep.bin * ep.bin
		if a.Segment > 0 {
			step = int(math.Round(a.Segment*ep.rate)) / ep.bin * ep.bin
			ep.segLen = step
			if step < 3*ep.bin {
				return nil, ferr(path+".segment", "%g s is too short", a.Segment)
			}
			if step > hi-lo {
				return nil, ferr(path+".segment", "%g s is longer than the %g s that remain after the edges", a.Segment, float64(hi-lo)/ep.rate)
			}
		}
		if a.Orthogonalize == OrthSymmetric {
			step = hi - lo // one unit: the weights need the whole recording
		}
		for s := lo; s+ep.bin <= hi; s += step {
			e := min(s+step, hi) // a last, partial segment counts for the recording, not for the time course
			ep.spans = append(ep.spans, [2]int{s, e})
			ep.units = append(ep.units, p.envUnit(ep, len(ep.spans)-1, [2]int{s, e}))
			total += (e - s) / ep.bin
		}
	}
	spearman := a.Method == "spearman"
	ep.store = spearman || a.Surrogates > 0 || !ep.epoched || a.Trials == "concatenate"
	ep.storeOr = a.Orthogonalize == OrthPairwise && (spearman || a.Surrogates > 0)
	ep.storeZ = a.Orthogonalize != OrthNone && a.Surrogates > 0
	if ep.como {
		ep.store, ep.storeZ = false, false
	}
	if ep.store {
		v := ep.storedSeries() * total
		if ep.storeZ {
			v += 2 * len(ep.chans) * total * ep.bin // the band signals at the full rate
		}
		if ep.storeZ && 2*len(ep.chans)*total*ep.bin > maxStoredValues/2 {
			return nil, ferr(path+".surrogates", "orthogonalised surrogates keep the band signals of %d channels at the full rate, %d MB; analyse fewer channels at a time, or use no surrogates", len(ep.chans), 16*len(ep.chans)*total*ep.bin>>20)
		}
		if v > maxStoredValues {
			return nil, ferr(path+".envelopeRate", "keeping %d envelope series of %d samples needs %d MB; set envelopeRate (for example 20 Hz) to bin the envelopes", ep.storedSeries(), total, v*8>>20)
		}
	}
	return ep, nil
}

// layout fixes the series and the terms.
func (ep *envPlan) layout() {
	n := len(ep.chans)
	a := ep.a
	if ep.como {
		// Series: each seed frequency on channel 0, each target frequency on the last channel.
		ep.nSeries = len(ep.fa) + len(ep.fb)
		for i := range ep.fa {
			for j := range ep.fb {
				ep.terms = append(ep.terms, term{i, len(ep.fa) + j})
			}
		}
		return
	}
	ep.nSeries = n
	if ep.fb != nil {
		ep.nSeries = 2 * n
		for i := range n {
			for j := range n {
				ep.terms = append(ep.terms, term{i, n + j})
				ep.rows = append(ep.rows, pairRow{seed: ep.names[i], target: ep.names[j], i: i, j: j, terms: []int{len(ep.terms) - 1}})
			}
		}
		return
	}
	for i := range n {
		for j := i + 1; j < n; j++ {
			row := pairRow{seed: ep.names[i], target: ep.names[j], i: i, j: j}
			if a.Orthogonalize == OrthPairwise {
				// |X| with |Y⊥X|, and |Y| with |X⊥Y|.
				ep.terms = append(ep.terms, term{i, ep.orthSeries(i, j)}, term{j, ep.orthSeries(j, i)})
				row.terms = []int{len(ep.terms) - 2, len(ep.terms) - 1}
			} else {
				ep.terms = append(ep.terms, term{i, j})
				row.terms = []int{len(ep.terms) - 1}
			}
			ep.rows = append(ep.rows, row)
		}
	}
}

// orthSeries is the series index of |z_j ⊥ z_i| (j orthogonalised to i).
func (ep *envPlan) orthSeries(i, j int) int {
	n := len(ep.chans)
	k := i*(n-1) + j
	if j > i {
		k--
	}
	return n + k
}

// storedSeries is how many series a unit returns when storing.
func (ep *envPlan) storedSeries() int {
	n := len(ep.chans)
	s := n
	if ep.fb != nil {
		s = 2 * n
	}
	if ep.storeOr {
		s += n * (n - 1)
	}
	return s
}

func (p *Plan) envUnit(ep *envPlan, seg int, span [2]int) int {
	id := len(p.units)
	ep.uspans = append(ep.uspans, span)
	cost := float64(len(ep.chans)*(span[1]-span[0])) * float64(len(ep.fa)+len(ep.fb)+len(ep.terms))
	p.units = append(p.units, unit{
		Unit: Unit{ID: id, Kind: ep.a.Type, Channels: ep.names, Cost: cost},
		compute: func(ctx context.Context, p *Plan) ([]float64, error) {
			return ep.compute(ctx, p, seg, span)
		},
	})
	return id
}

// compute does one unit: band signals of every channel over the span,
// binned envelopes, and the co-moments of every term.
func (ep *envPlan) compute(ctx context.Context, p *Plan, seg int, span [2]int) ([]float64, error) {
	a := ep.a
	n := len(ep.chans)
	var za, zb [][]complex128
	convs := map[int]*spectral.Convolver{}
	band := func(ch int, freqs []int) []complex128 {
		x := ep.src.samples(seg, ch)
		lo, hi := spectral.Crop(len(x), span[0], span[1], ep.src.margin)
		nfft := spectral.GoodSize(hi - lo + 2*ep.src.margin)
		c := convs[nfft]
		if c == nil {
			c = p.bank.NewConvolver(nfft)
			convs[nfft] = c
		}
		c.Load(x[lo:hi])
		return connect.BandSignal(nil, c, freqs, span[0]-lo, span[1]-lo)
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
	// Binned envelopes (connect.Envelope, connect.OrthEnvelope).
	series := make([][]float64, ep.nSeries+len(ep.chans)*(len(ep.chans)-1))
	for i, z := range za {
		series[i] = connect.Envelope(nil, z, ep.bin, nil, ep.kind)
	}
	for i, z := range zb {
		series[n+i] = connect.Envelope(nil, z, ep.bin, nil, ep.kind)
	}
	if a.Orthogonalize == OrthPairwise {
		// |Y⊥X| = |Im(y·ū)| with the unit phasors u = x/|x|, so each
		// channel's phasors are computed once.
		var u []complex128
		for i := range n {
			u = connect.UnitPhasors(u, za[i])
			for j := range n {
				if i != j {
					series[ep.orthSeries(i, j)] = connect.OrthEnvelope(nil, u, za[j], ep.bin, nil, ep.kind)
				}
			}
		}
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

func (ep *envPlan) finish(ctx context.Context, p *Plan, res []UnitResult, out *report.Results) error {
	a := ep.a
	nu := len(ep.units)
	mos := make([][]connect.Moments, nu)
	var stored [][]float64   // per series, concatenated over units
	var unitLen []int        // stored samples per unit
	var bands [][]complex128 // band signals per channel, concatenated over units
	var rawLen []int         // band-signal samples per unit
	if ep.store {
		stored = make([][]float64, ep.storedSeries())
	}
	if ep.storeZ {
		bands = make([][]complex128, len(ep.chans))
	}
	for u, id := range ep.units {
		mo, series, raw := ep.unitParts(u, res[id].Values)
		mos[u] = mo
		if ep.storeZ {
			rawLen = append(rawLen, len(raw[0]))
			for c := range raw {
				bands[c] = append(bands[c], raw[c]...)
			}
		}
		if ep.store {
			unitLen = append(unitLen, len(series[0]))
			for s := range series {
				stored[s] = append(stored[s], series[s]...)
			}
		}
	}
	if ep.como {
		return ep.finishComodulogram(mos, out)
	}
	spearman := a.Method == "spearman"
	rng := stats.NewRand(a.RandomSeed)
	var rows []report.Row
	var ps []float64
	n := len(ep.chans)
	rmat := make([][]float64, n)
	for i := range rmat {
		rmat[i] = make([]float64, n)
		for j := range rmat[i] {
			rmat[i][j] = math.NaN()
		}
		if ep.fb == nil {
			rmat[i][i] = 1
		}
	}
	for _, pr := range ep.rows {
		if err := ctx.Err(); err != nil {
			return err
		}
		row := report.Row{Analysis: a.ID, Type: a.Type, Method: a.Method, Seed: pr.seed, Target: pr.target, R: math.NaN(), P: math.NaN()}
		note := ""
		neff, psurr := math.NaN(), math.NaN()
		pmethod := ""
		var r float64
		switch {
		case ep.epoched && a.Trials != "concatenate":
			// Per trial, then the mean of Fisher z across trials.
			var zs []float64
			for u := range nu {
				if rt := meanR(ep.termRs(pr, func(t int) float64 { return mos[u][t].R() })); !math.IsNaN(rt) {
					zs = append(zs, math.Atanh(math.Max(-1+1e-15, math.Min(1-1e-15, rt))))
				}
			}
			row.N = len(zs)
			r = math.NaN()
			if len(zs) >= 3 {
				r = math.Tanh(mean(zs))
				_, _, row.P = stats.OneSampleT(zs)
				pmethod = "trials-t"
			}
			if len(zs) < nu {
				note = joinNote(note, fmt.Sprintf("%d of %d trials had an undefined r and were left out", nu-len(zs), nu))
			}
			if a.Surrogates > 0 && !math.IsNaN(r) {
				psurr = ep.trialShuffle(pr, stored, unitLen, r, rng, spearman, bands, rawLen)
			}
		default:
			if spearman {
				r = meanR(ep.termRs(pr, func(t int) float64 { return stats.Spearman(stored[ep.terms[t].x], stored[ep.terms[t].y]) }))
			} else {
				r = meanR(ep.termRs(pr, func(t int) float64 {
					var m connect.Moments
					for u := range nu {
						m.Merge(mos[u][t])
					}
					return m.R()
				}))
			}
			row.N = len(stored[0])
			if !math.IsNaN(r) {
				x, y := stored[ep.terms[pr.terms[0]].x], stored[pr.j+ep.targetOffset()]
				neff = stats.EffectiveN(x, y)
				if neff > 3 {
					row.P = stats.PValueT(r, neff-2)
				}
				pmethod = "effective-n"
				if a.Surrogates > 0 {
					if ep.epoched {
						psurr = ep.trialShuffle(pr, stored, unitLen, r, rng, spearman, bands, rawLen)
					} else {
						psurr = ep.timeShift(pr, stored, r, rng, spearman, bands, rawLen)
					}
				}
			}
		}
		if math.IsNaN(r) {
			note = joinNote(note, "undefined: an envelope has zero variance (a flat channel, or one orthogonalised away entirely)")
		} else {
			row.R = r
			rmat[pr.i][pr.j] = r
			if ep.fb == nil {
				rmat[pr.j][pr.i] = r
			}
		}
		switch a.Orthogonalize {
		case OrthPairwise:
			note = joinNote(note, "pairwise orthogonalised (Hipp et al. 2012): the part of each signal at zero phase lag to the other is removed, so genuine zero-lag coupling is removed as well as leakage")
		case OrthSymmetric:
			note = joinNote(note, "closest orthogonal set (Colclough et al. 2015): every zero-lag correlation among the listed channels' band signals is removed, genuine zero-lag coupling as well as leakage")
		}
		row.Extra = []report.Field{
			{Name: "band_low_hz", Value: report.Num(p.freqs[ep.fa[0]])},
			{Name: "band_high_hz", Value: report.Num(p.freqs[ep.fa[len(ep.fa)-1]])},
			{Name: "target_band_low_hz", Value: ep.fbNum(p, 0)},
			{Name: "target_band_high_hz", Value: ep.fbNum(p, len(ep.fb)-1)},
			{Name: "leakage_correction", Value: orthName(a.Orthogonalize)},
			{Name: "envelope", Value: envName(a.Envelope)},
			{Name: "over", Value: ep.overName()},
			{Name: "envelope_rate", Value: report.Num(ep.rate / float64(ep.bin))},
			{Name: "edge_discard_s", Value: report.Num(ep.discard)},
			{Name: "n_eff", Value: report.Num(neff)},
			{Name: "p_method", Value: pmethod},
			{Name: "p_surr", Value: report.Num(psurr)},
			{Name: "p_surr_se", Value: report.Num(stats.PermSE(psurr, a.Surrogates))},
			{Name: "surrogates", Value: strconv.Itoa(a.Surrogates)},
			{Name: "q", Value: ""},
			{Name: "correction", Value: a.Correction},
			{Name: "note", Value: note},
		}
		ps = append(ps, firstFinite(psurr, row.P))
		rows = append(rows, row)
	}
	applyCorrection(a, rows, ps)
	out.Rows = append(out.Rows, rows...)
	out.Maps = append(out.Maps, report.Map{Name: a.ID + "_r", RowName: "channel", ColName: "channel", RowLabels: ep.names, ColLabels: ep.names, Values: rmat})
	if !ep.epoched && a.Segment > 0 {
		out.Maps = append(out.Maps, ep.timeCourse(mos))
	}
	return nil
}

func firstFinite(v ...float64) float64 {
	for _, x := range v {
		if !math.IsNaN(x) {
			return x
		}
	}
	return math.NaN()
}

func (ep *envPlan) fbNum(p *Plan, i int) string {
	if ep.fb == nil {
		return ""
	}
	return report.Num(p.freqs[ep.fb[i]])
}

func (ep *envPlan) overName() string {
	if !ep.epoched {
		return "recording"
	}
	if ep.a.Trials == "concatenate" {
		return "epochs-concatenated"
	}
	return "epochs-averaged"
}

// envName is the envelope column: "amplitude" or "log-power".
func envName(e string) string {
	if e == "" {
		return "amplitude"
	}
	return e
}

func orthName(o Orth) string {
	if o == OrthNone {
		return "none"
	}
	return string(o)
}

// targetOffset is the index of the first target series.
func (ep *envPlan) targetOffset() int {
	if ep.fb != nil {
		return len(ep.chans)
	}
	return 0
}

func (ep *envPlan) termRs(pr pairRow, r func(t int) float64) []float64 {
	out := make([]float64, len(pr.terms))
	for i, t := range pr.terms {
		out[i] = r(t)
	}
	return out
}

// meanR averages the r of a row's terms (the two directions of pairwise
// orthogonalisation); NaN if any is undefined.
func meanR(rs []float64) float64 {
	s := 0.0
	for _, r := range rs {
		if math.IsNaN(r) {
			return math.NaN()
		}
		s += r
	}
	return s / float64(len(rs))
}

func mean(x []float64) float64 {
	s := 0.0
	for _, v := range x {
		s += v
	}
	return s / float64(len(x))
}

func corr(x, y []float64, spearman bool) float64 {
	if spearman {
		return stats.Spearman(x, y)
	}
	return stats.Pearson(x, y)
}

// timeShift returns the surrogate p of r: the second series of each term is
// shifted circularly by a random lag of at least a tenth of the record (and
// never less than five times the lag at which either envelope's
// autocorrelation falls below 1/e), breaking their alignment but not their
// own temporal structure. p = (b + 1)/(S + 1).
func (ep *envPlan) timeShift(pr pairRow, stored [][]float64, r float64, rng interface{ IntN(int) int }, spearman bool, zs [][]complex128, rawLen []int) float64 {
	if ep.storeZ {
		return ep.orthSurrogate(pr, stored, nil, r, rng, spearman, zs, rawLen)
	}
	n := len(stored[0])
	minLag := n / 10
	for _, t := range pr.terms {
		minLag = max(minLag, 5*decorrLag(stored[ep.terms[t].x]), 5*decorrLag(stored[ep.terms[t].y]))
	}
	if 2*minLag >= n {
		return math.NaN()
	}
	sc := make([]stats.ShiftCorr, len(pr.terms))
	for i, t := range pr.terms {
		sc[i] = stats.NewShiftCorr(stored[ep.terms[t].x], stored[ep.terms[t].y], spearman)
	}
	rs := make([]float64, len(pr.terms))
	b := 0
	for range ep.a.Surrogates {
		lag := minLag + rng.IntN(n-2*minLag+1)
		for i := range sc {
			rs[i] = sc[i].At(lag)
		}
		if rsur := meanR(rs); !math.IsNaN(rsur) && math.Abs(rsur) >= math.Abs(r)-1e-12 {
			b++
		}
	}
	return stats.PermP(b, ep.a.Surrogates)
}

// decorrLag returns the first lag at which the autocorrelation of x falls
// below 1/e (capped at len(x)/4).
func decorrLag(x []float64) int {
	n := len(x)
	m := mean(x)
	v := 0.0
	for _, a := range x {
		v += (a - m) * (a - m)
	}
	if v == 0 {
		return 1
	}
	for k := 1; k < n/4; k++ {
		c := 0.0
		for i := k; i < n; i++ {
			c += (x[i] - m) * (x[i-k] - m)
		}
		if c/v < 1/math.E {
			return k
		}
	}
	return n / 4
}

// trialShuffle returns the surrogate p for epoched input: the trials of the
// second series are paired with randomly permuted trials of the first.
func (ep *envPlan) trialShuffle(pr pairRow, stored [][]float64, unitLen []int, r float64, rng interface{ IntN(int) int }, spearman bool, zs [][]complex128, rawLen []int) float64 {
	if ep.storeZ {
		return ep.orthSurrogate(pr, stored, unitLen, r, rng, spearman, zs, rawLen)
	}
	nt := len(unitLen)
	off := make([]int, nt+1)
	for t, l := range unitLen {
		off[t+1] = off[t] + l
	}
	perm := make([]int, nt)
	for i := range perm {
		perm[i] = i
	}
	concat := ep.a.Trials == "concatenate"
	b := 0
	var buf []float64
	for range ep.a.Surrogates {
		for i := nt - 1; i > 0; i-- {
			j := rng.IntN(i + 1)
			perm[i], perm[j] = perm[j], perm[i]
		}
		rs := make([]float64, len(pr.terms))
		for ti, t := range pr.terms {
			x, y := stored[ep.terms[t].x], stored[ep.terms[t].y]
			if concat {
				buf = buf[:0]
				for k := range nt {
					buf = append(buf, y[off[perm[k]]:off[perm[k]+1]]...)
				}
				rs[ti] = corr(x, buf, spearman)
				continue
			}
			var zs []float64
			for k := range nt {
				if rk := corr(x[off[k]:off[k+1]], y[off[perm[k]]:off[perm[k]+1]], spearman); !math.IsNaN(rk) {
					zs = append(zs, math.Atanh(math.Max(-1+1e-15, math.Min(1-1e-15, rk))))
				}
			}
			rs[ti] = math.NaN()
			if len(zs) > 0 {
				rs[ti] = math.Tanh(mean(zs))
			}
		}
		if rsur := meanR(rs); !math.IsNaN(rsur) && math.Abs(rsur) >= math.Abs(r)-1e-12 {
			b++
		}
	}
	return stats.PermP(b, ep.a.Surrogates)
}

// orthSurrogate is the surrogate p of an orthogonalised row: channel j's
// band signal is shifted circularly (recordings, a lag in whole envelope
// bins drawn as in timeShift, from the envelopes of i and j) or its trials
// are permuted (epochs, unitLen non-nil), and only then orthogonalised
// against the unshifted channel i, both ways, or re-orthogonalised with
// the whole set (connect.PairTerms), and the terms correlated as the
// observed r was.
func (ep *envPlan) orthSurrogate(pr pairRow, stored [][]float64, unitLen []int, r float64, rng interface{ IntN(int) int }, spearman bool, zs [][]complex128, rawLen []int) float64 {
	corr := connect.PairwiseOrth
	if ep.a.Orthogonalize == OrthSymmetric {
		corr = connect.SymmetricOrth
	}
	nb := len(stored[0])
	minLag := 0
	if unitLen == nil {
		minLag = max(nb/10, 5*decorrLag(stored[pr.i]), 5*decorrLag(stored[pr.j]))
		if 2*minLag >= nb {
			return math.NaN()
		}
	}
	perm := make([]int, len(rawLen))
	for i := range perm {
		perm[i] = i
	}
	pt := connect.NewPairTermer(zs, pr.i, pr.j, corr, ep.bin, rawLen, ep.kind)
	b := 0
	for range ep.a.Surrogates {
		var terms [][2][]float64
		var err error
		if unitLen != nil {
			for i := len(perm) - 1; i > 0; i-- {
				k := rng.IntN(i + 1)
				perm[i], perm[k] = perm[k], perm[i]
			}
			terms, err = pt.Permuted(perm, rawLen[0])
		} else {
			lag := minLag + rng.IntN(nb-2*minLag+1)
			terms, err = pt.Shifted(lag * ep.bin % len(zs[pr.j]))
		}
		if err != nil {
			return math.NaN()
		}
		rsur := ep.surrR(terms, unitLen, spearman)
		if !math.IsNaN(rsur) && math.Abs(rsur) >= math.Abs(r)-1e-12 {
			b++
		}
	}
	return stats.PermP(b, ep.a.Surrogates)
}

// surrR is a surrogate's r from its terms, made as the observed r is: the
// mean of the terms' r over all samples, or on averaged epochs that mean
// per trial, then the mean of Fisher z across trials.
func (ep *envPlan) surrR(terms [][2][]float64, unitLen []int, spearman bool) float64 {
	rs := make([]float64, len(terms))
	if unitLen == nil || ep.a.Trials == "concatenate" {
		for t, tm := range terms {
			rs[t] = corr(tm[0], tm[1], spearman)
		}
		return meanR(rs)
	}
	var zs []float64
	off := 0
	for _, l := range unitLen {
		for t, tm := range terms {
			rs[t] = corr(tm[0][off:off+l], tm[1][off:off+l], spearman)
		}
		if rk := meanR(rs); !math.IsNaN(rk) {
			zs = append(zs, math.Atanh(math.Max(-1+1e-15, math.Min(1-1e-15, rk))))
		}
		off += l
	}
	if len(zs) == 0 {
		return math.NaN()
	}
	return math.Tanh(mean(zs))
}

// timeCourse is r per segment for every row. A last, partial segment
// counts for the recording's r but is left out here, where it would not be
// comparable with the full ones.
func (ep *envPlan) timeCourse(mos [][]connect.Moments) report.Map {
	m := report.Map{Name: ep.a.ID + "_timecourse", RowName: "pair", ColName: "segment_start_s"}
	full := 0
	for _, sp := range ep.spans {
		if sp[1]-sp[0] == ep.segLen {
			m.ColLabels = append(m.ColLabels, report.Num(roundTime(float64(sp[0])/ep.rate)))
			full++
		}
	}
	for _, pr := range ep.rows {
		m.RowLabels = append(m.RowLabels, pr.seed+"-"+pr.target)
		vals := make([]float64, 0, full)
		for u, sp := range ep.spans {
			if sp[1]-sp[0] == ep.segLen {
				vals = append(vals, meanR(ep.termRs(pr, func(t int) float64 { return mos[u][t].R() })))
			}
		}
		m.Values = append(m.Values, vals)
	}
	return m
}

func (ep *envPlan) finishComodulogram(mos [][]connect.Moments, out *report.Results) error {
	a := ep.a
	p := ep
	nf1, nf2 := len(p.fa), len(p.fb)
	vals := make([][]float64, nf1)
	best, bi, bj := math.NaN(), -1, -1
	total := 0.0
	for i := range nf1 {
		vals[i] = make([]float64, nf2)
		for j := range nf2 {
			var m connect.Moments
			for u := range mos {
				m.Merge(mos[u][i*nf2+j])
			}
			r := m.R()
			total = m.N
			vals[i][j] = r
			if !math.IsNaN(r) && (math.IsNaN(best) || math.Abs(r) > math.Abs(best)) {
				best, bi, bj = r, i, j
			}
		}
	}
	return ep.comoRows(vals, best, bi, bj, int(total), out, a)
}

func (ep *envPlan) comoRows(vals [][]float64, best float64, bi, bj, n int, out *report.Results, a *Analysis) error {
	var rl, cl []string
	for _, f := range ep.fa {
		rl = append(rl, report.Num(ep.freqs[f]))
	}
	for _, f := range ep.fb {
		cl = append(cl, report.Num(ep.freqs[f]))
	}
	out.Maps = append(out.Maps, report.Map{Name: a.ID + "_comodulogram", RowName: "seed_freq_hz", ColName: "target_freq_hz", RowLabels: rl, ColLabels: cl, Values: vals})
	row := report.Row{Analysis: a.ID, Type: a.Type, Method: a.Method, Seed: ep.names[0], Target: ep.names[len(ep.names)-1], N: n, R: best, P: math.NaN()}
	peak := func(idx []int, i int) string {
		if i < 0 {
			return ""
		}
		return report.Num(ep.freqs[idx[i]])
	}
	row.Extra = []report.Field{
		{Name: "band_low_hz", Value: peak(ep.fa, bi)}, {Name: "band_high_hz", Value: peak(ep.fa, bi)},
		{Name: "target_band_low_hz", Value: peak(ep.fb, bj)}, {Name: "target_band_high_hz", Value: peak(ep.fb, bj)},
		{Name: "over", Value: ep.overName()},
		{Name: "envelope", Value: envName(a.Envelope)},
		{Name: "envelope_rate", Value: report.Num(ep.rate / float64(ep.bin))},
		{Name: "edge_discard_s", Value: report.Num(ep.discard)},
		{Name: "note", Value: fmt.Sprintf("peak |r| of the %d×%d map in maps/%s_comodulogram.csv; p is not given for a peak picked from a map; neighbouring wavelets overlap in frequency, which inflates r near the diagonal", len(ep.fa), len(ep.fb), a.ID)},
	}
	if bi < 0 {
		row.Extra[len(row.Extra)-1].Value = "undefined: every envelope pair has zero variance"
	}
	out.Rows = append(out.Rows, row)
	return nil
}
