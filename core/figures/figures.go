package figures

import (
	"context"
	"fmt"
	"math"
	"strconv"
	"strings"

	"amplink/core/analysis"
	"amplink/core/data"
	"amplink/core/plot"
	"amplink/core/recipe"
	"amplink/core/report"
)

// KindPower is the unit kind of a trial-averaged power map for figures.
const KindPower = "tf-power"

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

// Plan is the figures of one analysis plan: the power maps that can be
// computed before the results exist, as units, and the drawing once they
// do. With figures off in the recipe it has no units and draws nothing.
type Plan struct {
	ap    *analysis.Plan
	units []powerUnit // unit i computes the power map of units[i].ch
}

type powerUnit struct {
	analysis.Unit
	ch int
}

// NewPlan lists the power-map units that the figures of ap need whatever
// the results: the maps of every seed channel, and of the target channels
// of a side with few.
func NewPlan(ap *analysis.Plan) *Plan {
	p := &Plan{ap: ap}
	e := ap.Dataset().Epochs
	if !ap.Recipe().Figures.Enabled || e == nil {
		return p
	}
	for i := range ap.Recipe().Analyses {
		seeds, targets := ap.Sides(i)
		for _, side := range [][]int{seeds, targets} {
			if len(side) <= figPowerTargets {
				for _, ch := range side {
					p.addPowerUnit(e, ch)
				}
			}
		}
	}
	return p
}

// addPowerUnit adds the unit computing the power map of channel ch, unless
// there is one.
func (p *Plan) addPowerUnit(e *data.Epochs, ch int) {
	if p.findPower(ch) >= 0 {
		return
	}
	all := p.allFreqs()
	n := e.NSamples
	p.units = append(p.units, powerUnit{
		Unit: analysis.Unit{ID: len(p.units), Kind: KindPower, Channels: []string{e.Channels[ch].Name},
			Cost: float64(e.NTrials * (n + p.ap.Bank().MaxHalf(all)) * (1 + len(all)))},
		ch: ch,
	})
}

func (p *Plan) findPower(ch int) int {
	for ui := range p.units {
		if p.units[ui].ch == ch {
			return ui
		}
	}
	return -1
}

func (p *Plan) allFreqs() []int {
	all := make([]int, len(p.ap.Freqs()))
	for i := range all {
		all[i] = i
	}
	return all
}

// Units lists the figure units, numbered from 0, in a fixed order.
func (p *Plan) Units() []analysis.Unit {
	out := make([]analysis.Unit, len(p.units))
	for i, u := range p.units {
		out[i] = u.Unit
	}
	return out
}

// Compute runs figure unit id of Units: one channel's power map, row after
// row.
func (p *Plan) Compute(ctx context.Context, id int) (analysis.UnitResult, error) {
	if id < 0 || id >= len(p.units) {
		return analysis.UnitResult{}, fmt.Errorf("figures: no unit %d", id)
	}
	return p.ComputeUnit(ctx, p.units[id].Unit)
}

// ComputeUnit runs a unit of Units or of Late from its description alone
// (the power map of its one channel), so that a worker that has the plan but
// not the results can compute a late unit.
func (p *Plan) ComputeUnit(ctx context.Context, u analysis.Unit) (analysis.UnitResult, error) {
	e := p.ap.Dataset().Epochs
	if u.Kind != KindPower || len(u.Channels) != 1 || e == nil {
		return analysis.UnitResult{}, fmt.Errorf("figures: unit %d is not a power map of one channel", u.ID)
	}
	ch := data.Lookup(e.Channels, u.Channels[0])
	if ch < 0 {
		return analysis.UnitResult{}, fmt.Errorf("figures: unit %d: no channel %q", u.ID, u.Channels[0])
	}
	m, err := powerMap(ctx, p.ap, ch)
	if err != nil {
		return analysis.UnitResult{}, err
	}
	var out []float64
	for _, row := range m {
		out = append(out, row...)
	}
	return analysis.UnitResult{ID: u.ID, Values: out}, nil
}

// Late lists the power-map units that only the results can choose (the
// channels of the strongest rows, on a side with more than figPowerTargets
// channels) and that no unit of Units computes, numbered after Units. Draw
// computes any of them whose result it is not given, so the command line
// never calls Late; the page spreads them over its workers.
func (p *Plan) Late(out *report.Results) []analysis.Unit {
	if !p.ap.Recipe().Figures.Enabled {
		return nil
	}
	d := &figDraw{p: p, ap: p.ap, out: out}
	return p.lateUnits(d.lateChannels())
}

// lateUnits are the units of Late for the channels lateChannels chose.
func (p *Plan) lateUnits(chans []int) []analysis.Unit {
	e := p.ap.Dataset().Epochs
	all := p.allFreqs()
	var units []analysis.Unit
	for _, ch := range chans {
		units = append(units, analysis.Unit{ID: len(p.units) + len(units), Kind: KindPower, Channels: []string{e.Channels[ch].Name},
			Cost: float64(e.NTrials * (e.NSamples + p.ap.Bank().MaxHalf(all)) * (1 + len(all)))})
	}
	return units
}

// figDraw collects the figures of one run.
type figDraw struct {
	p      *Plan
	ap     *analysis.Plan
	ctx    context.Context
	res    []analysis.UnitResult // the analysis units' results
	figRes []analysis.UnitResult // the figure units' results, by ID
	out    *report.Results
	names  map[string]int
	power  map[int][][]float64 // channel → power map computed while drawing
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

// Draw renders the figures of every analysis into out.Figures, from the
// results Finish made of res (the analysis units' results) and figRes: one
// result for each unit of Units, and any number of the units of Late (those
// missing are computed here, in parallel).
func (p *Plan) Draw(ctx context.Context, res, figRes []analysis.UnitResult, out *report.Results) error {
	if !p.ap.Recipe().Figures.Enabled {
		return nil
	}
	early := make([]analysis.UnitResult, len(p.units))
	d := &figDraw{p: p, ap: p.ap, ctx: ctx, res: res, figRes: early, out: out, names: map[string]int{}, power: map[int][][]float64{}}
	lateCh := d.lateChannels()
	late := p.lateUnits(lateCh)
	seen := make([]bool, len(p.units)+len(late))
	for _, r := range figRes {
		if r.ID < 0 || r.ID >= len(seen) || seen[r.ID] {
			return fmt.Errorf("figures: unit result %d is out of range or repeated", r.ID)
		}
		seen[r.ID] = true
		if r.ID < len(early) {
			early[r.ID] = r
			continue
		}
		m, err := d.asMap(r)
		if err != nil {
			return err
		}
		d.power[data.Lookup(p.ap.Dataset().Epochs.Channels, late[r.ID-len(early)].Channels[0])] = m
	}
	for id := range early {
		if !seen[id] {
			return fmt.Errorf("figures: no result for unit %d", id)
		}
	}
	if err := d.prefetch(lateCh); err != nil {
		return err
	}
	for i := range p.ap.Recipe().Analyses {
		if err := ctx.Err(); err != nil {
			return err
		}
		a := &p.ap.Recipe().Analyses[i]
		var err error
		if tw, ok := p.ap.TrialWindow(i); ok {
			if err = d.powerFigures(i); err == nil {
				err = d.scatterFigures(tw)
			}
			d.scalpMaps(tw) // sensors.go
		} else if ev, ok := p.ap.Envelope(i); ok {
			if ev.Comodulogram() {
				d.comodulogram(ev)
			} else {
				d.matrix(ev)
				err = d.envelopes(ev)
				d.network(ev) // sensors.go
			}
		} else if a.Type == recipe.TypeTFMap {
			if err = d.powerFigures(i); err == nil {
				d.tfCorr(i)
			}
		}
		if err != nil {
			return err
		}
	}
	return nil
}

// unitSquared is the square of a channel's unit: µV² for µV.
func unitSquared(ch data.Channel) string {
	switch strings.TrimSpace(ch.Unit) {
	case "µV", "μV", "uV":
		return "µV²"
	case "":
		return "unit²"
	}
	return strings.TrimSpace(ch.Unit) + "²"
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

// figSec formats a time in s for a figure, with a true minus sign.
func figSec(t float64) string {
	return strings.Replace(strconv.FormatFloat(analysis.RoundTime(t), 'f', -1, 64), "-", "−", 1)
}

// figHz formats a frequency in Hz for a figure: three significant digits,
// or a whole number from 100 Hz.
func figHz(f float64) string {
	if math.Abs(f) >= 100 {
		return strconv.FormatFloat(math.Round(f), 'f', -1, 64)
	}
	return strconv.FormatFloat(f, 'g', 3, 64)
}

// figBand is "lo–hi Hz" of grid frequencies, lowest first.
func figBand(freqs []float64) string {
	lo, hi := freqs[0], freqs[len(freqs)-1]
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
