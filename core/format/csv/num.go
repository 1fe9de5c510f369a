package csv

import (
	"math"
	"strconv"
)

// pow10 holds the powers of ten that float64 represents exactly.
var pow10 = [...]float64{1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10,
	1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// fastFloat64 parses a plain decimal [+-]digits[.digits][(e|E)[+-]digits]
// with at most 15 significant digits and a decimal exponent within ±22.
// Then m·10^e (or m/10^−e) is one correctly rounded float64 operation on
// exact operands (Clinger 1990), so the result equals strconv.ParseFloat's.
// ok is false for anything else, which the caller hands to strconv.
func fastFloat64(s string) (v float64, ok bool) {
	i, n := 0, len(s)
	neg := false
	if i < n && (s[i] == '-' || s[i] == '+') {
		neg = s[i] == '-'
		i++
	}
	var mant uint64
	digits, sig, exp := 0, 0, 0
	for ; i < n && s[i] >= '0' && s[i] <= '9'; i++ {
		digits++
		if mant == 0 && s[i] == '0' {
			continue
		}
		mant = mant*10 + uint64(s[i]-'0')
		sig++
	}
	if i < n && s[i] == '.' {
		i++
		for ; i < n && s[i] >= '0' && s[i] <= '9'; i++ {
			digits++
			exp--
			if mant == 0 && s[i] == '0' {
				continue
			}
			mant = mant*10 + uint64(s[i]-'0')
			sig++
		}
	}
	if digits == 0 || sig > 15 {
		return 0, false
	}
	if i < n && (s[i] == 'e' || s[i] == 'E') {
		i++
		eneg := false
		if i < n && (s[i] == '-' || s[i] == '+') {
			eneg = s[i] == '-'
			i++
		}
		e, ed := 0, 0
		for ; i < n && s[i] >= '0' && s[i] <= '9'; i++ {
			if e < 1000 {
				e = e*10 + int(s[i]-'0')
			}
			ed++
		}
		if ed == 0 {
			return 0, false
		}
		if eneg {
			e = -e
		}
		exp += e
	}
	if i != n {
		return 0, false
	}
	v = float64(mant)
	switch {
	case mant == 0:
	case exp >= 0 && exp <= 22:
		v *= pow10[exp]
	case exp < 0 && exp >= -22:
		v /= pow10[-exp]
	default:
		return 0, false
	}
	if neg {
		v = -v
	}
	return v, true
}

// parseFloat32 returns the float32 nearest to the decimal s, exactly as
// strconv.ParseFloat(s, 32) does, using fastFloat64 when it can: rounding
// the correctly rounded float64 to float32 again gives the same result
// unless the float64 lies exactly halfway between two float32 values
// (rounding to nearest is monotonic, so it cannot cross a halfway point),
// and that case goes to strconv.
func parseFloat32(s string) (float32, error) {
	// fastFloat64 results lie within 1e-22..1e37 in magnitude (or are 0), in
	// the normal float32 range, where d is halfway between two float32
	// values exactly when its 29 low mantissa bits are 1000…0.
	if d, ok := fastFloat64(s); ok && math.Float64bits(d)&(1<<29-1) != 1<<28 {
		return float32(d), nil
	}
	v, err := strconv.ParseFloat(s, 32)
	return float32(v), err
}

// parseFloat64 is strconv.ParseFloat(s, 64) with the fastFloat64 shortcut.
func parseFloat64(s string) (float64, error) {
	if d, ok := fastFloat64(s); ok {
		return d, nil
	}
	return strconv.ParseFloat(s, 64)
}
