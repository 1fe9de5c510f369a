package report

import (
	"math"
	"testing"

	"amplink/core/stats"
)

// Group rows carry q by the correction their analysis's recordings name,
// one family per kind of group row: the pooled rows, each group's, and the
// differences. stats.BH itself is checked against Benjamini & Hochberg's
// (1995) example in core/stats.
func TestGroupRowsCorrection(t *testing.T) {
	corr := func(c string) Field { return Field{Name: "correction", Value: c} }
	rs := map[string][]float64{ // recording → r for targets T1, T2, T3
		"1.edf": {0.5, 0.1, -0.2}, "2.edf": {0.6, 0.0, 0.1}, "3.edf": {0.1, 0.2, 0.0}, "4.edf": {0.0, 0.1, 0.2}, "5.edf": {0.2, 0.3, 0.1},
	}
	groups := map[string]string{"1.edf": "A", "2.edf": "A", "3.edf": "B", "4.edf": "B", "5.edf": "B"}
	for _, c := range []string{"fdr", "bonferroni", "none"} {
		t.Run(c, func(t *testing.T) {
			var rows []Row
			for _, rec := range []string{"1.edf", "2.edf", "3.edf", "4.edf", "5.edf"} {
				for k, target := range []string{"T1", "T2", "T3"} {
					rows = append(rows, recRow("a", "trial-window", "S", target, rec, rs[rec][k], corr(c)))
				}
				// Another analysis without a correction gets no q.
				rows = append(rows, recRow("b", "envelope", "X", "Y", rec, rs[rec][0]))
			}
			out, err := GroupRows(rows, groups, 0.95)
			if err != nil {
				t.Fatal(err)
			}
			fam := map[string][]int{}
			for i, r := range out {
				if r.Analysis == "b" {
					if _, ok := r.Lookup("q"); ok {
						t.Errorf("analysis b (no correction) has q in %s", r.Recording())
					}
					continue
				}
				fam[r.Recording()] = append(fam[r.Recording()], i)
			}
			if len(fam) != 4 {
				t.Fatalf("families %v", fam)
			}
			for rec, idx := range fam {
				p := make([]float64, len(idx))
				for k, i := range idx {
					p[k] = out[i].P
				}
				var want []float64
				switch c {
				case "fdr":
					want = stats.BH(p)
				case "bonferroni":
					want = stats.Bonferroni(p)
				}
				for k, i := range idx {
					q, ok := out[i].Lookup("q")
					if c == "none" {
						if ok {
							t.Errorf("%s %s: q %q without a correction", rec, out[i].Target, q)
						}
						continue
					}
					if got := fieldNum(t, out[i], "q"); math.Abs(got-want[k]) > 1e-15 || out[i].Field("correction") != c {
						t.Errorf("%s %s: q = %v (%s), want %v over the family's %d rows", rec, out[i].Target, got, out[i].Field("correction"), want[k], len(idx))
					}
				}
			}
		})
	}
}
