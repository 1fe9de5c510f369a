package connect

import "math"

// OrthIndex returns where OrthEnvelopes puts |z_j ⊥ z_i| (channel j
// orthogonalised to channel i, i ≠ j) among the n·(n−1) series:
// i·(n−1) + j, less one when j > i.
func OrthIndex(n, i, j int) int {
	k := i*(n-1) + j
	if j > i {
		k--
	}
	return k
}

// orthBlockLen is the number of samples of every channel that OrthEnvelopes
// holds at once: 64 channels × 256 samples × 3 values × 8 bytes = 384 KiB,
// which stays in a core's second-level cache while every pair reads it.
const orthBlockLen = 256

// OrthWork holds OrthEnvelopes' buffers so that repeated calls do not
// allocate. The zero value is ready to use; it must not be shared between
// goroutines.
type OrthWork struct {
	v      []float64 // per channel, orthBlockLen samples of (Re u, Im u, |y| or |y|²)
	pieces []orthPiece
	sums   [8]float64 // the four-partner sums, here so that passing them to sum4 does not allocate
}

// orthPiece is a run [lo, hi) of block samples that all fall into bin b.
type orthPiece struct{ b, lo, hi int }

// OrthEnvelopes writes the binned envelopes of every ordered pairwise
// orthogonalisation of the channels' band signals z (equal lengths) into
// dst, which must hold n·(n−1) slices (reused when long enough, allocated
// otherwise) and is returned: dst[OrthIndex(n, i, j)] is the envelope of
// |z_j ⊥ z_i|, the same series as OrthEnvelope(nil, UnitPhasors(nil, z[i]),
// z[j], bin, segs, kind) to rounding (Hipp et al. 2012).
//
// It uses |z_j ⊥ z_i| = |y_j|·|Im(u_j·ū_i)| and |z_i ⊥ z_j| = |y_i|·|Im(u_j·ū_i)|,
// with u = z/|z| the unit phasors (0 where z is 0): one |Im(u_j·ū_i)| per
// unordered pair and sample serves both directions (for LogPower the squares,
// |y|²·Im(u_j·ū_i)²). The samples are taken in blocks of a few hundred, across
// all channels, so each pair reads its channels from cache rather than from
// memory. Each bin is summed in sample order. work may be nil.
func OrthEnvelopes(dst [][]float64, z [][]complex128, bin int, segs []int, kind EnvKind, work *OrthWork) [][]float64 {
	n := len(z)
	if dst != nil && len(dst) < n*(n-1) {
		panic("connect: OrthEnvelopes needs n·(n−1) destination series")
	}
	if dst == nil {
		dst = make([][]float64, n*(n-1))
	}
	if n < 2 {
		return dst
	}
	total := len(z[0])
	for _, zc := range z {
		if len(zc) != total {
			panic("connect: OrthEnvelopes length mismatch")
		}
	}
	nb := NBins(total, bin, segs)
	for k := range dst[:n*(n-1)] {
		dst[k] = resize(dst[k], nb)
		clear(dst[k])
	}
	if work == nil {
		work = new(OrthWork)
	}
	const L = orthBlockLen
	work.v = resize(work.v, 3*n*L)
	if cap(work.pieces) < L+1 {
		work.pieces = make([]orthPiece, 0, L+1)
	}
	logp := kind == LogPower

	// The retained samples in bin order: bin b covers z[starts(b) …+bin].
	// A block gathers up to L of them; pieces mark where bins begin.
	fill := 0
	pieces := work.pieces[:0]
	flush := func() {
		if fill > 0 {
			if logp {
				orthBlock(dst, work, n, fill, pieces, orthSumSq4, orthSumSq1)
			} else {
				orthBlock(dst, work, n, fill, pieces, orthSum4, orthSum1)
			}
		}
		fill = 0
		pieces = pieces[:0]
	}
	binSegs(total, bin, segs, func(b, lo, hi int) {
		for lo < hi {
			take := min(hi-lo, L-fill)
			if m := len(pieces); m > 0 && pieces[m-1].b == b {
				pieces[m-1].hi += take
			} else {
				pieces = append(pieces, orthPiece{b, fill, fill + take})
			}
			for c, zc := range z {
				dv := work.v[3*(c*L+fill) : 3*(c*L+fill+take)]
				src := zc[lo : lo+take]
				for k, v := range src {
					d := dv[3*k : 3*k+3 : 3*k+3]
					re, im := real(v), imag(v)
					p2 := re*re + im*im
					m := math.Sqrt(p2)
					if p2 < 1e-290 || p2 > 1e290 {
						// Outside the range where re²+im² is exact to
						// rounding; 0 stays 0.
						m = math.Hypot(re, im)
						p2 = m * m
					}
					if m > 0 {
						d[0], d[1] = re/m, im/m
					} else {
						d[0], d[1] = 0, 0
					}
					if logp {
						d[2] = p2
					} else {
						d[2] = m
					}
				}
			}
			fill += take
			lo += take
			if fill == L {
				flush()
			}
		}
	})
	flush()
	work.pieces = pieces
	for k := range dst[:n*(n-1)] {
		for b, s := range dst[k] {
			dst[k][b] = finishBin(s, bin, kind)
		}
	}
	return dst
}

// orthBlock adds one block's samples (fill of them per channel, bins as in
// pieces) into the running bin sums of dst. Channel c's sample k is
// w.v[c·3L + 3k …]: Re u, Im u, |y| (|y|² for LogPower). sum4 and sum1 are
// the per-sample sums: orthSum4/orthSum1 for amplitude, orthSumSq4/orthSumSq1
// for LogPower.
func orthBlock(dst [][]float64, w *OrthWork, n, fill int, pieces []orthPiece,
	sum4 func(s *[8]float64, x, y0, y1, y2, y3 []float64),
	sum1 func(sf, sg float64, x, y []float64) (float64, float64)) {
	const L = orthBlockLen
	s := &w.sums
	for i := 0; i < n; i++ {
		vi := w.v[i*3*L : i*3*L+3*fill]
		j := i + 1
		// Four partners at a time: eight independent sums per sample.
		for ; j+4 <= n; j += 4 {
			v0, v1 := w.v[j*3*L:j*3*L+3*fill], w.v[(j+1)*3*L:(j+1)*3*L+3*fill]
			v2, v3 := w.v[(j+2)*3*L:(j+2)*3*L+3*fill], w.v[(j+3)*3*L:(j+3)*3*L+3*fill]
			// |z_j ⊥ z_i| at OrthIndex(n, i, j) (j > i), |z_i ⊥ z_j| at OrthIndex(n, j, i).
			f0, f1, f2, f3 := dst[i*(n-1)+j-1], dst[i*(n-1)+j], dst[i*(n-1)+j+1], dst[i*(n-1)+j+2]
			g0, g1, g2, g3 := dst[j*(n-1)+i], dst[(j+1)*(n-1)+i], dst[(j+2)*(n-1)+i], dst[(j+3)*(n-1)+i]
			for _, pc := range pieces {
				b, lo, hi := pc.b, 3*pc.lo, 3*pc.hi
				*s = [8]float64{f0[b], f1[b], f2[b], f3[b], g0[b], g1[b], g2[b], g3[b]}
				sum4(s, vi[lo:hi], v0[lo:hi], v1[lo:hi], v2[lo:hi], v3[lo:hi])
				f0[b], f1[b], f2[b], f3[b] = s[0], s[1], s[2], s[3]
				g0[b], g1[b], g2[b], g3[b] = s[4], s[5], s[6], s[7]
			}
		}
		for ; j < n; j++ {
			vj := w.v[j*3*L : j*3*L+3*fill]
			f, g := dst[i*(n-1)+j-1], dst[j*(n-1)+i]
			for _, pc := range pieces {
				b, lo, hi := pc.b, 3*pc.lo, 3*pc.hi
				f[b], g[b] = sum1(f[b], g[b], vi[lo:hi], vj[lo:hi])
			}
		}
	}
}

// orthSum4 adds to s, sample by sample, |Im(u_j·ū_i)|·|y_j| (s[0:4]) and
// |Im(u_j·ū_i)|·|y_i| (s[4:8]) for the four partners j of y0 … y3, with x
// channel i; all hold (Re u, Im u, |y|) triples.
func orthSum4(s *[8]float64, x, y0, y1, y2, y3 []float64) {
	y0, y1, y2, y3 = y0[:len(x)], y1[:len(x)], y2[:len(x)], y3[:len(x)]
	sf0, sf1, sf2, sf3, sg0, sg1, sg2, sg3 := s[0], s[1], s[2], s[3], s[4], s[5], s[6], s[7]
	for k := 0; k+2 < len(x); k += 3 {
		xr, xi, xa := x[k], x[k+1], x[k+2]
		// Im(u_j·ū_i) = Im(u_j)·Re(u_i) − Re(u_j)·Im(u_i)
		c0 := math.Abs(y0[k+1]*xr - y0[k]*xi)
		c1 := math.Abs(y1[k+1]*xr - y1[k]*xi)
		c2 := math.Abs(y2[k+1]*xr - y2[k]*xi)
		c3 := math.Abs(y3[k+1]*xr - y3[k]*xi)
		sf0 += c0 * y0[k+2]
		sf1 += c1 * y1[k+2]
		sf2 += c2 * y2[k+2]
		sf3 += c3 * y3[k+2]
		sg0 += c0 * xa
		sg1 += c1 * xa
		sg2 += c2 * xa
		sg3 += c3 * xa
	}
	*s = [8]float64{sf0, sf1, sf2, sf3, sg0, sg1, sg2, sg3}
}

// orthSum1 is orthSum4 for one partner.
func orthSum1(sf, sg float64, x, y []float64) (float64, float64) {
	y = y[:len(x)]
	for k := 0; k+2 < len(x); k += 3 {
		c := math.Abs(y[k+1]*x[k] - y[k]*x[k+1])
		sf += c * y[k+2]
		sg += c * x[k+2]
	}
	return sf, sg
}

// orthSumSq4 is orthSum4 with Im(u_j·ū_i)² and |y|².
func orthSumSq4(s *[8]float64, x, y0, y1, y2, y3 []float64) {
	y0, y1, y2, y3 = y0[:len(x)], y1[:len(x)], y2[:len(x)], y3[:len(x)]
	sf0, sf1, sf2, sf3, sg0, sg1, sg2, sg3 := s[0], s[1], s[2], s[3], s[4], s[5], s[6], s[7]
	for k := 0; k+2 < len(x); k += 3 {
		xr, xi, xa := x[k], x[k+1], x[k+2]
		// Im(u_j·ū_i) = Im(u_j)·Re(u_i) − Re(u_j)·Im(u_i)
		c0 := sq(y0[k+1]*xr - y0[k]*xi)
		c1 := sq(y1[k+1]*xr - y1[k]*xi)
		c2 := sq(y2[k+1]*xr - y2[k]*xi)
		c3 := sq(y3[k+1]*xr - y3[k]*xi)
		sf0 += c0 * y0[k+2]
		sf1 += c1 * y1[k+2]
		sf2 += c2 * y2[k+2]
		sf3 += c3 * y3[k+2]
		sg0 += c0 * xa
		sg1 += c1 * xa
		sg2 += c2 * xa
		sg3 += c3 * xa
	}
	*s = [8]float64{sf0, sf1, sf2, sf3, sg0, sg1, sg2, sg3}
}

// orthSumSq1 is orthSumSq4 for one partner.
func orthSumSq1(sf, sg float64, x, y []float64) (float64, float64) {
	y = y[:len(x)]
	for k := 0; k+2 < len(x); k += 3 {
		c := sq(y[k+1]*x[k] - y[k]*x[k+1])
		sf += c * y[k+2]
		sg += c * x[k+2]
	}
	return sf, sg
}

func sq(v float64) float64 { return v * v }
