package connect

// Rotate (a test reference) writes y circularly shifted by lag samples into dst and returns
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

// PermuteSegments (a test reference) writes y with its segments of segLen samples reordered
// into dst and returns it: segment k of dst is segment perm[k] of y. A
// trial-shuffle surrogate pairs trial k of X with trial perm[k] of Y.
func PermuteSegments(dst, y []complex128, segLen int, perm []int) []complex128 {
	if len(perm)*segLen != len(y) {
		panic("connect: PermuteSegments length mismatch")
	}
	if cap(dst) < len(y) {
		dst = make([]complex128, len(y))
	}
	dst = dst[:len(y)]
	for k, p := range perm {
		copy(dst[k*segLen:(k+1)*segLen], y[p*segLen:(p+1)*segLen])
	}
	return dst
}
