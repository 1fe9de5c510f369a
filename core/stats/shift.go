package stats

import (
	"math"

	"gonum.org/v1/gonum/floats"
)

// ShiftCorr is the correlation of x with y shifted circularly, for many
// shifts: r(x, y') with y'[i] = y[(i+lag) mod n], Pearson's or (on ranks,
// which a circular shift only permutes) Spearman's. The centred series and
// their sums of squares do not change with the shift, so each shift costs
// one pass of n products instead of a copy and a full correlation. It
// agrees with Pearson or Spearman of the shifted copy to rounding (about
// 1e-15). This is what time-shift surrogates need.
type ShiftCorr struct {
	xd, yd []float64 // centred
	den    float64   // √(Σxd²·Σyd²); 0 when either series is constant
}

// NewShiftCorr prepares x and y. It panics if the lengths differ.
func NewShiftCorr(x, y []float64, spearman bool) ShiftCorr {
	if len(x) != len(y) {
		panic("stats: ShiftCorr length mismatch")
	}
	if spearman {
		x, y = Ranks(nil, x), Ranks(nil, y)
	}
	var s ShiftCorr
	if len(x) < 2 {
		return s
	}
	var sxx, syy float64
	s.xd, sxx = centered(x)
	s.yd, syy = centered(y)
	if sxx > 0 && syy > 0 { // a constant series centres to exact zeros
		s.den = math.Sqrt(sxx * syy)
	}
	return s
}

// At returns the correlation at a shift of lag samples (0 ≤ lag < n); NaN
// when either series is constant or holds NaN.
func (s ShiftCorr) At(lag int) float64 {
	if s.den == 0 {
		return math.NaN()
	}
	n := len(s.xd)
	sxy := floats.Dot(s.xd[:n-lag], s.yd[lag:]) + floats.Dot(s.xd[n-lag:], s.yd[:lag])
	return max(-1, min(1, sxy/s.den))
}
