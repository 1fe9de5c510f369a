package demo

import (
	"context"
	"math"
	"testing"

	"amplink/core/dataset"
	"amplink/core/pipeline"
	"amplink/core/recipe"
	"amplink/core/report"
)

// The demo's planted effects are found by the demo recipe, and its absent
// couplings are not (ground truth of the simulation).
func TestDemoPlantedEffects(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the whole demo")
	}
	r, err := recipe.Parse(Recipe())
	if err != nil {
		t.Fatal(err)
	}
	rec := Recording()
	ds := &dataset.Dataset{Name: "demo", Recording: rec, Epochs: Epochs()}
	res, err := pipeline.Run(context.Background(), r, ds, nil)
	if err != nil {
		t.Fatal(err)
	}
	get := func(a, s, tg string) report.Row {
		for _, row := range res.Rows {
			if row.Analysis == a && row.Seed == s && row.Target == tg {
				return row
			}
		}
		t.Fatalf("no row %s %s-%s", a, s, tg)
		return report.Row{}
	}
	for _, row := range res.Rows {
		t.Logf("%s %s-%s r=%.3f p=%.3g", row.Analysis, row.Seed, row.Target, row.R, row.P)
	}
	if r := get("beta-to-delta", "C4", "Pz"); r.R < 0.25 || r.P > 1e-4 {
		t.Errorf("planted C4 beta → Pz delta: r = %.3f, p = %.3g", r.R, r.P)
	}
	if r := get("beta-to-delta", "C4", "Fz"); math.Abs(r.R) > 0.2 {
		t.Errorf("absent C4 beta → Fz delta: r = %.3f", r.R)
	}
	if r := get("posterior-alpha", "O1", "O2"); r.R < 0.25 {
		t.Errorf("planted O1–O2 alpha envelope coupling, orthogonalised: r = %.3f", r.R)
	}
	if r := get("posterior-alpha-plain", "O1", "P3"); r.R < 0.5 {
		t.Errorf("leakage O1–P3, plain: r = %.3f, want high", r.R)
	}
	if r := get("posterior-alpha", "O1", "P3"); math.Abs(r.R) > 0.15 {
		t.Errorf("leakage O1–P3, orthogonalised: r = %.3f, want near 0", r.R)
	}
	if r := get("temporal-beta-gamma", "T7", "T8"); r.R < 0.3 {
		t.Errorf("planted T7 beta – T8 gamma envelopes: r = %.3f", r.R)
	}
}
