package connect

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// randomBands returns n complex signals of m samples, with some exact zeros
// and one channel a scaled copy of another (zero phase lag: its
// orthogonalised envelope is 0).
func randomBands(n, m int, seed uint64) [][]complex128 {
	rng := rand.New(rand.NewPCG(seed, 7))
	z := make([][]complex128, n)
	for c := range z {
		z[c] = make([]complex128, m)
		for k := range z[c] {
			z[c][k] = complex(rng.NormFloat64()*3, rng.NormFloat64()*3)
		}
		if m > 10 {
			z[c][rng.IntN(m)] = 0
		}
	}
	if n > 2 {
		for k := range z[2] {
			z[2][k] = 2.5 * z[0][k]
		}
	}
	return z
}

// OrthEnvelopes against the pair-by-pair route it replaces (UnitPhasors and
// OrthEnvelope per ordered pair), for bins shorter and longer than a block,
// with and without segments, both envelope kinds.
func TestOrthEnvelopesPairByPair(t *testing.T) {
	for _, c := range []struct {
		name string
		n, m int
		bin  int
		segs []int
	}{
		{"2ch-bin1", 2, 300, 1, nil},
		{"3ch-bin7", 3, 1000, 7, nil},
		{"5ch-bin100", 5, 2345, 100, nil},
		{"9ch-bin300", 9, 3000, 300, nil},
		{"6ch-bin1000", 6, 2600, 1000, nil},
		{"7ch-segs", 7, 1500, 40, []int{410, 600, 490}},
		{"8ch-segs-bin1", 8, 700, 1, []int{300, 400}},
	} {
		for _, kind := range []EnvKind{Amplitude, LogPower} {
			t.Run(c.name+map[EnvKind]string{Amplitude: "/amp", LogPower: "/logpow"}[kind], func(t *testing.T) {
				z := randomBands(c.n, c.m, uint64(c.n*1000+c.bin))
				got := OrthEnvelopes(nil, z, c.bin, c.segs, kind, nil)
				if len(got) != c.n*(c.n-1) {
					t.Fatalf("%d series, want %d", len(got), c.n*(c.n-1))
				}
				var u []complex128
				worst := 0.0
				for i := range c.n {
					u = UnitPhasors(u, z[i])
					for j := range c.n {
						if i == j {
							continue
						}
						want := OrthEnvelope(nil, u, z[j], c.bin, c.segs, kind)
						g := got[OrthIndex(c.n, i, j)]
						if len(g) != len(want) || len(g) == 0 {
							t.Fatalf("(%d,%d): %d bins, want %d", i, j, len(g), len(want))
						}
						for b := range want {
							gv, wv := g[b], want[b]
							if kind == LogPower {
								// Compare the powers (µV², about 18 here): a pair at
								// zero lag (channels 0 and 2) leaves only rounding,
								// whose logarithm is noise.
								gv, wv = math.Exp(gv), math.Exp(wv)
							}
							d := math.Abs(gv - wv)
							if d > worst {
								worst = d
							}
							if d > 1e-13*math.Max(1, math.Abs(wv)) {
								t.Fatalf("(%d,%d) bin %d = %.17g, pair by pair %.17g", i, j, b, g[b], want[b])
							}
						}
					}
				}
				t.Logf("largest difference %.3g", worst)
				// A second call reuses the destination and the work space.
				var w OrthWork
				again := OrthEnvelopes(got, z, c.bin, c.segs, kind, &w)
				again = OrthEnvelopes(again, z, c.bin, c.segs, kind, &w)
				want := OrthEnvelopes(nil, z, c.bin, c.segs, kind, nil)
				for k := range want {
					for b := range want[k] {
						if again[k][b] != want[k][b] && !(math.IsNaN(want[k][b]) && math.IsNaN(again[k][b])) {
							t.Fatalf("reused call differs at series %d bin %d", k, b)
						}
					}
				}
			})
		}
	}
}

// A worked example: x = exp(iφ), y = A·exp(i(φ+θ)). Removing from y its part
// at zero lag to x leaves A·|sin θ|, and from x its part at zero lag to y
// |sin θ| (Hipp et al. 2012, Nat Neurosci 15:884; the geometry of the
// projection). With θ = π/6 and A = 4: 2 and 0.5.
func TestOrthEnvelopesWorked(t *testing.T) {
	const m, theta, amp = 50, math.Pi / 6, 4.0
	x, y := make([]complex128, m), make([]complex128, m)
	for k := range m {
		phi := 0.37 * float64(k)
		x[k] = cmplx.Exp(complex(0, phi))
		y[k] = complex(amp, 0) * cmplx.Exp(complex(0, phi+theta))
	}
	got := OrthEnvelopes(nil, [][]complex128{x, y}, 10, nil, Amplitude, nil)
	for b := range 5 {
		if v := got[OrthIndex(2, 0, 1)][b]; math.Abs(v-2) > 1e-14 {
			t.Errorf("|y⊥x| bin %d = %.17g, want 2", b, v)
		}
		if v := got[OrthIndex(2, 1, 0)][b]; math.Abs(v-0.5) > 1e-14 {
			t.Errorf("|x⊥y| bin %d = %.17g, want 0.5", b, v)
		}
	}
	lp := OrthEnvelopes(nil, [][]complex128{x, y}, 10, nil, LogPower, nil)
	if v := lp[OrthIndex(2, 0, 1)][0]; math.Abs(v-math.Log(4)) > 1e-14 {
		t.Errorf("log power of y⊥x = %.17g, want ln 4", v)
	}
	if v := lp[OrthIndex(2, 1, 0)][0]; math.Abs(v-math.Log(0.25)) > 1e-14 {
		t.Errorf("log power of x⊥y = %.17g, want ln 0.25", v)
	}
}

func TestOrthIndex(t *testing.T) {
	const n = 5
	seen := map[int]bool{}
	for i := range n {
		for j := range n {
			if i == j {
				continue
			}
			k := OrthIndex(n, i, j)
			if k < 0 || k >= n*(n-1) || seen[k] {
				t.Fatalf("OrthIndex(%d,%d,%d) = %d: out of range or taken", n, i, j, k)
			}
			seen[k] = true
		}
	}
}

func TestOrthEnvelopesNoAllocation(t *testing.T) {
	z := randomBands(6, 2000, 3)
	var w OrthWork
	dst := OrthEnvelopes(nil, z, 50, nil, Amplitude, &w)
	if a := testing.AllocsPerRun(5, func() { OrthEnvelopes(dst, z, 50, nil, Amplitude, &w) }); a > 1 {
		t.Errorf("%.0f allocations per call with reused buffers, want at most 1 (the bin closure)", a)
	}
}
