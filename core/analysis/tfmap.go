package analysis

import (
	"context"
	"fmt"
	"math"
	"strconv"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/stat/distuv"

	"amplink/core/analysis/connect"
	"amplink/core/data"
	"amplink/core/report"
	"amplink/core/spectral"
	"amplink/core/stats"
)

// kindTFPower is the unit kind of a tf-map target channel: the single-trial
// power at every map pixel (see connect.TrialPixels for the value layout).
const kindTFPower = "tf-power-trials"

// clusterNote goes on every cluster row.
const clusterNote = "a significant cluster does not localise the effect in time or frequency (Maris & Oostenveld 2007)"

// tfPlan is a tf-map analysis: the seed window's power correlated across
// trials with the power at every time × frequency pixel of each target
// channel.
type tfPlan struct {
	a            *Analysis
	path         string
	seed         chanRef
	seedF, seedT [2]float64 // grid frequencies and sample times actually used
	targets      []tfTarget
	rows, cols   int
	rowHz        []float64 // frequency of each map row
	colS         []float64 // time of each map column
	ntrials      int
}

type tfTarget struct {
	name string
	unit int
}

// planTFMap checks a tf-map analysis and plans its units: the seed window
// (shared with any analysis using the same window, see windowUnit) and one
// kindTFPower unit per target channel. The map has a row for every grid
// frequency inside target.freq and a column every round(timeStep·rate)
// samples from the first sample inside target.time.
func (p *Plan) planTFMap(path string, a *Analysis) (finisher, error) {
	e, err := p.epochs(path, a.Type)
	if err != nil {
		return nil, err
	}
	tp := &tfPlan{a: a, path: path, ntrials: e.NTrials}
	seedChs, err := resolveChannels(path+".seed.channel", a.Seed.Channel, e.Channels)
	if err != nil {
		return nil, err
	}
	if len(seedChs) != 1 {
		return nil, ferr(path+".seed.channel", "a tf-map takes one seed channel, not %d; use one analysis per seed", len(seedChs))
	}
	ss, err := p.span(path+".seed", a.Seed, e)
	if err != nil {
		return nil, err
	}
	targChs, err := resolveChannels(path+".target.channel", a.Target.Channel, e.Channels)
	if err != nil {
		return nil, err
	}
	seen := map[int]bool{}
	for i, c := range targChs {
		if seen[c] {
			return nil, ferr(fmt.Sprintf("%s.target.channel[%d]", path, i), "%q is listed twice (it names output maps)", e.Channels[c].Name)
		}
		seen[c] = true
	}
	ts, err := p.span(path+".target", a.Target, e)
	if err != nil {
		return nil, err
	}
	if e.NTrials < 3 {
		return nil, ferr(path, "needs at least 3 trials to correlate, %s has %d", p.ds.Name, e.NTrials)
	}
	switch {
	case len(a.Covariates) > 0:
		return nil, ferr(path+".covariates", "are not available for tf-map analyses; a trial-window analysis gives partial correlations")
	case a.Conditions != nil:
		return nil, ferr(path+".conditions", "are not available for tf-map analyses; a trial-window analysis compares conditions")
	case a.Correction == "cluster" && a.Permutations < 1:
		return nil, ferr(path+".permutations", "the cluster test needs trial shuffles: set permutations (for example 1000), not %d", a.Permutations)
	case a.Correction != "cluster" && a.Permutations > 0:
		p.warnings = append(p.warnings, fmt.Sprintf("%s.permutations: a tf-map uses permutations only with correction \"cluster\"; they are ignored here", path))
	}
	step := int(math.Round(a.TimeStep * e.Rate))
	if step < 1 {
		step = 1
		p.warnings = append(p.warnings, fmt.Sprintf("%s.timeStep: %g s is less than one sample at %g Hz; the map takes every sample", path, a.TimeStep, e.Rate))
	}
	tp.rows, tp.cols = len(ts.Freqs), spectral.TFCols(ts.From, ts.To, step)
	if v := len(targChs) * tp.rows * tp.cols * e.NTrials; v > maxStoredValues {
		return nil, ferr(path+".timeStep", "%d channels × %d×%d pixels × %d trials need %d MB; raise timeStep, narrow target.time or target.freq, or select fewer target channels", len(targChs), tp.rows, tp.cols, e.NTrials, v*8>>20)
	}
	for _, f := range ts.Freqs {
		tp.rowHz = append(tp.rowHz, p.freqs[f])
	}
	for c := range tp.cols {
		tp.colS = append(tp.colS, roundTime(e.Time(ts.From+c*step)))
	}
	tp.seedF = [2]float64{p.freqs[ss.Freqs[0]], p.freqs[ss.Freqs[len(ss.Freqs)-1]]}
	tp.seedT = [2]float64{roundTime(e.Time(ss.From)), roundTime(e.Time(ss.To - 1))}
	ui, si := p.windowUnit(e, seedChs[0], ss)
	tp.seed = chanRef{e.Channels[seedChs[0]].Name, ui, si}
	for _, c := range targChs {
		tp.targets = append(tp.targets, tfTarget{e.Channels[c].Name, p.tfUnit(e, c, ts, step)})
	}
	return tp, nil
}

// tfUnit returns the unit computing the single-trial pixel powers of map span
// s (columns every step samples) on channel ch, creating it when needed, so
// that analyses sharing a target map share its work.
func (p *Plan) tfUnit(e *data.Epochs, ch int, s connect.Span, step int) int {
	key := fmt.Sprintf("%d:%d:%d:%v", s.From, s.To, step, s.Freqs)
	for ui := range p.units {
		u := &p.units[ui]
		if _, ok := u.keys[key]; ok && u.Kind == kindTFPower && u.ch == ch {
			return ui
		}
	}
	freqs := append([]int(nil), s.Freqs...)
	from, to := s.From, s.To
	p.units = append(p.units, unit{
		Unit: Unit{ID: len(p.units), Kind: kindTFPower, Channels: []string{e.Channels[ch].Name},
			Cost: float64(e.NTrials * (to - from + 2*p.bank.MaxHalf(freqs)) * (1 + len(freqs)))},
		ch: ch, keys: map[string]int{key: 0},
		compute: func(ctx context.Context, p *Plan) ([]float64, error) {
			return connect.TrialPixels(ctx, nil, p.bank, p.ds.Epochs, ch, freqs, from, to, step)
		},
	})
	return len(p.units) - 1
}

// tfStats is the across-trial correlation of one seed vector with every
// pixel of one or more maps, prepared for a permutation test.
type tfStats struct {
	n, rows, cols int
	// r[m][px] is the observed Spearman ρ (or Pearson r) of map m at
	// row-major pixel px = row·cols + col; NaN when undefined.
	r [][]float64
	// a is the seed's (ranked,) centred, unit-norm vector, nil when the
	// seed is constant; b[m] holds the same for each defined pixel (zero
	// otherwise) trial-major, b[m][t·rows·cols + px], so that the r of the
	// pixels is the vector–matrix product a·b[m].
	a []float64
	b [][]float64
}

// newTFStats correlates seed (one value per trial) with each map of maps,
// each holding rows·cols pixel vectors of len(seed) values, pixel-major in
// row-major pixel order (the layout of connect.TrialPixels). For Spearman
// the seed is ranked once and each pixel's vector once; r is then
// stats.Pearson on the ranks, which is stats.Spearman.
func newTFStats(seed []float64, maps [][]float64, rows, cols int, spearman bool) *tfStats {
	n := len(seed)
	np := rows * cols
	s := &tfStats{n: n, rows: rows, cols: cols}
	x := seed
	if spearman {
		x = stats.Ranks(nil, seed)
	}
	a := make([]float64, n)
	if unitCentre(a, x) {
		s.a = a
	}
	buf := make([]float64, n)
	u := make([]float64, n)
	for _, m := range maps {
		if len(m) != np*n {
			panic("recipe: tf-map values do not match the map shape")
		}
		r := make([]float64, np)
		b := make([]float64, np*n)
		for px := range np {
			y := m[px*n : (px+1)*n]
			if spearman {
				y = stats.Ranks(buf, y)
			}
			r[px] = math.NaN()
			if s.a == nil {
				continue
			}
			r[px] = stats.Pearson(x, y)
			if math.IsNaN(r[px]) || !unitCentre(u, y) {
				r[px] = math.NaN()
				continue
			}
			for t, v := range u {
				b[t*np+px] = v
			}
		}
		s.r = append(s.r, r)
		s.b = append(s.b, b)
	}
	return s
}

// unitCentre writes (v − v̄)/‖v − v̄‖ into dst (which may be v) and reports
// whether v has a positive, finite spread.
func unitCentre(dst, v []float64) bool {
	m := floats.Sum(v) / float64(len(v))
	for i, x := range v {
		dst[i] = x - m
	}
	nrm := floats.Norm(dst, 2)
	if !(nrm > 0) || math.IsInf(nrm, 0) {
		return false
	}
	floats.Scale(1/nrm, dst)
	return true
}

// tOf is the t statistic t = r·√(df/(1−r²)) of a correlation; ±Inf at |r| = 1.
func tOf(r, df float64) float64 { return r * math.Sqrt(df/(1-r*r)) }

// permBatch is how many shuffles share one pass over the pixel vectors.
const permBatch = 32

// tfClusters is the result of the cluster-based permutation test.
type tfClusters struct {
	tcrit  float64     // cluster-forming threshold on |t|
	t      [][]float64 // per map, row-major t of the observed r
	labels [][][]int   // per map, [row][col]: 0 outside clusters, else a label unique over the maps
	sums   []float64   // cluster mass Σt of label k at k−1
	mapOf  []int       // the map of label k at k−1
	p      []float64   // cluster p of label k at k−1
	null   []float64   // max |cluster mass| over all maps, one per permutation
}

// clusterTest runs the cluster-based permutation test of Maris and
// Oostenveld (2007, J Neurosci Methods 164:177) on s:
//
//  1. t = r·√((n−2)/(1−r²)) per pixel, thresholded at |t| > t_c with t_c the
//     two-sided critical value of Student's t with n−2 df at alpha;
//  2. positive and negative clusters of 4-adjacent pixels (in time and
//     frequency) with their mass Σt (stats.Clusters);
//  3. for each of perms shuffles of the seed's trial order (stats.Shuffle
//     from stats.NewRand(seed), the same shuffles for every map), the t maps
//     are recomputed and the largest |mass| over all maps is kept;
//  4. p_k = (b+1)/(perms+1), b the shuffles whose maximum reaches |mass_k|
//     (stats.ClusterP), which controls the family-wise error over clusters
//     and maps.
//
// Each shuffle costs one dot product per pixel (done as one matrix product
// per batch of shuffles and map); the loop allocates nothing per shuffle.
func (s *tfStats) clusterTest(ctx context.Context, alpha float64, perms int, seed uint64) (*tfClusters, error) {
	n, np := s.n, s.rows*s.cols
	df := float64(n - 2)
	cl := &tfClusters{tcrit: distuv.StudentsT{Mu: 0, Sigma: 1, Nu: df}.Quantile(1 - alpha/2)}
	grid := make([][]float64, s.rows)
	for m, r := range s.r {
		t := make([]float64, np)
		for px, v := range r {
			t[px] = tOf(v, df)
		}
		cl.t = append(cl.t, t)
		for i := range grid {
			grid[i] = t[i*s.cols : (i+1)*s.cols]
		}
		labels, sums := stats.Clusters(grid, cl.tcrit)
		off := len(cl.sums)
		for _, row := range labels {
			for j, k := range row {
				if k > 0 {
					row[j] = k + off
				}
			}
		}
		cl.labels = append(cl.labels, labels)
		cl.sums = append(cl.sums, sums...)
		for range sums {
			cl.mapOf = append(cl.mapOf, m)
		}
	}
	if s.a == nil || perms < 1 {
		cl.p = stats.ClusterP(cl.sums, nil)
		return cl, nil
	}
	rng := stats.NewRand(seed)
	perm := make([]int, n)
	for i := range perm {
		perm[i] = i
	}
	// Shuffles are taken permBatch at a time, so that one matrix product
	// per map gives the r of every pixel under each of them and each map's
	// vectors are read once per batch rather than once per shuffle.
	ap := make([]float64, permBatch*n)
	rb := make([]float64, permBatch*np)
	mx := make([]float64, permBatch)
	sc := newClusterScratch(s.rows, s.cols)
	cl.null = make([]float64, perms)
	for k0 := 0; k0 < perms; k0 += permBatch {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		nb := min(permBatch, perms-k0)
		for q := range nb {
			stats.Shuffle(rng, perm)
			row := ap[q*n : (q+1)*n]
			for i, j := range perm {
				row[i] = s.a[j]
			}
			mx[q] = 0
		}
		A := blas64.General{Rows: nb, Cols: n, Stride: n, Data: ap}
		C := blas64.General{Rows: nb, Cols: np, Stride: np, Data: rb}
		for m, b := range s.b {
			blas64.Gemm(blas.NoTrans, blas.NoTrans, 1, A, blas64.General{Rows: n, Cols: np, Stride: np, Data: b}, 0, C)
			r := s.r[m]
			for q := range nb {
				tb := rb[q*np : (q+1)*np]
				for px, v := range tb {
					if math.IsNaN(r[px]) {
						tb[px] = math.NaN()
					} else {
						tb[px] = tOf(max(-1, min(1, v)), df)
					}
				}
				mx[q] = max(mx[q], sc.maxAbsSum(tb, cl.tcrit))
			}
		}
		copy(cl.null[k0:], mx[:nb])
	}
	cl.p = stats.ClusterP(cl.sums, cl.null)
	return cl, nil
}

// clusterScratch finds the largest |cluster sum| of a row-major map without
// allocating; it gives the value of stats.MaxAbsClusterSum.
type clusterScratch struct {
	rows, cols int
	seen       []bool
	stack      []int
}

func newClusterScratch(rows, cols int) *clusterScratch {
	return &clusterScratch{rows: rows, cols: cols, seen: make([]bool, rows*cols), stack: make([]int, 0, rows*cols)}
}

func signAbove(v, thr float64) int {
	switch {
	case v > thr:
		return 1
	case v < -thr:
		return -1
	}
	return 0 // includes NaN
}

// maxAbsSum returns max |Σ t| over the 4-connected same-sign clusters of
// pixels with |t| > thr, or 0 when there are none.
func (c *clusterScratch) maxAbsSum(t []float64, thr float64) float64 {
	clear(c.seen)
	cols := c.cols
	best := 0.0
	for i, v := range t {
		sg := signAbove(v, thr)
		if sg == 0 || c.seen[i] {
			continue
		}
		c.seen[i] = true
		st := append(c.stack[:0], i)
		sum := 0.0
		for len(st) > 0 {
			q := st[len(st)-1]
			st = st[:len(st)-1]
			sum += t[q]
			row, col := q/cols, q%cols
			push := func(j int) {
				if !c.seen[j] && signAbove(t[j], thr) == sg {
					c.seen[j] = true
					st = append(st, j)
				}
			}
			if row > 0 {
				push(q - cols)
			}
			if row < c.rows-1 {
				push(q + cols)
			}
			if col > 0 {
				push(q - 1)
			}
			if col < cols-1 {
				push(q + 1)
			}
		}
		c.stack = st
		best = max(best, math.Abs(sum))
	}
	return best
}

func (tp *tfPlan) finish(ctx context.Context, p *Plan, res []UnitResult, out *report.Results) error {
	a := tp.a
	nt := tp.ntrials
	seed := res[tp.seed.unit].Values[tp.seed.span*nt : (tp.seed.span+1)*nt]
	maps := make([][]float64, len(tp.targets))
	for i, t := range tp.targets {
		maps[i] = res[t.unit].Values
	}
	s := newTFStats(seed, maps, tp.rows, tp.cols, a.Method == "spearman")
	df := float64(nt - 2)
	np := tp.rows * tp.cols
	pm := make([][]float64, len(maps))
	var all []float64
	for m, r := range s.r {
		pm[m] = make([]float64, np)
		for px, v := range r {
			pm[m][px] = stats.PValueT(v, df)
		}
		all = append(all, pm[m]...)
	}
	var q []float64
	switch a.Correction {
	case "fdr":
		q = stats.BH(all)
	case "bonferroni":
		q = stats.Bonferroni(all)
	}
	var cl *tfClusters
	if a.Correction == "cluster" {
		var err error
		if cl, err = s.clusterTest(ctx, a.Threshold, a.Permutations, a.RandomSeed); err != nil {
			return err
		}
	}
	for m, t := range tp.targets {
		base := a.ID + "_" + t.name
		out.Maps = append(out.Maps, tp.mapOf(base+"_r", s.r[m]), tp.mapOf(base+"_p", pm[m]))
		if q != nil {
			out.Maps = append(out.Maps, tp.mapOf(base+"_q", q[m*np:(m+1)*np]))
		}
		if cl != nil {
			lab := make([]float64, 0, np)
			for _, row := range cl.labels[m] {
				for _, k := range row {
					lab = append(lab, float64(k))
				}
			}
			out.Maps = append(out.Maps, tp.mapOf(base+"_clusters", lab))
			out.Rows = append(out.Rows, tp.clusterRows(m, s, cl)...)
			continue
		}
		var qm []float64
		if q != nil {
			qm = q[m*np : (m+1)*np]
		}
		out.Rows = append(out.Rows, tp.peakRow(m, s.r[m], pm[m], qm))
	}
	return nil
}

// mapOf wraps row-major pixel values as a frequency × time map.
func (tp *tfPlan) mapOf(name string, v []float64) report.Map {
	m := report.Map{Name: name, RowName: "freq_hz", ColName: "time_s", Values: make([][]float64, tp.rows)}
	for _, f := range tp.rowHz {
		m.RowLabels = append(m.RowLabels, report.Num(f))
	}
	for _, t := range tp.colS {
		m.ColLabels = append(m.ColLabels, report.Num(t))
	}
	for i := range m.Values {
		m.Values[i] = append([]float64(nil), v[i*tp.cols:(i+1)*tp.cols]...)
	}
	return m
}

func (tp *tfPlan) row(target string) report.Row {
	a := tp.a
	return report.Row{Analysis: a.ID, Type: a.Type, Seed: tp.seed.name, Target: target, Method: a.Method, N: tp.ntrials, R: math.NaN(), P: math.NaN()}
}

// fields lays out the extra columns of a tf-map row; target_* give the
// cluster's (or the peak pixel's) extent.
func (tp *tfPlan) fields(t, f [2]float64, cluster, sign, mass, size, tcrit, pmethod, q, note string) []report.Field {
	a := tp.a
	return []report.Field{
		{Name: "seed_from_s", Value: report.Num(tp.seedT[0])}, {Name: "seed_to_s", Value: report.Num(tp.seedT[1])},
		{Name: "seed_low_hz", Value: report.Num(tp.seedF[0])}, {Name: "seed_high_hz", Value: report.Num(tp.seedF[1])},
		{Name: "target_from_s", Value: report.Num(t[0])}, {Name: "target_to_s", Value: report.Num(t[1])},
		{Name: "target_low_hz", Value: report.Num(f[0])}, {Name: "target_high_hz", Value: report.Num(f[1])},
		{Name: "df", Value: strconv.Itoa(tp.ntrials - 2)},
		{Name: "cluster", Value: cluster},
		{Name: "sign", Value: sign},
		{Name: "mass", Value: mass},
		{Name: "size", Value: size},
		{Name: "cluster_forming_t", Value: tcrit},
		{Name: "p_method", Value: pmethod},
		{Name: "permutations", Value: strconv.Itoa(a.Permutations)},
		{Name: "q", Value: q},
		{Name: "correction", Value: a.Correction},
		{Name: "note", Value: note},
	}
}

// clusterRows gives one row per cluster of map m, in label order, or one
// row saying there is none.
func (tp *tfPlan) clusterRows(m int, s *tfStats, cl *tfClusters) []report.Row {
	type acc struct {
		sumR   float64
		size   int
		r0, r1 int
		c0, c1 int
	}
	accs := map[int]*acc{}
	for i, row := range cl.labels[m] {
		for j, k := range row {
			if k == 0 {
				continue
			}
			c := accs[k]
			if c == nil {
				c = &acc{r0: i, r1: i, c0: j, c1: j}
				accs[k] = c
			}
			c.sumR += s.r[m][i*tp.cols+j]
			c.size++
			c.r0, c.r1, c.c0, c.c1 = min(c.r0, i), max(c.r1, i), min(c.c0, j), max(c.c1, j)
		}
	}
	tc := report.Num(cl.tcrit)
	var rows []report.Row
	for k := 1; k <= len(cl.sums); k++ {
		if cl.mapOf[k-1] != m {
			continue
		}
		c := accs[k]
		row := tp.row(tp.targets[m].name)
		row.R = c.sumR / float64(c.size)
		row.P = cl.p[k-1]
		sign := "positive"
		if cl.sums[k-1] < 0 {
			sign = "negative"
		}
		row.Extra = tp.fields([2]float64{tp.colS[c.c0], tp.colS[c.c1]}, [2]float64{tp.rowHz[c.r0], tp.rowHz[c.r1]},
			strconv.Itoa(k), sign, report.Num(cl.sums[k-1]), strconv.Itoa(c.size), tc, "cluster", "", clusterNote)
		// The cluster p is a permutation p: its Monte-Carlo standard error.
		row.Extra = append(row.Extra, report.Field{Name: "p_se", Value: report.Num(stats.PermSE(row.P, tp.a.Permutations))})
		rows = append(rows, row)
	}
	if rows == nil {
		row := tp.row(tp.targets[m].name)
		row.Extra = tp.fields([2]float64{math.NaN(), math.NaN()}, [2]float64{math.NaN(), math.NaN()},
			"", "", "", "0", tc, "cluster", "", fmt.Sprintf("no pixel of maps/%s_%s_r.csv passes the cluster-forming threshold |t| > %s", tp.a.ID, tp.targets[m].name, tc))
		rows = append(rows, row)
	}
	return rows
}

// peakRow is the pixel of map m with the largest |r| (the first in
// row-major order on ties).
func (tp *tfPlan) peakRow(m int, r, pv, q []float64) report.Row {
	best := -1
	for px, v := range r {
		if !math.IsNaN(v) && (best < 0 || math.Abs(v) > math.Abs(r[best])) {
			best = px
		}
	}
	row := tp.row(tp.targets[m].name)
	name := tp.a.ID + "_" + tp.targets[m].name
	if best < 0 {
		row.Extra = tp.fields([2]float64{math.NaN(), math.NaN()}, [2]float64{math.NaN(), math.NaN()},
			"", "", "", "", "", "t", "", fmt.Sprintf("undefined: no pixel of maps/%s_r.csv has a defined r (power constant across trials)", name))
		return row
	}
	row.R, row.P = r[best], pv[best]
	qs := ""
	note := fmt.Sprintf("the peak |r| of the %d×%d map maps/%s_r.csv; p is that pixel's own p, not corrected for picking the peak", tp.rows, tp.cols, name)
	if q != nil {
		qs = report.Num(q[best])
		note = fmt.Sprintf("the peak |r| of the %d×%d map maps/%s_r.csv; q is corrected over all %d pixels of the analysis", tp.rows, tp.cols, name, len(tp.targets)*tp.rows*tp.cols)
	}
	i, j := best/tp.cols, best%tp.cols
	row.Extra = tp.fields([2]float64{tp.colS[j], tp.colS[j]}, [2]float64{tp.rowHz[i], tp.rowHz[i]}, "", "", "", "", "", "t", qs, note)
	return row
}
