package stats

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// PermSE against scipy.stats.binom(n, p).std()/n
// (testdata/stats/permse_ref.py, scipy 1.10.1).
func TestPermSEScipy(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "..", "testdata", "stats", "permse_ref.json"))
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Scipy string
		Cases []struct {
			P  float64
			N  int
			SE float64
		}
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if ref.Scipy == "" || len(ref.Cases) == 0 {
		t.Fatal("permse_ref.json incomplete")
	}
	for _, c := range ref.Cases {
		if got := PermSE(c.P, c.N); math.Abs(got-c.SE) > 1e-15 {
			t.Errorf("PermSE(%g, %d) = %.17g, scipy %.17g", c.P, c.N, got, c.SE)
		}
	}
	if !math.IsNaN(PermSE(math.NaN(), 10)) || !math.IsNaN(PermSE(0.5, 0)) {
		t.Error("PermSE of NaN p or no draws is not NaN")
	}
}

// The standard error describes the spread of a permutation p: over many
// repetitions with fresh draws, PermP's values from n = 199 permutations
// of a weakly correlated pair spread by about PermSE (the binomial
// standard error, common practice), within 15 %.
func TestPermSESpread(t *testing.T) {
	x := []float64{0.1, 0.7, -0.4, 1.3, 0.2, -1.1, 0.5, 0.9, -0.3, 0.0, 1.6, -0.8, 0.4, 0.3, -0.2, 1.0, -0.6, 0.8}
	y := []float64{0.5, -0.2, 0.1, 0.9, -0.8, 0.6, 0.1, -0.4, 0.3, -0.5, 1.1, 0.2, -0.3, -0.9, 0.2, 0.3, 0.9, -0.6}
	const n, reps = 199, 400
	ps := make([]float64, reps)
	for k := range reps {
		ps[k] = PermCorr(x, y, false, n, uint64(k+1))
	}
	m, v := 0.0, 0.0
	for _, p := range ps {
		m += p
	}
	m /= reps
	for _, p := range ps {
		v += (p - m) * (p - m)
	}
	sd := math.Sqrt(v / (reps - 1))
	se := PermSE(m, n)
	t.Logf("mean p %.4f, spread %.4f, PermSE %.4f", m, sd, se)
	if math.Abs(sd-se) > 0.15*se {
		t.Errorf("spread of p over %d repetitions = %.4f, PermSE %.4f", reps, sd, se)
	}
}
