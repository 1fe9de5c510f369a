package workload

import (
	"context"
	"math"
	"slices"
	"strconv"
	"testing"

	"amplink/core/dataset"
	"amplink/core/pipeline"
	"amplink/core/recipe"
	"amplink/core/report"
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
