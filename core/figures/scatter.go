package figures

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"amplink/core/analysis"
	"amplink/core/data"
	"amplink/core/plot"
	"amplink/core/report"
)

type rowKey struct{ analysis, seed, target, condition string }

func (d *figDraw) rowIndex(id string) map[rowKey]report.Row {
	m := map[rowKey]report.Row{}
	for _, r := range d.out.Rows {
		if r.Analysis != id {
			continue
		}
		k := rowKey{r.Analysis, r.Seed, r.Target, r.Field("condition")}
		if _, ok := m[k]; !ok {
			m[k] = r
		}
	}
	return m
}

// scatterFigures draws the trial scatter behind every row of a
// trial-window analysis, in row order.
func (d *figDraw) scatterFigures(tw analysis.TrialWindowView) error {
	a := tw.Analysis()
	e := d.ap.Dataset().Epochs
	spearman := a.Method == "spearman"
	rows := d.rowIndex(a.ID)
	stat := "r"
	if spearman {
		stat = "ρ"
	}
	if len(a.Covariates) > 0 {
		stat = "partial " + stat
	}
	unit := ""
	band := func(f, t [2]float64) string {
		return fmt.Sprintf("%s–%s Hz, %s to %s s", figHz(f[0]), figHz(f[1]), figSec(t[0]), figSec(t[1]))
	}
	labels := make([]string, len(tw.Kept()))
	for i, t := range tw.Kept() {
		labels[i] = "trial " + strconv.Itoa(t+1)
	}
	draw := scatterPairs(tw, rows)
	seedF, seedT := tw.SeedWindow()
	targF, targT := tw.TargetWindow()
	conds, covsAll := tw.ConditionTrials(), tw.Covariates()
	for _, s := range tw.Seeds() {
		x := tw.Values(d.res, s, true)
		for _, t := range tw.Targets() {
			if err := d.ctx.Err(); err != nil {
				return err
			}
			if !draw[[2]string{s, t}] {
				continue
			}
			y := tw.Values(d.res, t, false)
			if c := data.Lookup(e.Channels, t); c >= 0 {
				unit = unitSquared(e.Channels[c])
			}
			type part struct {
				cond string
				idx  []int
			}
			parts := []part{{"", nil}}
			if a.Conditions != nil {
				parts = []part{{a.Conditions.Compare[0], conds[0]}, {a.Conditions.Compare[1], conds[1]}}
			}
			for _, pt := range parts {
				xs, ys, covs, lab := x, y, covsAll, labels
				if pt.idx != nil {
					xs, ys, covs, lab = analysis.Pick(x, pt.idx), analysis.Pick(y, pt.idx), analysis.PickCovariates(covsAll, pt.idx), pickStrings(labels, pt.idx)
				}
				xl, yl := s+" power, "+band(seedF, seedT), t+" power, "+band(targF, targT)
				opt := plot.ScatterOptions{
					Frame:  plot.Frame{XLabel: xl, XUnit: unit, YLabel: yl, YUnit: unit, Width: 360, Height: 300},
					Ranks:  spearman,
					Labels: lab,
				}
				if len(covs) > 0 {
					xs, ys = analysis.Residuals(xs, ys, covs, spearman)
					opt.Ranks = false
					what := "power"
					if spearman {
						what = "power rank"
						opt.XUnit, opt.YUnit = "", ""
					}
					opt.XLabel = fmt.Sprintf("%s %s residual", s, what)
					opt.YLabel = fmt.Sprintf("%s %s residual", t, what)
				}
				title := fmt.Sprintf("%s: %s → %s across trials", a.ID, s, t)
				name := a.ID + "_scatter_" + s + "_" + t
				if pt.cond != "" {
					title += ", " + pt.cond
					name += "_" + pt.cond
				}
				if len(covs) > 0 {
					title += ", after " + strings.Join(a.Covariates, ", ")
				}
				opt.Title = title
				opt.Width = figFrame(title, 360, 300).Width
				if row, ok := rows[rowKey{a.ID, s, t, pt.cond}]; ok {
					opt.Stat = &plot.Stat{Name: stat, R: row.R, P: row.P, N: row.N}
				}
				svg, _ := plot.Scatter(xs, ys, opt)
				d.add(name, title, svg)
			}
		}
	}
	return nil
}

// figScatterMax bounds the scatters of one analysis: with more seed ×
// target pairs, only the pairs of the figScatterMax rows with the largest
// |r| (first in table order on ties) are drawn.
const figScatterMax = 24

// scatterPairs returns the seed–target pairs whose scatter is drawn.
func scatterPairs(tw analysis.TrialWindowView, rows map[rowKey]report.Row) map[[2]string]bool {
	type cand struct {
		key [2]string
		r   float64
		i   int
	}
	var cs []cand
	for _, s := range tw.Seeds() {
		for _, t := range tw.Targets() {
			r := math.Inf(-1)
			for k, row := range rows {
				if k.seed == s && k.target == t && !math.IsNaN(row.R) {
					r = math.Max(r, math.Abs(row.R))
				}
			}
			cs = append(cs, cand{[2]string{s, t}, r, len(cs)})
		}
	}
	if len(cs) > figScatterMax {
		sort.SliceStable(cs, func(i, j int) bool { return cs[i].r > cs[j].r })
		cs = cs[:figScatterMax]
	}
	out := make(map[[2]string]bool, len(cs))
	for _, c := range cs {
		out[c.key] = true
	}
	return out
}

func pickStrings(v []string, idx []int) []string {
	out := make([]string, len(idx))
	for i, j := range idx {
		out[i] = v[j]
	}
	return out
}
