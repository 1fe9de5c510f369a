package connect

import (
	"encoding/json"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// closestRef mirrors testdata/connect/closest_orth.json, written by
// testdata/connect/symmetric_ref.py (numpy 1.24.2, scipy 1.10.1).
type closestRef struct {
	Numpy, Scipy string
	Cases        []struct {
		N, T     int
		Z, D     []float64
		Residual float64
	}
}

// ClosestOrthogonal against scipy.optimize: on small random cases the
// alternating iteration reaches the minimum of ‖Z − D·O‖_F that
// scipy.optimize.minimize finds over d (with O profiled out exactly by the
// orthogonal Procrustes solution; testdata/connect/symmetric_ref.py), with
// the same d, and W·Z has mutually orthogonal rows of norms d.
func TestClosestOrthogonalScipy(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "..", "..", "testdata", "connect", "closest_orth.json"))
	if err != nil {
		t.Fatal(err)
	}
	var ref closestRef
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if ref.Scipy == "" || len(ref.Cases) == 0 {
		t.Fatal("closest_orth.json incomplete")
	}
	for _, c := range ref.Cases {
		t.Run(fmt.Sprintf("%dx%d", c.N, c.T), func(t *testing.T) {
			z := mat.NewDense(c.N, c.T, c.Z)
			w, iters, err := ClosestOrthogonal(envGram(z), c.N)
			if err != nil {
				t.Fatal(err)
			}
			var o, diff, g mat.Dense
			o.Mul(mat.NewDense(c.N, c.N, w), z)
			diff.Sub(z, &o)
			resid := mat.Norm(&diff, 2)
			// scipy.optimize minimum (symmetric_ref.py); Nelder–Mead stops
			// near 1e-13 in d, so agreement to 1e-8 is its precision.
			if math.Abs(resid-c.Residual) > 1e-8*math.Max(1, c.Residual) {
				t.Errorf("‖Z − D·O‖ = %.12g after %d iterations, scipy minimum %.12g", resid, iters, c.Residual)
			}
			g.Mul(&o, o.T())
			for i := range c.N {
				if d := math.Sqrt(g.At(i, i)); math.Abs(d-c.D[i]) > 1e-6*c.D[i] {
					t.Errorf("d[%d] = %.10g, scipy %.10g", i, d, c.D[i])
				}
				for j := range c.N {
					if i != j && math.Abs(g.At(i, j)) > 1e-8*c.D[i]*c.D[j] {
						t.Errorf("rows %d, %d of D·O not orthogonal: %g", i, j, g.At(i, j))
					}
				}
			}
			t.Logf("%d iterations", iters)
		})
	}
}

// The closest orthogonal set is never farther from Z than the closest
// orthonormal set rescaled row by row (Löwdin's symmetric orthogonalisation
// with the input norms), which is one admissible D·O: the minimum is at
// most that (a check of optimality on random mixtures).
func TestClosestOrthogonalBeatsRescaled(t *testing.T) {
	rng := rand.New(rand.NewPCG(31, 1))
	for _, c := range []struct{ n, T int }{{2, 50}, {3, 200}, {6, 400}} {
		z := envMixed(rng, c.n, c.T)
		o := envOrth(t, z)
		var svd mat.SVD
		if !svd.Factorize(z, mat.SVDThin) {
			t.Fatal("SVD failed")
		}
		var u, v, uv, d1, d2 mat.Dense
		svd.UTo(&u)
		svd.VTo(&v)
		uv.Mul(&u, v.T())
		for i := range c.n {
			s := mat.Norm(z.RowView(i), 2)
			for j := range c.T {
				uv.Set(i, j, uv.At(i, j)*s)
			}
		}
		d1.Sub(z, o)
		d2.Sub(z, &uv)
		if a, b := mat.Norm(&d1, 2), mat.Norm(&d2, 2); a > b*(1+1e-12) {
			t.Errorf("%dx%d: ‖Z − D·O‖ = %g above the rescaled orthonormal set's %g", c.n, c.T, a, b)
		}
	}
}

// Binned amplitude and log-power envelopes, plain and orthogonalised,
// against numpy (testdata/connect/logpower_ref.py).
func TestEnvelopeKindsNumpy(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "..", "..", "testdata", "connect", "logpower_ref.json"))
	if err != nil {
		t.Fatal(err)
	}
	var raw map[string]json.RawMessage
	if err := json.Unmarshal(b, &raw); err != nil {
		t.Fatal(err)
	}
	get := func(k string, v any) {
		if err := json.Unmarshal(raw[k], v); err != nil {
			t.Fatalf("%s: %v", k, err)
		}
	}
	var segs []int
	var bin int
	var xr, xi, yr, yi, ampX, lpX, ampYX, lpYX []float64
	get("segs", &segs)
	get("bin", &bin)
	get("x_re", &xr)
	get("x_im", &xi)
	get("y_re", &yr)
	get("y_im", &yi)
	get("amp_x", &ampX)
	get("logpow_x", &lpX)
	get("amp_yx", &ampYX)
	get("logpow_yx", &lpYX)
	x, y := make([]complex128, len(xr)), make([]complex128, len(yr))
	for i := range x {
		x[i], y[i] = complex(xr[i], xi[i]), complex(yr[i], yi[i])
	}
	u := UnitPhasors(nil, x)
	for _, c := range []struct {
		name      string
		got, want []float64
	}{
		{"amplitude", Envelope(nil, x, bin, segs, Amplitude), ampX},
		{"log power", Envelope(nil, x, bin, segs, LogPower), lpX},
		{"orthogonalised amplitude", OrthEnvelope(nil, u, y, bin, segs, Amplitude), ampYX},
		{"orthogonalised log power", OrthEnvelope(nil, u, y, bin, segs, LogPower), lpYX},
	} {
		if len(c.got) != len(c.want) {
			t.Fatalf("%s: %d bins, numpy %d", c.name, len(c.got), len(c.want))
		}
		for i := range c.got {
			if !closeRel(c.got[i], c.want[i], 1e-12) {
				t.Errorf("%s[%d] = %.15g, numpy %.15g", c.name, i, c.got[i], c.want[i])
			}
		}
	}
}

// Rotate is a circular shift: Rotate(y, lag)[t] = y[(t+lag) mod n].
func TestRotate(t *testing.T) {
	y := []complex128{1, 2i, 3, 4i, 5}
	for lag := range len(y) {
		got := Rotate(nil, y, lag)
		for k := range y {
			if got[k] != y[(k+lag)%len(y)] {
				t.Fatalf("lag %d: %v", lag, got)
			}
		}
	}
}

// PairTerms of a shifted Y against the definitions: pairwise terms are
// |X| with mean |Im(y_s·x̄)|/|x| and |Y_s| with mean |Im(x·ȳ_s)|/|y_s| per
// bin (OrthAmp; Hipp et al. 2012), computed here sample by sample on the
// shifted copy; symmetric terms are the envelopes of SymmetricCorrect of
// the set with Y shifted, segment by segment.
func TestPairTermsShifted(t *testing.T) {
	rng := rand.New(rand.NewPCG(33, 1))
	const n, m, bin, lag = 3, 120, 4, 37
	z := make([][]complex128, n)
	for c := range z {
		z[c] = make([]complex128, m)
		for k := range z[c] {
			z[c][k] = envRandComplex(rng)
		}
	}
	for k := range m { // leakage of channel 0 into 1
		z[1][k] += 0.7 * z[0][k]
	}
	segs := []int{70, 50}
	ys := Rotate(nil, z[1], lag)
	for _, kind := range []EnvKind{Amplitude, LogPower} {
		fin := func(s float64) float64 {
			if kind == LogPower {
				return math.Log(s / bin)
			}
			return s / bin
		}
		amp := func(v float64) float64 {
			if kind == LogPower {
				return v * v
			}
			return math.Abs(v)
		}
		terms, err := PairTerms(z, 0, 1, ys, PairwiseOrth, bin, segs, kind)
		if err != nil {
			t.Fatal(err)
		}
		var want [4][]float64
		off := 0
		for _, l := range segs {
			for s := 0; s+bin <= l; s += bin {
				var a, b, c, d float64
				for k := off + s; k < off+s+bin; k++ {
					a += amp(cmplx.Abs(z[0][k]))
					b += amp(OrthAmp(z[0][k], ys[k]))
					c += amp(cmplx.Abs(ys[k]))
					d += amp(OrthAmp(ys[k], z[0][k]))
				}
				for i, v := range []float64{a, b, c, d} {
					want[i] = append(want[i], fin(v))
				}
			}
			off += l
		}
		got := [4][]float64{terms[0][0], terms[0][1], terms[1][0], terms[1][1]}
		for i := range got {
			if len(got[i]) != len(want[i]) {
				t.Fatalf("kind %d series %d: %d bins, want %d", kind, i, len(got[i]), len(want[i]))
			}
			for b := range got[i] {
				if !closeRel(got[i][b], want[i][b], 1e-12) {
					t.Errorf("kind %d pairwise series %d bin %d = %.15g, want %.15g", kind, i, b, got[i][b], want[i][b])
				}
			}
		}
		// Symmetric: the set with Y shifted, corrected per segment.
		terms, err = PairTerms(z, 0, 1, ys, SymmetricOrth, bin, segs, kind)
		if err != nil {
			t.Fatal(err)
		}
		var wx, wy []float64
		off = 0
		for _, l := range segs {
			set := [][]complex128{z[0][off : off+l], ys[off : off+l], z[2][off : off+l]}
			o, err := SymmetricCorrect(set, []int{0, 1})
			if err != nil {
				t.Fatal(err)
			}
			wx = append(wx, Envelope(nil, o[0], bin, nil, kind)...)
			wy = append(wy, Envelope(nil, o[1], bin, nil, kind)...)
			off += l
		}
		for b := range wx {
			if !closeRel(terms[0][0][b], wx[b], 1e-9) || !closeRel(terms[0][1][b], wy[b], 1e-9) {
				t.Fatalf("kind %d symmetric bin %d: %v, %v, want %v, %v", kind, b, terms[0][0][b], terms[0][1][b], wx[b], wy[b])
			}
		}
	}
}

// Shifted and Permuted read channel j at an offset; they must equal Terms
// of an explicitly shifted or permuted copy (Rotate, PermuteSegments).
func TestPairTermerShiftedPermuted(t *testing.T) {
	rng := rand.New(rand.NewPCG(34, 1))
	const n, trials, segLen, bin = 3, 4, 30, 4
	m := trials * segLen
	z := make([][]complex128, n)
	for c := range z {
		z[c] = make([]complex128, m)
		for k := range z[c] {
			z[c][k] = envRandComplex(rng)
		}
	}
	segs := []int{segLen, segLen, segLen, segLen}
	perm := []int{2, 0, 3, 1}
	for _, corr := range []Leakage{NoLeakageCorrection, PairwiseOrth, SymmetricOrth} {
		for _, kind := range []EnvKind{Amplitude, LogPower} {
			pt := NewPairTermer(z, 0, 2, corr, bin, segs, kind)
			for _, c := range []struct {
				name      string
				got, want func() ([][2][]float64, error)
			}{
				{"shifted", func() ([][2][]float64, error) { return pt.Shifted(47) }, func() ([][2][]float64, error) { return pt.Terms(Rotate(nil, z[2], 47)) }},
				{"permuted", func() ([][2][]float64, error) { return pt.Permuted(perm, segLen) }, func() ([][2][]float64, error) { return pt.Terms(PermuteSegments(nil, z[2], segLen, perm)) }},
			} {
				got, err1 := c.got()
				want, err2 := c.want()
				if err1 != nil || err2 != nil {
					t.Fatal(err1, err2)
				}
				for tm := range want {
					for s := range 2 {
						for b := range want[tm][s] {
							if !closeRel(got[tm][s][b], want[tm][s][b], 1e-12) {
								t.Fatalf("leakage %d kind %d %s term %d series %d bin %d: %v, want %v", corr, kind, c.name, tm, s, b, got[tm][s][b], want[tm][s][b])
							}
						}
					}
				}
			}
		}
	}
}
