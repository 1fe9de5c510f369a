package recipe

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"sync"

	"amplink/core/connect"
	"amplink/core/data"
	"amplink/core/plot"
	"amplink/core/report"
	"amplink/core/spectral"
)

// Figures. Every analysis draws what shows its result (names are safe file
// names; the CLI writes figures/<Name>.svg):
//
//   - trial-window and tf-map: <id>_tfpower_<channel>, the trial-averaged
//     power P(f, t) = (1/N) Σ_trials |x∗w_f|²(t) of each channel the analysis
//     reads (µV² for µV data), over the whole epoch and every grid frequency,
//     with the analysis's seed window drawn on its seed channels and its
//     target window on its target channels (each only where it applies);
//     a sanity view, with no normalisation of single trials;
//   - trial-window: <id>_scatter_<seed>_<target> for every row, or for the
//     figScatterMax rows with the largest |r| when there are more (one per
//     condition, suffixed _<condition>, when conditions are compared), the
//     trial values behind r: ranks for Spearman, and the residuals after the
//     covariates for a partial correlation;
//   - tf-map: <id>_tfcorr_<channel>, the r map with the clusters of cluster
//     p ≤ 0.05 outlined;
//   - envelope: <id>_matrix, the r matrix (with ≥ 3 channels, or any
//     cross-frequency analysis: seed band on the rows, target band on the
//     columns) and <id>_envelopes_<a>_<b>, the envelopes of the first pair
//     over a short stretch;
//   - comodulogram: <id>_comodulogram.
//
// The power maps are units of kind "tf-power" (one per channel, shared by
// the analyses). A map costs one inverse FFT of the whole epoch per trial
// and grid frequency; on the demo one channel's map costs about half of all
// three trial-window analyses together, so maps are drawn for few
// channels: every seed channel and every target channel of an analysis
// whose side (seed or target) has at most figPowerTargets channels, and,
// for a side with more (such as "*"), the channels of that side with the
// figPowerTargets strongest rows (largest |r|, first in table order on
// ties). Those last maps can only be chosen once the rows exist, so they
// are computed when the figures are drawn (in parallel, on GOMAXPROCS
// goroutines) rather than as units.

// kindFigPower is the unit kind of a trial-averaged power map for figures.
const kindFigPower = "tf-power"

// figPowerCols bounds the columns of a power map: the time step is
// ⌈samples/figPowerCols⌉ samples.
const figPowerCols = 250

// figPowerTargets is how many channels of one side (seed or target) of an
// analysis get a power map when the side has more.
const figPowerTargets = 3

// figStretch is the length in seconds of the envelope time-course figure
// for continuous input (epoched input shows the first trial).
const figStretch = 20.0

// figClusterP is the cluster p at or below which a cluster is outlined.
const figClusterP = 0.05

// figPowerStep is the time decimation of a power map of n samples.
func figPowerStep(n int) int { return max(1, (n+figPowerCols-1)/figPowerCols) }

// planFigures adds the power-map units that the figures need.
func (p *Plan) planFigures() error {
	e := p.ds.Epochs
	if e == nil {
		return nil
	}
	for i := range p.r.Analyses {
		for _, ch := range p.figPlannedChannels(&p.r.Analyses[i], e) {
			p.figPowerUnit(e, ch)
		}
	}
	return nil
}

// figSides resolves the seed and target channels of a trial-window or
// tf-map analysis (nil for other types; NewPlan has already checked them).
func figSides(a *Analysis, e *data.Epochs) (seeds, targets []int) {
	if a.Type != TypeTrialWindow && a.Type != TypeTFMap {
		return nil, nil
	}
	seeds, _ = resolveChannels("", a.Seed.Channel, e.Channels)
	targets, _ = resolveChannels("", a.Target.Channel, e.Channels)
	return seeds, targets
}

// figPlannedChannels lists the channels whose power map is computed as a
// unit for a: the seeds, and the targets when there are few.
func (p *Plan) figPlannedChannels(a *Analysis, e *data.Epochs) []int {
	seeds, targets := figSides(a, e)
	var out []int
	for _, side := range [][]int{seeds, targets} {
		if len(side) <= figPowerTargets {
			out = append(out, side...)
		}
	}
	return out
}

// figPowerUnit returns the unit computing the power map of channel ch,
// creating it when needed.
func (p *Plan) figPowerUnit(e *data.Epochs, ch int) int {
	if ui := p.figFindPower(ch); ui >= 0 {
		return ui
	}
	all := p.figAllFreqs()
	n := e.NSamples
	p.units = append(p.units, unit{
		Unit: Unit{ID: len(p.units), Kind: kindFigPower, Channels: []string{e.Channels[ch].Name},
			Cost: float64(e.NTrials * (n + p.bank.MaxHalf(all)) * (1 + len(all)))},
		ch: ch,
		compute: func(ctx context.Context, p *Plan) ([]float64, error) {
			m, err := figPowerMap(ctx, p.bank, e, ch, all)
			if err != nil {
				return nil, err
			}
			var out []float64
			for _, row := range m {
				out = append(out, row...)
			}
			return out, nil
		},
	})
	return len(p.units) - 1
}

func (p *Plan) figFindPower(ch int) int {
	for ui := range p.units {
		if p.units[ui].Kind == kindFigPower && p.units[ui].ch == ch {
			return ui
		}
	}
	return -1
}

func (p *Plan) figAllFreqs() []int {
	all := make([]int, len(p.freqs))
	for i := range all {
		all[i] = i
	}
	return all
}

// figPowerMap returns the trial-averaged power of channel ch of e,
//
//	P[r][c] = (1/N) Σ_t |x_t∗w_freqs[r]|²[c·step],  step = figPowerStep(samples),
//
// over the whole epoch, in the square of the channel's unit. Each trial is
// transformed once (a Tight convolver of spectral.TightFFTLenStep, so the decimated read folds the spectrum) and every
// frequency reads that spectrum.
func figPowerMap(ctx context.Context, bank *spectral.Bank, e *data.Epochs, ch int, freqs []int) ([][]float64, error) {
	n := e.NSamples
	step := figPowerStep(n)
	conv := bank.NewConvolver(spectral.TightFFTLenStep(n, 0, n, bank.MaxHalf(freqs), step))
	conv.Tight = true
	var pow [][]float64
	for t := range e.NTrials {
		if t%16 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
		}
		conv.Load(e.Trial(t, ch))
		pow = spectral.TFPower(pow, conv, freqs, 0, n, step)
	}
	inv := 1 / float64(max(e.NTrials, 1))
	for _, row := range pow {
		for j := range row {
			row[j] *= inv
		}
	}
	return pow, nil
}

// figDraw collects the figures of one run.
type figDraw struct {
	p     *Plan
	ctx   context.Context
	res   []UnitResult
	out   *report.Results
	names map[string]int
	power map[int][][]float64 // channel → power map computed while drawing
}

// add appends a figure, making its name a safe file name and unique.
func (d *figDraw) add(name, title, svg string) {
	name = report.SafeName(name, '-')
	if k := d.names[name]; k > 0 {
		d.names[name] = k + 1
		name += "-" + strconv.Itoa(k+1)
	} else {
		d.names[name] = 1
	}
	d.out.Figures = append(d.out.Figures, report.Figure{Name: name, Title: title, SVG: svg})
}

// drawFigures renders the figures of every analysis into out.Figures.
func (p *Plan) drawFigures(ctx context.Context, res []UnitResult, out *report.Results) error {
	d := &figDraw{p: p, ctx: ctx, res: res, out: out, names: map[string]int{}, power: map[int][][]float64{}}
	if err := d.prefetch(); err != nil {
		return err
	}
	for i := range p.r.Analyses {
		if err := ctx.Err(); err != nil {
			return err
		}
		a := &p.r.Analyses[i]
		var err error
		switch f := p.finish[i].(type) {
		case *twPlan:
			if err = d.powerFigures(a); err == nil {
				err = d.scatterFigures(f)
			}
		case *envPlan:
			if f.como {
				d.comodulogram(f)
			} else {
				d.matrix(f)
				err = d.envelopes(f)
			}
		default:
			if a.Type == TypeTFMap {
				if err = d.powerFigures(a); err == nil {
					d.tfCorr(a)
				}
			}
		}
		if err != nil {
			return err
		}
	}
	return nil
}

// powerUnit is the square of a channel's unit: µV² for µV.
func powerUnit(ch data.Channel) string {
	switch strings.TrimSpace(ch.Unit) {
	case "µV", "μV", "uV":
		return "µV²"
	case "":
		return "unit²"
	}
	return strings.TrimSpace(ch.Unit) + "²"
}

// strongChannels returns the seed (or target) channels, among cands, of the
// k rows of analysis id with the largest |r| (first in table order on
// ties), in that order, each once.
func (d *figDraw) strongChannels(id string, seed bool, cands []int, k int) []int {
	e := d.p.ds.Epochs
	type cand struct {
		ch  int
		r   float64
		pos int
	}
	best := map[int]cand{}
	for pos, row := range d.out.Rows {
		if row.Analysis != id || math.IsNaN(row.R) || row.IsGroupRow() {
			continue
		}
		name := row.Target
		if seed {
			name = row.Seed
		}
		c := data.Lookup(e.Channels, name)
		if c < 0 {
			continue
		}
		if b, ok := best[c]; !ok || math.Abs(row.R) > math.Abs(b.r) {
			best[c] = cand{c, row.R, pos}
		}
	}
	var cs []cand
	for _, t := range cands {
		if b, ok := best[t]; ok {
			cs = append(cs, b)
		}
	}
	sort.SliceStable(cs, func(i, j int) bool {
		if math.Abs(cs[i].r) != math.Abs(cs[j].r) {
			return math.Abs(cs[i].r) > math.Abs(cs[j].r)
		}
		return cs[i].pos < cs[j].pos
	})
	var out []int
	for _, c := range cs[:min(k, len(cs))] {
		out = append(out, c.ch)
	}
	return out
}

// powerMap returns the power map of channel ch: the unit's when there is
// one, otherwise the one prefetch computed.
func (d *figDraw) powerMap(ch int) ([][]float64, error) {
	p := d.p
	e := p.ds.Epochs
	rows, cols := len(p.freqs), spectral.TFCols(0, e.NSamples, figPowerStep(e.NSamples))
	if ui := p.figFindPower(ch); ui >= 0 {
		v := d.res[ui].Values
		if len(v) != rows*cols {
			return nil, fmt.Errorf("recipe: power map of unit %d has %d values, want %d×%d", ui, len(v), rows, cols)
		}
		m := make([][]float64, rows)
		for r := range m {
			m[r] = v[r*cols : (r+1)*cols]
		}
		return m, nil
	}
	if m, ok := d.power[ch]; ok {
		return m, nil
	}
	return nil, fmt.Errorf("recipe: no power map for channel %d", ch)
}

// powerChannels lists the channels whose power map analysis a draws: its
// seeds, then its targets (or those of its strongest rows), each once.
func (d *figDraw) powerChannels(a *Analysis) (chans []int, byRule map[int]bool) {
	seeds, targets := figSides(a, d.p.ds.Epochs)
	var all []int
	byRule = map[int]bool{}
	for k, side := range [][]int{seeds, targets} {
		if len(side) <= figPowerTargets {
			all = append(all, side...)
			continue
		}
		for _, c := range d.strongChannels(a.ID, k == 0, side, figPowerTargets) {
			all = append(all, c)
			byRule[c] = true
		}
	}
	for _, side := range [][]int{seeds, targets} {
		if len(side) <= figPowerTargets {
			for _, c := range side {
				delete(byRule, c)
			}
		}
	}
	seen := map[int]bool{}
	for _, c := range all {
		if !seen[c] {
			seen[c] = true
			chans = append(chans, c)
		}
	}
	return chans, byRule
}

// prefetch computes, in parallel, the power maps that no unit computed.
func (d *figDraw) prefetch() error {
	p := d.p
	if p.ds.Epochs == nil {
		return nil
	}
	var need []int
	seen := map[int]bool{}
	for i := range p.r.Analyses {
		chans, _ := d.powerChannels(&p.r.Analyses[i])
		for _, c := range chans {
			if !seen[c] && p.figFindPower(c) < 0 {
				seen[c] = true
				need = append(need, c)
			}
		}
	}
	maps := make([][][]float64, len(need))
	errs := make([]error, len(need))
	next := make(chan int)
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), len(need)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for k := range next {
				maps[k], errs[k] = figPowerMap(d.ctx, p.bank, p.ds.Epochs, need[k], p.figAllFreqs())
			}
		}()
	}
	for k := range need {
		next <- k
	}
	close(next)
	wg.Wait()
	for k, c := range need {
		if errs[k] != nil {
			return errs[k]
		}
		d.power[c] = maps[k]
	}
	return nil
}

// powerFigures draws <id>_tfpower_<channel> for the seed channels and the
// chosen target channels of a trial-window or tf-map analysis.
func (d *figDraw) powerFigures(a *Analysis) error {
	p := d.p
	e := p.ds.Epochs
	if e == nil {
		return nil
	}
	seeds, targets := figSides(a, e)
	chans, byRule := d.powerChannels(a)
	step := figPowerStep(e.NSamples)
	times := make([]float64, spectral.TFCols(0, e.NSamples, step))
	for j := range times {
		times[j] = roundTime(e.Time(j * step))
	}
	for _, ch := range chans {
		if err := d.ctx.Err(); err != nil {
			return err
		}
		m, err := d.powerMap(ch)
		if err != nil {
			return err
		}
		var wins []plot.Window
		for _, w := range []struct {
			label string
			win   *Window
			on    []int
		}{{"seed", a.Seed, seeds}, {"target", a.Target, targets}} {
			for _, c := range w.on {
				if c == ch {
					wins = append(wins, plot.Window{Label: w.label, T0: w.win.Time[0], T1: w.win.Time[1], F0: w.win.Freq[0], F1: w.win.Freq[1]})
					break
				}
			}
		}
		name := e.Channels[ch].Name
		title := fmt.Sprintf("%s: %s power, mean of %d trials", a.ID, name, e.NTrials)
		caption := title
		if byRule[ch] {
			caption += fmt.Sprintf(" (a channel of one of the %d strongest rows)", figPowerTargets)
		}
		svg, _ := plot.TFPower(m, p.freqs, times, plot.TFPowerOptions{
			Frame:       figFrame(title, 400, 270),
			LogColour:   p.r.Figures.PowerScale != "linear",
			Windows:     wins,
			ColourLabel: "power", ColourUnit: powerUnit(e.Channels[ch]),
		})
		d.add(a.ID+"_tfpower_"+name, caption, svg)
	}
	return nil
}

// figFrame is a w × h frame, widened (up to 640) so that a one-line bold
// title fits: its width is estimated from average sans-serif glyph widths
// at the 10-unit title size.
func figFrame(title string, w, h float64) plot.Frame {
	est := 0.0
	for _, r := range title {
		switch {
		case strings.ContainsRune(" .,:;il|'()[]-ftjr", r):
			est += 0.34
		case r >= 'A' && r <= 'Z', r == 'm', r == 'w':
			est += 0.75
		default:
			est += 0.6
		}
	}
	return plot.Frame{Title: title, Width: min(max(w, est*10+24), 640), Height: h}
}

func contains(s []int, v int) bool {
	for _, x := range s {
		if x == v {
			return true
		}
	}
	return false
}

// rowKey finds a result row by analysis, seed, target and condition.
type rowKey struct{ analysis, seed, target, condition string }

func (d *figDraw) rowIndex(id string) map[rowKey]report.Row {
	m := map[rowKey]report.Row{}
	for _, r := range d.out.Rows {
		if r.Analysis != id {
			continue
		}
		k := rowKey{r.Analysis, r.Seed, r.Target, field(r, "condition")}
		if _, ok := m[k]; !ok {
			m[k] = r
		}
	}
	return m
}

// scatterFigures draws the trial scatter behind every row of a
// trial-window analysis, in row order.
func (d *figDraw) scatterFigures(tw *twPlan) error {
	a := tw.a
	e := d.p.ds.Epochs
	spearman := a.Method == "spearman"
	rows := d.rowIndex(a.ID)
	stat := "r"
	if spearman {
		stat = "ρ"
	}
	if len(a.Covariates) > 0 {
		stat = "partial " + stat
	}
	unit := ""
	band := func(f, t [2]float64) string {
		return fmt.Sprintf("%s–%s Hz, %s to %s s", figHz(f[0]), figHz(f[1]), figSec(t[0]), figSec(t[1]))
	}
	labels := make([]string, len(tw.keep))
	for i, t := range tw.keep {
		labels[i] = "trial " + strconv.Itoa(t+1)
	}
	draw := scatterPairs(tw, rows)
	for _, s := range tw.seeds {
		x := tw.values(d.res, s)
		for _, t := range tw.targets {
			if err := d.ctx.Err(); err != nil {
				return err
			}
			if !draw[[2]string{s.name, t.name}] {
				continue
			}
			y := tw.values(d.res, t)
			if c := data.Lookup(e.Channels, t.name); c >= 0 {
				unit = powerUnit(e.Channels[c])
			}
			type part struct {
				cond string
				idx  []int
			}
			parts := []part{{"", nil}}
			if a.Conditions != nil {
				parts = []part{{a.Conditions.Compare[0], tw.conds[0]}, {a.Conditions.Compare[1], tw.conds[1]}}
			}
			for _, pt := range parts {
				xs, ys, covs, lab := x, y, tw.covs, labels
				if pt.idx != nil {
					xs, ys, covs, lab = pick(x, pt.idx), pick(y, pt.idx), pickCovs(tw.covs, pt.idx), pickStrings(labels, pt.idx)
				}
				xl, yl := s.name+" power, "+band(tw.seedF, tw.seedT), t.name+" power, "+band(tw.targF, tw.targT)
				opt := plot.ScatterOptions{
					Frame:  plot.Frame{XLabel: xl, XUnit: unit, YLabel: yl, YUnit: unit, Width: 360, Height: 300},
					Ranks:  spearman,
					Labels: lab,
				}
				if len(covs) > 0 {
					xs, ys = residualise(xs, ys, covs, spearman)
					opt.Ranks = false
					what := "power"
					if spearman {
						what = "power rank"
						opt.XUnit, opt.YUnit = "", ""
					}
					opt.XLabel = fmt.Sprintf("%s %s residual", s.name, what)
					opt.YLabel = fmt.Sprintf("%s %s residual", t.name, what)
				}
				title := fmt.Sprintf("%s: %s → %s across trials", a.ID, s.name, t.name)
				name := a.ID + "_scatter_" + s.name + "_" + t.name
				if pt.cond != "" {
					title += ", " + pt.cond
					name += "_" + pt.cond
				}
				if len(covs) > 0 {
					title += ", after " + strings.Join(a.Covariates, ", ")
				}
				opt.Title = title
				opt.Width = figFrame(title, 360, 300).Width
				if row, ok := rows[rowKey{a.ID, s.name, t.name, pt.cond}]; ok {
					opt.Stat = &plot.Stat{Name: stat, R: row.R, P: row.P, N: row.N}
				}
				svg, _ := plot.Scatter(xs, ys, opt)
				d.add(name, title, svg)
			}
		}
	}
	return nil
}

// figScatterMax bounds the scatters of one analysis: with more seed ×
// target pairs, only the pairs of the figScatterMax rows with the largest
// |r| (first in table order on ties) are drawn.
const figScatterMax = 24

// scatterPairs returns the seed–target pairs whose scatter is drawn.
func scatterPairs(tw *twPlan, rows map[rowKey]report.Row) map[[2]string]bool {
	type cand struct {
		key [2]string
		r   float64
		i   int
	}
	var cs []cand
	for _, s := range tw.seeds {
		for _, t := range tw.targets {
			r := math.Inf(-1)
			for k, row := range rows {
				if k.seed == s.name && k.target == t.name && !math.IsNaN(row.R) {
					r = math.Max(r, math.Abs(row.R))
				}
			}
			cs = append(cs, cand{[2]string{s.name, t.name}, r, len(cs)})
		}
	}
	if len(cs) > figScatterMax {
		sort.SliceStable(cs, func(i, j int) bool { return cs[i].r > cs[j].r })
		cs = cs[:figScatterMax]
	}
	out := make(map[[2]string]bool, len(cs))
	for _, c := range cs {
		out[c.key] = true
	}
	return out
}

func pickStrings(v []string, idx []int) []string {
	out := make([]string, len(idx))
	for i, j := range idx {
		out[i] = v[j]
	}
	return out
}

// figSec formats a time in s for a figure, with a true minus sign.
func figSec(t float64) string {
	return strings.Replace(strconv.FormatFloat(roundTime(t), 'f', -1, 64), "-", "−", 1)
}

// figHz formats a frequency in Hz for a figure: three significant digits,
// or a whole number from 100 Hz.
func figHz(f float64) string {
	if math.Abs(f) >= 100 {
		return strconv.FormatFloat(math.Round(f), 'f', -1, 64)
	}
	return strconv.FormatFloat(f, 'g', 3, 64)
}

// figBand is "lo–hi Hz" of the grid frequencies idx.
func (p *Plan) figBand(idx []int) string {
	lo, hi := p.freqs[idx[0]], p.freqs[idx[len(idx)-1]]
	if lo == hi {
		return figHz(lo) + " Hz"
	}
	return figHz(lo) + "–" + figHz(hi) + " Hz"
}

func findMap(out *report.Results, name string) *report.Map {
	for i := range out.Maps {
		if out.Maps[i].Name == name {
			return &out.Maps[i]
		}
	}
	return nil
}

// squareMap reports whether m is a rows × cols matrix.
func squareMap(m *report.Map, rows, cols int) bool {
	if m == nil || len(m.Values) != rows {
		return false
	}
	for _, r := range m.Values {
		if len(r) != cols {
			return false
		}
	}
	return true
}

// matrix draws <id>_matrix for an envelope analysis with at least three
// channels, or any cross-frequency one.
func (d *figDraw) matrix(ep *envPlan) {
	a := ep.a
	n := len(ep.names)
	if n < 3 && ep.fb == nil {
		return
	}
	m := findMap(d.out, a.ID+"_r")
	if !squareMap(m, n, n) {
		return
	}
	opt := plot.MatrixOptions{Frame: plot.Frame{XLabel: "channel", YLabel: "channel", Width: 360, Height: 300}}
	var title string
	if ep.fb != nil {
		title = fmt.Sprintf("%s: envelope r across bands", a.ID)
		opt.YLabel = "seed, " + d.p.figBand(ep.fa)
		opt.XLabel = "target, " + d.p.figBand(ep.fb)
	} else {
		title = fmt.Sprintf("%s: envelope r, %s", a.ID, d.p.figBand(ep.fa))
		if a.Orthogonalize != OrthNone {
			title += ", orthogonalised (" + string(a.Orthogonalize) + ")"
		}
	}
	opt.Title = title
	opt.Width = figFrame(title, 360, 300).Width
	svg, _ := plot.Matrix(m.Values, ep.names, opt)
	d.add(a.ID+"_matrix", title, svg)
}

// comodulogram draws <id>_comodulogram from the comodulogram map.
func (d *figDraw) comodulogram(ep *envPlan) {
	a := ep.a
	m := findMap(d.out, a.ID+"_comodulogram")
	if !squareMap(m, len(ep.fa), len(ep.fb)) {
		return
	}
	sf, tf := make([]float64, len(ep.fa)), make([]float64, len(ep.fb))
	for i, f := range ep.fa {
		sf[i] = d.p.freqs[f]
	}
	for i, f := range ep.fb {
		tf[i] = d.p.freqs[f]
	}
	seed, target := ep.names[0], ep.names[len(ep.names)-1]
	title := fmt.Sprintf("%s: envelope r of %s and %s across frequencies", a.ID, seed, target)
	if seed == target {
		title = fmt.Sprintf("%s: envelope r across frequencies on %s", a.ID, seed)
	}
	svg, _ := plot.CrossFreq(m.Values, sf, tf, plot.CrossFreqOptions{
		Frame: plot.Frame{Title: title, XLabel: seed + " frequency", XUnit: "Hz", YLabel: target + " frequency", YUnit: "Hz", Width: figFrame(title, 360, 300).Width, Height: 300},
	})
	d.add(a.ID+"_comodulogram", title, svg)
}

// parseLabels reads numeric map labels; ok is false unless they are all
// finite and strictly increasing.
func parseLabels(ls []string) ([]float64, bool) {
	out := make([]float64, len(ls))
	for i, l := range ls {
		v, err := strconv.ParseFloat(l, 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) || (i > 0 && v <= out[i-1]) {
			return nil, false
		}
		out[i] = v
	}
	return out, len(out) > 0
}

// tfCorr draws <id>_tfcorr_<channel> for every target map of a tf-map
// analysis that has one, outlining the clusters with p ≤ figClusterP.
func (d *figDraw) tfCorr(a *Analysis) {
	e := d.p.ds.Epochs
	seeds, targets := figSides(a, e)
	for _, ch := range targets {
		name := e.Channels[ch].Name
		base := a.ID + "_" + name
		m := findMap(d.out, base+"_r")
		if m == nil {
			continue
		}
		freqs, ok1 := parseLabels(m.RowLabels)
		times, ok2 := parseLabels(m.ColLabels)
		if !ok1 || !ok2 || !squareMap(m, len(freqs), len(times)) {
			continue
		}
		var lab [][]int
		var outline []int
		if cm := findMap(d.out, base+"_clusters"); squareMap(cm, len(freqs), len(times)) {
			lab = make([][]int, len(freqs))
			for i, row := range cm.Values {
				lab[i] = make([]int, len(row))
				for j, v := range row {
					if !math.IsNaN(v) {
						lab[i][j] = int(v)
					}
				}
			}
			for _, r := range d.out.Rows {
				if r.Analysis != a.ID || r.Target != name {
					continue
				}
				k, err := strconv.Atoi(field(r, "cluster"))
				if err == nil && k > 0 && r.P <= figClusterP {
					outline = append(outline, k)
				}
			}
		}
		var wins []plot.Window
		if contains(seeds, ch) {
			wins = append(wins, plot.Window{Label: "seed", T0: a.Seed.Time[0], T1: a.Seed.Time[1], F0: a.Seed.Freq[0], F1: a.Seed.Freq[1]})
		}
		stat := "r"
		if a.Method == "spearman" {
			stat = "ρ"
		}
		seedName := ""
		if len(seeds) > 0 {
			seedName = e.Channels[seeds[0]].Name
		}
		title := fmt.Sprintf("%s: %s seed with %s power", a.ID, seedName, name)
		switch {
		case lab != nil && len(outline) > 0:
			title += fmt.Sprintf("; outlined: cluster p ≤ %g", figClusterP)
		case lab != nil:
			title += fmt.Sprintf("; no cluster at p ≤ %g", figClusterP)
		}
		svg, _ := plot.TFCorr(m.Values, freqs, times, lab, outline, plot.TFCorrOptions{
			Frame:     figFrame(title, 400, 270),
			ValueName: stat,
			Windows:   wins,
		})
		d.add(a.ID+"_tfcorr_"+name, title, svg)
	}
}

// envelopes draws <id>_envelopes_<a>_<b>: the two envelopes of the first
// pair (for a cross-frequency analysis the first pair of two different
// channels, when there is one) over the first figStretch seconds after the
// discarded edge of a recording, or over the first trial, binned as the
// analysis bins them. With pairwise orthogonalisation the second trace is
// |b ⊥ a|, the envelope the analysis correlates with |a|.
func (d *figDraw) envelopes(ep *envPlan) error {
	if len(ep.rows) == 0 {
		return nil
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
	where := ""
	if ep.epoched {
		e := ep.src.ep
		from, to = h, e.NSamples-h
		t0 = e.Start
		where = "trial 1"
	} else {
		rec := ep.src.rec
		from = h
		to = min(rec.Len()-h, from+int(math.Round(figStretch*ep.rate)))
		t0 = rec.Start
		where = fmt.Sprintf("first %s s", figSec(float64(to-from)/ep.rate))
	}
	if to-from < 2*ep.bin {
		return nil
	}
	ci, cj := ep.chans[pr.i], ep.chans[pr.j]
	convs := map[int]*spectral.Convolver{}
	band := func(ch int, freqs []int) []complex128 {
		x := ep.src.samples(seg, ch)
		lo, hi := spectral.Crop(len(x), from, to, h)
		nfft := spectral.GoodSize(hi - lo + 2*h)
		c := convs[nfft]
		if c == nil {
			c = d.p.bank.NewConvolver(nfft)
			convs[nfft] = c
		}
		c.Load(x[lo:hi])
		return connect.BandSignal(nil, c, freqs, from-lo, to-lo)
	}
	za := band(ci, ep.fa)
	fbIdx := ep.fa
	if ep.fb != nil {
		fbIdx = ep.fb
	}
	zb := band(cj, fbIdx)
	if err := d.ctx.Err(); err != nil {
		return err
	}
	nameB := ep.names[pr.j]
	bAmp := func(k int) float64 { return math.Hypot(real(zb[k]), imag(zb[k])) }
	note := ""
	switch a.Orthogonalize {
	case OrthPairwise:
		nameB = ep.names[pr.j] + " ⊥ " + ep.names[pr.i]
		bAmp = func(k int) float64 { return connect.OrthAmp(za[k], zb[k]) }
	case OrthSymmetric:
		note = ", before orthogonalisation"
	}
	nb := (to - from) / ep.bin
	times := make([]float64, nb)
	va, vb := make([]float64, nb), make([]float64, nb)
	for b := range nb {
		var sa, sb float64
		for k := b * ep.bin; k < (b+1)*ep.bin; k++ {
			sa += math.Hypot(real(za[k]), imag(za[k]))
			sb += bAmp(k)
		}
		va[b], vb[b] = sa/float64(ep.bin), sb/float64(ep.bin)
		times[b] = roundTime(t0 + (float64(from+b*ep.bin)+float64(ep.bin-1)/2)/ep.rate)
	}
	bandName := d.p.figBand
	nameA := ep.names[pr.i]
	if ep.fb != nil {
		nameA += ", " + bandName(ep.fa)
		nameB += ", " + bandName(ep.fb)
	}
	title := fmt.Sprintf("%s: %s and %s envelopes, %s, %s%s", a.ID, ep.names[pr.i], ep.names[pr.j], bandName(ep.fa), where, note)
	if ep.fb != nil {
		title = fmt.Sprintf("%s: %s and %s envelopes, %s%s", a.ID, nameA, nameB, where, note)
	}
	unit := ""
	if ep.epoched {
		unit = strings.TrimSuffix(powerUnit(ep.src.ep.Channels[ci]), "²")
	} else {
		unit = strings.TrimSuffix(powerUnit(ep.src.rec.Channels[ci]), "²")
	}
	svg, _ := plot.EnvelopeTrace(times, va, vb, plot.EnvelopeOptions{
		Frame: plot.Frame{Title: title, YLabel: "amplitude", YUnit: unit, Width: figFrame(title, 480, 220).Width, Height: 220},
		NameA: nameA, NameB: nameB,
	})
	d.add(a.ID+"_envelopes_"+ep.names[pr.i]+"_"+ep.names[pr.j], title, svg)
	return nil
}
