package figures

import (
	"fmt"
	"math"
	"strconv"

	"amplink/core/plot"
)

// parseLabels reads numeric map labels; ok is false unless they are all
// finite and strictly increasing.
func parseLabels(ls []string) ([]float64, bool) {
	out := make([]float64, len(ls))
	for i, l := range ls {
		v, err := strconv.ParseFloat(l, 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) || (i > 0 && v <= out[i-1]) {
			return nil, false
		}
		out[i] = v
	}
	return out, len(out) > 0
}

// tfCorr draws <id>_tfcorr_<channel> for every target map of a tf-map
// analysis i that has one, outlining the clusters with p ≤ figClusterP.
func (d *figDraw) tfCorr(i int) {
	a := &d.ap.Recipe().Analyses[i]
	e := d.ap.Dataset().Epochs
	seeds, targets := d.ap.Sides(i)
	for _, ch := range targets {
		name := e.Channels[ch].Name
		base := a.ID + "_" + name
		m := findMap(d.out, base+"_r")
		if m == nil {
			continue
		}
		freqs, ok1 := parseLabels(m.RowLabels)
		times, ok2 := parseLabels(m.ColLabels)
		if !ok1 || !ok2 || !squareMap(m, len(freqs), len(times)) {
			continue
		}
		var lab [][]int
		var outline []int
		if cm := findMap(d.out, base+"_clusters"); squareMap(cm, len(freqs), len(times)) {
			lab = make([][]int, len(freqs))
			for i, row := range cm.Values {
				lab[i] = make([]int, len(row))
				for j, v := range row {
					if !math.IsNaN(v) {
						lab[i][j] = int(v)
					}
				}
			}
			for _, r := range d.out.Rows {
				if r.Analysis != a.ID || r.Target != name {
					continue
				}
				k, err := strconv.Atoi(r.Field("cluster"))
				if err == nil && k > 0 && r.P <= figClusterP {
					outline = append(outline, k)
				}
			}
		}
		var wins []plot.Window
		if contains(seeds, ch) {
			wins = append(wins, plot.Window{Label: "seed", T0: a.Seed.Time[0], T1: a.Seed.Time[1], F0: a.Seed.Freq[0], F1: a.Seed.Freq[1]})
		}
		stat := "r"
		if a.Method == "spearman" {
			stat = "ρ"
		}
		seedName := ""
		if len(seeds) > 0 {
			seedName = e.Channels[seeds[0]].Name
		}
		title := fmt.Sprintf("%s: %s seed with %s power", a.ID, seedName, name)
		switch {
		case lab != nil && len(outline) > 0:
			title += fmt.Sprintf("; outlined: cluster p ≤ %g", figClusterP)
		case lab != nil:
			title += fmt.Sprintf("; no cluster at p ≤ %g", figClusterP)
		}
		svg, _ := plot.TFCorr(m.Values, freqs, times, lab, outline, plot.TFCorrOptions{
			Frame:     figFrame(title, 400, 270),
			ValueName: stat,
			Windows:   wins,
		})
		d.add(a.ID+"_tfcorr_"+name, title, svg)
	}
}

// envelopes draws <id>_envelopes_<a>_<b>: the two envelopes of the first
// pair (for a cross-frequency analysis the first pair of two different
// channels, when there is one) over the first figStretch seconds after the
// discarded edge of a recording, or over the first trial, binned as the
// analysis bins them. With pairwise orthogonalisation the second trace is
// |b ⊥ a|, the envelope the analysis correlates with |a|.
