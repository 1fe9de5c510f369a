package pipeline

import (
	"bytes"
	"context"
	"slices"
	"testing"

	"amplink/core/dataset"
	"amplink/core/internal/synth"
	"amplink/core/recipe"
	"amplink/core/report"
)

// Envelope surrogates on the later units: orthogonalised time shifts (3
// blocks: 50, 50, 20), plain time shifts and a cross-band pair.
const laterRecipe = `{
  "spectral": {"low": 4, "high": 48, "steps": 23, "cycles": [4, 8]},
  "analyses": [
    {"id": "orth", "type": "envelope", "channels": ["S", "L", "G", "N"], "freq": [9, 11], "leakageCorrection": "pairwise", "surrogates": 120, "randomSeed": 2},
    {"id": "plain", "type": "envelope", "channels": ["S", "G", "N"], "freq": [9, 11], "envelopeRate": 20, "surrogates": 60, "randomSeed": 3},
    {"id": "cross", "type": "envelope", "channels": ["S", "H"], "freq": [9, 11], "targetFreq": [38, 42], "envelopeRate": 20, "surrogates": 40, "randomSeed": 4}
  ]
}`

func tablesAndFigures(res *report.Results) []byte {
	b := synth.Tables(res)
	for _, f := range res.Figures {
		b = append(b, f.Name...)
		b = append(b, f.SVG...)
	}
	return b
}

// The surrogate units give the same results byte for byte however they are
// spread: computed by Finish itself, by ComputeAll on 1 or 3 goroutines, or
// by three "workers" each with its own Later from the first units' results,
// each computing its share in reverse order (as the page's workers do).
func TestSurrogateUnitsSpread(t *testing.T) {
	ctx := context.Background()
	r, err := recipe.Parse([]byte(laterRecipe))
	if err != nil {
		t.Fatal(err)
	}
	ds := &dataset.Dataset{Name: "env", Recording: synth.Envelopes()}
	p, err := NewPlan(r, ds)
	if err != nil {
		t.Fatal(err)
	}
	// orth: 6 rows × 3 blocks; plain: 3 rows × 2; cross: 4 rows × 1
	later := p.LaterUnits()
	if len(later) != 6*3+3*2+4 {
		t.Fatalf("%d later units, want 28", len(later))
	}
	n := len(p.Units())
	for k, u := range later {
		if u.ID != n+k || u.Kind != "surrogates" {
			t.Fatalf("later unit %d: %+v, want ID %d", k, u, n+k)
		}
	}
	ref, err := Run(ctx, r, ds, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, row := range ref.Rows {
		if row.Field("p_surr") == "" || row.Field("p_surr") == "NaN" {
			t.Fatalf("row %s %s-%s has no surrogate p", row.Analysis, row.Seed, row.Target)
		}
	}
	want := tablesAndFigures(ref)

	first, err := analysisFirst(ctx, p)
	if err != nil {
		t.Fatal(err)
	}
	check := func(name string, res []UnitResult) {
		t.Helper()
		out, err := p.Finish(ctx, res)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if got := tablesAndFigures(out); !bytes.Equal(got, want) {
			t.Errorf("%s: results differ from Run's", name)
		}
	}
	check("Finish computing the later units", slices.Clone(first))
	for _, g := range []int{1, 3} {
		all, err := p.ComputeAll(ctx, g, nil)
		if err != nil {
			t.Fatal(err)
		}
		check("ComputeAll", all)
	}
	all := slices.Clone(first)
	for w := range 3 {
		// each worker's own copy of the first units' results, reversed
		mine := slices.Clone(first)
		slices.Reverse(mine)
		l, err := p.Later(mine)
		if err != nil {
			t.Fatal(err)
		}
		for k := len(later) - 1; k >= 0; k-- {
			if k%3 != w {
				continue
			}
			res, err := l.Compute(ctx, later[k].ID)
			if err != nil {
				t.Fatal(err)
			}
			all = append(all, res)
		}
	}
	check("three workers", all)
	// the blocks of a row draw from streams of their own
	l, err := p.Later(first)
	if err != nil {
		t.Fatal(err)
	}
	b0, _ := l.Compute(ctx, later[0].ID)
	b1, _ := l.Compute(ctx, later[1].ID)
	if len(b0.Values) != 50 || slices.Equal(b0.Values, b1.Values) {
		t.Errorf("row 0's first two blocks: %d values, equal %v", len(b0.Values), slices.Equal(b0.Values, b1.Values))
	}

	// the later units' values are the surrogates' r: changing one block
	// changes the results
	all[len(all)-1].Values = append([]float64(nil), all[len(all)-1].Values...)
	for i := range all[len(all)-1].Values {
		all[len(all)-1].Values[i] = 0.999
	}
	out, err := p.Finish(ctx, all)
	if err != nil {
		t.Fatal(err)
	}
	if bytes.Equal(tablesAndFigures(out), want) {
		t.Error("a changed surrogate block left the results as they were")
	}
	// too few results is an error
	if _, err := p.Finish(ctx, all[:len(all)-1]); err == nil {
		t.Error("Finish took a result short")
	}
	if _, err := p.Later(first[1:]); err == nil {
		t.Error("Later took a result short")
	}
}

// analysisFirst computes the units of Units on one goroutine.
func analysisFirst(ctx context.Context, p *Plan) ([]UnitResult, error) {
	var out []UnitResult
	for _, u := range p.Units() {
		r, err := p.Compute(ctx, u.ID)
		if err != nil {
			return nil, err
		}
		out = append(out, r)
	}
	return out, nil
}
