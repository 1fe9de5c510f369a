package connect

import (
	"math"
	"math/rand/v2"
	"sort"

	"gonum.org/v1/gonum/blas"
	gonumlapack "gonum.org/v1/gonum/lapack/gonum"
)

// eigenSource gives the eigenpairs of a symmetric matrix in decreasing order
// of eigenvalue: every eigenvalue at once, the eigenvectors on demand and
// always in the same order, so that a vector does not depend on how many
// were asked for before it. A centrosymmetric matrix (q[i][j] =
// q[n−1−i][n−1−j], which a window's form is when its crop is not clipped by
// the epoch's edges) splits into its symmetric and antisymmetric halves, two
// problems of about n/2.
type eigenSource struct {
	n      int
	halves []*symProblem
	order  []eigenRef // every eigenvalue, largest first
	resid  float64    // the largest eigen-residual a vector may have
}

type eigenRef struct {
	val     float64
	half, k int // the k-th largest of half
}

func newEigenSource(q []float64, n int, centro bool) (*eigenSource, bool) {
	s := &eigenSource{n: n}
	if !centro || n < 4 {
		s.halves = []*symProblem{newSymProblem(append([]float64(nil), q...), n, func(c, v []float64) { copy(v, c) })}
	} else {
		m := n / 2
		odd := n%2 == 1
		// Symmetric vectors [w/√2; a; Jw/√2] (a only for odd n), antisymmetric
		// [w/√2; 0; −Jw/√2], J the reversal and B = q[0:m][n−m:n]: (A ± BJ)
		// on w, bordered by √2·q[0:m][m] and q[m][m] for the symmetric half of
		// odd n.
		ms := m
		if odd {
			ms = m + 1
		}
		sym, anti := make([]float64, ms*ms), make([]float64, m*m)
		for i := range m {
			for j := i; j < m; j++ {
				a := q[i*n+j]
				bj := q[i*n+(n-1-j)] // (BJ)[i][j] = B[i][m−1−j] = q[i][n−1−j]
				sym[i*ms+j], sym[j*ms+i] = a+bj, a+bj
				anti[i*m+j], anti[j*m+i] = a-bj, a-bj
			}
			if odd {
				v := math.Sqrt2 * q[i*n+m]
				sym[i*ms+m], sym[m*ms+i] = v, v
			}
		}
		if odd {
			sym[m*ms+m] = q[m*n+m]
		}
		expand := func(sign float64) func(c, v []float64) {
			return func(c, v []float64) {
				for i := range m {
					v[i] = c[i] / math.Sqrt2
					v[n-1-i] = sign * c[i] / math.Sqrt2
				}
				if odd {
					v[m] = 0
					if sign > 0 {
						v[m] = c[m]
					}
				}
			}
		}
		s.halves = []*symProblem{newSymProblem(sym, ms, expand(1)), newSymProblem(anti, m, expand(-1))}
	}
	for h, p := range s.halves {
		if !p.ok {
			return nil, false
		}
		s.resid = max(s.resid, p.residTol)
		for k, v := range p.vals {
			s.order = append(s.order, eigenRef{v, h, k})
		}
	}
	// Largest first; a stable sort keeps ties in the order the halves gave
	// them, so the order depends on q alone.
	sort.SliceStable(s.order, func(i, j int) bool { return s.order[i].val > s.order[j].val })
	return s, true
}

// fill writes eigenvectors from … to−1 (in the global order) as rows of
// vecs (n each) and returns to, or the index of the first vector that did
// not reach its residual tolerance.
func (s *eigenSource) fill(vecs []float64, from, to int) int {
	n := s.n
	for k := from; k < to; k++ {
		e := s.order[k]
		p := s.halves[e.half]
		if !p.vectors(e.k + 1) {
			return k
		}
		p.expand(p.z[e.k*p.n:(e.k+1)*p.n], vecs[k*n:(k+1)*n])
	}
	return to
}

// symProblem is the eigenproblem of one symmetric n×n matrix A: reduced to
// tridiagonal form T = UᵀAU (LAPACK's Dsytrd), all eigenvalues of T
// (Dsterf), then the eigenvectors of the largest, one by one, by inverse
// iteration on T, transformed back by U. This costs about (4/3)·n³ plus
// 2n² per vector, where a full eigendecomposition costs some 9n³.
type symProblem struct {
	n        int
	d, e     []float64 // T's diagonal and off-diagonal
	tau      []float64
	refl     []float64 // row i: the first i entries of U's i-th reflector
	vals     []float64 // eigenvalues, decreasing
	norm     float64   // ‖T‖₁
	residTol float64   // the largest ‖Tz − λz‖ a vector may keep
	tvec     []float64 // rows: the eigenvectors of T found so far
	z        []float64 // rows: the same, transformed back: eigenvectors of A
	done     int
	lu       *tridiagLU
	rng      *rand.Rand
	expand   func(c, v []float64)
	failed   bool
	ok       bool
}

var lapackImpl gonumlapack.Implementation

func newSymProblem(a []float64, n int, expand func(c, v []float64)) *symProblem {
	p := &symProblem{n: n, expand: expand, d: make([]float64, n), e: make([]float64, max(n-1, 1)), tau: make([]float64, max(n-1, 1))}
	w := make([]float64, 1)
	lapackImpl.Dsytrd(blas.Upper, n, a, n, p.d, p.e, p.tau, w, -1)
	work := make([]float64, max(int(w[0]), 1))
	lapackImpl.Dsytrd(blas.Upper, n, a, n, p.d, p.e, p.tau, work, len(work))
	dd := append([]float64(nil), p.d...)
	ee := append([]float64(nil), p.e[:max(n-1, 0)]...)
	if !lapackImpl.Dsterf(n, dd, ee) {
		return p
	}
	p.vals = make([]float64, n)
	for i, v := range dd {
		p.vals[n-1-i] = v
	}
	// H_i = I − τ_i·v_i·v_iᵀ with v_i[i] = 1, v_i[0:i] in column i+1 of a
	// above the diagonal and zero after i (Dsytrd on the upper triangle).
	p.refl = make([]float64, n*n)
	for i := 0; i < n-1; i++ {
		for j := range i {
			p.refl[i*n+j] = a[j*n+i+1]
		}
	}
	for i := range n {
		s := math.Abs(p.d[i])
		if i > 0 {
			s += math.Abs(p.e[i-1])
		}
		if i < n-1 {
			s += math.Abs(p.e[i])
		}
		p.norm = max(p.norm, s)
	}
	// Inverse iteration reaches a residual of a few eps·‖T‖ (from memory, as
	// LAPACK's dstein); the allowance is generous so that only a vector lost
	// in a cluster fails.
	p.residTol = 32 * math.Sqrt(float64(n)) * 0x1p-52 * p.norm
	p.lu = newTridiagLU(n)
	p.rng = rand.New(rand.NewPCG(uint64(n), 7))
	p.ok = true
	return p
}

// vectors makes sure the eigenvectors of the r largest eigenvalues are in
// z; it reports false if one of them did not converge.
func (p *symProblem) vectors(r int) bool {
	for p.done < r {
		if p.failed {
			return false
		}
		z := make([]float64, p.n)
		if !p.inverseIteration(p.done, z) {
			p.failed = true
			return false
		}
		p.z = append(p.z, z...)
		p.done++
	}
	return true
}

// inverseIteration computes eigenvector k of T into z and transforms it
// back to an eigenvector of A.
func (p *symProblem) inverseIteration(k int, z []float64) bool {
	n := p.n
	lam := p.vals[k]
	for i := range z {
		z[i] = p.rng.Float64() - 0.5
	}
	p.lu.factor(p.d, p.e, lam, p.norm*0x1p-52)
	res := math.Inf(1)
	for it := 0; it < 6 && res > p.residTol/4; it++ {
		scaleUnit(z)
		p.lu.solve(z)
		// Against the vectors of eigenvalues within 1e-3·‖T‖ of lam (as
		// LAPACK's dstein, from memory), so that a cluster's vectors stay
		// orthogonal; those are still vectors of T here.
		for j := k - 1; j >= 0 && p.vals[j]-lam <= 1e-3*p.norm; j-- {
			zj := p.tvec[j*n : (j+1)*n]
			c := dot1(zj, z)
			for i := range z {
				z[i] -= c * zj[i]
			}
		}
		scaleUnit(z)
		res = tridiagResidual(p.d, p.e, lam, z)
	}
	if !(res <= p.residTol) {
		return false
	}
	p.tvec = append(p.tvec, z...)
	// U·z = H_{n−2}···H_0·z: H_0 applies first.
	for i := 0; i < n-1; i++ {
		tau := p.tau[i]
		if tau == 0 {
			continue
		}
		v := p.refl[i*n : i*n+i]
		c := tau * (dot1(v, z[:i]) + z[i])
		for j, vj := range v {
			z[j] -= c * vj
		}
		z[i] -= c
	}
	return true
}

func scaleUnit(z []float64) {
	s := math.Sqrt(dot1(z, z))
	if s == 0 {
		z[0] = 1
		return
	}
	for i := range z {
		z[i] /= s
	}
}

// tridiagResidual returns ‖(T − λI)z‖ for T with diagonal d and
// off-diagonal e.
func tridiagResidual(d, e []float64, lam float64, z []float64) float64 {
	n := len(z)
	s := 0.0
	for i := range n {
		v := (d[i] - lam) * z[i]
		if i > 0 {
			v += e[i-1] * z[i-1]
		}
		if i < n-1 {
			v += e[i] * z[i+1]
		}
		s += v * v
	}
	return math.Sqrt(s)
}

// tridiagLU is the LU factorisation with partial pivoting of T − λI for a
// symmetric tridiagonal T (the elimination of LAPACK's dgtsv).
type tridiagLU struct {
	dg, du, du2, mult []float64
	piv               []bool
}

func newTridiagLU(n int) *tridiagLU {
	return &tridiagLU{dg: make([]float64, n), du: make([]float64, n), du2: make([]float64, n), mult: make([]float64, n), piv: make([]bool, n)}
}

// factor factorises T − λI, T with diagonal d and off-diagonal e; a zero
// pivot becomes tiny.
func (f *tridiagLU) factor(d, e []float64, lam, tiny float64) {
	n := len(d)
	for i := range n {
		f.dg[i] = d[i] - lam
		if i < n-1 {
			f.du[i] = e[i]
		}
		f.du2[i] = 0
	}
	for i := 0; i < n-1; i++ {
		dl := e[i]
		if math.Abs(f.dg[i]) >= math.Abs(dl) {
			if f.dg[i] == 0 {
				f.dg[i] = tiny
			}
			m := dl / f.dg[i]
			f.mult[i], f.piv[i] = m, false
			f.dg[i+1] -= m * f.du[i]
		} else {
			// rows i and i+1 swap
			m := f.dg[i] / dl
			f.dg[i] = dl
			t := f.dg[i+1]
			f.dg[i+1] = f.du[i] - m*t
			if i < n-2 {
				f.du2[i] = f.du[i+1]
				f.du[i+1] = -m * f.du2[i]
			}
			f.du[i] = t
			f.mult[i], f.piv[i] = m, true
		}
	}
	if f.dg[n-1] == 0 {
		f.dg[n-1] = tiny
	}
}

// solve overwrites b with (T − λI)⁻¹·b.
func (f *tridiagLU) solve(b []float64) {
	n := len(b)
	for i := 0; i < n-1; i++ {
		if f.piv[i] {
			t := b[i]
			b[i] = b[i+1]
			b[i+1] = t - f.mult[i]*b[i]
		} else {
			b[i+1] -= f.mult[i] * b[i]
		}
	}
	b[n-1] /= f.dg[n-1]
	if n > 1 {
		b[n-2] = (b[n-2] - f.du[n-2]*b[n-1]) / f.dg[n-2]
	}
	for i := n - 3; i >= 0; i-- {
		b[i] = (b[i] - f.du[i]*b[i+1] - f.du2[i]*b[i+2]) / f.dg[i]
	}
}
