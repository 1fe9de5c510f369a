package report

import "amplink/core/stats"

// correctGroupRows adds q and correction to the group rows of each analysis
// whose per-recording rows name a correction ("fdr": Benjamini & Hochberg
// 1995, stats.BH; "bonferroni": stats.Bonferroni); method maps an analysis
// to the correction its first groupable row names, lower-cased. Each analysis has up to
// four families of group rows, each corrected on its own: the rows pooled
// over every recording ("group"), those of each group ("group:A",
// "group:B") and the difference rows ("group:A-B"). Rows with an undefined
// p get an empty q and do not count in m. Analyses with no correction
// ("none", or none named) get no q.
func correctGroupRows(method map[string]string, out []Row) {
	type family struct{ analysis, rec string }
	var order []family
	members := map[family][]int{}
	for i := range out {
		f := family{out[i].Analysis, out[i].Recording()}
		if _, ok := members[f]; !ok {
			order = append(order, f)
		}
		members[f] = append(members[f], i)
	}
	for _, f := range order {
		m := method[f.analysis]
		var adjust func([]float64) []float64
		switch m {
		case "fdr":
			adjust = stats.BH
		case "bonferroni":
			adjust = stats.Bonferroni
		default:
			continue
		}
		idx := members[f]
		p := make([]float64, len(idx))
		for k, i := range idx {
			p[k] = out[i].P
		}
		for k, q := range adjust(p) {
			r := &out[idx[k]]
			r.Extra = append(r.Extra, Field{Name: "q", Value: Num(q)}, Field{Name: "correction", Value: m})
		}
	}
}
