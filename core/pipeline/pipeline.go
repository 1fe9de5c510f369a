// Package pipeline runs a recipe on a dataset from start to end: the
// analysis plan (core/analysis) and the figures drawn from its results
// (core/figures) as one list of independent units, so that the command line
// (on goroutines) and the page (on Web Workers) share one way of splitting,
// computing and finishing a run.
//
// Units 0 … A−1 are the analysis units, A … A+F−1 the figure units (power
// maps), in that order; A+F … A+F+L−1 are the later units (LaterUnits:
// envelope surrogates), which read the analysis units' results and so run
// after them. Finish combines the analysis and later units into rows and
// maps, then draws the figures from them.
package pipeline

import (
	"context"
	"fmt"

	"amplink/core/analysis"
	"amplink/core/dataset"
	"amplink/core/figures"
	"amplink/core/recipe"
	"amplink/core/report"
)

// Unit and UnitResult are the analysis package's: a unit's description and
// what computing it gives.
type (
	Unit       = analysis.Unit
	UnitResult = analysis.UnitResult
)

// Plan is a run's analysis plan with its figures.
type Plan struct {
	Analysis *analysis.Plan
	Figures  *figures.Plan
	na       int // analysis units
	nf       int // figure units
}

// NewPlan checks r against ds and lists every unit of the run.
func NewPlan(r *recipe.Recipe, ds *dataset.Dataset) (*Plan, error) {
	ap, err := analysis.NewPlan(r, ds)
	if err != nil {
		return nil, err
	}
	fp := figures.NewPlan(ap)
	return &Plan{Analysis: ap, Figures: fp, na: len(ap.Units()), nf: len(fp.Units())}, nil
}

// Freqs returns the frequency grid in Hz.
func (p *Plan) Freqs() []float64 { return p.Analysis.Freqs() }

// Warnings lists what the plan found questionable but not wrong.
func (p *Plan) Warnings() []string { return p.Analysis.Warnings() }

// Units lists every unit, analysis units first, with IDs in this plan's
// numbering.
func (p *Plan) Units() []Unit {
	out := p.Analysis.Units()
	for _, u := range p.Figures.Units() {
		u.ID += p.na
		out = append(out, u)
	}
	return out
}

// LaterUnits lists the units that run once every unit of Units has: IDs
// len(Units()) on. They compute through Later.
func (p *Plan) LaterUnits() []Unit {
	out := p.Analysis.LaterUnits()
	for i := range out {
		out[i].ID += p.nf
	}
	return out
}

// Later is the second stage of a run: the later units, reading the first
// stage's results.
type Later struct {
	p *Plan
	l *analysis.Later
}

// Later checks the results of every unit of Units (in any order) and
// returns the stage that computes the later units from them.
func (p *Plan) Later(res []UnitResult) (*Later, error) {
	var ar []UnitResult
	for _, r := range res {
		if r.ID < p.na {
			ar = append(ar, r)
		}
	}
	if len(res) != p.na+p.nf {
		return nil, fmt.Errorf("pipeline: %d unit results for %d units", len(res), p.na+p.nf)
	}
	l, err := p.Analysis.Later(ar)
	if err != nil {
		return nil, err
	}
	return &Later{p: p, l: l}, nil
}

// Compute runs later unit id (numbered as LaterUnits numbers it).
func (l *Later) Compute(ctx context.Context, id int) (UnitResult, error) {
	r, err := l.l.Compute(ctx, id-l.p.nf)
	r.ID = id
	return r, err
}

// Compute runs unit id.
func (p *Plan) Compute(ctx context.Context, id int) (UnitResult, error) {
	if id < p.na {
		return p.Analysis.Compute(ctx, id)
	}
	r, err := p.Figures.Compute(ctx, id-p.na)
	r.ID = id
	return r, err
}

// Finish turns every unit's result into the results table, maps and
// figures.
func (p *Plan) Finish(ctx context.Context, res []UnitResult) (*report.Results, error) {
	out, ar, fr, err := p.Combine(ctx, res)
	if err != nil {
		return nil, err
	}
	if err := p.Figures.Draw(ctx, ar, fr, out); err != nil {
		return nil, err
	}
	return out, nil
}

// Combine is Finish without the figures: the rows and maps, with the
// analysis units' results (ar, by unit ID) and the figure units' (fr,
// numbered as figures.Plan numbers them) apart, for figures.Plan.Draw, to
// which results of figures.Plan.Late units may be added. res holds every
// unit's result and, optionally, every later unit's (computed here when
// missing).
func (p *Plan) Combine(ctx context.Context, res []UnitResult) (out *report.Results, ar, fr []UnitResult, err error) {
	nl := len(p.Analysis.LaterUnits())
	if len(res) != p.na+p.nf && len(res) != p.na+p.nf+nl {
		return nil, nil, nil, fmt.Errorf("pipeline: %d unit results for %d units and %d later units", len(res), p.na+p.nf, nl)
	}
	var all []UnitResult // analysis and later units, in the analysis plan's numbering
	for _, r := range res {
		switch {
		case r.ID < p.na:
			ar = append(ar, r)
			all = append(all, r)
		case r.ID < p.na+p.nf:
			r.ID -= p.na
			fr = append(fr, r)
		default:
			r.ID -= p.nf
			all = append(all, r)
		}
	}
	if out, err = p.Analysis.Finish(ctx, all); err != nil {
		return nil, nil, nil, err
	}
	// Finish has checked the IDs; Draw reads ar by unit ID
	sorted := make([]UnitResult, p.na)
	for _, r := range ar {
		if r.ID < 0 || r.ID >= p.na {
			return nil, nil, nil, fmt.Errorf("pipeline: unit result %d is out of range", r.ID)
		}
		sorted[r.ID] = r
	}
	return out, sorted, fr, nil
}

// ComputeAll computes every unit, then every later unit, on the given
// number of goroutines; progress counts both.
func (p *Plan) ComputeAll(ctx context.Context, workers int, progress func(done, total int)) ([]UnitResult, error) {
	n, nl := p.na+p.nf, len(p.Analysis.LaterUnits())
	prog := func(before int) func(done, total int) {
		if progress == nil {
			return nil
		}
		return func(done, _ int) { progress(before+done, n+nl) }
	}
	first, err := analysis.ComputeUnits(ctx, n, workers, p.Compute, prog(0))
	if err != nil || nl == 0 {
		return first, err
	}
	l, err := p.Later(first)
	if err != nil {
		return nil, err
	}
	lr, err := analysis.ComputeUnits(ctx, nl, workers, func(ctx context.Context, k int) (UnitResult, error) {
		return l.Compute(ctx, n+k)
	}, prog(n))
	if err != nil {
		return nil, err
	}
	return append(first, lr...), nil
}

// Run plans and runs r on ds, computing units on up to GOMAXPROCS
// goroutines. progress, when not nil, is called with done/total units from
// one goroutine at a time.
func Run(ctx context.Context, r *recipe.Recipe, ds *dataset.Dataset, progress func(done, total int)) (*report.Results, error) {
	p, err := NewPlan(r, ds)
	if err != nil {
		return nil, err
	}
	return analysis.RunPlan(ctx, p, progress)
}
