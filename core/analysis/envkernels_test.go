package analysis

import (
	"context"
	"fmt"
	"math"
	"strings"
	"testing"

	"amplink/cmd/amplink-workload/workload"
	"amplink/core/analysis/connect"
	"amplink/core/recipe"
	"amplink/core/report"
	"amplink/core/spectral"
)

// directEnvelopeR is the envelope r of every channel pair computed the way
// the units did before overlap-save and blocked orthogonalisation: per
// chunk of the retained span, one transform of the chunk's crop
// (Convolver.BandAnalytic), then UnitPhasors and OrthEnvelope per ordered
// pair (or Envelope for no correction), co-moments merged over chunks, and
// for pairwise correction the mean r of the two directions.
func directEnvelopeR(t *testing.T, ep *envPlan, p *Plan) map[[2]int]float64 {
	t.Helper()
	rec := ep.src.rec
	n := len(ep.chans)
	h := ep.src.margin
	lo0, hi0 := h, rec.Len()-h
	step := chunkLen / ep.bin * ep.bin
	orth := ep.a.Orthogonalize == OrthPairwise
	mo := map[[2]int]*connect.Moments{}
	for i := range n {
		for j := range n {
			mo[[2]int{i, j}] = new(connect.Moments)
		}
	}
	for s := lo0; s+ep.bin <= hi0; s += step {
		e := min(s+step, hi0)
		z := make([][]complex128, n)
		env := make([][]float64, n)
		for c, ch := range ep.chans {
			x := rec.Samples[ch]
			lo, hi := spectral.Crop(len(x), s, e, h)
			conv := p.bank.NewConvolver(spectral.GoodSize(hi - lo + 2*h))
			conv.Load(x[lo:hi])
			z[c] = conv.BandAnalytic(nil, ep.fa, s-lo, e-lo)
			env[c] = connect.Envelope(nil, z[c], ep.bin, nil, ep.kind)
		}
		for i := range n {
			u := connect.UnitPhasors(nil, z[i])
			for j := range n {
				if i == j {
					continue
				}
				y := env[j]
				if orth {
					y = connect.OrthEnvelope(nil, u, z[j], ep.bin, nil, ep.kind)
				}
				var m connect.Moments
				for b := range y {
					m.Add(env[i][b], y[b])
				}
				mo[[2]int{i, j}].Merge(m)
			}
		}
	}
	r := map[[2]int]float64{}
	for i := range n {
		for j := i + 1; j < n; j++ {
			if orth {
				r[[2]int{i, j}] = (mo[[2]int{i, j}].R() + mo[[2]int{j, i}].R()) / 2
			} else {
				r[[2]int{i, j}] = mo[[2]int{i, j}].R()
			}
		}
	}
	return r
}

// The envelope rows from the units (overlap-save band signals, blocked
// orthogonalisation) equal the direct route's r to 1e-12 relative, on a
// recording long enough for three chunks of many blocks each, for the
// amplitude and log-power envelopes with and without pairwise correction;
// and the results are byte-identical for 1, 2 and 3 workers.
func TestEnvelopeKernelsMatchDirectRoute(t *testing.T) {
	rec := workload.Continuous(6, 500, 300, 3)
	ds := &Dataset{Name: "wl", Recording: rec}
	for _, c := range []struct{ corr, env, rate string }{
		{"pairwise", "amplitude", "10"},
		{"pairwise", "log-power", "20"},
		{"none", "amplitude", "10"},
		{"pairwise", "amplitude", "250"},
	} {
		t.Run(c.corr+"/"+c.env+"/"+c.rate, func(t *testing.T) {
			rc := fmt.Sprintf(`{
  "spectral": {"method": "wavelet", "low": 2, "high": 60, "steps": 40, "spacing": "log", "cycles": [3, 10]},
  "analyses": [
    {"id": "e", "type": "envelope", "method": "pearson", "channels": "*", "freq": [8, 12],
     "leakageCorrection": %q, "envelope": %q, "envelopeRate": %s, "over": "recording"}
  ]
}`, c.corr, c.env, c.rate)
			r, err := recipe.Parse([]byte(rc))
			if err != nil {
				t.Fatal(err)
			}
			var outs []string
			var res *report.Results
			var p *Plan
			for _, w := range []int{1, 2, 3} {
				p, err = NewPlan(r, ds)
				if err != nil {
					t.Fatal(err)
				}
				ur, err := p.ComputeAll(context.Background(), w, nil)
				if err != nil {
					t.Fatal(err)
				}
				if res, err = p.Finish(context.Background(), ur); err != nil {
					t.Fatal(err)
				}
				var b strings.Builder
				if err := report.WriteCSV(&b, res); err != nil {
					t.Fatal(err)
				}
				outs = append(outs, b.String())
			}
			if outs[0] != outs[1] || outs[0] != outs[2] {
				t.Error("results differ across worker counts")
			}
			var ep *envPlan
			for _, f := range p.finish {
				if e, ok := f.(*envPlan); ok {
					ep = e
				}
			}
			if ep == nil || len(ep.units) < 3 {
				t.Fatalf("want an envelope analysis of at least 3 chunks, got %v", ep)
			}
			want := directEnvelopeR(t, ep, p)
			if len(res.Rows) != len(want) {
				t.Fatalf("%d rows, want %d", len(res.Rows), len(want))
			}
			worst := 0.0
			for _, row := range res.Rows {
				i, j := indexOf(ep.names, row.Seed), indexOf(ep.names, row.Target)
				w, ok := want[[2]int{i, j}]
				if !ok || math.IsNaN(w) || math.IsNaN(row.R) {
					t.Fatalf("row %s–%s: r = %v, direct route %v", row.Seed, row.Target, row.R, w)
				}
				d := math.Abs(row.R-w) / math.Abs(w)
				worst = math.Max(worst, d)
				if d > 1e-12 {
					t.Errorf("row %s–%s: r = %.17g, direct route %.17g (relative %.3g)", row.Seed, row.Target, row.R, w, d)
				}
			}
			t.Logf("largest relative difference in r: %.3g", worst)
		})
	}
}

func indexOf(names []string, s string) int {
	for i, n := range names {
		if n == s {
			return i
		}
	}
	return -1
}
