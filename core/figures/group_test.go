package figures

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"amplink/core/report"
)

func TestGroup(t *testing.T) {
	var rows []report.Row
	for _, rec := range []string{"s1.edf", "s2.edf", "s3.edf"} {
		for k := range 30 {
			rows = append(rows, report.Row{Analysis: "a", Type: "trial-window", Seed: "C4", Target: fmt.Sprintf("T%02d", k), Method: "spearman", N: 50,
				R: 0.01 * float64(k), P: 0.5, Extra: []report.Field{{Name: "recording", Value: rec}}})
		}
	}
	g, err := report.GroupRows(rows, nil, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	figs := Group(append(rows, g...))
	if len(figs) != MaxGroupFigures {
		t.Fatalf("%d figures, want the cap %d", len(figs), MaxGroupFigures)
	}
	// The strongest group r come first: T29 down to T06.
	if figs[0].Name != "group_a_C4_T29" || figs[len(figs)-1].Name != "group_a_C4_T06" {
		t.Errorf("figures %s … %s, want the largest |r| first", figs[0].Name, figs[len(figs)-1].Name)
	}
	for _, f := range figs {
		for _, want := range []string{"<svg", "s1.edf", "s3.edf", "95% CI"} {
			if !strings.Contains(f.SVG, want) {
				t.Errorf("%s lacks %q", f.Name, want)
			}
		}
	}
	if math.IsNaN(g[0].R) {
		t.Error("group r undefined")
	}
}
