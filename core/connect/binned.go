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

// Rotate writes y circularly shifted by lag samples into dst and returns
// it: dst[t] = y[(t+lag) mod len(y)], 0 ≤ lag < len(y). Time-shift
// surrogates shift a band signal this way before it is orthogonalised.
func Rotate(dst, y []complex128, lag int) []complex128 {
	n := len(y)
	if lag < 0 || (n > 0 && lag >= n) {
		panic("connect: Rotate lag out of range")
	}
	if cap(dst) < n {
		dst = make([]complex128, n)
	}
	dst = dst[:n]
	copy(dst, y[lag:])
	copy(dst[n-lag:], y[:lag])
	return dst
}
