package plot

import (
	"errors"
	"math"
	"strconv"
)

// niceNum is Heckbert's nicenum: a number 1, 2, 5 or 10 × 10^k close to x.
// With round it is the nearest such number (thresholds 1.5, 3, 7), without
// it the smallest such number ≥ x. Heckbert (1990), "Nice numbers for
// graph labels", Graphics Gems, pp. 61–63.
func niceNum(x float64, round bool) (nf float64, exp int) {
	exp = int(math.Floor(math.Log10(x)))
	f := x / math.Pow(10, float64(exp))
	switch {
	case round && f < 1.5, !round && f <= 1:
		nf = 1
	case round && f < 3, !round && f <= 2:
		nf = 2
	case round && f < 7, !round && f <= 5:
		nf = 5
	default:
		nf = 10
	}
	return nf, exp
}

// scaled is k·nf·10^exp, computed so that decimal steps come out as the
// nearest float64 to the decimal value (0.6, not 0.6000000000000001).
func scaled(k, nf float64, exp int) float64 {
	m := k * nf // a small integer, exact in float64
	v, err := strconv.ParseFloat(strconv.FormatFloat(m, 'f', -1, 64)+"e"+strconv.Itoa(exp), 64)
	if err != nil && !errors.Is(err, strconv.ErrRange) {
		panic("plot: " + err.Error())
	}
	return v // correctly rounded; under- or overflow gives 0 or ±Inf
}

// NiceTicks is Heckbert's loose labelling of [lo, hi] with about n ticks:
//
//	range = nicenum(hi − lo, false)
//	step  = nicenum(range/(n − 1), true)
//	ticks = floor(lo/step)·step, …, ceil(hi/step)·step
//
// so the ticks cover [lo, hi] and the first and last may lie outside it.
// lo and hi may come in either order; equal (or nearly equal, see flat)
// values are widened to ±|lo|/2, or ±1 around 0. n < 2 counts as 2, n > 100 as 100. Non-finite
// input, and ranges too narrow for float64 steps, give nil, 0.
// Heckbert (1990), "Nice numbers for graph labels", Graphics Gems.
func NiceTicks(lo, hi float64, n int) (ticks []float64, step float64) {
	nf, exp, ok := niceStep(lo, hi, n)
	if !ok {
		return nil, 0
	}
	if lo > hi {
		lo, hi = hi, lo
	}
	if flat(lo, hi) {
		lo, hi = widen(lo)
	}
	step = scaled(1, nf, exp)
	k0 := math.Floor(lo/step + 1e-9)
	k1 := math.Ceil(hi/step - 1e-9)
	if scaled(k0, nf, exp) > lo {
		k0-- // the slack above must never leave lo uncovered
	}
	if scaled(k1, nf, exp) < hi {
		k1++
	}
	if !(step > 0) || !finite(step) || !finite(k0) || !finite(k1) || k1-k0 < 1 || k1-k0 > 1000 {
		return nil, 0 // a range too narrow for float64 steps
	}
	for k := k0; k <= k1; k++ {
		ticks = append(ticks, cleanZero(scaled(k, nf, exp)))
	}
	return ticks, step
}

func niceStep(lo, hi float64, n int) (nf float64, exp int, ok bool) {
	if !finite(lo) || !finite(hi) {
		return 0, 0, false
	}
	n = max(2, min(n, 100))
	if lo > hi {
		lo, hi = hi, lo
	}
	if flat(lo, hi) {
		lo, hi = widen(lo)
	}
	rnf, rexp := niceNum(hi-lo, false)
	nf, exp = niceNum(scaled(1, rnf, rexp)/float64(n-1), true)
	if nf == 10 {
		nf, exp = 1, exp+1
	}
	return nf, exp, true
}

// flat reports whether [lo, hi] is too narrow for float64 tick steps:
// narrower than 1e-12 of its magnitude or than 1e-200 absolute.
func flat(lo, hi float64) bool {
	d := math.Abs(hi - lo)
	return d <= 1e-12*math.Max(math.Abs(lo), math.Abs(hi)) || d < 1e-200
}

func widen(v float64) (lo, hi float64) {
	d := math.Abs(v) / 2
	if v == 0 || v-d == v+d || math.Abs(v) < 1e-200 {
		return v - 1, v + 1
	}
	return v - d, v + d
}

// InnerTicks is like NiceTicks but keeps only ticks inside [lo, hi], and
// asks for more ticks until at least four fall inside (−1.0…1.5 s gives
// −1, −0.5, 0, 0.5, 1, 1.5). It suits axes whose limits are the data's
// own extent, such as a time axis.
func InnerTicks(lo, hi float64, n int) (ticks []float64, step float64) {
	if !finite(lo) || !finite(hi) {
		return nil, 0
	}
	if lo > hi {
		lo, hi = hi, lo
	}
	if n < 2 {
		n = 2
	}
	for m := n; m <= n+16; m++ {
		all, st := NiceTicks(lo, hi, m)
		eps := st * 1e-9
		ticks = ticks[:0]
		for _, v := range all {
			if v >= lo-eps && v <= hi+eps {
				ticks = append(ticks, v)
			}
		}
		step = st
		if len(ticks) >= 4 || lo == hi {
			break
		}
	}
	return append([]float64(nil), ticks...), step
}

// LogTicks chooses ticks for a logarithmic axis over [lo, hi], lo > 0:
// the numbers m·10^k inside the range with m ∈ {1, 2, 3, 5} when the range
// spans at most 1.5 decades, m ∈ {1, 2, 5} up to 3 decades, and m = 1
// beyond (every other decade past 6). When fewer than three such numbers
// fall inside, the range is narrow: the ticks are then the grid's own
// values inside the range, thinned to at most n (n < 2 counts as 5), or,
// without a grid, InnerTicks. lo ≤ 0 or non-finite input gives nil.
func LogTicks(lo, hi float64, grid []float64, n int) []float64 {
	if !finite(lo) || !finite(hi) || lo <= 0 || hi <= 0 {
		return nil
	}
	if lo > hi {
		lo, hi = hi, lo
	}
	if n < 2 {
		n = 5
	}
	dec := math.Log10(hi) - math.Log10(lo)
	var mult []float64
	stride := 1
	switch {
	case dec <= 1.5:
		mult = []float64{1, 2, 3, 5}
	case dec <= 3:
		mult = []float64{1, 2, 5}
	default:
		mult = []float64{1}
		if dec > 6 {
			stride = int(math.Ceil(dec / 6))
		}
	}
	lo1, hi1 := lo*(1-1e-9), hi*(1+1e-9)
	var ticks []float64
	for k := int(math.Floor(math.Log10(lo))); k <= int(math.Ceil(math.Log10(hi))); k++ {
		if k%stride != 0 {
			continue
		}
		for _, m := range mult {
			v := scaled(1, m, k)
			if v >= lo1 && v <= hi1 {
				ticks = append(ticks, v)
			}
		}
	}
	if len(ticks) >= 3 {
		return ticks
	}
	var in []float64
	for _, f := range grid {
		if finite(f) && f >= lo1 && f <= hi1 {
			in = append(in, f)
		}
	}
	if len(in) == 0 {
		t, _ := InnerTicks(lo, hi, n)
		return t
	}
	s := (len(in) + n - 1) / n
	ticks = ticks[:0]
	for i := 0; i < len(in); i += s {
		ticks = append(ticks, in[i])
	}
	return ticks
}

// maxMagnitude bounds the values a figure can place: anything larger in
// magnitude (including ±Inf) is treated like NaN, as undefined, so that
// differences of two values never overflow.
const maxMagnitude = 1e100

func finite(v float64) bool { return v >= -maxMagnitude && v <= maxMagnitude }

func cleanZero(v float64) float64 {
	if v == 0 {
		return 0 // turns −0 into +0
	}
	return v
}
