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

// ErrRankDeficient is returned by SymmetricWeights when the channels are
// linearly dependent (for example after an average reference over exactly
// these channels), so no orthogonal set is close to them.
var ErrRankDeficient = errors.New("the channels' band signals are linearly dependent (rank-deficient)")

// SymmetricWeights returns W = G^(−1/2) for the n×n Gram matrix G = Z·Zᵀ of
// the channels' real band-limited signals (row-major, length n·n). W·Z is
// U·Vᵀ from the SVD Z = U·S·Vᵀ: the orthonormal set of rows closest to Z in
// the least-squares sense (the symmetric multivariate orthogonalisation of
// Colclough et al. 2015, NeuroImage 117:439). Each row of W·Z is then scaled
// back to its original norm, which does not change any correlation.
func SymmetricWeights(gram []float64, n int) ([]float64, error) {
	for _, v := range gram {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, errors.New("the band signals contain non-finite values")
		}
	}
	sym := mat.NewSymDense(n, append([]float64(nil), gram...))
	var eig mat.EigenSym
	if !eig.Factorize(sym, true) {
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
	w := make([]float64, n*n)
	for i := range n {
		for j := range n {
			s := 0.0
			for k := range n {
				s += vec.At(i, k) * vec.At(j, k) / math.Sqrt(vals[k])
			}
			w[i*n+j] = s
		}
	}
	// Scale each output row back to the norm of its input row: row i of W·Z
	// has unit norm, the input row has norm √G_ii.
	for i := range n {
		s := math.Sqrt(gram[i*n+i])
		for j := range n {
			w[i*n+j] *= s
		}
	}
	return w, nil
}
