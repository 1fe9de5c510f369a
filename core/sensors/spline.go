package sensors

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Spherical splines after Perrin, Pernier, Bertrand & Echallier (1989),
// "Spherical splines for scalp potential and current density mapping",
// Electroencephalogr Clin Neurophysiol 72:184–187. With electrodes at unit
// vectors r_i and values V_i, the interpolant is
//
//	U(r) = c₀ + Σ_i c_i · g(r·r_i),
//	g(x) = 1/(4π) Σ_{n=1}^{N} (2n + 1)/(n(n + 1))^m · P_n(x),
//
// with P_n the Legendre polynomials, and c₀, c_i solving
//
//	Σ_j c_j g(r_i·r_j) + λ c_i + c₀ = V_i   (every i),   Σ_j c_j = 0.
//
// Perrin et al. use the order m = 4; the series is cut after N terms. The
// terms fall as 2/n^(2m−1), so for m = 4 the 50 terms used here leave a
// remainder below 1e−11 (SplineTerms).

// SplineOrder is the spline order m, as in Perrin et al. (1989).
const SplineOrder = 4

// SplineTerms is the number N of Legendre terms of g.
const SplineTerms = 50

// G is the spline kernel g(x) of order m with n terms (x = cos of the
// angle between two positions), by the recurrence
// (k + 1)·P_{k+1}(x) = (2k + 1)·x·P_k(x) − k·P_{k−1}(x).
func G(x float64, m, n int) float64 {
	p0, p1 := 1.0, x
	sum := 0.0
	for k := 1; k <= n; k++ {
		f := float64(k * (k + 1))
		sum += float64(2*k+1) / math.Pow(f, float64(m)) * p1
		p0, p1 = p1, (float64(2*k+1)*x*p1-float64(k)*p0)/float64(k+1)
	}
	return sum / (4 * math.Pi)
}

// Spline interpolates values given at electrode positions over the
// sphere.
type Spline struct {
	pos  []Point // unit vectors
	c    []float64
	c0   float64
	m, n int
}

// ErrFewPositions is returned when a spline has fewer than two positions.
var ErrFewPositions = errors.New("sensors: a spline needs at least two positions")

// NewSpline fits the spherical spline of order SplineOrder with
// SplineTerms terms through values at pos (normalised to unit vectors);
// lambda ≥ 0 is the smoothing λ (0 interpolates exactly). It fails when
// two positions coincide or a value is not finite.
func NewSpline(pos []Point, values []float64, lambda float64) (*Spline, error) {
	if len(pos) != len(values) {
		panic("sensors: positions and values differ in length")
	}
	k := len(pos)
	if k < 2 {
		return nil, ErrFewPositions
	}
	s := &Spline{pos: make([]Point, k), m: SplineOrder, n: SplineTerms}
	for i, p := range pos {
		if !p.finite() || p.Norm() == 0 {
			return nil, fmt.Errorf("sensors: position %d is not usable", i)
		}
		if !finite(values[i]) {
			return nil, fmt.Errorf("sensors: value %d is not finite", i)
		}
		s.pos[i] = p.unit()
	}
	a := mat.NewDense(k+1, k+1, nil)
	b := mat.NewVecDense(k+1, nil)
	for i := range k {
		for j := range k {
			a.Set(i, j, G(s.pos[i].Dot(s.pos[j]), s.m, s.n))
		}
		a.Set(i, i, a.At(i, i)+lambda)
		a.Set(i, k, 1)
		a.Set(k, i, 1)
		b.SetVec(i, values[i])
	}
	var x mat.VecDense
	if err := x.SolveVec(a, b); err != nil {
		return nil, fmt.Errorf("sensors: the spline system is singular (two positions coincide?): %w", err)
	}
	s.c = make([]float64, k)
	for i := range k {
		s.c[i] = x.AtVec(i)
	}
	s.c0 = x.AtVec(k)
	return s, nil
}

// At is the interpolated value at p (normalised to a unit vector).
func (s *Spline) At(p Point) float64 {
	u := p.unit()
	v := s.c0
	for i, q := range s.pos {
		v += s.c[i] * G(u.Dot(q), s.m, s.n)
	}
	return v
}

// Coefficients returns c₀ and the c_i.
func (s *Spline) Coefficients() (c0 float64, c []float64) {
	return s.c0, append([]float64(nil), s.c...)
}
