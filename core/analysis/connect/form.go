package connect

import (
	"fmt"
	"math"
	"sync"
	"sync/atomic"

	"amplink/core/spectral"
)

// DefaultTolerance is the largest relative error a window power computed
// through its quadratic form (see Form) may have, unless the recipe states
// another (spectral.tolerance).
const DefaultTolerance = 1e-10 // the same as recipe.DefaultTolerance

// A window's power is a quadratic form in the trial's samples. For the
// 'same'-aligned convolution y_f[t] = Σ_j x[j]·a_f(t−j), a_f(δ) = w_f[δ+H_f],
//
//	P(x) = (1/(K·S))·Σ_f Σ_t |y_f[t]|² = xᵀQx,
//	Q[i][j] = (1/(K·S))·Σ_f Σ_t Re(a_f(t−i)·conj(a_f(t−j))),
//
// over the K grid frequencies f of the window and its S samples t. Q depends
// on the window, the grid and the rate only. With its eigendecomposition
// Q = Σ_k λ_k v_k v_kᵀ (λ_0 ≥ λ_1 ≥ …) and c_k = v_kᵀx,
//
//	P(x) = Σ_k λ_k c_k²,  0 ≤ P(x) − P_r(x) ≤ λ_r·(‖x‖² − Σ_{k<r} c_k²),
//
// where P_r keeps the first r terms: the rest of x's energy meets
// eigenvalues of at most λ_r. A Form keeps the leading eigenpairs and
// evaluates P_r with r growing in blocks until that bound, plus an allowance
// for rounding, is at most tol·P_r; a trial for which no kept rank suffices
// is left to the exact FFT route.
type Form struct {
	lo, hi int       // the input samples [lo, hi) the window's power depends on
	vals   []float64 // λ_0 … λ_rank: rank+1 eigenvalues, the last bounding the rest
	rank   int
	round  float64 // rounding allowance per unit of ‖x‖²
	tol    float64

	// The eigenvectors are computed when a trial first needs them, always
	// in the same order, so a value never depends on which trial or
	// goroutine asked first. vecs holds rank rows of hi−lo samples (row k
	// is v_k), of which the first ready are computed; failed says the
	// vector after them did not converge, so no more will come.
	vecs   []float64
	ready  atomic.Int64
	mu     sync.Mutex
	failed bool
	src    *eigenSource
}

// grow makes sure at least k eigenvectors are computed, if it can, and
// returns how many are.
func (f *Form) grow(k int) int {
	f.mu.Lock()
	defer f.mu.Unlock()
	have := int(f.ready.Load())
	if have >= k || f.failed {
		return have
	}
	to := min(f.rank, max(k, 2*have))
	got := f.src.fill(f.vecs, have, to)
	f.failed = got < to
	f.ready.Store(int64(got))
	return got
}

// formBlock is the number of eigenpairs added between two checks of the
// bound.
const formBlock = 16

// Costs of the two routes per trial, in units of one multiply-add of the
// form's dot products (0.3–0.7 ns here): from BenchmarkFormVsFFT, the FFT
// route costs 2.3–2.8 ns per N·log2 N of each transform (complex inverse
// of length N per frequency, the real forward about half that).
const (
	fftUnit   = 6
	formPays  = 0.6 // the form is used when its full rank costs at most this share of the FFT route
	formStart = 8   // a form of fewer than this many eigenpairs is not worth keeping
)

// fftRouteCost is the estimated cost of one trial's window power by FFT:
// one real forward transform and one complex inverse per frequency.
func fftRouteCost(nfft, nfreq int) float64 {
	lg := math.Log2(float64(nfft))
	return fftUnit * float64(nfft) * lg * (0.5 + float64(nfreq))
}

// Rank returns the most eigenpairs the form uses.
func (f *Form) Rank() int { return f.rank }

// Len returns the number of input samples the form reads.
func (f *Form) Len() int { return f.hi - f.lo }

// Tolerance returns the relative error the form holds.
func (f *Form) Tolerance() float64 { return f.tol }

// Eigenvalue returns λ_k, k ≤ Rank().
func (f *Form) Eigenvalue(k int) float64 { return f.vals[k] }

// Power returns P_r(x) for the trial x (all its samples; the form reads
// x[lo:hi]) with the smallest rank r, a multiple of formBlock or Rank(),
// whose error bound is within the tolerance; it returns the rank used and
// ok = false when no kept rank suffices. buf must hold Len() values. Power
// does not allocate.
func (f *Form) Power(x []float32, buf []float64) (p float64, rank int, ok bool) {
	n := f.hi - f.lo
	xs := buf[:n]
	nx := 0.0
	for i, v := range x[f.lo:f.hi] {
		d := float64(v)
		xs[i] = d
		nx += d * d
	}
	s := 0.0
	for k0 := 0; k0 < f.rank; k0 += formBlock {
		k1 := min(k0+formBlock, f.rank)
		if int(f.ready.Load()) < k1 && f.grow(k1) < k1 {
			return 0, k0, false
		}
		k := k0
		for ; k+4 <= k1; k += 4 {
			c0, c1, c2, c3 := dot4(f.vecs[k*n:(k+4)*n], xs)
			p += f.vals[k]*c0*c0 + f.vals[k+1]*c1*c1 + f.vals[k+2]*c2*c2 + f.vals[k+3]*c3*c3
			s += c0*c0 + c1*c1 + c2*c2 + c3*c3
		}
		for ; k < k1; k++ {
			c := dot1(f.vecs[k*n:(k+1)*n], xs)
			p += f.vals[k] * c * c
			s += c * c
		}
		if f.vals[k1]*max(nx-s, 0)+f.round*nx <= f.tol*p {
			return p, k1, true
		}
	}
	return 0, f.rank, false
}

// dot4 returns the dot products of x with the four rows of v (len 4·len(x)).
func dot4(v, x []float64) (c0, c1, c2, c3 float64) {
	n := len(x)
	r0, r1, r2, r3 := v[:n], v[n:2*n], v[2*n:3*n], v[3*n:4*n]
	for i, xi := range x {
		c0 += r0[i] * xi
		c1 += r1[i] * xi
		c2 += r2[i] * xi
		c3 += r3[i] * xi
	}
	return
}

func dot1(v, x []float64) float64 {
	v = v[:len(x)]
	s := 0.0
	for i, xi := range x {
		s += v[i] * xi
	}
	return s
}

// NewForm builds the form of span sp on epochs of nSamples samples for
// relative tolerance tol, keeping at most maxRank eigenpairs. It returns nil
// when the eigendecomposition fails or when fewer than a handful of
// eigenpairs fit in maxRank.
func NewForm(bank *spectral.Bank, nSamples int, sp Span, tol float64, maxRank int) *Form {
	h := bank.MaxHalf(sp.Freqs)
	lo, hi := spectral.Crop(nSamples, sp.From, sp.To, h)
	n := hi - lo
	maxRank = min(maxRank, n-1)
	if maxRank < formStart || tol <= 0 {
		return nil
	}
	q := formMatrix(bank, sp, lo, hi)
	src, ok := newEigenSource(q, n, lo == sp.From-h && hi == sp.To+h)
	if !ok {
		return nil
	}
	rank := maxRank
	// Past the point where the eigenvalues are rounding, more terms buy
	// nothing.
	floor := src.order[0].val * float64(n) * 0x1p-52
	for rank > formStart && src.order[rank-1].val <= floor {
		rank--
	}
	vals := make([]float64, rank+1)
	for k := range vals {
		vals[k] = max(src.order[k].val, 0)
	}
	f := &Form{lo: lo, hi: hi, vals: vals, rank: rank, tol: tol, vecs: make([]float64, rank*n), src: src}
	resid := src.resid
	// With kept vectors V whose residual is E = QV − VΛ, the error has the
	// further terms cᵀVᵀEc + 2cᵀEᵀz, at most 2‖E‖·‖x‖²; rounding in building
	// Q, in the transforms and in the dot products adds a few units of
	// eps·√n·λ_0 per unit of ‖x‖² (a statistical allowance, common practice
	// for sums of n terms).
	// ‖E‖ is taken as a few times the largest vector residual allowed (a
	// statistical allowance: the residuals are rounding, nearly orthogonal).
	f.round = 8*math.Sqrt(float64(n))*0x1p-52*vals[0] + 8*resid
	return f
}

// formMatrix returns Q (see Form) on input samples [lo, hi), row-major and
// symmetric. Along each diagonal j = i + d, Q[i][i+d] is a sum over the
// window of R_d(t−i) with R_d(δ) = Σ_f Re(a_f(δ)·conj(a_f(δ−d))), so one
// compensated running sum of R_d gives every entry of the diagonal as a
// difference of two of its values.
func formMatrix(bank *spectral.Bank, sp Span, lo, hi int) []float64 {
	n := hi - lo
	hmax := bank.MaxHalf(sp.Freqs)
	q := make([]float64, n*n)
	m := 2*hmax + 1
	r := make([]float64, m)
	ch, cl := make([]float64, m+1), make([]float64, m+1)
	scale := 1 / float64(len(sp.Freqs)*(sp.To-sp.From))
	// cum returns Σ_{δ' ≤ δ} R_d(δ') as a high and a low part.
	cum := func(delta int) (float64, float64) {
		i := min(max(delta+hmax+1, 0), m)
		return ch[i], cl[i]
	}
	for d := 0; d < min(2*hmax+1, n); d++ {
		clear(r)
		for _, fi := range sp.Freqs {
			w := bank.Kernel(fi)
			hf := bank.Half(fi)
			// δ and δ−d both within [−hf, hf]
			for delta := max(-hf, d-hf); delta <= hf; delta++ {
				a, b := w[delta+hf], w[delta-d+hf]
				r[delta+hmax] += real(a)*real(b) + imag(a)*imag(b)
			}
		}
		// Neumaier's compensated running sum.
		var s, c float64
		for i, v := range r {
			t := s + v
			if math.Abs(s) >= math.Abs(v) {
				c += (s - t) + v
			} else {
				c += (v - t) + s
			}
			s = t
			ch[i+1], cl[i+1] = s, c
		}
		for i := 0; i+d < n; i++ {
			g := lo + i
			h1, l1 := cum(sp.To - 1 - g)
			h0, l0 := cum(sp.From - 1 - g)
			v := ((h1 - h0) + (l1 - l0)) * scale
			q[i*n+i+d] = v
			q[(i+d)*n+i] = v
		}
	}
	return q
}

// Forms builds and keeps the forms of a plan's windows, once per window,
// for every unit and goroutine: the form depends only on the window, the
// grid and the rate, so every channel shares it, and the values do not
// depend on which goroutine built it. A nil *Forms, or one with tolerance 0,
// gives no forms: every window power then takes the FFT route.
type Forms struct {
	tol float64
	mu  sync.Mutex
	m   map[string]*formEntry
}

type formEntry struct {
	once sync.Once
	f    *Form
}

// NewForms returns an empty cache for relative tolerance tol.
func NewForms(tol float64) *Forms {
	return &Forms{tol: tol, m: map[string]*formEntry{}}
}

// Tolerance returns the cache's relative tolerance.
func (fs *Forms) Tolerance() float64 {
	if fs == nil {
		return 0
	}
	return fs.tol
}

// get returns the form of span sp on epochs of nSamples samples, or nil when
// the form does not pay against an FFT route of length nfft.
func (fs *Forms) get(bank *spectral.Bank, nSamples int, sp Span, nfft int) *Form {
	if fs == nil || fs.tol <= 0 {
		return nil
	}
	key := fmt.Sprintf("%d:%d:%d:%v", nSamples, sp.From, sp.To, sp.Freqs)
	fs.mu.Lock()
	e := fs.m[key]
	if e == nil {
		e = new(formEntry)
		fs.m[key] = e
	}
	fs.mu.Unlock()
	e.once.Do(func() {
		h := bank.MaxHalf(sp.Freqs)
		lo, hi := spectral.Crop(nSamples, sp.From, sp.To, h)
		maxRank := int(formPays * fftRouteCost(nfft, len(sp.Freqs)) / float64(hi-lo))
		e.f = NewForm(bank, nSamples, sp, fs.tol, maxRank)
	})
	return e.f
}
