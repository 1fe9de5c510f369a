// Package pipeline runs a recipe on a dataset from start to end: the
// analysis plan (core/analysis) and the figures drawn from its results
// (core/figures) as one list of independent units, so that the command line
// (on goroutines) and the page (on Web Workers) share one way of splitting,
// computing and finishing a run.
//
// Units 0 … A−1 are the analysis units, A … A+F−1 the figure units (power
// maps), in that order; Finish combines the analysis units into rows and
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
}

// NewPlan checks r against ds and lists every unit of the run.
func NewPlan(r *recipe.Recipe, ds *dataset.Dataset) (*Plan, error) {
	ap, err := analysis.NewPlan(r, ds)
	if err != nil {
		return nil, err
	}
	return &Plan{Analysis: ap, Figures: figures.NewPlan(ap), na: len(ap.Units())}, nil
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
// which results of figures.Plan.Late units may be added.
func (p *Plan) Combine(ctx context.Context, res []UnitResult) (out *report.Results, ar, fr []UnitResult, err error) {
	nf := len(p.Figures.Units())
	if len(res) != p.na+nf {
		return nil, nil, nil, fmt.Errorf("pipeline: %d unit results for %d units", len(res), p.na+nf)
	}
	for _, r := range res {
		if r.ID < p.na {
			ar = append(ar, r)
		} else {
			r.ID -= p.na
			fr = append(fr, r)
		}
	}
	if out, err = p.Analysis.Finish(ctx, ar); err != nil {
		return nil, nil, nil, err
	}
	// Finish has checked ar; Draw reads it by unit ID
	sorted := make([]UnitResult, len(ar))
	for _, r := range ar {
		sorted[r.ID] = r
	}
	return out, sorted, fr, nil
}

// ComputeAll computes every unit on the given number of goroutines.
func (p *Plan) ComputeAll(ctx context.Context, workers int, progress func(done, total int)) ([]UnitResult, error) {
	return analysis.ComputeUnits(ctx, p.na+len(p.Figures.Units()), workers, p.Compute, progress)
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
