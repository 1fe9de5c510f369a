package connect

import (
	"errors"
	"math"

	"gonum.org/v1/gonum/mat"

	"amplink/core/spectral"
)

// BandSignal writes the band's complex signal for output samples [from, to)
// of the signal loaded in conv into dst and returns it:
//
//	z_B(t) = (1/K) Σ_{f ∈ B} (x ∗ w_f)(t),
//
// the mean of the analytic wavelet outputs at the K grid frequencies of the
// band. Its modulus |z_B| is the band's amplitude envelope and its argument
// the band's phase. With one frequency it is that wavelet's analytic signal.
func BandSignal(dst []complex128, conv *spectral.Convolver, freqs []int, from, to int) []complex128 {
	// One inverse FFT with the band kernel (Convolver.BandAnalytic) gives
	// the same mean as K single-wavelet transforms.
	return conv.BandAnalytic(dst, freqs, from, to)
}

// OrthAmp returns |Y⊥X| = |Im(y·x̄)|/|x| = |y|·|sin(φy − φx)|, the amplitude
// of y after removing the part that has zero phase lag to x (Hipp et al.
// 2012, Nat Neurosci 15:884). It is 0 where x is 0.
func OrthAmp(x, y complex128) float64 {
	ax := math.Hypot(real(x), imag(x))
	if ax == 0 {
		return 0
	}
	// Im(y·conj(x)) = imag(y)·real(x) − real(y)·imag(x)
	return math.Abs(imag(y)*real(x)-real(y)*imag(x)) / ax
}

// Moments accumulates the co-moments of a pair of series in a numerically
// stable way (Welford; pairwise merging after Chan, Golub & LeVeque 1979):
// the count, the means and the sums of squared and cross deviations.
type Moments struct {
	N, MX, MY, SXX, SYY, SXY float64
}

// Add includes one pair of values.
func (m *Moments) Add(x, y float64) {
	m.N++
	dx := x - m.MX
	m.MX += dx / m.N
	dy := y - m.MY
	m.MY += dy / m.N
	m.SXX += dx * (x - m.MX)
	m.SYY += dy * (y - m.MY)
	m.SXY += dx * (y - m.MY)
}

// Merge combines o into m, as if every pair of o had been added to m.
func (m *Moments) Merge(o Moments) {
	if o.N == 0 {
		return
	}
	if m.N == 0 {
		*m = o
		return
	}
	n := m.N + o.N
	dx, dy := o.MX-m.MX, o.MY-m.MY
	f := m.N * o.N / n
	m.SXX += o.SXX + dx*dx*f
	m.SYY += o.SYY + dy*dy*f
	m.SXY += o.SXY + dx*dy*f
	m.MX += dx * o.N / n
	m.MY += dy * o.N / n
	m.N = n
}

// R returns the Pearson correlation SXY/√(SXX·SYY), or NaN when either
// series has (numerically) zero variance or fewer than 3 values were added.
func (m Moments) R() float64 {
	if m.N < 3 || !(m.SXX > 1e-24*m.N*(m.MX*m.MX+1e-300)) || !(m.SYY > 1e-24*m.N*(m.MY*m.MY+1e-300)) {
		return math.NaN()
	}
	r := m.SXY / math.Sqrt(m.SXX*m.SYY)
	return math.Max(-1, math.Min(1, r))
}

// Flat appends the six numbers of m to dst.
func (m Moments) Flat(dst []float64) []float64 {
	return append(dst, m.N, m.MX, m.MY, m.SXX, m.SYY, m.SXY)
}

// MomentsFrom reads six numbers written by Flat.
func MomentsFrom(v []float64) Moments {
	return Moments{v[0], v[1], v[2], v[3], v[4], v[5]}
}

// ErrRankDeficient is returned by ClosestOrthogonal when the channels are
// linearly dependent (for example after an average reference over exactly
// these channels), so no orthogonal set is close to them.
var ErrRankDeficient = errors.New("the channels' band signals are linearly dependent (rank-deficient)")

// MaxOrthIter bounds the iterations of ClosestOrthogonal.
const MaxOrthIter = 5000

// OrthTol is ClosestOrthogonal's stopping tolerance: it stops when no
// diagonal weight changed by more than OrthTol times the largest one.
const OrthTol = 1e-10

// ErrNoConvergence is returned by ClosestOrthogonal when the weights still
// change after MaxOrthIter iterations.
var ErrNoConvergence = errors.New("the closest orthogonal set did not converge")

// ClosestOrthogonal returns the n×n weights W (row-major) that map the
// channels' real band-limited signals Z (n × T, given only through their
// Gram matrix G = Z·Zᵀ, row-major) to their closest orthogonal set,
// W·Z = D·O: the minimiser of ‖Z − D·O‖_F over a diagonal D and an O with
// orthonormal rows (O·Oᵀ = I). This is the symmetric multivariate leakage
// correction of Colclough et al. 2015 (NeuroImage 117:439), found as the
// paper describes by alternating the two exact partial minimisations:
//
//	O = U·Vᵀ from the SVD D·Z = U·S·Vᵀ (the closest orthonormal set to
//	  D·Z), which is (D·G·D)^(−1/2)·D·Z;
//	d_i = ⟨Z_i, O_i⟩ = (G·D·(D·G·D)^(−1/2))_ii.
//
// Both steps only need G. It starts from d_i = √G_ii (the row norms) and
// stops when max_i |d_i − d_i(previous)| ≤ OrthTol·max_i d_i, after at most
// MaxOrthIter iterations (ErrNoConvergence). Then W = D·(D_prev·G·D_prev)^(−1/2)·D_prev,
// with D the last weights and D_prev the ones O was made from. The output
// rows are mutually orthogonal, so every zero-lag correlation among the
// channels is removed, the genuine kind as well as leakage. It returns the
// number of iterations too.
func ClosestOrthogonal(gram []float64, n int) (w []float64, iters int, err error) {
	if len(gram) != n*n {
		panic("connect: Gram matrix size mismatch")
	}
	for _, v := range gram {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, 0, errors.New("the band signals contain non-finite values")
		}
	}
	d := make([]float64, n)
	for i := range n {
		d[i] = math.Sqrt(gram[i*n+i])
		if !(d[i] > 0) {
			return nil, 0, ErrRankDeficient
		}
	}
	next := make([]float64, n)
	for iters = 1; iters <= MaxOrthIter; iters++ {
		isq, err := invSqrtDGD(gram, d, n)
		if err != nil {
			return nil, iters, err
		}
		// next_i = Σ_k G_ik d_k isq_ki
		change, top := 0.0, 0.0
		for i := range n {
			s := 0.0
			for k := range n {
				s += gram[i*n+k] * d[k] * isq[k*n+i]
			}
			next[i] = s
			change = math.Max(change, math.Abs(s-d[i]))
			top = math.Max(top, math.Abs(s))
		}
		if change <= OrthTol*top {
			w = make([]float64, n*n)
			for i := range n {
				for j := range n {
					w[i*n+j] = next[i] * isq[i*n+j] * d[j]
				}
			}
			return w, iters, nil
		}
		for i := range n {
			if !(next[i] > 0) {
				return nil, iters, ErrRankDeficient
			}
		}
		d, next = next, d
	}
	return nil, MaxOrthIter, ErrNoConvergence
}

// invSqrtDGD returns (D·G·D)^(−1/2) for D = diag(d), or ErrRankDeficient
// when an eigenvalue is below 1e−10 times the largest.
func invSqrtDGD(gram, d []float64, n int) ([]float64, error) {
	a := make([]float64, n*n)
	for i := range n {
		for j := range n {
			a[i*n+j] = d[i] * gram[i*n+j] * d[j]
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(mat.NewSymDense(n, a), true) {
		return nil, errors.New("eigen-decomposition of the Gram matrix failed")
	}
	vals := eig.Values(nil)
	maxv := 0.0
	for _, v := range vals {
		maxv = math.Max(maxv, v)
	}
	for _, v := range vals {
		if !(v > 1e-10*maxv) {
			return nil, ErrRankDeficient
		}
	}
	var vec mat.Dense
	eig.VectorsTo(&vec)
	out := make([]float64, n*n)
	for i := range n {
		for j := range n {
			s := 0.0
			for k := range n {
				s += vec.At(i, k) * vec.At(j, k) / math.Sqrt(vals[k])
			}
			out[i*n+j] = s
		}
	}
	return out, nil
}

// RealGram returns G = Re(Z)·Re(Z)ᵀ (row-major, n × n) of the channels'
// complex band signals z (equal lengths): the Gram matrix of the real
// band-limited signals.
func RealGram(z [][]complex128) []float64 {
	n := len(z)
	g := make([]float64, n*n)
	for i := range n {
		for j := i; j < n; j++ {
			s := 0.0
			for k, v := range z[i] {
				s += real(v) * real(z[j][k])
			}
			g[i*n+j], g[j*n+i] = s, s
		}
	}
	return g
}

// SymmetricCorrect returns rows of the closest orthogonal set of the
// channels' band signals z (ClosestOrthogonal on their real Gram matrix,
// applied to the complex signals; a real linear map commutes with taking
// the analytic signal): out[k] = Σ_j W[rows[k]][j]·z[j]. rows nil means
// every row.
func SymmetricCorrect(z [][]complex128, rows []int) ([][]complex128, error) {
	n := len(z)
	if rows == nil {
		rows = make([]int, n)
		for i := range rows {
			rows[i] = i
		}
	}
	w, _, err := ClosestOrthogonal(RealGram(z), n)
	if err != nil {
		return nil, err
	}
	m := len(z[0])
	out := make([][]complex128, len(rows))
	for k, i := range rows {
		o := make([]complex128, m)
		for j := range n {
			wij := w[i*n+j]
			for t, v := range z[j] {
				o[t] += complex(wij*real(v), wij*imag(v))
			}
		}
		out[k] = o
	}
	return out, nil
}
