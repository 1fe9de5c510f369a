package analysis

import (
	"math"

	"amplink/core/analysis/connect"
	"amplink/core/stats"
)

// The surrogate p-values of envelope rows: time shifts of a recording,
// trial shuffles of epochs, and for orthogonalised rows the shifted or
// shuffled complex band signal corrected again, as the observed r is.

// timeShift returns the surrogate p of r: the second series of each term is
// shifted circularly by a random lag of at least a tenth of the record (and
// never less than five times the lag at which either envelope's
// autocorrelation falls below 1/e), breaking their alignment but not their
// own temporal structure. p = (b + 1)/(S + 1).
func (ep *envPlan) timeShift(pr pairRow, stored [][]float64, r float64, rng interface{ IntN(int) int }, spearman bool, zs [][]complex128, rawLen []int) float64 {
	if ep.storeZ {
		return ep.orthSurrogate(pr, stored, nil, r, rng, spearman, zs, rawLen)
	}
	n := len(stored[0])
	minLag := n / 10
	for _, t := range pr.terms {
		minLag = max(minLag, 5*decorrLag(stored[ep.terms[t].x]), 5*decorrLag(stored[ep.terms[t].y]))
	}
	if 2*minLag >= n {
		return math.NaN()
	}
	sc := make([]stats.ShiftCorr, len(pr.terms))
	for i, t := range pr.terms {
		sc[i] = stats.NewShiftCorr(stored[ep.terms[t].x], stored[ep.terms[t].y], spearman)
	}
	rs := make([]float64, len(pr.terms))
	b := 0
	for range ep.a.Surrogates {
		lag := minLag + rng.IntN(n-2*minLag+1)
		for i := range sc {
			rs[i] = sc[i].At(lag)
		}
		if rsur := meanR(rs); !math.IsNaN(rsur) && math.Abs(rsur) >= math.Abs(r)-1e-12 {
			b++
		}
	}
	return stats.PermP(b, ep.a.Surrogates)
}

// decorrLag returns the first lag at which the autocorrelation of x falls
// below 1/e (capped at len(x)/4).
func decorrLag(x []float64) int {
	n := len(x)
	m := mean(x)
	v := 0.0
	for _, a := range x {
		v += (a - m) * (a - m)
	}
	if v == 0 {
		return 1
	}
	for k := 1; k < n/4; k++ {
		c := 0.0
		for i := k; i < n; i++ {
			c += (x[i] - m) * (x[i-k] - m)
		}
		if c/v < 1/math.E {
			return k
		}
	}
	return n / 4
}

// trialShuffle returns the surrogate p for epoched input: the trials of the
// second series are paired with randomly permuted trials of the first.
func (ep *envPlan) trialShuffle(pr pairRow, stored [][]float64, unitLen []int, r float64, rng interface{ IntN(int) int }, spearman bool, zs [][]complex128, rawLen []int) float64 {
	if ep.storeZ {
		return ep.orthSurrogate(pr, stored, unitLen, r, rng, spearman, zs, rawLen)
	}
	nt := len(unitLen)
	off := make([]int, nt+1)
	for t, l := range unitLen {
		off[t+1] = off[t] + l
	}
	perm := make([]int, nt)
	for i := range perm {
		perm[i] = i
	}
	concat := ep.a.Trials == "concatenate"
	b := 0
	var buf []float64
	for range ep.a.Surrogates {
		for i := nt - 1; i > 0; i-- {
			j := rng.IntN(i + 1)
			perm[i], perm[j] = perm[j], perm[i]
		}
		rs := make([]float64, len(pr.terms))
		for ti, t := range pr.terms {
			x, y := stored[ep.terms[t].x], stored[ep.terms[t].y]
			if concat {
				buf = buf[:0]
				for k := range nt {
					buf = append(buf, y[off[perm[k]]:off[perm[k]+1]]...)
				}
				rs[ti] = corr(x, buf, spearman)
				continue
			}
			var zs []float64
			for k := range nt {
				if rk := corr(x[off[k]:off[k+1]], y[off[perm[k]]:off[perm[k]+1]], spearman); !math.IsNaN(rk) {
					zs = append(zs, math.Atanh(math.Max(-1+1e-15, math.Min(1-1e-15, rk))))
				}
			}
			rs[ti] = math.NaN()
			if len(zs) > 0 {
				rs[ti] = math.Tanh(mean(zs))
			}
		}
		if rsur := meanR(rs); !math.IsNaN(rsur) && math.Abs(rsur) >= math.Abs(r)-1e-12 {
			b++
		}
	}
	return stats.PermP(b, ep.a.Surrogates)
}

// orthSurrogate is the surrogate p of an orthogonalised row: channel j's
// band signal is shifted circularly (recordings, a lag in whole envelope
// bins drawn as in timeShift, from the envelopes of i and j) or its trials
// are permuted (epochs, unitLen non-nil), and only then orthogonalised
// against the unshifted channel i, both ways, or re-orthogonalised with
// the whole set (connect.PairTerms), and the terms correlated as the
// observed r was.
func (ep *envPlan) orthSurrogate(pr pairRow, stored [][]float64, unitLen []int, r float64, rng interface{ IntN(int) int }, spearman bool, zs [][]complex128, rawLen []int) float64 {
	corr := connect.PairwiseOrth
	if ep.a.Orthogonalize == OrthSymmetric {
		corr = connect.SymmetricOrth
	}
	nb := len(stored[0])
	minLag := 0
	if unitLen == nil {
		minLag = max(nb/10, 5*decorrLag(stored[pr.i]), 5*decorrLag(stored[pr.j]))
		if 2*minLag >= nb {
			return math.NaN()
		}
	}
	perm := make([]int, len(rawLen))
	for i := range perm {
		perm[i] = i
	}
	pt := connect.NewPairTermer(zs, pr.i, pr.j, corr, ep.bin, rawLen, ep.kind)
	b := 0
	for range ep.a.Surrogates {
		var terms [][2][]float64
		var err error
		if unitLen != nil {
			for i := len(perm) - 1; i > 0; i-- {
				k := rng.IntN(i + 1)
				perm[i], perm[k] = perm[k], perm[i]
			}
			terms, err = pt.Permuted(perm, rawLen[0])
		} else {
			lag := minLag + rng.IntN(nb-2*minLag+1)
			terms, err = pt.Shifted(lag * ep.bin % len(zs[pr.j]))
		}
		if err != nil {
			return math.NaN()
		}
		rsur := ep.surrR(terms, unitLen, spearman)
		if !math.IsNaN(rsur) && math.Abs(rsur) >= math.Abs(r)-1e-12 {
			b++
		}
	}
	return stats.PermP(b, ep.a.Surrogates)
}

// surrR is a surrogate's r from its terms, made as the observed r is: the
// mean of the terms' r over all samples, or on averaged epochs that mean
// per trial, then the mean of Fisher z across trials.
func (ep *envPlan) surrR(terms [][2][]float64, unitLen []int, spearman bool) float64 {
	rs := make([]float64, len(terms))
	if unitLen == nil || ep.a.Trials == "concatenate" {
		for t, tm := range terms {
			rs[t] = corr(tm[0], tm[1], spearman)
		}
		return meanR(rs)
	}
	var zs []float64
	off := 0
	for _, l := range unitLen {
		for t, tm := range terms {
			rs[t] = corr(tm[0][off:off+l], tm[1][off:off+l], spearman)
		}
		if rk := meanR(rs); !math.IsNaN(rk) {
			zs = append(zs, math.Atanh(math.Max(-1+1e-15, math.Min(1-1e-15, rk))))
		}
		off += l
	}
	if len(zs) == 0 {
		return math.NaN()
	}
	return math.Tanh(mean(zs))
}
