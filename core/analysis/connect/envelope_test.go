package connect

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"testing"

	"gonum.org/v1/gonum/mat"

	"amplink/core/spectral"
	"amplink/core/stats"
)

// closeRel reports whether got is within tol of want, relative to
// max(1, |want|).
func closeRel(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol*math.Max(1, math.Abs(want))
}

func envRandComplex(rng *rand.Rand) complex128 {
	return complex(rng.NormFloat64()*math.Exp(rng.NormFloat64()), rng.NormFloat64()*math.Exp(rng.NormFloat64()))
}

// Identities of the orthogonalised amplitude [computed, REFERENCES.md
// "Envelope (power) correlation"]: Y = 2X gives Y⊥X ≡ 0, Y = iX gives
// |Y⊥X| = |X|, and in general Im(Y·X̄)/|X| = |Y|·sin(φY − φX) (Hipp et al.
// 2012, Nat Neurosci 15:884).
func TestOrthAmp(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 1))
	cases := []struct {
		name string
		y    func(x complex128) complex128
		want func(x, y complex128) float64
	}{
		{"Y=2X", func(x complex128) complex128 { return 2 * x }, func(x, y complex128) float64 { return 0 }},
		{"Y=-0.5X", func(x complex128) complex128 { return -0.5 * x }, func(x, y complex128) float64 { return 0 }},
		{"Y=iX", func(x complex128) complex128 { return 1i * x }, func(x, y complex128) float64 { return cmplx.Abs(x) }},
		{"Y=-3iX", func(x complex128) complex128 { return -3i * x }, func(x, y complex128) float64 { return 3 * cmplx.Abs(x) }},
		{"random: |Y|·|sin(φY−φX)|", func(complex128) complex128 { return envRandComplex(rng) },
			func(x, y complex128) float64 { return cmplx.Abs(y) * math.Abs(math.Sin(cmplx.Phase(y)-cmplx.Phase(x))) }},
		{"random: |Im(Y·conj X)|/|X|", func(complex128) complex128 { return envRandComplex(rng) },
			func(x, y complex128) float64 { return math.Abs(imag(y*cmplx.Conj(x))) / cmplx.Abs(x) }},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			for range 1000 {
				x := envRandComplex(rng)
				y := c.y(x)
				got, want := OrthAmp(x, y), c.want(x, y)
				// Scale the tolerance by |Y|, the size of the inputs.
				if math.Abs(got-want) > 1e-12*math.Max(1, cmplx.Abs(y)) {
					t.Fatalf("OrthAmp(%v, %v) = %v, want %v", x, y, got, want)
				}
			}
		})
	}
	t.Run("X=0", func(t *testing.T) {
		if got := OrthAmp(0, 1+2i); got != 0 {
			t.Errorf("OrthAmp(0, y) = %v, want 0", got)
		}
	})
}

func envSeries(rng *rand.Rand, n int, offset, scale float64) (x, y []float64) {
	x, y = make([]float64, n), make([]float64, n)
	for i := range x {
		a, b := rng.NormFloat64(), rng.NormFloat64()
		x[i] = offset + scale*a
		y[i] = offset + scale*(0.6*a+0.8*b)
	}
	return x, y
}

func envMoments(x, y []float64) Moments {
	var m Moments
	for i := range x {
		m.Add(x[i], y[i])
	}
	return m
}

// Moments.Add over a series gives the Pearson r of stats.Pearson, which is
// gonum's two-pass stat.Correlation.
func TestMomentsPearson(t *testing.T) {
	rng := rand.New(rand.NewPCG(12, 1))
	for _, n := range []int{3, 4, 10, 137, 5000} {
		t.Run("n="+strconv.Itoa(n), func(t *testing.T) {
			x, y := envSeries(rng, n, 3, 2)
			m := envMoments(x, y)
			if m.N != float64(n) {
				t.Errorf("N = %v, want %d", m.N, n)
			}
			if got, want := m.R(), stats.Pearson(x, y); !closeRel(got, want, 1e-12) {
				t.Errorf("n=%d: R = %.16g, stats.Pearson = %.16g", n, got, want)
			}
			var sx, sy float64
			for i := range x {
				sx += x[i]
				sy += y[i]
			}
			if !closeRel(m.MX, sx/float64(n), 1e-12) || !closeRel(m.MY, sy/float64(n), 1e-12) {
				t.Errorf("means %v %v, want %v %v", m.MX, m.MY, sx/float64(n), sy/float64(n))
			}
		})
	}
}

// Merging the moments of any split of a series, empty parts included,
// equals one pass over it.
func TestMomentsMerge(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 1))
	x, y := envSeries(rng, 500, -7, 0.5)
	whole := envMoments(x, y)
	cases := []struct {
		name string
		cuts []int // part boundaries inside [0, 500]
	}{
		{"halves", []int{250}},
		{"empty first", []int{0, 0, 100}},
		{"empty last", []int{499, 500, 500}},
		{"single values", []int{1, 2, 3, 4}},
		{"empty middle", []int{200, 200, 200, 301}},
		{"random", nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			cuts := c.cuts
			if cuts == nil {
				for range 20 {
					cuts = append(cuts, rng.IntN(501))
				}
				slices.Sort(cuts)
			}
			bounds := append(append([]int{0}, cuts...), len(x))
			var got Moments
			for i := 1; i < len(bounds); i++ {
				part := envMoments(x[bounds[i-1]:bounds[i]], y[bounds[i-1]:bounds[i]])
				got.Merge(part)
			}
			g, w := got.Flat(nil), whole.Flat(nil)
			names := []string{"N", "MX", "MY", "SXX", "SYY", "SXY"}
			for i := range g {
				if !closeRel(g[i], w[i], 1e-12) {
					t.Errorf("%s = %.16g, one pass %.16g", names[i], g[i], w[i])
				}
			}
			if !closeRel(got.R(), whole.R(), 1e-12) {
				t.Errorf("R = %v, one pass %v", got.R(), whole.R())
			}
		})
	}
	t.Run("Flat round trip", func(t *testing.T) {
		if got := MomentsFrom(whole.Flat(nil)); got != whole {
			t.Errorf("MomentsFrom(Flat) = %+v, want %+v", got, whole)
		}
	})
}

func TestMomentsUndefined(t *testing.T) {
	rng := rand.New(rand.NewPCG(14, 1))
	noise, _ := envSeries(rng, 100, 0, 1)
	constant := make([]float64, 100)
	for i := range constant {
		constant[i] = 0.1 // not exactly representable: the mean drifts in the last bit
	}
	big := make([]float64, 100)
	for i := range big {
		big[i] = 1e6 + 0.1
	}
	cases := []struct {
		name string
		x, y []float64
	}{
		{"constant x", constant, noise},
		{"constant y", noise, constant},
		{"both constant", constant, constant},
		{"constant at 1e6", big, noise},
		{"zeros", make([]float64, 100), noise},
		{"two values", noise[:2], noise[1:3]},
		{"empty", nil, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if r := envMoments(c.x, c.y).R(); !math.IsNaN(r) {
				t.Errorf("R = %v, want NaN", r)
			}
		})
	}
}

// Values of 1e6 plus small noise: the naive one-pass Σxy − n·x̄·ȳ loses all
// digits here (it gave NaN for offset 1e6, scale 0.01, and 0.5674 for
// r = 0.5685 at scale 1), Welford's update does not (errors seen: 1e-9,
// 1e-11, 9e-10; the tolerances leave a factor of 10 to 100). The reference is stats.Pearson on
// the same values minus 1e6 (an exact subtraction, Sterbenz).
func TestMomentsLargeOffset(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 1))
	for _, c := range []struct {
		name               string
		offset, scale, tol float64
	}{
		{"1e6+0.01·noise", 1e6, 1e-2, 1e-7},
		{"1e6+noise", 1e6, 1, 1e-10},
		{"-1e8+noise", -1e8, 1, 1e-8},
	} {
		t.Run(c.name, func(t *testing.T) {
			x, y := envSeries(rng, 2000, c.offset, c.scale)
			xs, ys := make([]float64, len(x)), make([]float64, len(y))
			for i := range x {
				xs[i], ys[i] = x[i]-c.offset, y[i]-c.offset
			}
			want := stats.Pearson(xs, ys)
			if got := envMoments(x, y).R(); !closeRel(got, want, c.tol) {
				t.Errorf("offset %g scale %g: R = %.12g, want %.12g", c.offset, c.scale, got, want)
			}
			// Merged halves are as stable.
			a, b := envMoments(x[:700], y[:700]), envMoments(x[700:], y[700:])
			a.Merge(b)
			if got := a.R(); !closeRel(got, want, c.tol) {
				t.Errorf("merged: R = %.12g, want %.12g", got, want)
			}
		})
	}
}

// envGram returns Z·Zᵀ of the n×T matrix z, row-major.
func envGram(z *mat.Dense) []float64 {
	n, _ := z.Dims()
	var g mat.Dense
	g.Mul(z, z.T())
	out := make([]float64, n*n)
	for i := range n {
		for j := range n {
			out[i*n+j] = g.At(i, j)
		}
	}
	return out
}

// envMixed returns n channels of T samples that are linear mixtures of
// independent noise (so they correlate) with different row norms.
func envMixed(rng *rand.Rand, n, T int) *mat.Dense {
	src := mat.NewDense(n, T, nil)
	for i := range n {
		for j := range T {
			src.Set(i, j, rng.NormFloat64())
		}
	}
	mix := mat.NewDense(n, n, nil)
	for i := range n {
		for j := range n {
			v := 0.3 * rng.NormFloat64()
			if i == j {
				v += 1
			}
			mix.Set(i, j, v*float64(i+1))
		}
	}
	var z mat.Dense
	z.Mul(mix, src)
	return &z
}

func envOrth(t *testing.T, z *mat.Dense) *mat.Dense {
	t.Helper()
	n, _ := z.Dims()
	w, _, err := ClosestOrthogonal(envGram(z), n)
	if err != nil {
		t.Fatal(err)
	}
	var o mat.Dense
	o.Mul(mat.NewDense(n, n, w), z)
	return &o
}

func TestClosestOrthogonalRankDeficient(t *testing.T) {
	rng := rand.New(rand.NewPCG(17, 1))
	sum := envMixed(rng, 4, 300)
	for j := range 300 {
		sum.Set(3, j, sum.At(0, j)+sum.At(1, j)) // row 3 = row 0 + row 1
	}
	avgRef := envMixed(rng, 3, 300)
	for j := range 300 { // an average reference over exactly these channels
		m := (avgRef.At(0, j) + avgRef.At(1, j) + avgRef.At(2, j)) / 3
		for i := range 3 {
			avgRef.Set(i, j, avgRef.At(i, j)-m)
		}
	}
	cases := []struct {
		name string
		z    *mat.Dense
	}{
		{"row = sum of two others", sum},
		{"average reference", avgRef},
		{"more channels than samples", envMixed(rng, 5, 3)},
		{"zero channel", mat.NewDense(2, 4, []float64{1, 2, 3, 4, 0, 0, 0, 0})},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			n, _ := c.z.Dims()
			w, _, err := ClosestOrthogonal(envGram(c.z), n)
			if !errors.Is(err, ErrRankDeficient) {
				t.Errorf("err = %v (weights %v), want ErrRankDeficient", err, w)
			}
		})
	}
}

// Symmetric orthogonalisation treats every channel alike: permuting the
// rows of Z permutes the rows of W·Z the same way.
func TestClosestOrthogonalPermutation(t *testing.T) {
	rng := rand.New(rand.NewPCG(18, 1))
	const n, T = 5, 250
	z := envMixed(rng, n, T)
	o := envOrth(t, z)
	for _, perm := range [][]int{{1, 0, 2, 3, 4}, {4, 3, 2, 1, 0}, {2, 4, 1, 0, 3}} {
		t.Run(fmt.Sprint(perm), func(t *testing.T) {
			zp := mat.NewDense(n, T, nil)
			for i, p := range perm {
				zp.SetRow(i, mat.Row(nil, p, z))
			}
			op := envOrth(t, zp)
			for i, p := range perm {
				scale := mat.Norm(z.RowView(p), 2)
				for j := range T {
					if math.Abs(op.At(i, j)-o.At(p, j)) > 1e-9*scale {
						t.Fatalf("permuted row %d (input row %d) sample %d: %v, want %v", i, p, j, op.At(i, j), o.At(p, j))
					}
				}
			}
		})
	}
}

// envRef mirrors testdata/connect/envelope_ref.json, written by
// testdata/connect/make_ref.py (numpy 1.24.2, scipy 1.10.1, Python 3.11.2;
// the versions are also in the JSON).
type envRef struct {
	Generator string    `json:"generator"`
	Numpy     string    `json:"numpy"`
	Scipy     string    `json:"scipy"`
	Rate      float64   `json:"rate"`
	Freqs     []float64 `json:"freqs"`
	Cycles    []float64 `json:"cycles"`
	Band      []float64 `json:"band"`
	BandIndex []int     `json:"band_index"`
	Half      int       `json:"half"`
	X         []float64 `json:"x"`
	Y         []float64 `json:"y"`
	EnvStep   int       `json:"env_step"`
	EnvX      []float64 `json:"env_x"`
	EnvY      []float64 `json:"env_y"`
	AEC       float64   `json:"aec"`
	OrthXY    float64   `json:"orth_xy"`
	OrthYX    float64   `json:"orth_yx"`
	Orth      float64   `json:"orth"`
}

// The envelope correlation, plain and orthogonalised, of two seeded 10 Hz
// signals against scipy: the band signal is the mean over the band's grid
// frequencies of scipy.signal.fftconvolve(x, w, mode="same"), edges of the
// widest band wavelet's half-length discarded, then numpy.corrcoef
// (testdata/connect/make_ref.py).
func TestEnvelopeScipy(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "..", "..", "testdata", "connect", "envelope_ref.json"))
	if err != nil {
		t.Fatal(err)
	}
	var ref envRef
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if ref.Numpy == "" || ref.Scipy == "" || len(ref.X) != len(ref.Y) || len(ref.X) == 0 {
		t.Fatalf("envelope_ref.json incomplete: numpy %q scipy %q, %d/%d samples", ref.Numpy, ref.Scipy, len(ref.X), len(ref.Y))
	}
	bank, err := spectral.NewBank(ref.Rate, ref.Freqs, ref.Cycles)
	if err != nil {
		t.Fatal(err)
	}
	idx := bank.Within(ref.Band[0], ref.Band[1])
	if len(idx) != len(ref.BandIndex) {
		t.Fatalf("Within = %v, scipy band %v", idx, ref.BandIndex)
	}
	for i := range idx {
		if idx[i] != ref.BandIndex[i] {
			t.Fatalf("Within = %v, scipy band %v", idx, ref.BandIndex)
		}
	}
	half := bank.MaxHalf(idx)
	if half != ref.Half {
		t.Fatalf("MaxHalf = %d, scipy %d", half, ref.Half)
	}
	n := len(ref.X)
	from, to := half, n-half
	// float32 input, as the recipe path stores samples; the reference
	// values are float32-exact.
	x32, y32 := make([]float32, n), make([]float32, n)
	for i := range n {
		x32[i], y32[i] = float32(ref.X[i]), float32(ref.Y[i])
		if float64(x32[i]) != ref.X[i] || float64(y32[i]) != ref.Y[i] {
			t.Fatalf("sample %d is not float32-exact", i)
		}
	}
	conv := bank.NewConvolver(spectral.FFTLen(n, half))
	conv.Load(x32)
	zx := BandSignal(nil, conv, idx, from, to)
	conv.Load(y32)
	zy := BandSignal(nil, conv, idx, from, to)
	if len(zx) != to-from || len(zy) != to-from {
		t.Fatalf("band signal lengths %d, %d, want %d", len(zx), len(zy), to-from)
	}
	t.Run("envelopes", func(t *testing.T) {
		for k, want := range ref.EnvX {
			j := k * ref.EnvStep
			if got := cmplx.Abs(zx[j]); math.Abs(got-want) > 1e-9 {
				t.Errorf("|X|[%d] = %.12g, scipy %.12g", j, got, want)
			}
			if got, want := cmplx.Abs(zy[j]), ref.EnvY[k]; math.Abs(got-want) > 1e-9 {
				t.Errorf("|Y|[%d] = %.12g, scipy %.12g", j, got, want)
			}
		}
	})
	var plain, xy, yx Moments
	for j := range zx {
		ax, ay := cmplx.Abs(zx[j]), cmplx.Abs(zy[j])
		plain.Add(ax, ay)
		xy.Add(ax, OrthAmp(zx[j], zy[j]))
		yx.Add(ay, OrthAmp(zy[j], zx[j]))
	}
	cases := []struct {
		name      string
		got, want float64
	}{
		{"aec", plain.R(), ref.AEC},                 // numpy.corrcoef(|X|, |Y|)
		{"orth x→y", xy.R(), ref.OrthXY},            // corr(|X|, |Y⊥X|)
		{"orth y→x", yx.R(), ref.OrthYX},            // corr(|Y|, |X⊥Y|)
		{"orth", 0.5 * (xy.R() + yx.R()), ref.Orth}, // Hipp et al. 2012 average
	}
	// The same two directions from the blocked kernel, sample by sample
	// (bin 1): corr(|X|, |Y⊥X|) and corr(|Y|, |X⊥Y|) as numpy has them.
	orth := OrthEnvelopes(nil, [][]complex128{zx, zy}, 1, nil, Amplitude, nil)
	var bxy, byx Moments
	for j := range zx {
		bxy.Add(cmplx.Abs(zx[j]), orth[OrthIndex(2, 0, 1)][j])
		byx.Add(cmplx.Abs(zy[j]), orth[OrthIndex(2, 1, 0)][j])
	}
	cases = append(cases, []struct {
		name      string
		got, want float64
	}{
		{"blocked orth x→y", bxy.R(), ref.OrthXY},
		{"blocked orth y→x", byx.R(), ref.OrthYX},
	}...)
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if math.Abs(c.got-c.want) > 1e-9 {
				t.Errorf("%s = %.12g, scipy/numpy %.12g", c.name, c.got, c.want)
			}
		})
	}
}
