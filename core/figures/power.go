package figures

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"sort"
	"sync"

	"amplink/core/analysis"
	"amplink/core/data"
	"amplink/core/plot"
	"amplink/core/spectral"
)

// powerMap returns the trial-averaged power of channel ch of the plan's
// epochs,
//
//	P[r][c] = (1/N) Σ_t |x_t∗w_r|²[c·step],  step = figPowerStep(samples),
//
// over the whole epoch and every grid frequency r, in the square of the
// channel's unit. Each trial is transformed once (a Tight convolver of
// spectral.TightFFTLenStep, so the decimated read folds the spectrum) and
// every frequency reads that spectrum.
func powerMap(ctx context.Context, ap *analysis.Plan, ch int) ([][]float64, error) {
	bank, e := ap.Bank(), ap.Dataset().Epochs
	freqs := make([]int, len(ap.Freqs()))
	for i := range freqs {
		freqs[i] = i
	}
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

// asMap checks that a power-map unit's result has rows × cols values for
// the grid and the epoch, and returns it as rows.
func (d *figDraw) asMap(r analysis.UnitResult) ([][]float64, error) {
	e := d.ap.Dataset().Epochs
	rows, cols := len(d.ap.Freqs()), spectral.TFCols(0, e.NSamples, figPowerStep(e.NSamples))
	if len(r.Values) != rows*cols {
		return nil, fmt.Errorf("figures: power map of unit %d has %d values, want %d×%d", r.ID, len(r.Values), rows, cols)
	}
	m := make([][]float64, rows)
	for i := range m {
		m[i] = r.Values[i*cols : (i+1)*cols]
	}
	return m, nil
}

// strongChannels returns the seed (or target) channels, among cands, of the
// k rows of analysis id with the largest |r| (first in table order on
// ties), in that order, each once.
func (d *figDraw) strongChannels(id string, seed bool, cands []int, k int) []int {
	e := d.ap.Dataset().Epochs
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

// powerMapOf returns the power map of channel ch: the unit's when there is
// one, otherwise the late one (given to Draw, or computed by prefetch).
func (d *figDraw) powerMapOf(ch int) ([][]float64, error) {
	if ui := d.p.findPower(ch); ui >= 0 {
		return d.asMap(d.figRes[ui])
	}
	if m, ok := d.power[ch]; ok {
		return m, nil
	}
	return nil, fmt.Errorf("figures: no power map for channel %d", ch)
}

// powerChannels lists the channels whose power map analysis i draws: its
// seeds, then its targets (or those of its strongest rows), each once.
func (d *figDraw) powerChannels(i int) (chans []int, byRule map[int]bool) {
	a := &d.ap.Recipe().Analyses[i]
	seeds, targets := d.ap.Sides(i)
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

// lateChannels lists, in a fixed order, the channels whose power map the
// figures draw but no unit of Units computes: those chosen from the rows.
func (d *figDraw) lateChannels() []int {
	if d.ap.Dataset().Epochs == nil {
		return nil
	}
	var need []int
	seen := map[int]bool{}
	for i := range d.ap.Recipe().Analyses {
		chans, _ := d.powerChannels(i)
		for _, c := range chans {
			if !seen[c] && d.p.findPower(c) < 0 {
				seen[c] = true
				need = append(need, c)
			}
		}
	}
	return need
}

// prefetch computes, in parallel, the late power maps (of the channels
// lateChannels chose) whose results Draw was not given.
func (d *figDraw) prefetch(late []int) error {
	var need []int
	for _, c := range late {
		if _, ok := d.power[c]; !ok {
			need = append(need, c)
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
				maps[k], errs[k] = powerMap(d.ctx, d.ap, need[k])
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
// chosen target channels of trial-window or tf-map analysis i.
func (d *figDraw) powerFigures(i int) error {
	e := d.ap.Dataset().Epochs
	if e == nil {
		return nil
	}
	a := &d.ap.Recipe().Analyses[i]
	seeds, targets := d.ap.Sides(i)
	chans, byRule := d.powerChannels(i)
	step := figPowerStep(e.NSamples)
	times := make([]float64, spectral.TFCols(0, e.NSamples, step))
	for j := range times {
		times[j] = analysis.RoundTime(e.Time(j * step))
	}
	for _, ch := range chans {
		if err := d.ctx.Err(); err != nil {
			return err
		}
		m, err := d.powerMapOf(ch)
		if err != nil {
			return err
		}
		var wins []plot.Window
		for _, w := range []struct {
			label string
			win   *analysis.Window
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
		svg, _ := plot.TFPower(m, d.ap.Freqs(), times, plot.TFPowerOptions{
			Frame:       figFrame(title, 400, 270),
			LogColour:   d.ap.Recipe().Figures.PowerScale != "linear",
			Windows:     wins,
			ColourLabel: "power", ColourUnit: unitSquared(e.Channels[ch]),
		})
		d.add(a.ID+"_tfpower_"+name, caption, svg)
	}
	return nil
}
