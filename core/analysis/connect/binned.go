package connect

import "math"

// EnvKind is what an envelope series holds.
type EnvKind uint8

const (
	// Amplitude is the amplitude envelope: the mean of |z| over each bin.
	Amplitude EnvKind = iota
	// LogPower is the log power envelope: ln of the mean of |z|² over each
	// bin (natural log; −Inf where the power is 0, which leaves r
	// undefined).
	LogPower
)

// binSegs calls f(b, lo, hi) for every bin of `bin` samples: bins lie
// inside consecutive segments of the given lengths (nil: one segment of
// total samples), and each segment's last total%bin samples are left out.
// It returns the number of bins.
func binSegs(total, bin int, segs []int, f func(b, lo, hi int)) int {
	if bin < 1 {
		panic("connect: bin < 1")
	}
	if segs == nil {
		segs = []int{total}
	}
	b, off := 0, 0
	for _, l := range segs {
		for s := 0; s+bin <= l; s += bin {
			f(b, off+s, off+s+bin)
			b++
		}
		off += l
	}
	return b
}

// NBins returns how many bins binSegs makes of total samples in segs.
func NBins(total, bin int, segs []int) int {
	if segs == nil {
		return total / bin
	}
	n := 0
	for _, l := range segs {
		n += l / bin
	}
	return n
}

func finishBin(sum float64, bin int, kind EnvKind) float64 {
	m := sum / float64(bin)
	if kind == LogPower {
		return math.Log(m)
	}
	return m
}

// Envelope writes the binned envelope of z into dst (reused when large
// enough) and returns it: per bin, the mean of |z| (Amplitude) or
// ln(mean of |z|²) (LogPower). Bins of `bin` samples lie inside the
// segments segs (see NBins).
func Envelope(dst []float64, z []complex128, bin int, segs []int, kind EnvKind) []float64 {
	dst = resize(dst, NBins(len(z), bin, segs))
	binSegs(len(z), bin, segs, func(b, lo, hi int) {
		s := 0.0
		for _, v := range z[lo:hi] {
			if kind == LogPower {
				s += real(v)*real(v) + imag(v)*imag(v)
			} else {
				s += math.Hypot(real(v), imag(v))
			}
		}
		dst[b] = finishBin(s, bin, kind)
	})
	return dst
}

// UnitPhasors writes u = x/|x| (0 where x is 0) into dst and returns it.
func UnitPhasors(dst, x []complex128) []complex128 {
	if cap(dst) < len(x) {
		dst = make([]complex128, len(x))
	}
	dst = dst[:len(x)]
	for k, v := range x {
		dst[k] = 0
		if a := math.Hypot(real(v), imag(v)); a > 0 {
			dst[k] = complex(real(v)/a, imag(v)/a)
		}
	}
	return dst
}

// OrthEnvelope writes the binned envelope of Y⊥X into dst and returns it,
// with u the unit phasors of X (UnitPhasors) and y the band signal of Y:
// |Y⊥X| = |Im(y·ū)| = |Im(y·x̄)|/|x| (OrthAmp; Hipp et al. 2012), binned as
// in Envelope.
func OrthEnvelope(dst []float64, u, y []complex128, bin int, segs []int, kind EnvKind) []float64 {
	if len(u) != len(y) {
		panic("connect: OrthEnvelope length mismatch")
	}
	dst = resize(dst, NBins(len(y), bin, segs))
	binSegs(len(y), bin, segs, func(b, lo, hi int) {
		s := 0.0
		for k := lo; k < hi; k++ {
			// Im(y·ū) = imag(y)·real(u) − real(y)·imag(u)
			v := imag(y[k])*real(u[k]) - real(y[k])*imag(u[k])
			if kind == LogPower {
				s += v * v
			} else {
				s += math.Abs(v)
			}
		}
		dst[b] = finishBin(s, bin, kind)
	})
	return dst
}

func resize(dst []float64, n int) []float64 {
	if cap(dst) < n {
		return make([]float64, n)
	}
	return dst[:n]
}

// Leakage is a leakage correction for PairTerms.
type Leakage uint8

const (
	// NoLeakageCorrection correlates the plain envelopes.
	NoLeakageCorrection Leakage = iota
	// PairwiseOrth correlates |X| with |Y⊥X| and |Y| with |X⊥Y| (Hipp et
	// al. 2012, Nat Neurosci 15:884).
	PairwiseOrth
	// SymmetricOrth correlates the envelopes of the closest orthogonal set
	// of all the channels (ClosestOrthogonal; Colclough et al. 2015).
	SymmetricOrth
)

// PairTerms returns the envelope series that the pair (i, j) correlates
// when channel j's band signal is replaced by yj (z[j] itself for the
// observed r; a time-shifted or trial-permuted copy for a surrogate): each
// term is a pair of binned series (as Envelope and OrthEnvelope make them
// with bin, segs and kind). The correction is applied after the
// replacement, so a surrogate is orthogonalised against the unshifted X
// (pairwise, both directions: |X| with |Y⊥X| and |Y| with |X⊥Y|) or
// re-orthogonalised as a set (symmetric: one closest orthogonal set per
// segment of segs, as per trial on epochs; z holds every channel of the
// set). It is NewPairTermer(…).Terms(yj).
func PairTerms(z [][]complex128, i, j int, yj []complex128, corr Leakage, bin int, segs []int, kind EnvKind) ([][2][]float64, error) {
	return NewPairTermer(z, i, j, corr, bin, segs, kind).Terms(yj)
}

// PairTermer is PairTerms prepared once for many replacements of channel
// j: what does not depend on the replacement (|X| and 1/|X|, the Gram
// matrix of the other channels per segment) is computed once, and Shifted
// and Permuted read channel j's own signal at an offset instead of copying
// it.
type PairTermer struct {
	z      [][]complex128
	i, j   int
	corr   Leakage
	bin    int
	segs   []int
	kind   EnvKind
	ex     []float64   // envelope of X
	xr, xi []float64   // X
	invx   []float64   // 1/|x| (Amplitude) or 1/|x|² (LogPower); 0 where x is 0
	grams  [][]float64 // symmetric: the real Gram matrix per segment
	own    *ySource    // channel j's own signal, twice over (for Shifted)
}

// ySource is a replacement Y in the form the loops read: real and
// imaginary parts, |y| (or |y|²) and its inverse (0 where y is 0).
type ySource struct{ re, im, a, inv []float64 }

func newYSource(y []complex128, times int, kind EnvKind) *ySource {
	n := len(y)
	s := &ySource{re: make([]float64, n*times), im: make([]float64, n*times), a: make([]float64, n*times), inv: make([]float64, n*times)}
	for k, v := range y {
		p2 := real(v)*real(v) + imag(v)*imag(v)
		a := p2
		if kind != LogPower {
			a = math.Sqrt(p2)
		}
		inv := 0.0
		if a > 0 {
			inv = 1 / a
		}
		for t := range times {
			q := t*n + k
			s.re[q], s.im[q], s.a[q], s.inv[q] = real(v), imag(v), a, inv
		}
	}
	return s
}

// NewPairTermer prepares PairTerms for the pair (i, j) of z.
func NewPairTermer(z [][]complex128, i, j int, corr Leakage, bin int, segs []int, kind EnvKind) *PairTermer {
	if segs == nil {
		segs = []int{len(z[i])}
	}
	p := &PairTermer{z: z, i: i, j: j, corr: corr, bin: bin, segs: segs, kind: kind}
	x := z[i]
	switch corr {
	case PairwiseOrth:
		p.ex = Envelope(nil, x, bin, segs, kind)
		xs := newYSource(x, 1, kind)
		p.xr, p.xi, p.invx = xs.re, xs.im, xs.inv
	case SymmetricOrth:
		off := 0
		seg := make([][]complex128, len(z))
		for _, l := range segs {
			for c := range z {
				seg[c] = z[c][off : off+l]
			}
			p.grams = append(p.grams, RealGram(seg))
			off += l
		}
	default:
		p.ex = Envelope(nil, x, bin, segs, kind)
	}
	return p
}

// Terms returns the terms with channel j's band signal replaced by yj.
func (p *PairTermer) Terms(yj []complex128) ([][2][]float64, error) {
	if len(yj) != len(p.z[p.i]) {
		panic("connect: PairTerms length mismatch")
	}
	return p.terms(newYSource(yj, 1, p.kind), func(lo int) int { return lo })
}

// Shifted is Terms(y) for channel j's own signal shifted circularly by
// lag samples, y[t] = z_j[(t+lag) mod n] (0 ≤ lag < n): a time-shift
// surrogate.
func (p *PairTermer) Shifted(lag int) ([][2][]float64, error) {
	n := len(p.z[p.j])
	if lag < 0 || lag >= n {
		panic("connect: Shifted lag out of range")
	}
	if p.own == nil {
		p.own = newYSource(p.z[p.j], 2, p.kind)
	}
	return p.terms(p.own, func(lo int) int { return lo + lag })
}

// Permuted is Terms(y) for channel j's own signal with its segments of
// segLen samples reordered, segment k of y being segment perm[k] of z_j: a
// trial-shuffle surrogate. Every segment of segs must be segLen long.
func (p *PairTermer) Permuted(perm []int, segLen int) ([][2][]float64, error) {
	if len(perm)*segLen != len(p.z[p.j]) {
		panic("connect: Permuted length mismatch")
	}
	if p.own == nil {
		p.own = newYSource(p.z[p.j], 2, p.kind)
	}
	return p.terms(p.own, func(lo int) int { return perm[lo/segLen]*segLen + lo%segLen })
}

// terms computes the terms with Y read from y: the samples of a bin (or,
// for symmetric, of a segment) starting at lo are y[src(lo) …].
func (p *PairTermer) terms(y *ySource, src func(lo int) int) ([][2][]float64, error) {
	x := p.z[p.i]
	logp := p.kind == LogPower
	switch p.corr {
	case PairwiseOrth:
		nb := NBins(len(x), p.bin, p.segs)
		yx, ey, xy := make([]float64, nb), make([]float64, nb), make([]float64, nb)
		binSegs(len(x), p.bin, p.segs, func(b, lo, hi int) {
			var s1, s2, s3 float64
			q0 := src(lo) - lo
			l := hi - lo
			xr, xi, invx := p.xr[lo:hi], p.xi[lo:hi:hi], p.invx[lo:hi:hi]
			yr, yi := y.re[lo+q0:lo+q0+l:lo+q0+l], y.im[lo+q0:lo+q0+l:lo+q0+l]
			ya, yinv := y.a[lo+q0:lo+q0+l:lo+q0+l], y.inv[lo+q0:lo+q0+l:lo+q0+l]
			xi, invx, yr, yi, ya, yinv = xi[:len(xr)], invx[:len(xr)], yr[:len(xr)], yi[:len(xr)], ya[:len(xr)], yinv[:len(xr)]
			for k := range xr {
				// c = Im(y·x̄); |Y⊥X| = |c|/|x|, |X⊥Y| = |c|/|y| (OrthAmp)
				c := yi[k]*xr[k] - yr[k]*xi[k]
				if logp {
					c *= c
				} else {
					c = math.Abs(c)
				}
				s1 += c * invx[k]
				s2 += ya[k]
				s3 += c * yinv[k]
			}
			yx[b] = finishBin(s1, p.bin, p.kind)
			ey[b] = finishBin(s2, p.bin, p.kind)
			xy[b] = finishBin(s3, p.bin, p.kind)
		})
		return [][2][]float64{{p.ex, yx}, {ey, xy}}, nil
	case SymmetricOrth:
		n := len(p.z)
		var ex, ey []float64
		off := 0
		for s, l := range p.segs {
			g := append([]float64(nil), p.grams[s]...)
			q0 := src(off)
			yr, yi := y.re[q0:q0+l], y.im[q0:q0+l]
			for c := range n {
				v := 0.0
				if c == p.j {
					for _, r := range yr {
						v += r * r
					}
				} else {
					for k, v2 := range p.z[c][off : off+l] {
						v += yr[k] * real(v2)
					}
				}
				g[p.j*n+c], g[c*n+p.j] = v, v
			}
			w, _, err := ClosestOrthogonal(g, n)
			if err != nil {
				return nil, err
			}
			// The two output rows, sample by sample, straight into their bins.
			wi, wj := w[p.i*n:(p.i+1)*n], w[p.j*n:(p.j+1)*n]
			nb := l / p.bin
			bx, by := make([]float64, nb), make([]float64, nb)
			for b := range nb {
				var sx, sy float64
				for k := b * p.bin; k < (b+1)*p.bin; k++ {
					ir, ii := wi[p.j]*yr[k], wi[p.j]*yi[k]
					jr, ji := wj[p.j]*yr[k], wj[p.j]*yi[k]
					for c := range n {
						if c == p.j {
							continue
						}
						v := p.z[c][off+k]
						ir += wi[c] * real(v)
						ii += wi[c] * imag(v)
						jr += wj[c] * real(v)
						ji += wj[c] * imag(v)
					}
					if logp {
						sx += ir*ir + ii*ii
						sy += jr*jr + ji*ji
					} else {
						sx += math.Sqrt(ir*ir + ii*ii)
						sy += math.Sqrt(jr*jr + ji*ji)
					}
				}
				bx[b], by[b] = finishBin(sx, p.bin, p.kind), finishBin(sy, p.bin, p.kind)
			}
			ex = append(ex, bx...)
			ey = append(ey, by...)
			off += l
		}
		return [][2][]float64{{ex, ey}}, nil
	default:
		nb := NBins(len(x), p.bin, p.segs)
		e := make([]float64, nb)
		binSegs(len(x), p.bin, p.segs, func(b, lo, hi int) {
			q0 := src(lo)
			sum := 0.0
			for _, a := range y.a[q0 : q0+hi-lo] {
				sum += a
			}
			e[b] = finishBin(sum, p.bin, p.kind)
		})
		return [][2][]float64{{p.ex, e}}, nil
	}
}
