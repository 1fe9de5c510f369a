package spectral

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"sync"
)

type bandEntry struct {
	once sync.Once
	w    []complex128
}

// BandSpectrum returns the spectrum of the band kernel of the wavelets idx
// at FFT length nfft,
//
//	W_B[k] = (1/K)·Σ_{i ∈ idx} W_i[k]·exp(i2πk·H_i/nfft),
//
// the mean of the kernels, each shifted by its own half-length so that one
// inverse transform of X·W_B gives the mean of the 'same'-aligned analytic
// signals directly (see Convolver.BandAnalytic). It is computed once per
// (idx, nfft) and cached; the slice is shared and must not be modified.
func (b *Bank) BandSpectrum(idx []int, nfft int) []complex128 {
	if len(idx) == 0 {
		panic("spectral: empty band")
	}
	var key strings.Builder
	key.WriteString(strconv.Itoa(nfft))
	for _, i := range idx {
		key.WriteByte(',')
		key.WriteString(strconv.Itoa(i))
	}
	b.mu.Lock()
	if b.bands == nil {
		b.bands = map[string]*bandEntry{}
	}
	e := b.bands[key.String()]
	if e == nil {
		e = new(bandEntry)
		b.bands[key.String()] = e
	}
	b.mu.Unlock()
	e.once.Do(func() {
		w := make([]complex128, nfft)
		inv := 1 / float64(len(idx))
		for _, i := range idx {
			wi := b.Spectrum(i, nfft)
			h := b.halves[i]
			for k := range w {
				// exp(i2πk·h/nfft), with k·h reduced modulo nfft for accuracy.
				s, c := math.Sincos(2 * math.Pi * float64((k*h)%nfft) / float64(nfft))
				w[k] += wi[k] * complex(c*inv, s*inv)
			}
		}
		e.w = w
	})
	return e.w
}

// BandAnalytic writes samples [from, to) of the band's complex signal
// z_B = (1/K)·Σ_{i ∈ idx} x∗w_i of the loaded signal into dst and returns it:
// the same values as averaging Analytic over idx, to rounding, for one
// inverse FFT instead of K. It panics under the same conditions as Analytic
// for the longest wavelet of the band.
func (c *Convolver) BandAnalytic(dst []complex128, idx []int, from, to int) []complex128 {
	if c.n < 0 {
		panic("spectral: Convolver used before Load")
	}
	for _, i := range idx {
		if i < 0 || i >= len(c.spec) {
			panic(fmt.Sprintf("spectral: wavelet index %d out of range [0,%d)", i, len(c.spec)))
		}
	}
	c.check(c.bank.MaxHalf(idx), from, to)
	w := c.bank.BandSpectrum(idx, c.nfft)
	out, x := c.out, c.x
	for k := range out {
		out[k] = x[k] * w[k]
	}
	c.inverse(out)
	c.cur = -1 // out no longer holds a single wavelet's result
	m := to - from
	if cap(dst) < m {
		dst = make([]complex128, m)
	}
	dst = dst[:m]
	s := complex(c.scale, 0)
	for j, v := range out[from:to] {
		dst[j] = v * s
	}
	return dst
}
