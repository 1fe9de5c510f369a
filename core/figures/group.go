package figures

import (
	"fmt"
	"math"
	"sort"
	"strconv"

	"amplink/core/plot"
	"amplink/core/report"
)

// MaxGroupFigures bounds the group figures of one table: with more pooled
// tests, only those with the largest |group r| are drawn.
const MaxGroupFigures = 24

// Group draws, for each pooled test (a row whose recording is
// "group"), the per-recording r as dots with the group mean and its
// interval. Figures are named group_<analysis>_<seed>_<target>[_<condition>].
func Group(rows []report.Row) []report.Figure {
	type test struct {
		id    report.TestID
		group report.Row
		recs  []string
		rs    []float64
	}
	byID := map[report.TestID]*test{}
	var order []*test
	for _, r := range rows {
		if !r.Groupable() && !(r.Recording() == report.GroupRecording) {
			continue
		}
		id := r.ID()
		t := byID[id]
		if t == nil {
			t = &test{id: id}
			byID[id] = t
			order = append(order, t)
		}
		switch {
		case r.Recording() == report.GroupRecording:
			t.group = r
		case !r.IsGroupRow():
			t.recs = append(t.recs, r.Recording())
			t.rs = append(t.rs, r.R)
		}
	}
	var tests []*test
	for _, t := range order {
		if t.group.Recording() == report.GroupRecording && len(t.recs) > 0 {
			tests = append(tests, t)
		}
	}
	if len(tests) > MaxGroupFigures {
		sort.SliceStable(tests, func(i, j int) bool { return absOr(tests[i].group.R) > absOr(tests[j].group.R) })
		tests = tests[:MaxGroupFigures]
	}
	var out []report.Figure
	for _, t := range tests {
		g := t.group
		lo := cell(g, "ci_lo")
		hi := cell(g, "ci_hi")
		level := cell(g, "ci_level")
		note := ""
		if !math.IsNaN(level) {
			note = strconv.FormatFloat(100*level, 'f', -1, 64) + "% CI"
		}
		title := fmt.Sprintf("%s: %s → %s, %d recordings", t.id.Analysis, t.id.Seed, t.id.Target, len(t.recs))
		if t.id.Condition != "" {
			title += ", " + t.id.Condition
		}
		opt := plot.GroupDotsOptions{
			Frame: plot.Frame{Title: title, XLabel: t.id.Method + " r"},
			Group: &plot.Interval{Mean: g.R, Lo: lo, Hi: hi, Label: "group: mean Fisher z", Note: note},
		}
		svg, _ := plot.GroupDots(t.recs, t.rs, opt)
		name := "group_" + t.id.Analysis + "_" + t.id.Seed + "_" + t.id.Target
		if t.id.Condition != "" {
			name += "_" + t.id.Condition
		}
		out = append(out, report.Figure{Name: report.SafeName(name, '_'), Title: title, SVG: svg})
	}
	return out
}

func absOr(v float64) float64 {
	if math.IsNaN(v) {
		return -1
	}
	return math.Abs(v)
}

func cell(r report.Row, name string) float64 {
	v, ok := r.Lookup(name)
	if !ok || v == "" {
		return math.NaN()
	}
	f, err := strconv.ParseFloat(v, 64)
	if err != nil {
		return math.NaN()
	}
	return f
}
