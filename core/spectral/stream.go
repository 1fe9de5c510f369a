package spectral

import (
	"fmt"
	"math"
	"math/bits"
	"strconv"

	"gonum.org/v1/gonum/dsp/fourier"
)

// Stream convolves long continuous signals with one wavelet of a Bank by
// overlap-save block convolution, delivering the 'same'-aligned analytic
// signal y = x∗w_i (see Analytic) in consecutive chunks. Its memory depends
// on the FFT length only, not on the signal length. A Stream must not be used
// by more than one goroutine at a time.
type Stream struct {
	bank  *Bank
	i, h  int
	nfft  int
	block int // output samples per FFT: nfft − 2h

	rfft *fourier.FFT
	cfft *fourier.CmplxFFT
	w    []complex128
	xr   []float64
	x    []complex128
	y    []complex128
}

// DefaultStreamLen returns the FFT length NewStream uses when asked for 0:
// GoodSize(max(8·(2h+1), 4096)) for kernel half-length h. Each FFT then
// yields at least 7/8 of its length as output.
func DefaultStreamLen(h int) int { return GoodSize(max(8*(2*h+1), 4096)) }

// NewStream returns a Stream for wavelet i with FFT length nfft, which must
// exceed 2·Half(i); nfft == 0 picks DefaultStreamLen(Half(i)). Each FFT
// yields nfft − 2·Half(i) output samples (see Block).
func (b *Bank) NewStream(i, nfft int) *Stream {
	if i < 0 || i >= b.Len() {
		panic(fmt.Sprintf("spectral: wavelet index %d out of range [0,%d)", i, b.Len()))
	}
	h := b.halves[i]
	if nfft == 0 {
		nfft = DefaultStreamLen(h)
	}
	if nfft <= 2*h {
		panic(fmt.Sprintf("spectral: stream FFT length %d not longer than 2×%d kernel half-length", nfft, h))
	}
	return &Stream{
		bank:  b,
		i:     i,
		h:     h,
		nfft:  nfft,
		block: nfft - 2*h,
		rfft:  fourier.NewFFT(nfft),
		cfft:  fourier.NewCmplxFFT(nfft),
		w:     b.Spectrum(i, nfft),
		xr:    make([]float64, nfft),
		x:     make([]complex128, nfft),
		y:     make([]complex128, nfft),
	}
}

// Len returns the FFT length.
func (s *Stream) Len() int { return s.nfft }

// Block returns the number of output samples per FFT, the length of every
// chunk but the last.
func (s *Stream) Block() int { return s.block }

// Run convolves x with the wavelet and calls fn(start, y) for consecutive
// chunks, in order, where y[q] is output sample start+q of the 'same'-aligned
// analytic signal (in the unit of x). Chunks cover [0, len(x)) exactly; all
// but the last have Block() samples. y is reused: it is valid only until fn
// returns. Run does not allocate.
func (s *Stream) Run(x []float32, fn func(start int, y []complex128)) {
	s.run(len(x), func(dst []float64, lo int) {
		for m := range dst {
			dst[m] = float64(x[lo+m])
		}
	}, fn)
}

// RunFloat64 is Run for float64 samples.
func (s *Stream) RunFloat64(x []float64, fn func(start int, y []complex128)) {
	s.run(len(x), func(dst []float64, lo int) { copy(dst, x[lo:]) }, fn)
}

// run implements overlap-save: block b loads input samples [a, a+nfft) with
// a = start−h (zero outside the signal); circular output c[m] for m ≥ 2h is
// the full linear convolution at a+m, which is 'same' sample start+m−2h.
func (s *Stream) run(n int, fill func(dst []float64, lo int), fn func(start int, y []complex128)) {
	nf, h := s.nfft, s.h
	scale := complex(1/float64(nf), 0)
	for start := 0; start < n; start += s.block {
		a := start - h
		lo, hi := max(a, 0), min(a+nf, n)
		clear(s.xr[:lo-a])
		fill(s.xr[lo-a:hi-a], lo)
		clear(s.xr[hi-a:])

		s.rfft.Coefficients(s.x[:nf/2+1], s.xr)
		for k := 1; k < nf-k; k++ {
			v := s.x[k]
			s.x[nf-k] = complex(real(v), -imag(v))
		}
		for k, v := range s.w {
			s.x[k] *= v
		}
		s.cfft.Sequence(s.y, s.x)

		cnt := min(s.block, n-start)
		y := s.y[2*h : 2*h+cnt]
		for q := range y {
			y[q] *= scale
		}
		fn(start, y)
	}
}

// BandBlocks computes a band's complex signal (see Convolver.BandAnalytic)
// by overlap-save block convolution with a power-of-four FFT (blockFFT):
// two consecutive real blocks share one forward transform (as the real and
// imaginary parts of one complex sequence), and each block then takes one
// inverse. For long signals this costs about a third of one long
// mixed-radix transform per output sample. Its memory depends on the block
// length only. A BandBlocks must not be used by more than one goroutine at
// a time.
type BandBlocks struct {
	idx   []int
	h     int // the band's largest kernel half-length
	nfft  int
	block int // output samples per FFT: nfft − 2h

	fft       *blockFFT
	w         []complex128 // BandSpectrum(idx, nfft)/(2·nfft)
	z, ya, yb []complex128
}

// BandBlockLen returns the FFT length BandBlocks uses for a band of largest
// kernel half-length h and m output samples: among the powers of four from
// 4096 to MaxRadixLen, the one with the least estimated work
// ⌈m/(N−2h)⌉·N·log₂N (ties to the shorter), or 0 when none yields more than
// half of its length (2h ≥ MaxRadixLen/2), where the one-transform route is
// the better one.
func BandBlockLen(h, m int) int {
	best, cost := 0, math.Inf(1)
	for n := 4096; n <= MaxRadixLen; n *= 4 {
		out := n - 2*h
		if 2*out <= n {
			continue
		}
		blocks := (max(m, 1) + out - 1) / out
		c := float64(blocks) * float64(n) * math.Log2(float64(n))
		if c < cost {
			best, cost = n, c
		}
	}
	return best
}

// NewBandBlocks returns a BandBlocks for the band idx (wavelet indices of b)
// with FFT length nfft, a power of four from 4 to MaxRadixLen longer than
// 2·MaxHalf(idx).
func (b *Bank) NewBandBlocks(idx []int, nfft int) *BandBlocks {
	if len(idx) == 0 {
		panic("spectral: empty band")
	}
	h := b.MaxHalf(idx)
	if nfft < 4 || nfft > MaxRadixLen || nfft&(nfft-1) != 0 || bits.TrailingZeros(uint(nfft))%2 != 0 || nfft <= 2*h {
		panic(fmt.Sprintf("spectral: block FFT length %d is not a power of four in [4, %d] above 2×%d", nfft, MaxRadixLen, h))
	}
	w := make([]complex128, nfft)
	scale := complex(1/(2*float64(nfft)), 0)
	for k, v := range b.BandSpectrum(idx, nfft) {
		w[k] = v * scale
	}
	return &BandBlocks{
		idx:   append([]int(nil), idx...),
		h:     h,
		nfft:  nfft,
		block: nfft - 2*h,
		fft:   newBlockFFT(nfft),
		w:     w,
		z:     make([]complex128, nfft),
		ya:    make([]complex128, nfft),
		yb:    make([]complex128, nfft),
	}
}

// Len returns the FFT length.
func (s *BandBlocks) Len() int { return s.nfft }

// Block returns the number of output samples per FFT.
func (s *BandBlocks) Block() int { return s.block }

// Band writes samples [from, to) of the band's 'same'-aligned complex signal
// z_B = (1/K)·Σ_{i ∈ idx} x∗w_i of x (zero outside [0, len(x))) into dst,
// reused when its capacity suffices, and returns it: the values of
// Convolver.BandAnalytic after Load(x), to rounding. It does not allocate
// when dst is large enough, and panics unless 0 ≤ from ≤ to ≤ len(x).
//
// Block b reads input samples [a, a+N) with a = from + b·B − H (B = N − 2H):
// its circular convolution with the band kernel, whose taps lie at lags −H …
// H, equals the linear one at block positions [H, N−H), which are output
// samples from + b·B … + B. Blocks b and b+1 go into one forward transform
// as z = x_b + i·x_{b+1}, whose spectrum Z gives X_b[k] = (Z[k] +
// conj(Z[−k]))/2 and X_{b+1}[k] = (Z[k] − conj(Z[−k]))/(2i).
func (s *BandBlocks) Band(dst []complex128, x []float32, from, to int) []complex128 {
	if from < 0 || to < from || to > len(x) {
		panic(fmt.Sprintf("spectral: sample range [%d,%d) outside the signal [0,%d)", from, to, len(x)))
	}
	m := to - from
	if cap(dst) < m {
		dst = make([]complex128, m)
	}
	dst = dst[:m]
	nf, h, bl := s.nfft, s.h, s.block
	z, ya, yb, w := s.z[:nf], s.ya[:nf], s.yb[:nf], s.w[:nf]
	for start := from; start < to; start += 2 * bl {
		two := start+bl < to
		s.load(z, x, start-h, false)
		if two {
			s.load(z, x, start+bl-h, true)
		} else {
			for k := range z {
				z[k] = complex(real(z[k]), 0)
			}
		}
		s.fft.transform(z, false)
		for k := range nf {
			zk, zr := z[k], z[(nf-k)&(nf-1)]
			c := complex(real(zr), -imag(zr)) // conj(Z[−k])
			ya[k] = (zk + c) * w[k]
			d := zk - c
			yb[k] = complex(imag(d), -real(d)) * w[k] // −i·(Z[k] − conj(Z[−k]))
		}
		s.fft.transform(ya, true)
		cnt := min(bl, to-start)
		copy(dst[start-from:start-from+cnt], ya[h:h+cnt])
		if two {
			s.fft.transform(yb, true)
			cnt = min(bl, to-start-bl)
			copy(dst[start+bl-from:start+bl-from+cnt], yb[h:h+cnt])
		}
	}
	return dst
}

// load puts input samples [a, a+N) of x (zero outside it) into the real
// (im false) or imaginary part of z; the real part's call sets the
// imaginary part to 0.
func (s *BandBlocks) load(z []complex128, x []float32, a int, im bool) {
	nf := s.nfft
	lo, hi := max(a, 0), max(min(a+nf, len(x)), max(a, 0))
	if !im {
		clear(z[:lo-a])
		for q, v := range x[lo:hi] {
			z[lo-a+q] = complex(float64(v), 0)
		}
		clear(z[hi-a:])
		return
	}
	for q := range z[:lo-a] {
		z[q] = complex(real(z[q]), 0)
	}
	for q, v := range x[lo:hi] {
		z[lo-a+q] = complex(real(z[lo-a+q]), float64(v))
	}
	for q := hi - a; q < nf; q++ {
		z[q] = complex(real(z[q]), 0)
	}
}

// BandFilter gives a band's complex signal by the cheaper of two routes:
// overlap-save blocks (BandBlocks) when the output spans more than one
// block, one transform of the whole signal (Convolver.BandAnalytic with FFT
// length FFTLen(len(x), MaxHalf(idx))) otherwise. It keeps its plans and
// buffers between calls; one goroutine at a time.
type BandFilter struct {
	bank   *Bank
	blocks map[string]*BandBlocks
	convs  map[int]*Convolver
	key    []byte
}

// NewBandFilter returns a BandFilter for the wavelets of b.
func (b *Bank) NewBandFilter() *BandFilter {
	return &BandFilter{bank: b, blocks: map[string]*BandBlocks{}, convs: map[int]*Convolver{}}
}

// Band writes samples [from, to) of the 'same'-aligned band signal of x for
// the wavelets idx into dst (reused when large enough) and returns it (see
// BandBlocks.Band and Convolver.BandAnalytic, which agree to rounding).
func (f *BandFilter) Band(dst []complex128, idx []int, x []float32, from, to int) []complex128 {
	if len(idx) == 0 {
		panic("spectral: empty band")
	}
	h := f.bank.MaxHalf(idx)
	m := to - from
	if nb := BandBlockLen(h, m); nb > 0 && m > nb-2*h {
		f.key = f.key[:0]
		f.key = strconv.AppendInt(f.key, int64(nb), 10)
		for _, i := range idx {
			f.key = append(f.key, ',')
			f.key = strconv.AppendInt(f.key, int64(i), 10)
		}
		s := f.blocks[string(f.key)]
		if s == nil {
			s = f.bank.NewBandBlocks(idx, nb)
			f.blocks[string(f.key)] = s
		}
		return s.Band(dst, x, from, to)
	}
	nfft := FFTLen(len(x), h)
	c := f.convs[nfft]
	if c == nil {
		c = f.bank.NewConvolver(nfft)
		f.convs[nfft] = c
	}
	c.Load(x)
	return c.BandAnalytic(dst, idx, from, to)
}

// blockFFT is a radix-4 complex FFT of one power-of-four length whose
// twiddle factors come from math.Sincos, one table per stage, so its
// rounding error grows like that of a mixed-radix transform, not like
// twiddles made by repeated multiplication (gonum's CoefficientsRadix4,
// about 30× larger at 4096 points). Decimation in time: the input is
// permuted by bit-pair reversal, then log₄N stages of butterflies
//
//	X0 = a0 + a1 + a2 + a3,   X1 = a0 ∓ i·a1 − a2 ± i·a3,
//	X2 = a0 − a1 + a2 − a3,   X3 = a0 ± i·a1 − a2 ∓ i·a3,
//
// with a_q = x[j + q·m]·ω^{q·j}, ω = exp(∓2πi/(4m)) (upper signs forward).
type blockFFT struct {
	n     int
	tw    [][]float64 // per stage m = 4, 16, …: (Re, Im) of ω^j, ω^{2j}, ω^{3j} (forward), j < m
	swaps [][2]int32  // index pairs the bit-pair reversal exchanges
}

func newBlockFFT(n int) *blockFFT {
	if n < 4 || n&(n-1) != 0 || bits.TrailingZeros(uint(n))%2 != 0 {
		panic(fmt.Sprintf("spectral: block FFT length %d is not a power of 4", n))
	}
	f := &blockFFT{n: n}
	for m := 4; m < n; m *= 4 {
		t := make([]float64, 6*m)
		for j := range m {
			for q := 1; q <= 3; q++ {
				// ω^{q·j} = exp(−2πi·q·j/(4m)), with q·j < 4m exact.
				s, c := math.Sincos(-2 * math.Pi * float64(q*j) / float64(4*m))
				t[6*j+2*(q-1)], t[6*j+2*(q-1)+1] = c, s
			}
		}
		f.tw = append(f.tw, t)
	}
	digits := bits.TrailingZeros(uint(n)) / 2
	for i := range n {
		j, v := 0, i
		for range digits {
			j = j<<2 | v&3
			v >>= 2
		}
		if i < j {
			f.swaps = append(f.swaps, [2]int32{int32(i), int32(j)})
		}
	}
	return f
}

// transform computes the unnormalised DFT of x (length n) in place: forward,
// X[k] = Σ x[j]·exp(−2πijk/n), or inverse, with exp(+2πijk/n).
func (f *blockFFT) transform(x []complex128, inverse bool) {
	n := f.n
	x = x[:n]
	for _, p := range f.swaps {
		x[p[0]], x[p[1]] = x[p[1]], x[p[0]]
	}
	// sg·(Im v, −Re v) is −i·v forward (sg = 1) and i·v inverse (sg = −1);
	// the inverse twiddles are the conjugates.
	sg := 1.0
	if inverse {
		sg = -1
	}
	for k := 0; k+3 < n; k += 4 {
		q := x[k : k+4 : k+4]
		t, u := q[1]+q[3], q[2]
		d := q[1] - q[3]
		v := complex(sg*imag(d), -sg*real(d))
		a := q[0]
		q[0], q[1], q[2], q[3] = a+u+t, a-u+v, a+u-t, a-u-v
	}
	for s, m := 0, 4; m < n; s, m = s+1, m*4 {
		tw := f.tw[s][:6*m]
		for k := 0; k < n; k += 4 * m {
			b0, b1, b2, b3 := x[k:k+m], x[k+m:k+2*m], x[k+2*m:k+3*m], x[k+3*m:k+4*m]
			b1, b2, b3 = b1[:len(b0)], b2[:len(b0)], b3[:len(b0)]
			for j := range b0 {
				w := tw[6*j : 6*j+6 : 6*j+6]
				a1 := b1[j] * complex(w[0], sg*w[1])
				a2 := b2[j] * complex(w[2], sg*w[3])
				a3 := b3[j] * complex(w[4], sg*w[5])
				t := a1 + a3
				d := a1 - a3
				v := complex(sg*imag(d), -sg*real(d))
				a := b0[j]
				b0[j], b1[j], b2[j], b3[j] = a+a2+t, a-a2+v, a+a2-t, a-a2-v
			}
		}
	}
}
