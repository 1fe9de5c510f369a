package analysis

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"strings"
	"sync"

	"amplink/core/analysis/connect"
	"amplink/core/data"
	"amplink/core/recipe"
	"amplink/core/report"
	"amplink/core/spectral"
)

// Unit is one independent piece of work. Channels names the channels its
// computation reads, so a worker could be given only those.
type Unit struct {
	ID       int      `json:"id"`
	Kind     string   `json:"kind"`
	Channels []string `json:"channels"`
	Cost     float64  `json:"cost"` // relative work, for balancing
}

// UnitResult is what computing a unit gives: plain numbers, so it can cross
// a worker boundary as JSON.
type UnitResult struct {
	ID     int       `json:"id"`
	Values []float64 `json:"values"`
}

// Plan is the minimum work a recipe needs on one dataset.
type Plan struct {
	r        *Recipe
	ds       *Dataset
	freqs    []float64
	cycles   []float64
	bank     *spectral.Bank
	forms    *connect.Forms // window powers' quadratic forms, shared by all units
	units    []unit
	later    []laterUnit // units that read the units' results (see Later)
	finish   []finisher
	warnings []string
}

type unit struct {
	Unit
	ch    int            // channel index in the epochs
	spans []connect.Span // window units
	keys  map[string]int // span key → index in spans
	// compute fills Values; set for kinds other than windows.
	compute func(ctx context.Context, p *Plan) ([]float64, error)
}

// laterUnit is a unit of the second stage: it reads the first stage's
// results through l.
type laterUnit struct {
	Unit
	compute func(ctx context.Context, l *Later) ([]float64, error)
}

type finisher interface {
	finish(ctx context.Context, p *Plan, res []UnitResult, out *report.Results) error
}

// Freqs returns the frequency grid in Hz.
func (p *Plan) Freqs() []float64 { return p.freqs }

// Warnings lists what the plan found questionable but not wrong.
func (p *Plan) Warnings() []string { return p.warnings }

// Units lists the units of work, in a fixed order.
func (p *Plan) Units() []Unit {
	out := make([]Unit, len(p.units))
	for i, u := range p.units {
		out[i] = u.Unit
	}
	return out
}

// NewPlan checks the recipe against the dataset and works out the units.
func NewPlan(r *Recipe, ds *Dataset) (*Plan, error) {
	p := &Plan{r: r, ds: ds}
	rate := 0.0
	switch {
	case ds.Epochs != nil:
		rate = ds.Epochs.Rate
	case ds.Recording != nil:
		rate = ds.Recording.Rate
	default:
		return nil, fmt.Errorf("%s: no data", ds.Name)
	}
	sp := r.Spectral
	freqs, err := spectral.Frequencies(sp.Low, sp.High, sp.Steps, sp.Spacing)
	if err != nil {
		return nil, ferr("spectral", "%v", err)
	}
	if nyq := rate / 2; sp.High >= nyq {
		return nil, ferr("spectral.high", "%g Hz is at or above the Nyquist frequency %g Hz of %s", sp.High, nyq, ds.Name)
	}
	p.freqs = freqs
	p.forms = connect.NewForms(sp.WindowTolerance())
	p.cycles = spectral.Cycles(len(freqs), sp.Cycles[0], sp.Cycles[1])
	// No wavelet may be longer than the data: checked before any kernel is
	// built, so a tiny file claiming an absurd rate allocates nothing.
	n := 0
	if ds.Recording != nil {
		n = ds.Recording.Len()
	}
	if ds.Epochs != nil {
		n = max(n, ds.Epochs.NSamples)
	}
	p.bank, err = spectral.NewBankFor(rate, p.freqs, p.cycles, n)
	if le := (*spectral.LengthError)(nil); errors.As(err, &le) {
		field := "spectral.cycles"
		if le.Index == 0 {
			field = "spectral.low"
		}
		return nil, ferr(field, "%v (%s); raise spectral.low or lower spectral.cycles", err, ds.Name)
	}
	if err != nil {
		return nil, ferr("spectral", "%v", err)
	}
	for i := range r.Analyses {
		a := &r.Analyses[i]
		path := fmt.Sprintf("analyses[%d]", i)
		var f finisher
		switch a.Type {
		case TypeTrialWindow:
			f, err = p.planTrialWindow(path, a)
		case TypeTFMap:
			f, err = p.planTFMap(path, a)
		case TypeEnvelope, TypeComodulogram:
			f, err = p.planEnvelope(path, a)
		default:
			err = ferr(path+".type", "%q analyses are not available in this build", a.Type)
		}
		if err != nil {
			return nil, err
		}
		p.finish = append(p.finish, f)
	}
	for k := range p.later {
		p.later[k].ID = len(p.units) + k
	}
	return p, nil
}

// LaterUnits lists the units that need every unit's result before they can
// run (the surrogates of envelope rows), numbered after Units:
// len(Units()) … len(Units())+len(LaterUnits())−1. They compute through
// Later.
func (p *Plan) LaterUnits() []Unit {
	out := make([]Unit, len(p.later))
	for i, u := range p.later {
		out[i] = u.Unit
	}
	return out
}

// Later is the second stage of a plan: what its later units read, the
// first stage's results, with each envelope analysis's series gathered once
// on first use. Its Compute is safe for concurrent use.
type Later struct {
	p   *Plan
	res []UnitResult // by unit ID
	mu  sync.Mutex
	env map[*envPlan]*envOnce
}

type envOnce struct {
	once sync.Once
	d    *envData
}

// Later checks the results of every unit of Units (in any order) and
// returns the second stage that reads them.
func (p *Plan) Later(res []UnitResult) (*Later, error) {
	sorted, err := sortResults(res, len(p.units))
	if err != nil {
		return nil, err
	}
	return &Later{p: p, res: sorted, env: map[*envPlan]*envOnce{}}, nil
}

// Compute runs later unit id (numbered as LaterUnits numbers it).
func (l *Later) Compute(ctx context.Context, id int) (UnitResult, error) {
	k := id - len(l.p.units)
	if k < 0 || k >= len(l.p.later) {
		return UnitResult{}, fmt.Errorf("analysis: no later unit %d", id)
	}
	vals, err := l.p.later[k].compute(ctx, l)
	if err != nil {
		return UnitResult{}, err
	}
	return UnitResult{ID: id, Values: vals}, nil
}

// ComputeAll computes every later unit on the given number of goroutines.
func (l *Later) ComputeAll(ctx context.Context, workers int, progress func(done, total int)) ([]UnitResult, error) {
	n0 := len(l.p.units)
	res, err := ComputeUnits(ctx, len(l.p.later), workers, func(ctx context.Context, k int) (UnitResult, error) {
		return l.Compute(ctx, n0+k)
	}, progress)
	return res, err
}

func (l *Later) envData(ep *envPlan) *envData {
	l.mu.Lock()
	o := l.env[ep]
	if o == nil {
		o = &envOnce{}
		l.env[ep] = o
	}
	l.mu.Unlock()
	o.once.Do(func() { o.d = ep.gather(l.res) })
	return o.d
}

// sortResults orders res by unit ID, checking that IDs 0 … n−1 each come
// once.
func sortResults(res []UnitResult, n int) ([]UnitResult, error) {
	if len(res) != n {
		return nil, fmt.Errorf("analysis: %d unit results for %d units", len(res), n)
	}
	sorted := make([]UnitResult, n)
	seen := make([]bool, n)
	for _, r := range res {
		if r.ID < 0 || r.ID >= n || seen[r.ID] {
			return nil, fmt.Errorf("analysis: unit result %d is out of range or repeated", r.ID)
		}
		seen[r.ID] = true
		sorted[r.ID] = r
	}
	return sorted, nil
}

func (p *Plan) epochs(path, what string) (*data.Epochs, error) {
	if p.ds.Epochs == nil {
		return nil, ferr(path, "%s analyses need trials, but %s is continuous: add an \"epochs\" block {\"event\", \"start\", \"end\"} to the recipe", what, p.ds.Name)
	}
	return p.ds.Epochs, nil
}

// resolveChannels turns a selection into channel indices.
func resolveChannels(path string, sel []string, chs []data.Channel) ([]int, error) {
	if len(sel) == 1 && sel[0] == "*" {
		out := make([]int, len(chs))
		for i := range out {
			out[i] = i
		}
		return out, nil
	}
	var out []int
	for i, name := range sel {
		if name == "*" {
			return nil, ferr(fmt.Sprintf("%s[%d]", path, i), "\"*\" must stand alone")
		}
		c := data.Lookup(chs, name)
		if c < 0 {
			f := path
			if len(sel) > 1 {
				f = fmt.Sprintf("%s[%d]", path, i)
			}
			return nil, ferr(f, "no channel %q; channels are: %s", name, strings.Join(data.Names(chs), ", "))
		}
		out = append(out, c)
	}
	return out, nil
}

// freqIndices returns the grid frequencies inside [lo, hi].
func freqIndices(path string, band [2]float64, freqs []float64) ([]int, error) {
	return recipe.BandIndices(path, band, freqs)
}

func fmtHz(f float64) string { return fmt.Sprintf("%.4g", f) }

// span resolves a window's time and band on e.
func (p *Plan) span(path string, w *Window, e *data.Epochs) (connect.Span, error) {
	var s connect.Span
	tol := 0.5 / e.Rate
	if w.Time[0] < e.Start-tol || w.Time[1] > e.End()+tol {
		return s, ferr(path+".time", "[%g, %g] s lies outside the epoch (%g to %g s)", w.Time[0], w.Time[1], e.Start, roundTime(e.End()))
	}
	s.From = int(math.Ceil((w.Time[0]-e.Start)*e.Rate - 1e-6))
	s.To = int(math.Floor((w.Time[1]-e.Start)*e.Rate+1e-6)) + 1
	if s.From < 0 {
		s.From = 0
	}
	if s.To > e.NSamples {
		s.To = e.NSamples
	}
	if s.To <= s.From {
		return s, ferr(path+".time", "[%g, %g] s holds no sample at %g Hz", w.Time[0], w.Time[1], e.Rate)
	}
	idx, err := freqIndices(path+".freq", w.Freq, p.freqs)
	if err != nil {
		return s, err
	}
	s.Freqs = idx
	for _, f := range idx {
		h := p.bank.Half(f)
		if s.From-h < 0 || s.To-1+h > e.NSamples-1 {
			p.warnings = append(p.warnings, fmt.Sprintf("%s: the %s Hz wavelet (±%.3g s) runs past the epoch edge, so power there is attenuated; move the window inward or lengthen the epochs", path, fmtHz(p.freqs[f]), float64(h)/e.Rate))
			break
		}
	}
	return s, nil
}

// roundTime removes the floating-point noise of start + k/rate for display,
// keeping nanosecond resolution.
func roundTime(t float64) float64 { return math.Round(t*1e9) / 1e9 }

// windowUnit returns the unit computing window powers on channel ch,
// creating it when needed, and the index of span s within it.
func (p *Plan) windowUnit(e *data.Epochs, ch int, s connect.Span) (int, int) {
	key := fmt.Sprintf("%d:%d:%v", s.From, s.To, s.Freqs)
	for ui := range p.units {
		u := &p.units[ui]
		if u.Kind == "window-power" && u.ch == ch {
			if si, ok := u.keys[key]; ok {
				return ui, si
			}
			u.spans = append(u.spans, s)
			u.keys[key] = len(u.spans) - 1
			u.Cost += float64(e.NTrials * (s.To - s.From + 2*p.bank.MaxHalf(s.Freqs)) * (1 + len(s.Freqs)))
			return ui, len(u.spans) - 1
		}
	}
	p.units = append(p.units, unit{
		Unit: Unit{ID: len(p.units), Kind: "window-power", Channels: []string{e.Channels[ch].Name},
			Cost: float64(e.NTrials * (s.To - s.From + 2*p.bank.MaxHalf(s.Freqs)) * (1 + len(s.Freqs)))},
		ch: ch, spans: []connect.Span{s}, keys: map[string]int{key: 0},
	})
	return len(p.units) - 1, 0
}

// Compute runs one unit.
func (p *Plan) Compute(ctx context.Context, id int) (UnitResult, error) {
	if id < 0 || id >= len(p.units) {
		return UnitResult{}, fmt.Errorf("analysis: no unit %d", id)
	}
	u := &p.units[id]
	var vals []float64
	var err error
	if u.compute != nil {
		vals, err = u.compute(ctx, p)
	} else {
		vals, err = connect.WindowPower(ctx, nil, p.bank, p.forms, p.ds.Epochs, u.ch, u.spans)
	}
	if err != nil {
		return UnitResult{}, err
	}
	return UnitResult{ID: id, Values: vals}, nil
}

// Finish turns unit results into the results table and maps. Figures are
// drawn from its results afterwards, by core/figures. res holds every
// unit's result and, optionally, every later unit's; Finish computes the
// later units itself when they are missing (on up to GOMAXPROCS
// goroutines), with the same results.
func (p *Plan) Finish(ctx context.Context, res []UnitResult) (*report.Results, error) {
	if len(res) == len(p.units) && len(p.later) > 0 {
		l, err := p.Later(res)
		if err != nil {
			return nil, err
		}
		lr, err := l.ComputeAll(ctx, runtime.GOMAXPROCS(0), nil)
		if err != nil {
			return nil, err
		}
		res = append(l.res, lr...)
	}
	sorted, err := sortResults(res, len(p.units)+len(p.later))
	if err != nil {
		return nil, err
	}
	out := &report.Results{Recipe: p.r.JSON()}
	out.Warnings = append(out.Warnings, p.ds.Notes...)
	out.Warnings = append(out.Warnings, p.warnings...)
	for _, f := range p.finish {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		if err := f.finish(ctx, p, sorted, out); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// Run plans and runs r on ds, computing units on up to GOMAXPROCS
// goroutines. progress, when not nil, is called with done/total units from
// one goroutine at a time.
func Run(ctx context.Context, r *Recipe, ds *Dataset, progress func(done, total int)) (*report.Results, error) {
	p, err := NewPlan(r, ds)
	if err != nil {
		return nil, err
	}
	return RunPlan(ctx, p, progress)
}

// Runner is a plan whose units compute independently and then finish
// together: an analysis Plan, or a pipeline's analyses with their figures.
type Runner interface {
	ComputeAll(ctx context.Context, workers int, progress func(done, total int)) ([]UnitResult, error)
	Finish(ctx context.Context, res []UnitResult) (*report.Results, error)
}

// RunPlan computes every unit of p on up to GOMAXPROCS goroutines, then
// finishes it.
func RunPlan(ctx context.Context, p Runner, progress func(done, total int)) (*report.Results, error) {
	res, err := p.ComputeAll(ctx, runtime.GOMAXPROCS(0), progress)
	if err != nil {
		return nil, err
	}
	return p.Finish(ctx, res)
}

// ComputeAll computes every unit, then every later unit, on the given
// number of goroutines; progress counts both.
func (p *Plan) ComputeAll(ctx context.Context, workers int, progress func(done, total int)) ([]UnitResult, error) {
	n, nl := len(p.units), len(p.later)
	first, err := ComputeUnits(ctx, n, workers, p.Compute, stage(progress, 0, n+nl))
	if err != nil || nl == 0 {
		return first, err
	}
	l, err := p.Later(first)
	if err != nil {
		return nil, err
	}
	lr, err := l.ComputeAll(ctx, workers, stage(progress, n, n+nl))
	if err != nil {
		return nil, err
	}
	return append(first, lr...), nil
}

// stage reports a stage's progress as part of total, after the done units
// of the stages before it.
func stage(progress func(done, total int), before, total int) func(done, total int) {
	if progress == nil {
		return nil
	}
	return func(done, _ int) { progress(before+done, total) }
}

// ComputeUnits computes units 0 … n−1 with compute on up to workers
// goroutines and returns their results by ID. The first error cancels the
// rest. progress, when not nil, is called with done/total units from one
// goroutine at a time.
func ComputeUnits(ctx context.Context, n, workers int, compute func(ctx context.Context, id int) (UnitResult, error), progress func(done, total int)) ([]UnitResult, error) {
	res := make([]UnitResult, n)
	if workers < 1 {
		workers = 1
	}
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	next := make(chan int)
	var mu sync.Mutex
	var firstErr error
	done := 0
	var wg sync.WaitGroup
	for range min(workers, max(n, 1)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for id := range next {
				ur, err := compute(ctx, id)
				mu.Lock()
				if err != nil {
					if firstErr == nil {
						firstErr = err
					}
					cancel()
				} else {
					res[id] = ur
					done++
					if progress != nil {
						progress(done, n)
					}
				}
				mu.Unlock()
			}
		}()
	}
loop:
	for id := range n {
		select {
		case next <- id:
		case <-ctx.Done():
			break loop
		}
	}
	close(next)
	wg.Wait()
	if firstErr != nil {
		return nil, firstErr
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	return res, nil
}
