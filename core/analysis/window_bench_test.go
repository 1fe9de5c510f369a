package analysis_test

import (
	"context"
	"fmt"
	"io"
	"testing"

	"amplink/cmd/amplink-workload/workload"
	"amplink/core/dataset"
	"amplink/core/pipeline"
	"amplink/core/recipe"
	"amplink/core/report"
)

// BenchmarkStandardWindow runs the standard trial-window workload
// (cmd/amplink-workload: 32 channels, 2.5 s epochs at 500 Hz, 40 frequencies,
// 32 × 32 Spearman rows, figures off) in memory through pipeline.Run, for a
// reduced and the full trial count, and through Plan.ComputeAll with 1 and 2
// workers; "figures" is pipeline.Run of the same analysis with the default
// figures, which add trial-averaged power maps. It reports trial-channels
// processed per second (each is two window powers: seed and target).
func BenchmarkStandardWindow(b *testing.B) {
	rc, err := recipe.Parse([]byte(workload.StdRecipe))
	if err != nil {
		b.Fatal(err)
	}
	rcFig, err := recipe.Parse([]byte(workload.StdRecipeFigures))
	if err != nil {
		b.Fatal(err)
	}
	for _, trials := range []int{50, workload.StdTrials} {
		e := workload.Epochs(trials, 1)
		ds := &dataset.Dataset{Name: "workload.f32", Format: "f32", Epochs: e}
		perOp := float64(trials * len(e.Channels))
		for _, c := range []struct {
			name string
			rc   *recipe.Recipe
		}{{"Run", rc}, {"Run/figures", rcFig}} {
			if c.rc == rcFig && trials != 50 {
				continue
			}
			b.Run(fmt.Sprintf("trials=%d/%s", trials, c.name), func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					res, err := pipeline.Run(context.Background(), c.rc, ds, nil)
					if err != nil {
						b.Fatal(err)
					}
					if len(res.Rows) != 1024 {
						b.Fatalf("%d rows, want 1024", len(res.Rows))
					}
				}
				b.ReportMetric(perOp*float64(b.N)/b.Elapsed().Seconds(), "trialchans/s")
			})
		}
		for _, workers := range []int{1, 2} {
			b.Run(fmt.Sprintf("trials=%d/workers=%d", trials, workers), func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					p, err := pipeline.NewPlan(rc, ds)
					if err != nil {
						b.Fatal(err)
					}
					res, err := p.ComputeAll(context.Background(), workers, nil)
					if err != nil {
						b.Fatal(err)
					}
					if _, err := p.Finish(context.Background(), res); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric(perOp*float64(b.N)/b.Elapsed().Seconds(), "trialchans/s")
			})
		}
	}
}

// BenchmarkStandardFinish is the combining step of the standard workload
// (32 × 32 Spearman pairs over 200 trials from the units' window powers,
// then results.csv and results.json), which the page runs on one worker
// after the others have sent their units.
func BenchmarkStandardFinish(b *testing.B) {
	rc, err := recipe.Parse([]byte(workload.StdRecipe))
	if err != nil {
		b.Fatal(err)
	}
	ds := &dataset.Dataset{Name: "workload.f32", Format: "f32", Epochs: workload.Epochs(workload.StdTrials, 1)}
	p, err := pipeline.NewPlan(rc, ds)
	if err != nil {
		b.Fatal(err)
	}
	units, err := p.ComputeAll(context.Background(), 2, nil)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		res, err := p.Finish(context.Background(), units)
		if err != nil {
			b.Fatal(err)
		}
		if err := report.WriteCSV(io.Discard, res); err != nil {
			b.Fatal(err)
		}
		if err := report.WriteJSON(io.Discard, res); err != nil {
			b.Fatal(err)
		}
	}
}
