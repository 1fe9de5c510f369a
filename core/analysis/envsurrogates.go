package analysis

import (
	"context"
	"math"

	"amplink/core/analysis/connect"
	"amplink/core/stats"
)

// The surrogate p-values of envelope rows: time shifts of a recording,
// trial shuffles of epochs, and for orthogonalised rows the shifted or
// shuffled complex band signal corrected again, as the observed r is.
//
// They are later units of the plan (see Plan.Later): each row's surrogates
// are cut into blocks of surrBlock, and each block is a unit that reads
// the envelope units' results and returns its surrogates' r values (none
// when the row has no valid surrogate, such as a recording too short for
// its shifts). Block b of row k draws from stats.NewRandFor(seed, k·B + b),
// B the blocks per row, so a block's values do not depend on which worker
// computes it, or when; Finish counts the values against the observed r.

// surrBlock is the number of surrogates one later unit computes.
const surrBlock = 50

// envData is an envelope analysis's unit results gathered: every unit's
// moments, and the stored series and band signals concatenated over units.
type envData struct {
	mos     [][]connect.Moments
	stored  [][]float64    // per series, concatenated over units
	unitLen []int          // stored samples per unit
	bands   [][]complex128 // band signals per channel, concatenated over units
	rawLen  []int          // band-signal samples per unit
}

// surrogateUnits registers the later units of ep's rows: one per block of
// surrBlock surrogates of each row.
func (p *Plan) surrogateUnits(ep *envPlan) {
	if ep.a.Surrogates <= 0 || ep.como {
		return
	}
	nb := (ep.a.Surrogates + surrBlock - 1) / surrBlock
	samples := 0.0
	for _, sp := range ep.uspans {
		samples += float64(sp[1] - sp[0])
	}
	for k, pr := range ep.rows {
		for b := range nb {
			n := min(surrBlock, ep.a.Surrogates-b*surrBlock)
			stream := k*nb + b
			ep.later = append(ep.later, len(p.later))
			p.later = append(p.later, laterUnit{
				Unit: Unit{Kind: "surrogates", Channels: []string{pr.seed, pr.target}, Cost: float64(n) * samples * float64(len(pr.terms))},
				compute: func(ctx context.Context, l *Later) ([]float64, error) {
					d := l.envData(ep)
					rng := stats.NewRandFor(ep.a.RandomSeed, uint64(stream))
					return ep.surrogateRs(ctx, pr, d, rng, n)
				},
			})
		}
	}
}

// surrogateP is the surrogate p of a row with observed r from its blocks'
// values: p = (b + 1)/(S + 1), b the surrogates with |r_s| ≥ |r|; NaN when
// a block has no valid surrogate.
func (ep *envPlan) surrogateP(res []UnitResult, row int, base int, r float64) float64 {
	nb := (ep.a.Surrogates + surrBlock - 1) / surrBlock
	b := 0
	for k := range nb {
		v := res[base+ep.later[row*nb+k]].Values
		if len(v) == 0 {
			return math.NaN()
		}
		for _, rs := range v {
			if !math.IsNaN(rs) && math.Abs(rs) >= math.Abs(r)-1e-12 {
				b++
			}
		}
	}
	return stats.PermP(b, ep.a.Surrogates)
}

// surrogateRs returns n surrogate r values of row pr, or nil when the row
// has none (a recording too short for its shifts; a failed correction).
func (ep *envPlan) surrogateRs(ctx context.Context, pr pairRow, d *envData, rng interface{ IntN(int) int }, n int) ([]float64, error) {
	spearman := ep.a.Method == "spearman"
	switch {
	case ep.storeZ && ep.epoched:
		return ep.orthSurrogate(ctx, pr, d, d.unitLen, rng, spearman, n)
	case ep.storeZ:
		return ep.orthSurrogate(ctx, pr, d, nil, rng, spearman, n)
	case ep.epoched:
		return ep.trialShuffle(ctx, pr, d, rng, spearman, n)
	}
	return ep.timeShift(ctx, pr, d, rng, spearman, n)
}

// timeShift: the second series of each term is shifted circularly by a
// random lag of at least a tenth of the record (and never less than five
// times the lag at which either envelope's autocorrelation falls below
// 1/e), breaking their alignment but not their own temporal structure.
func (ep *envPlan) timeShift(ctx context.Context, pr pairRow, d *envData, rng interface{ IntN(int) int }, spearman bool, count int) ([]float64, error) {
	stored := d.stored
	n := len(stored[0])
	minLag := n / 10
	for _, t := range pr.terms {
		minLag = max(minLag, 5*decorrLag(stored[ep.terms[t].x]), 5*decorrLag(stored[ep.terms[t].y]))
	}
	if 2*minLag >= n {
		return nil, nil
	}
	sc := make([]stats.ShiftCorr, len(pr.terms))
	for i, t := range pr.terms {
		sc[i] = stats.NewShiftCorr(stored[ep.terms[t].x], stored[ep.terms[t].y], spearman)
	}
	rs := make([]float64, len(pr.terms))
	out := make([]float64, count)
	for s := range out {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		lag := minLag + rng.IntN(n-2*minLag+1)
		for i := range sc {
			rs[i] = sc[i].At(lag)
		}
		out[s] = meanR(rs)
	}
	return out, nil
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

// trialShuffle is for epoched input: the trials of the second series are
// paired with randomly permuted trials of the first.
func (ep *envPlan) trialShuffle(ctx context.Context, pr pairRow, d *envData, rng interface{ IntN(int) int }, spearman bool, count int) ([]float64, error) {
	stored, unitLen := d.stored, d.unitLen
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
	var buf []float64
	rs := make([]float64, len(pr.terms))
	out := make([]float64, count)
	for s := range out {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		for i := nt - 1; i > 0; i-- {
			j := rng.IntN(i + 1)
			perm[i], perm[j] = perm[j], perm[i]
		}
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
		out[s] = meanR(rs)
	}
	return out, nil
}

// orthSurrogate is for an orthogonalised row: channel j's band signal is
// shifted circularly (recordings, a lag in whole envelope bins drawn as in
// timeShift, from the envelopes of i and j) or its trials are permuted
// (epochs, unitLen non-nil), and only then orthogonalised against the
// unshifted channel i, both ways, or re-orthogonalised with the whole set
// (connect.PairTerms), and the terms correlated as the observed r was.
func (ep *envPlan) orthSurrogate(ctx context.Context, pr pairRow, d *envData, unitLen []int, rng interface{ IntN(int) int }, spearman bool, count int) ([]float64, error) {
	stored, zs, rawLen := d.stored, d.bands, d.rawLen
	corr := connect.PairwiseOrth
	if ep.a.Orthogonalize == OrthSymmetric {
		corr = connect.SymmetricOrth
	}
	nb := len(stored[0])
	minLag := 0
	if unitLen == nil {
		minLag = max(nb/10, 5*decorrLag(stored[pr.i]), 5*decorrLag(stored[pr.j]))
		if 2*minLag >= nb {
			return nil, nil
		}
	}
	perm := make([]int, len(rawLen))
	for i := range perm {
		perm[i] = i
	}
	pt := connect.NewPairTermer(zs, pr.i, pr.j, corr, ep.bin, rawLen, ep.kind)
	out := make([]float64, count)
	for s := range out {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
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
			return nil, nil
		}
		out[s] = ep.surrR(terms, unitLen, spearman)
	}
	return out, nil
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
