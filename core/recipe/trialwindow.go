package recipe

import (
	"context"
	"math"
	"strconv"

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
	if e.NTrials < 3 {
		return nil, ferr(path, "needs at least 3 trials to correlate, %s has %d", p.ds.Name, e.NTrials)
	}
	return tw, nil
}

func (tw *twPlan) values(res []UnitResult, c chanRef) []float64 {
	v := res[c.unit].Values
	return v[c.span*tw.ntrials : (c.span+1)*tw.ntrials]
}

func (tw *twPlan) finish(ctx context.Context, p *Plan, res []UnitResult, out *report.Results) error {
	a := tw.a
	spearman := a.Method == "spearman"
	var rows []report.Row
	var ps []float64
	for _, s := range tw.seeds {
		x := tw.values(res, s)
		for _, t := range tw.targets {
			if err := ctx.Err(); err != nil {
				return err
			}
			y := tw.values(res, t)
			row := correlate(a, x, y, spearman)
			row.Seed, row.Target = s.name, t.name
			row.Extra = append(windowFields(tw), row.Extra...)
			rows = append(rows, row)
			ps = append(ps, pForCorrection(row))
		}
	}
	applyCorrection(a, rows, ps)
	out.Rows = append(out.Rows, rows...)
	return nil
}

func windowFields(tw *twPlan) []report.Field {
	return []report.Field{
		{Name: "seed_tmin", Value: report.Num(tw.seedT[0])}, {Name: "seed_tmax", Value: report.Num(tw.seedT[1])},
		{Name: "seed_fmin", Value: report.Num(tw.seedF[0])}, {Name: "seed_fmax", Value: report.Num(tw.seedF[1])},
		{Name: "target_tmin", Value: report.Num(tw.targT[0])}, {Name: "target_tmax", Value: report.Num(tw.targT[1])},
		{Name: "target_fmin", Value: report.Num(tw.targF[0])}, {Name: "target_fmax", Value: report.Num(tw.targF[1])},
	}
}

// correlate computes r, its p-values and interval for one pair of vectors.
func correlate(a *Analysis, x, y []float64, spearman bool) report.Row {
	n := len(x)
	row := report.Row{Analysis: a.ID, Type: a.Type, Method: a.Method, N: n, R: math.NaN(), P: math.NaN()}
	var r float64
	if spearman {
		r = stats.Spearman(x, y)
	} else {
		r = stats.Pearson(x, y)
	}
	pperm, pexact, lo, hi := math.NaN(), math.NaN(), math.NaN(), math.NaN()
	note := ""
	if math.IsNaN(r) {
		note = "undefined: a window's power does not vary across trials"
	} else {
		row.R = r
		row.P = stats.PValueT(r, float64(n-2))
		if n <= 10 {
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
			pperm = stats.PermCorr(x, y, spearman, a.Permutations, a.RandomSeed)
		}
		lo, hi = stats.FisherCI(r, n, a.Level, spearman)
	}
	pmethod := "t"
	if !math.IsNaN(pexact) {
		pmethod = "exact"
		note = joinNote(note, "n ≤ 10: use p_exact, the t approximation is anticonservative here")
	}
	row.Extra = []report.Field{
		{Name: "df", Value: strconv.Itoa(n - 2)},
		{Name: "p_perm", Value: report.Num(pperm)},
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

func field(row report.Row, name string) string {
	for _, f := range row.Extra {
		if f.Name == name {
			return f.Value
		}
	}
	return ""
}

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
