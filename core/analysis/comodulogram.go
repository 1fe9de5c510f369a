package analysis

import (
	"fmt"
	"math"

	"amplink/core/analysis/connect"
	"amplink/core/report"
)

// The comodulogram: the envelope r for every seed × target grid frequency
// of one channel or a pair, as a map, with one row for its peak. Its units
// are the envelope analysis's (planEnvelope plans both).

func (ep *envPlan) finishComodulogram(mos [][]connect.Moments, out *report.Results) error {
	a := ep.a
	p := ep
	nf1, nf2 := len(p.fa), len(p.fb)
	vals := make([][]float64, nf1)
	best, bi, bj := math.NaN(), -1, -1
	total := 0.0
	for i := range nf1 {
		vals[i] = make([]float64, nf2)
		for j := range nf2 {
			var m connect.Moments
			for u := range mos {
				m.Merge(mos[u][i*nf2+j])
			}
			r := m.R()
			total = m.N
			vals[i][j] = r
			if !math.IsNaN(r) && (math.IsNaN(best) || math.Abs(r) > math.Abs(best)) {
				best, bi, bj = r, i, j
			}
		}
	}
	return ep.comoRows(vals, best, bi, bj, int(total), out, a)
}

func (ep *envPlan) comoRows(vals [][]float64, best float64, bi, bj, n int, out *report.Results, a *Analysis) error {
	var rl, cl []string
	for _, f := range ep.fa {
		rl = append(rl, report.Num(ep.freqs[f]))
	}
	for _, f := range ep.fb {
		cl = append(cl, report.Num(ep.freqs[f]))
	}
	out.Maps = append(out.Maps, report.Map{Name: a.ID + "_comodulogram", RowName: "seed_freq_hz", ColName: "target_freq_hz", RowLabels: rl, ColLabels: cl, Values: vals})
	row := report.Row{Analysis: a.ID, Type: a.Type, Method: a.Method, Seed: ep.names[0], Target: ep.names[len(ep.names)-1], N: n, R: best, P: math.NaN()}
	peak := func(idx []int, i int) string {
		if i < 0 {
			return ""
		}
		return report.Num(ep.freqs[idx[i]])
	}
	row.Extra = []report.Field{
		{Name: "band_low_hz", Value: peak(ep.fa, bi)}, {Name: "band_high_hz", Value: peak(ep.fa, bi)},
		{Name: "target_band_low_hz", Value: peak(ep.fb, bj)}, {Name: "target_band_high_hz", Value: peak(ep.fb, bj)},
		{Name: "over", Value: ep.overName()},
		{Name: "envelope", Value: envName(a.Envelope)},
		{Name: "envelope_rate", Value: report.Num(ep.rate / float64(ep.bin))},
		{Name: "edge_discard_s", Value: report.Num(ep.discard)},
		{Name: "note", Value: fmt.Sprintf("peak |r| of the %d×%d map in maps/%s_comodulogram.csv; p is not given for a peak picked from a map; neighbouring wavelets overlap in frequency, which inflates r near the diagonal", len(ep.fa), len(ep.fb), a.ID)},
	}
	if bi < 0 {
		row.Extra[len(row.Extra)-1].Value = "undefined: every envelope pair has zero variance"
	}
	out.Rows = append(out.Rows, row)
	return nil
}
