package demo

import (
	"context"
	"testing"

	"amplink/core/dataset"
	"amplink/core/pipeline"
	"amplink/core/recipe"
)

// BenchmarkSeedToAllPermutations is the statistics workload of a study: the
// demo's C4 seed against every channel (19 rows), Spearman, with 1000 and
// 5000 permutations and FDR, figures off. The window powers are computed
// once outside the timer; the loop times the inference (Finish).
func BenchmarkSeedToAllPermutations(b *testing.B) {
	for _, perms := range []string{"1000", "5000"} {
		b.Run(perms, func(b *testing.B) {
			r, err := recipe.Parse([]byte(`{"figures": false, "spectral": {"low": 2, "high": 80, "steps": 36, "cycles": [3, 10]},
  "analyses": [{"id": "a", "type": "trial-window", "seed": {"channel": "C4", "time": [-0.5, -0.1], "freq": [15, 25]},
    "target": {"channel": "*", "time": [0.3, 0.8], "freq": [1.5, 3.5]}, "permutations": ` + perms + `, "randomSeed": 7, "correction": "fdr"}]}`))
			if err != nil {
				b.Fatal(err)
			}
			p, err := pipeline.NewPlan(r, &dataset.Dataset{Name: "demo", Epochs: Epochs()})
			if err != nil {
				b.Fatal(err)
			}
			ctx := context.Background()
			res, err := p.ComputeAll(ctx, 2, nil)
			if err != nil {
				b.Fatal(err)
			}
			b.ResetTimer()
			for range b.N {
				if _, err := p.Finish(ctx, res); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkDemoWindowPower times the window-power units of the same
// analysis (19 channels × 180 trials, cropped convolutions) on 2 goroutines.
func BenchmarkDemoWindowPower(b *testing.B) {
	r, err := recipe.Parse([]byte(`{"figures": false, "spectral": {"low": 2, "high": 80, "steps": 36, "cycles": [3, 10]},
  "analyses": [{"id": "a", "type": "trial-window", "seed": {"channel": "C4", "time": [-0.5, -0.1], "freq": [15, 25]},
    "target": {"channel": "*", "time": [0.3, 0.8], "freq": [1.5, 3.5]}}]}`))
	if err != nil {
		b.Fatal(err)
	}
	p, err := pipeline.NewPlan(r, &dataset.Dataset{Name: "demo", Epochs: Epochs()})
	if err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	for range b.N {
		if _, err := p.ComputeAll(context.Background(), 2, nil); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkDemoFinish times combining the whole demo recipe's units into
// rows, maps and figures (pipeline.Plan.Finish) on one goroutine: what the
// page's worker 0 does after the units come back. The units are computed
// once outside the timer.
func BenchmarkDemoFinish(b *testing.B) {
	r, err := recipe.Parse(Recipe())
	if err != nil {
		b.Fatal(err)
	}
	p, err := pipeline.NewPlan(r, &dataset.Dataset{Name: "demo", Recording: Recording(), Epochs: Epochs()})
	if err != nil {
		b.Fatal(err)
	}
	ctx := context.Background()
	res, err := p.ComputeAll(ctx, 2, nil)
	if err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	for range b.N {
		if _, err := p.Finish(ctx, res); err != nil {
			b.Fatal(err)
		}
	}
}
