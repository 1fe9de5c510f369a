package workload

import (
	"context"
	"crypto/sha256"
	"encoding/binary"
	"fmt"
	"math"
	"slices"
	"strconv"
	"testing"

	"amplink/core/dataset"
	"amplink/core/pipeline"
	"amplink/core/recipe"
	"amplink/core/report"
	"amplink/core/stats"
)

func TestDeterministic(t *testing.T) {
	for _, c := range []struct {
		name string
		a, b []float32
		same bool
	}{
		{"epochs same seed", Epochs(4, 1).Data, Epochs(4, 1).Data, true},
		{"epochs other seed", Epochs(4, 1).Data, Epochs(4, 2).Data, false},
		{"continuous same seed", Continuous(3, 500, 2, 1).Samples[2], Continuous(3, 500, 2, 1).Samples[2], true},
		{"continuous other seed", Continuous(3, 500, 2, 1).Samples[2], Continuous(3, 500, 2, 2).Samples[2], false},
	} {
		t.Run(c.name, func(t *testing.T) {
			if got := slices.Equal(c.a, c.b); got != c.same {
				t.Errorf("equal = %v, want %v", got, c.same)
			}
		})
	}
}

func TestShapes(t *testing.T) {
	e := Epochs(3, 1)
	r := Continuous(5, 1000, 1.5, 1)
	for _, c := range []struct {
		name      string
		got, want int
	}{
		{"epoch channels", len(e.Channels), StdChannels},
		{"epoch trials", e.NTrials, 3},
		{"epoch samples", e.NSamples, StdSamples},
		{"epoch data", len(e.Data), 3 * StdChannels * StdSamples},
		{"continuous channels", len(r.Samples), 5},
		{"continuous samples", r.Len(), 1500},
	} {
		t.Run(c.name, func(t *testing.T) {
			if c.got != c.want {
				t.Errorf("got %d, want %d", c.got, c.want)
			}
		})
	}
	if err := e.Validate(); err != nil {
		t.Error(err)
	}
	if e.Channels[31].Name != "E32" || e.Start != StdStart || e.Rate != StdRate {
		t.Errorf("channel 32 %q, start %v, rate %v", e.Channels[31].Name, e.Start, e.Rate)
	}
}

func run(t *testing.T, src string, ds *dataset.Dataset) *report.Results {
	t.Helper()
	rc, err := recipe.Parse([]byte(src))
	if err != nil {
		t.Fatal(err)
	}
	res, err := pipeline.Run(context.Background(), rc, ds, nil)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

func chanNum(t *testing.T, name string) int {
	t.Helper()
	n, err := strconv.Atoi(name[1:])
	if err != nil {
		t.Fatalf("channel %q: %v", name, err)
	}
	return n
}

// TestPlantedWindowCoupling checks the structure documented on Epochs: the
// seed power of channels 1–8 predicts the target power of channels 9–16 and
// of no other channel.
func TestPlantedWindowCoupling(t *testing.T) {
	res := run(t, StdRecipe, &dataset.Dataset{Name: "w", Epochs: Epochs(80, 1)})
	if len(res.Rows) != StdChannels*StdChannels {
		t.Fatalf("%d rows, want %d", len(res.Rows), StdChannels*StdChannels)
	}
	var planted, other, np, no float64
	for _, r := range res.Rows {
		s, g := chanNum(t, r.Seed), chanNum(t, r.Target)
		if s <= 8 && g >= 9 && g <= 16 {
			planted += r.R
			np++
		} else {
			other += r.R
			no++
		}
	}
	planted /= np
	other /= no
	// log v = 0.7 log u + noise: a rank correlation near 0.6, diluted by the
	// background noise in both windows.
	for _, c := range []struct {
		name string
		ok   bool
	}{
		{"planted pairs correlate", planted > 0.35},
		{"other pairs do not", math.Abs(other) < 0.05},
	} {
		t.Run(c.name, func(t *testing.T) {
			if !c.ok {
				t.Errorf("mean r planted %.3f, other %.3f", planted, other)
			}
		})
	}
}

// TestPlantedEnvelopeCoupling checks the structure documented on
// Continuous: neighbouring channels share a source at a 25 ms lag, which
// survives orthogonalisation; channels two apart share none.
func TestPlantedEnvelopeCoupling(t *testing.T) {
	res := run(t, EnvelopeRecipe, &dataset.Dataset{Name: "c", Recording: Continuous(4, 500, 120, 1)})
	if len(res.Rows) != 6 {
		t.Fatalf("%d rows, want 6 (all pairs of 4 channels)", len(res.Rows))
	}
	r := map[[2]int]float64{}
	for _, row := range res.Rows {
		r[[2]int{chanNum(t, row.Seed), chanNum(t, row.Target)}] = row.R
	}
	for _, c := range []struct {
		name       string
		near, far  [2]int
		minSpacing float64
	}{
		{"E01-E02 above E01-E03", [2]int{1, 2}, [2]int{1, 3}, 0.1},
		{"E02-E03 above E02-E04", [2]int{2, 3}, [2]int{2, 4}, 0.1},
	} {
		t.Run(c.name, func(t *testing.T) {
			if !(r[c.near] > r[c.far]+c.minSpacing) {
				t.Errorf("r%v = %.3f, r%v = %.3f", c.near, r[c.near], c.far, r[c.far])
			}
		})
	}
}

// The standard epochs stay what they were before EpochsN took a channel
// count: the SHA-256 of Epochs(5, 7)'s float32 samples (little-endian) as
// the generator of commit 3924bcd wrote them. A 306-channel set has the
// block layout of the doc comment.
func TestEpochsNStandard(t *testing.T) {
	h := sha256.New()
	if err := binary.Write(h, binary.LittleEndian, Epochs(5, 7).Data); err != nil {
		t.Fatal(err)
	}
	if got, want := fmt.Sprintf("%x", h.Sum(nil)), "fb0b53fd43602089b27ddea3a5988c4a4330e5ff60bfe065006a4e35482dd75f"; got != want {
		t.Errorf("standard epochs changed: sha256 %s, want %s", got, want)
	}
	e := EpochsN(306, 3, 1)
	if len(e.Channels) != 306 || e.Channels[305].Name != "E306" || len(e.Data) != 3*306*StdSamples {
		t.Fatalf("306 channels: %d channels, last %q, %d samples", len(e.Channels), e.Channels[len(e.Channels)-1].Name, len(e.Data))
	}
	if !slices.Equal(EpochsN(StdChannels, 4, 1).Data, Epochs(4, 1).Data) {
		t.Error("EpochsN(32, …) differs from Epochs(…)")
	}
}

// Tables keeps every cell of the template but the recording, r and p; r
// moves on the z scale and p is the t-test p of the new r; the same seed
// gives the same tables and another seed others.
func TestTables(t *testing.T) {
	nan := math.NaN()
	tmpl := &report.Results{Rows: []report.Row{
		{Analysis: "a", Type: "trial-window", Seed: "E01", Target: "E02", Method: "spearman", N: 50, R: 0.4, P: 0.004,
			Extra: []report.Field{{Name: "note", Value: ""}, {Name: "recording", Value: "x.f32"}}},
		{Analysis: "a", Type: "trial-window", Seed: "E01", Target: "E03", Method: "spearman", N: 50, R: nan, P: nan,
			Extra: []report.Field{{Name: "note", Value: "undefined"}, {Name: "recording", Value: "x.f32"}}},
	}}
	collect := func(seed uint64) []report.Results {
		var out []report.Results
		if err := Tables(tmpl, 3, seed, func(i int, res *report.Results) error {
			out = append(out, *res)
			return nil
		}); err != nil {
			t.Fatal(err)
		}
		return out
	}
	a, b, c := collect(1), collect(1), collect(2)
	for i, res := range a {
		for j, row := range res.Rows {
			if got := row.Field("recording"); got != TableName(i) {
				t.Errorf("table %d row %d: recording %q, want %q", i, j, got, TableName(i))
			}
			if row.Field("note") != tmpl.Rows[j].Field("note") || row.Seed != tmpl.Rows[j].Seed || row.N != tmpl.Rows[j].N {
				t.Errorf("table %d row %d: other cells changed: %+v", i, j, row)
			}
			if row.R != b[i].Rows[j].R && !(math.IsNaN(row.R) && math.IsNaN(b[i].Rows[j].R)) {
				t.Errorf("table %d row %d: same seed, r %v and %v", i, j, row.R, b[i].Rows[j].R)
			}
		}
		r := res.Rows[0].R
		if r == 0.4 || math.Abs(r) >= 1 || r == c[i].Rows[0].R {
			t.Errorf("table %d: r = %v (other seed %v), want a new value in (-1, 1)", i, r, c[i].Rows[0].R)
		}
		if want := stats.PValueT(r, 48); res.Rows[0].P != want {
			t.Errorf("table %d: p = %v, want %v", i, res.Rows[0].P, want)
		}
		if !math.IsNaN(res.Rows[1].R) || !math.IsNaN(res.Rows[1].P) {
			t.Errorf("table %d: an undefined r became %v", i, res.Rows[1].R)
		}
	}
	if tmpl.Rows[0].Field("recording") != "x.f32" {
		t.Error("Tables changed the template")
	}
}
