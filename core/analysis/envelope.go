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

// cropped returns the samples of one channel of segment seg that output
// samples [from, to) need, [lo, hi) with the margins (spectral.Crop), and
// lo: a view of the held samples, or read from a streamed recording.
func (s envSource) cropped(seg, ch, from, to int) ([]float32, int, error) {
	if !s.streamed() {
		x := s.samples(seg, ch)
		lo, hi := spectral.Crop(len(x), from, to, s.margin)
		return x[lo:hi], lo, nil
	}
	lo, hi := spectral.Crop(s.rec.Len(), from, to, s.margin)
	b, err := s.block([]int{ch}, lo, hi)
	if err != nil {
		return nil, 0, err
	}
	return b[0], lo, nil
}

// streamed reports whether the recording's samples are read a chunk at a
// time (data.Recording.Source) rather than held.
func (s envSource) streamed() bool { return s.ep == nil && s.rec.Streamed() }

// block reads samples [lo, hi) of the listed channels of a streamed
// recording: what one continuous unit holds.
func (s envSource) block(chans []int, lo, hi int) ([][]float32, error) {
	buf := make([]float32, len(chans)*(hi-lo))
	dst := make([][]float32, len(chans))
	for i := range dst {
		dst[i] = buf[i*(hi-lo) : (i+1)*(hi-lo) : (i+1)*(hi-lo)]
	}
	if err := s.rec.Block(dst, chans, lo); err != nil {
		return nil, err
	}
	return dst, nil
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
	later   []int    // the rows' surrogate units (Plan.later indices), surrBlock surrogates each, row by row
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
	if ep.src.streamed() {
		if err := ep.checkHeld(total); err != nil {
			return nil, err
		}
	}
	p.surrogateUnits(ep)
	return ep, nil
}

// checkHeld applies the sample budget (data.CheckSamples) to what a
// streamed analysis holds: the samples of its longest unit with their
// margins, and the stored series and band signals that the rows and
// surrogates need, counted in float32 samples (a float64 is two). The
// recording itself is not held, so its length counts only through these.
func (ep *envPlan) checkHeld(total int) error {
	block := 0
	for _, sp := range ep.uspans {
		lo, hi := spectral.Crop(ep.src.rec.Len(), sp[0], sp[1], ep.src.margin)
		block = max(block, hi-lo)
	}
	held := int64(len(ep.unitChannels())) * int64(block)
	if ep.store {
		held += 2 * int64(ep.storedSeries()) * int64(total)
	}
	if ep.storeZ {
		held += 4 * int64(len(ep.chans)) * int64(total) * int64(ep.bin)
	}
	if err := data.CheckSamples(held); err != nil {
		return fmt.Errorf("%s: %s is read a chunk at a time, but a chunk of %d channels × %d samples and the series kept for the rows: %w", ep.path, ep.src.rec.Name, len(ep.unitChannels()), block, err)
	}
	return nil
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

// gather collects the units' moments, and concatenates their stored
// series and band signals over units.
func (ep *envPlan) gather(res []UnitResult) *envData {
	d := &envData{mos: make([][]connect.Moments, len(ep.units))}
	if ep.store {
		d.stored = make([][]float64, ep.storedSeries())
	}
	if ep.storeZ {
		d.bands = make([][]complex128, len(ep.chans))
	}
	for u, id := range ep.units {
		mo, series, raw := ep.unitParts(u, res[id].Values)
		d.mos[u] = mo
		if ep.storeZ {
			d.rawLen = append(d.rawLen, len(raw[0]))
			for c := range raw {
				d.bands[c] = append(d.bands[c], raw[c]...)
			}
		}
		if ep.store {
			d.unitLen = append(d.unitLen, len(series[0]))
			for s := range series {
				d.stored[s] = append(d.stored[s], series[s]...)
			}
		}
	}
	return d
}

// finish reads res by unit ID, the later (surrogate) units' results from
// len(p.units) on.
func (ep *envPlan) finish(ctx context.Context, p *Plan, res []UnitResult, out *report.Results) error {
	a := ep.a
	nu := len(ep.units)
	d := ep.gather(res)
	mos, stored := d.mos, d.stored
	if ep.como {
		return ep.finishComodulogram(mos, out)
	}
	spearman := a.Method == "spearman"
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
	for ri, pr := range ep.rows {
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
				psurr = ep.surrogateP(res, ri, len(p.units), r)
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
					psurr = ep.surrogateP(res, ri, len(p.units), r)
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
