package stats

import (
	"math"
	"math/bits"
	"math/rand/v2"

	"gonum.org/v1/gonum/floats"
)

// pcgStream is the fixed second word of every PCG source made by NewRand
// ("amplink" in ASCII). Changing it changes every permutation result.
const pcgStream = 0x616d706c696e6b

// NewRand returns a generator seeded with rand.NewPCG(seed, pcgStream).
// PCG is fully specified, so a seed gives the same stream on every
// platform and Go release.
func NewRand(seed uint64) *rand.Rand {
	return rand.New(rand.NewPCG(seed, pcgStream))
}

// NewRandFor returns the generator of substream k of seed: PCG seeded with
// seed and pcgStream XOR (k+1)·0x9e3779b97f4a7c15 (the 64-bit golden-ratio
// constant, which spreads neighbouring k over the second word). Work cut
// into pieces that may run in any order on any worker draws piece k from
// NewRandFor(seed, k), so its values do not depend on the other pieces.
func NewRandFor(seed, k uint64) *rand.Rand {
	return rand.New(rand.NewPCG(seed, pcgStream^((k+1)*0x9e3779b97f4a7c15)))
}

// uintN returns a uniform integer in [0, n) from rng.Uint64: a mask when n
// is a power of two, else Lemire's multiply-and-reject method. It is the
// algorithm of math/rand/v2's 64-bit IntN written out, because IntN takes a
// different, 32-bit path on 32-bit platforms, which would change
// permutations between, say, GOARCH=386 and amd64. On 64-bit platforms it
// returns the same values as rng.IntN.
func uintN(rng *rand.Rand, n uint64) uint64 {
	if n&(n-1) == 0 {
		return rng.Uint64() & (n - 1)
	}
	hi, lo := bits.Mul64(rng.Uint64(), n)
	if lo < n {
		thresh := -n % n
		for lo < thresh {
			hi, lo = bits.Mul64(rng.Uint64(), n)
		}
	}
	return hi
}

// Shuffle permutes perm in place uniformly at random with the Fisher–Yates
// algorithm: for i from len−1 down to 1, swap perm[i] with perm[j],
// j uniform in [0, i]. The result depends only on rng's stream, so it is
// the same on every platform.
func Shuffle(rng *rand.Rand, perm []int) {
	for i := len(perm) - 1; i > 0; i-- {
		j := uintN(rng, uint64(i+1))
		perm[i], perm[j] = perm[j], perm[i]
	}
}

// shuffleFloats is Shuffle for a []float64 drawing from the PCG source
// itself, which avoids an interface call per draw in the permutation loop.
// rand.New(src).Uint64() is src.Uint64(), so a source seeded like NewRand
// gives the same permutations as Shuffle.
func shuffleFloats(src *rand.PCG, v []float64) {
	for i := len(v) - 1; i > 0; i-- {
		n := uint64(i + 1)
		var j uint64
		if n&(n-1) == 0 {
			j = src.Uint64() & (n - 1)
		} else {
			hi, lo := bits.Mul64(src.Uint64(), n)
			if lo < n {
				thresh := -n % n
				for lo < thresh {
					hi, lo = bits.Mul64(src.Uint64(), n)
				}
			}
			j = hi
		}
		v[i], v[j] = v[j], v[i]
	}
}

// PermP returns the permutation p-value (b+1)/(n+1) for b of n random
// permutations reaching the observed statistic, counting the observed data
// as one permutation (Phipson and Smyth 2010, Stat Appl Genet Mol Biol
// 9:39). It is never 0. It panics if n < 0 or b is not in [0, n].
func PermP(b, n int) float64 {
	if n < 0 || b < 0 || b > n {
		panic("stats: PermP count out of range")
	}
	return float64(b+1) / float64(n+1)
}

// permTol is the relative tolerance by which a permuted |r| may fall short
// of the observed |r| and still count as reaching it, so that pairings
// equal in exact arithmetic are counted despite rounding.
const permTol = 1e-9

// unitCentered writes (v − v̄)/‖v − v̄‖ into dst. It returns false when v is
// constant or holds NaN.
func unitCentered(dst, v []float64) bool {
	if len(v) < 2 || constant(v) || hasNaN(v) {
		return false
	}
	m := mean(v)
	for i, x := range v {
		dst[i] = x - m
	}
	nrm := floats.Norm(dst, 2)
	if !(nrm > 0) {
		return false
	}
	floats.Scale(1/nrm, dst)
	return true
}

// PermCorr returns the two-sided permutation p-value of the correlation of
// x and y (Spearman's ρ when spearman is set, else Pearson's r): the pairing
// of x with y is shuffled n times with a generator from NewRand(seed), and
//
//	p = PermP(#{|r_perm| ≥ |r_obs|}, n)
//
// with the relative tolerance 1e−9 on the comparison. Both series are
// ranked (for Spearman), centred and scaled to unit norm once, so each
// permutation costs one shuffle and one dot product and allocates nothing.
// p lies in [1/(n+1), 1]. It is NaN when n < 1, len(x) < 2, either series is
// constant or any value is NaN. It panics if the lengths differ.
func PermCorr(x, y []float64, spearman bool, n int, seed uint64) (p float64) {
	ps, _ := PermCorrMany(x, [][]float64{y}, spearman, n, seed)
	return ps[0]
}

// PermCorrMany tests x against each target ys[j] with the same n shuffles
// of x (from NewRand(seed)), as PermCorr does for one target; with one
// target it returns exactly PermCorr's p. Besides the per-target p it
// returns the single-step max-statistic p that controls the family-wise
// error over the targets:
//
//	pMax[j] = PermP(#{max_k |r_perm,k| ≥ |r_obs,j|}, n)
//
// where the maximum runs over the targets with a defined r. Targets whose
// r is undefined (constant, NaN) get NaN in both. It panics if a target's
// length differs from len(x).
func PermCorrMany(x []float64, ys [][]float64, spearman bool, n int, seed uint64) (p, pMax []float64) {
	p = make([]float64, len(ys))
	pMax = make([]float64, len(ys))
	for j, y := range ys {
		if len(y) != len(x) {
			panic("stats: PermCorr length mismatch")
		}
		p[j], pMax[j] = math.NaN(), math.NaN()
	}
	m := len(x)
	a := make([]float64, m)
	if n < 1 || m < 2 {
		return p, pMax
	}
	if spearman {
		Ranks(a, x)
	} else {
		copy(a, x)
	}
	if !unitCentered(a, a) {
		return p, pMax
	}
	type target struct {
		j    int
		b    []float64
		thr  float64 // |r_obs|·(1 − permTol)
		hit  int     // permutations with |r_perm| ≥ |r_obs|
		hitM int     // permutations with max |r_perm| ≥ |r_obs|
	}
	ts := make([]target, 0, len(ys))
	buf := make([]float64, m)
	for j, y := range ys {
		b := make([]float64, m)
		if spearman {
			Ranks(buf, y)
		} else {
			copy(buf, y)
		}
		if !unitCentered(b, buf) {
			continue
		}
		r := clampR(floats.Dot(a, b))
		ts = append(ts, target{j: j, b: b, thr: math.Abs(r) * (1 - permTol)})
	}
	if len(ts) == 0 {
		return p, pMax
	}
	src := rand.NewPCG(seed, pcgStream) // the source of NewRand(seed)
	for range n {
		shuffleFloats(src, a)
		maxAbs := 0.0
		for i := range ts {
			v := math.Abs(floats.Dot(a, ts[i].b))
			if v >= ts[i].thr {
				ts[i].hit++
			}
			maxAbs = math.Max(maxAbs, v)
		}
		for i := range ts {
			if maxAbs >= ts[i].thr {
				ts[i].hitM++
			}
		}
	}
	for _, t := range ts {
		p[t.j] = PermP(t.hit, n)
		pMax[t.j] = PermP(t.hitM, n)
	}
	return p, pMax
}

// PermSE returns the Monte-Carlo standard error of a permutation or
// surrogate p estimated from n random draws,
//
//	se = √(p·(1 − p)/n),
//
// the binomial standard error of the fraction of draws that reach the
// observed statistic (common practice; for example Davison & Hinkley 1997,
// Bootstrap Methods and their Application, §4.2, from memory). A p from 199
// draws near 0.05 has se ≈ 0.015, one from 9999 draws se ≈ 0.002. It is NaN
// when p is NaN or n < 1.
func PermSE(p float64, n int) float64 {
	if math.IsNaN(p) || n < 1 {
		return math.NaN()
	}
	return math.Sqrt(p * (1 - p) / float64(n))
}
