package analysis

import (
	"context"
	"fmt"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"

	"amplink/core/report"
	"amplink/core/stats"
)

type chanRef struct {
	name       string
	unit, span int
}

type twPlan struct {
	a              *Analysis
	path           string
	seeds, targets []chanRef
	seedF, targF   [2]float64 // grid frequencies actually used
	seedT, targT   [2]float64 // sample times actually used
	ntrials        int
	keep           []int       // trials used (all, or those with every covariate)
	covs           [][]float64 // covariates over keep
	conds          [2][]int    // positions in keep of each condition's trials
	excluded       int         // trials left out for a missing covariate
}

func (p *Plan) planTrialWindow(path string, a *Analysis) (finisher, error) {
	e, err := p.epochs(path, a.Type)
	if err != nil {
		return nil, err
	}
	tw := &twPlan{a: a, path: path, ntrials: e.NTrials}
	for _, side := range []struct {
		name string
		w    *Window
		refs *[]chanRef
		f, t *[2]float64
	}{
		{"seed", a.Seed, &tw.seeds, &tw.seedF, &tw.seedT},
		{"target", a.Target, &tw.targets, &tw.targF, &tw.targT},
	} {
		wp := path + "." + side.name
		chs, err := resolveChannels(wp+".channel", side.w.Channel, e.Channels)
		if err != nil {
			return nil, err
		}
		s, err := p.span(wp, side.w, e)
		if err != nil {
			return nil, err
		}
		*side.f = [2]float64{p.freqs[s.Freqs[0]], p.freqs[s.Freqs[len(s.Freqs)-1]]}
		*side.t = [2]float64{roundTime(e.Time(s.From)), roundTime(e.Time(s.To - 1))}
		for _, c := range chs {
			ui, si := p.windowUnit(e, c, s)
			*side.refs = append(*side.refs, chanRef{e.Channels[c].Name, ui, si})
		}
	}
	tw.keep = make([]int, e.NTrials)
	for i := range tw.keep {
		tw.keep[i] = i
	}
	if len(a.Covariates) > 0 {
		if tw.covs, tw.keep, err = covariateMatrix(path, e, a.Covariates); err != nil {
			return nil, err
		}
		tw.excluded = e.NTrials - len(tw.keep)
	}
	if need := 3 + len(a.Covariates); len(tw.keep) < need {
		return nil, ferr(path, "needs at least %d trials with every covariate, %s has %d", need, p.ds.Name, len(tw.keep))
	}
	if a.Conditions != nil {
		levels, err := conditionTrials(path, e, a.Conditions)
		if err != nil {
			return nil, err
		}
		pos := map[int]int{}
		for i, t := range tw.keep {
			pos[t] = i
		}
		for l := range 2 {
			for _, t := range levels[l] {
				if i, ok := pos[t]; ok {
					tw.conds[l] = append(tw.conds[l], i)
				}
			}
			if len(tw.conds[l]) < 3+len(a.Covariates) {
				return nil, ferr(fmt.Sprintf("%s.conditions.compare[%d]", path, l), "%q has %d usable trials; at least %d are needed", a.Conditions.Compare[l], len(tw.conds[l]), 3+len(a.Covariates))
			}
		}
	}
	return tw, nil
}

// values returns a window's power over the trials in keep.
func (tw *twPlan) values(res []UnitResult, c chanRef) []float64 {
	v := res[c.unit].Values[c.span*tw.ntrials : (c.span+1)*tw.ntrials]
	out := make([]float64, len(tw.keep))
	for i, t := range tw.keep {
		out[i] = v[t]
	}
	return out
}

func (tw *twPlan) finish(ctx context.Context, p *Plan, res []UnitResult, out *report.Results) error {
	a := tw.a
	spearman := a.Method == "spearman"
	var rows []report.Row
	var ps []float64
	// Spearman ranks each window's powers once, not once per pair (ranking
	// ranks changes nothing, so every result is as from the raw powers)
	ranked := spearman && a.Conditions == nil
	ys := make([][]float64, len(tw.targets))
	for j, t := range tw.targets {
		ys[j] = tw.values(res, t)
		if ranked {
			ys[j] = stats.Ranks(nil, ys[j])
		}
	}
	for _, s := range tw.seeds {
		x := tw.values(res, s)
		if ranked {
			x = stats.Ranks(nil, x)
		}
		for j, t := range tw.targets {
			if err := ctx.Err(); err != nil {
				return err
			}
			y := ys[j]
			var rs []report.Row
			if a.Conditions != nil {
				rs = tw.compareConditions(a, x, y, spearman)
			} else {
				row := correlate(a, x, y, tw.covs, spearman, ranked)
				if tw.excluded > 0 {
					setField(&row, "note", joinNote(field(row, "note"), fmt.Sprintf("%d trials left out for a missing covariate", tw.excluded)))
				}
				rs = []report.Row{row}
			}
			for _, row := range rs {
				row.Seed, row.Target = s.name, t.name
				row.Extra = append(windowFields(tw), row.Extra...)
				rows = append(rows, row)
				ps = append(ps, pForCorrection(row))
			}
		}
	}
	applyCorrection(a, rows, ps)
	out.Rows = append(out.Rows, rows...)
	return nil
}

func windowFields(tw *twPlan) []report.Field {
	return []report.Field{
		{Name: "seed_from_s", Value: report.Num(tw.seedT[0])}, {Name: "seed_to_s", Value: report.Num(tw.seedT[1])},
		{Name: "seed_low_hz", Value: report.Num(tw.seedF[0])}, {Name: "seed_high_hz", Value: report.Num(tw.seedF[1])},
		{Name: "target_from_s", Value: report.Num(tw.targT[0])}, {Name: "target_to_s", Value: report.Num(tw.targT[1])},
		{Name: "target_low_hz", Value: report.Num(tw.targF[0])}, {Name: "target_high_hz", Value: report.Num(tw.targF[1])},
	}
}

// correlate computes r, its p-values and interval for one pair of vectors,
// partial on covs (one slice per covariate, aligned with x) when there are
// any: the df then drop by one per covariate, the permutation p shuffles the
// residuals of x and y after regressing out the covariates (ranks first for
// Spearman), and the interval uses n − k in place of n. ranked says x and
// y are already average ranks (Spearman only), which are then not ranked
// again for r.
func correlate(a *Analysis, x, y []float64, covs [][]float64, spearman, ranked bool) report.Row {
	n := len(x)
	k := len(covs)
	row := report.Row{Analysis: a.ID, Type: a.Type, Method: a.Method, N: n, R: math.NaN(), P: math.NaN()}
	var r float64
	df := n - 2
	switch {
	case k > 0:
		r, df = stats.Partial(x, y, covs, spearman)
	case spearman && ranked:
		r = stats.Pearson(x, y) // x and y are already average ranks
	case spearman:
		r = stats.Spearman(x, y)
	default:
		r = stats.Pearson(x, y)
	}
	pperm, pexact, lo, hi := math.NaN(), math.NaN(), math.NaN(), math.NaN()
	note := ""
	if k > 0 {
		note = "partial correlation on " + strings.Join(a.Covariates, ", ")
	}
	if math.IsNaN(r) {
		note = joinNote(note, "undefined: a window's power does not vary across trials")
	} else {
		row.R = r
		row.P = stats.PValueT(r, float64(df))
		if n <= 10 && k == 0 {
			var ok bool
			if spearman {
				pexact, ok = stats.ExactSpearmanP(x, y)
			} else {
				pexact, ok = stats.ExactPearsonP(x, y)
			}
			if !ok {
				pexact = math.NaN()
			}
		}
		if a.Permutations > 0 {
			if k > 0 {
				rx, ry := residualise(x, y, covs, spearman)
				pperm = stats.PermCorr(rx, ry, false, a.Permutations, a.RandomSeed)
			} else {
				pperm = stats.PermCorr(x, y, spearman, a.Permutations, a.RandomSeed)
			}
		}
		lo, hi = stats.FisherCI(r, n-k, a.Level, spearman)
	}
	pmethod := "t"
	if !math.IsNaN(pexact) {
		pmethod = "exact"
		note = joinNote(note, "n ≤ 10: use p_exact, the t approximation is anticonservative here")
	}
	row.Extra = []report.Field{
		{Name: "df", Value: strconv.Itoa(df)},
		{Name: "p_perm", Value: report.Num(pperm)},
		{Name: "p_perm_se", Value: report.Num(stats.PermSE(pperm, a.Permutations))},
		{Name: "p_exact", Value: report.Num(pexact)},
		{Name: "p_method", Value: pmethod},
		{Name: "permutations", Value: strconv.Itoa(a.Permutations)},
		{Name: "q", Value: ""},
		{Name: "correction", Value: a.Correction},
		{Name: "ci_lo", Value: report.Num(lo)},
		{Name: "ci_hi", Value: report.Num(hi)},
		{Name: "ci_level", Value: report.Num(a.Level)},
		{Name: "note", Value: note},
	}
	return row
}

func joinNote(a, b string) string {
	if a == "" {
		return b
	}
	return a + "; " + b
}

// pForCorrection picks the p-value that multiple-comparison correction uses:
// the permutation p when there is one, else the exact p, else the t p.
func pForCorrection(row report.Row) float64 {
	for _, name := range []string{"p_perm", "p_exact"} {
		if v := field(row, name); v != "" {
			f, _ := strconv.ParseFloat(v, 64)
			return f
		}
	}
	return row.P
}

func field(row report.Row, name string) string { return row.Field(name) }

func setField(row *report.Row, name, value string) {
	for i := range row.Extra {
		if row.Extra[i].Name == name {
			row.Extra[i].Value = value
			return
		}
	}
	row.Extra = append(row.Extra, report.Field{Name: name, Value: value})
}

func applyCorrection(a *Analysis, rows []report.Row, ps []float64) {
	var q []float64
	switch a.Correction {
	case "fdr":
		q = stats.BH(ps)
	case "bonferroni":
		q = stats.Bonferroni(ps)
	default:
		return
	}
	for i := range rows {
		setField(&rows[i], "q", report.Num(q[i]))
	}
}

// residualise returns x and y (ranked first for Spearman) minus their
// least-squares fit on the covariates and an intercept.
func residualise(x, y []float64, covs [][]float64, spearman bool) (rx, ry []float64) {
	n, k := len(x), len(covs)
	prep := func(v []float64) []float64 {
		if spearman {
			return stats.Ranks(nil, v)
		}
		return append([]float64(nil), v...)
	}
	design := mat.NewDense(n, k+1, nil)
	for i := range n {
		design.Set(i, 0, 1)
		for j, c := range covs {
			v := c[i]
			if spearman {
				v = 0 // filled below
			}
			design.Set(i, j+1, v)
		}
	}
	if spearman {
		for j, c := range covs {
			rc := stats.Ranks(nil, c)
			for i := range n {
				design.Set(i, j+1, rc[i])
			}
		}
	}
	var qr mat.QR
	qr.Factorize(design)
	res := func(v []float64) []float64 {
		b := mat.NewVecDense(n, v)
		var beta mat.VecDense
		if err := qr.SolveVecTo(&beta, false, b); err != nil {
			return v
		}
		var fit mat.VecDense
		fit.MulVec(design, &beta)
		out := make([]float64, n)
		for i := range n {
			out[i] = v[i] - fit.AtVec(i)
		}
		return out
	}
	return res(prep(x)), res(prep(y))
}

// pick returns v at the given positions.
func pick(v []float64, idx []int) []float64 {
	out := make([]float64, len(idx))
	for i, j := range idx {
		out[i] = v[j]
	}
	return out
}

func pickCovs(covs [][]float64, idx []int) [][]float64 {
	if covs == nil {
		return nil
	}
	out := make([][]float64, len(covs))
	for k, c := range covs {
		out[k] = pick(c, idx)
	}
	return out
}

// compareConditions gives one row per condition and a difference row: the
// Fisher z test for two independent correlations (with the Bonett–Wright
// variance for Spearman) and, with permutations, a label-permutation p that
// shuffles the condition labels among the pooled trials. Windows are the
// same in both conditions.
func (tw *twPlan) compareConditions(a *Analysis, x, y []float64, spearman bool) []report.Row {
	var rows []report.Row
	var rs [2]float64
	var ns [2]int
	k := len(a.Covariates)
	for l := range 2 {
		idx := tw.conds[l]
		row := correlate(a, pick(x, idx), pick(y, idx), pickCovs(tw.covs, idx), spearman, false)
		setField(&row, "condition", a.Conditions.Compare[l])
		rs[l], ns[l] = row.R, row.N
		rows = append(rows, row)
	}
	diff := report.Row{Analysis: a.ID, Type: a.Type, Method: a.Method, N: ns[0] + ns[1], R: math.NaN(), P: math.NaN()}
	zd, pperm := math.NaN(), math.NaN()
	note := fmt.Sprintf("difference of %s and %s (n = %d and %d)", a.Conditions.Compare[0], a.Conditions.Compare[1], ns[0], ns[1])
	if ns[0] > 2*ns[1] || ns[1] > 2*ns[0] {
		note = joinNote(note, "the conditions differ greatly in size, so r in the smaller one is less precise")
	}
	if !math.IsNaN(rs[0]) && !math.IsNaN(rs[1]) {
		zd, diff.P = stats.CompareIndependent(rs[0], ns[0]-k, rs[1], ns[1]-k, spearman)
		if a.Permutations > 0 {
			pperm = tw.labelPermutation(a, x, y, spearman, rs)
		}
	} else {
		note = joinNote(note, "undefined: r is undefined in a condition")
	}
	diff.Extra = []report.Field{
		{Name: "condition", Value: a.Conditions.Compare[0] + "-" + a.Conditions.Compare[1]},
		{Name: "z_diff", Value: report.Num(zd)},
		{Name: "r_diff", Value: report.Num(rs[0] - rs[1])},
		{Name: "p_method", Value: "fisher-z"},
		{Name: "p_perm", Value: report.Num(pperm)},
		{Name: "p_perm_se", Value: report.Num(stats.PermSE(pperm, a.Permutations))},
		{Name: "permutations", Value: strconv.Itoa(a.Permutations)},
		{Name: "q", Value: ""},
		{Name: "correction", Value: a.Correction},
		{Name: "note", Value: note},
	}
	return append(rows, diff)
}

// labelPermutation shuffles condition labels among the pooled trials of
// both conditions and counts |atanh r1 − atanh r2| at least the observed.
func (tw *twPlan) labelPermutation(a *Analysis, x, y []float64, spearman bool, rs [2]float64) float64 {
	pool := append(append([]int(nil), tw.conds[0]...), tw.conds[1]...)
	n0 := len(tw.conds[0])
	obs := math.Abs(math.Atanh(clampUnit(rs[0])) - math.Atanh(clampUnit(rs[1])))
	rng := stats.NewRand(a.RandomSeed)
	perm := make([]int, len(pool))
	for i := range perm {
		perm[i] = i
	}
	r := func(idx []int) float64 {
		if tw.covs != nil {
			v, _ := stats.Partial(pick(x, idx), pick(y, idx), pickCovs(tw.covs, idx), spearman)
			return v
		}
		return corr(pick(x, idx), pick(y, idx), spearman)
	}
	b := 0
	g0, g1 := make([]int, n0), make([]int, len(pool)-n0)
	for range a.Permutations {
		stats.Shuffle(rng, perm)
		for i := range g0 {
			g0[i] = pool[perm[i]]
		}
		for i := range g1 {
			g1[i] = pool[perm[n0+i]]
		}
		r0, r1 := r(g0), r(g1)
		if math.IsNaN(r0) || math.IsNaN(r1) {
			continue
		}
		if math.Abs(math.Atanh(clampUnit(r0))-math.Atanh(clampUnit(r1))) >= obs-1e-12 {
			b++
		}
	}
	return stats.PermP(b, a.Permutations)
}

func clampUnit(r float64) float64 { return math.Max(-1+1e-15, math.Min(1-1e-15, r)) }
