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
	"amplink/core/recipe"
	"amplink/core/report"
	"amplink/core/sensors"
)

// Sensor views. Every trial-window analysis whose target (or, with one
// target, whose seed) covers several channels draws <id>_scalp_<seed>
// (one per seed channel; per condition, suffixed _<condition>, when
// conditions are compared): r of each target channel with the seed,
// interpolated over the head by spherical splines (core/sensors; Perrin et
// al. 1989) through the placed channels and drawn on the azimuthal
// equidistant projection. Every envelope analysis with three or more
// channels draws <id>_network: a line for each pair that passes the
// analysis's test (q ≤ figSigLevel with a correction, else the surrogate
// p ≤ figSigLevel), or the strongest k pairs (k = the number of channels)
// when the analysis has neither, with k in the title; a cross-frequency
// analysis draws arrows from band A of a channel to band B of another.
//
// Channels are placed by Dataset.Electrodes. Channels without a position
// are named in a note and left out; with fewer than figScalpMin placed
// channels there is no scalp map, and the note says why.

// figScalpMin is the fewest placed channels a scalp map is drawn with.
const figScalpMin = 4

// figSigLevel is the level at which a value counts as significant in the
// sensor views and matrices.
const figSigLevel = 0.05

// note adds a warning once.
func (d *figDraw) note(s string) {
	for _, w := range d.out.Warnings {
		if w == s {
			return
		}
	}
	d.out.Warnings = append(d.out.Warnings, s)
}

// channel finds a channel of the dataset by name.
func (d *figDraw) channel(name string) data.Channel {
	var chs []data.Channel
	if d.ap.Dataset().Recording != nil {
		chs = d.ap.Dataset().Recording.Channels
	}
	if d.ap.Dataset().Epochs != nil {
		chs = d.ap.Dataset().Epochs.Channels
	}
	if i := data.Lookup(chs, name); i >= 0 {
		return chs[i]
	}
	return data.Channel{Name: name}
}

// place splits names into the placed ones (with their unit vectors) and
// the rest, noting the rest for analysis id.
func (d *figDraw) place(id string, names []string) (placed []string, pos []sensors.Point) {
	el := d.ap.Dataset().Electrodes
	var missing []string
	for _, n := range names {
		if p, ok := el.Position(d.channel(n)); ok {
			placed = append(placed, n)
			pos = append(pos, p)
		} else {
			missing = append(missing, n)
		}
	}
	if len(missing) > 0 {
		d.note(fmt.Sprintf("%s: no position for %s in %s; left out of the sensor views", id, strings.Join(missing, ", "), el.Source()))
	}
	return placed, pos
}

// sigRule says which column of an analysis's rows decides significance,
// and how the figures say so; ok is false when the analysis has no test
// to decide it by.
func sigRule(a *recipe.Analysis) (col, note string, ok bool) {
	lv := strconv.FormatFloat(figSigLevel, 'g', -1, 64)
	switch {
	case a.Correction == "fdr" || a.Correction == "bonferroni":
		return "q", "q ≤ " + lv + " (" + a.Correction + ")", true
	case a.Type == recipe.TypeTrialWindow && a.Permutations > 0:
		return "p_perm", "permutation p ≤ " + lv + ", uncorrected", true
	case a.Type == recipe.TypeTrialWindow:
		return "p", "p ≤ " + lv + ", uncorrected", true
	case a.Surrogates > 0:
		return "p_surr", "surrogate p ≤ " + lv + ", uncorrected", true
	}
	return "", "", false
}

// significant applies sigRule's column to a row.
func significant(row report.Row, col string) bool {
	v := row.P
	if col != "p" {
		var err error
		if v, err = strconv.ParseFloat(row.Field(col), 64); err != nil {
			return false
		}
	}
	return v <= figSigLevel
}

// scalpMaps draws the scalp maps of a trial-window analysis.
func (d *figDraw) scalpMaps(tw analysis.TrialWindowView) {
	a := tw.Analysis()
	rows := d.rowIndex(a.ID)
	seedSide := len(tw.Targets()) < 2 // map the seeds' r with each target
	fixed, varied := tw.Seeds(), tw.Targets()
	if seedSide {
		fixed, varied = tw.Targets(), tw.Seeds()
	}
	if len(varied) < 2 {
		return
	}
	names := varied
	placed, pos := d.place(a.ID, names)
	if len(placed) < figScalpMin {
		d.note(fmt.Sprintf("%s: no scalp map, since only %d of its %d channels have a position (at least %d are needed)", a.ID, len(placed), len(names), figScalpMin))
		return
	}
	conds := []string{""}
	if a.Conditions != nil {
		conds = a.Conditions.Compare[:]
	}
	col, markNote, _ := sigRule(a)
	stat := "r"
	if a.Method == "spearman" {
		stat = "ρ"
	}
	if len(a.Covariates) > 0 {
		stat = "partial " + stat
	}
	for _, f := range fixed {
		for _, cond := range conds {
			ss := make([]plot.Sensor, 0, len(placed)+1)
			var vpos []sensors.Point
			var vals []float64
			for i, n := range placed {
				k := rowKey{a.ID, f, n, cond}
				if seedSide {
					k = rowKey{a.ID, n, f, cond}
				}
				s := plot.Sensor{Name: n, Value: math.NaN(), Seed: !seedSide && n == f}
				s.X, s.Y = sensors.Project(pos[i])
				if row, ok := rows[k]; ok && !math.IsNaN(row.R) {
					s.Value = row.R
					s.Marked = significant(row, col)
					vpos = append(vpos, pos[i])
					vals = append(vals, row.R)
				}
				ss = append(ss, s)
			}
			if len(vals) < figScalpMin {
				d.note(fmt.Sprintf("%s: no scalp map for %s, since only %d placed channels have a defined r (at least %d are needed)", a.ID, f, len(vals), figScalpMin))
				continue
			}
			if !seedSide && !hasName(placed, f) {
				if p, ok := d.ap.Dataset().Electrodes.Position(d.channel(f)); ok {
					s := plot.Sensor{Name: f, Value: math.NaN(), Seed: true}
					s.X, s.Y = sensors.Project(p)
					ss = append(ss, s)
				}
			}
			sp, err := sensors.NewSpline(vpos, vals, 0)
			if err != nil {
				d.note(fmt.Sprintf("%s: no scalp map for %s: %v", a.ID, f, err))
				continue
			}
			var title string
			seedNote := "seed " + f
			if seedSide {
				title = fmt.Sprintf("%s: %s of each seed channel with %s", a.ID, stat, f)
				seedNote = ""
			} else {
				title = fmt.Sprintf("%s: %s of each channel with the %s seed", a.ID, stat, f)
			}
			if cond != "" {
				title += ", " + cond
			}
			analysis := ""
			if !seedSide {
				analysis = a.ID
			}
			svg, _ := plot.Scalp(ss, plot.ScalpOptions{
				Frame:     figFrame(title, 380, 350),
				Field:     func(x, y float64) float64 { return sp.At(sensors.Unproject(x, y)) },
				ValueName: stat, MarkNote: markNote, SeedNote: seedNote, Analysis: analysis,
			})
			svg = strings.Replace(svg, "<svg ", `<svg data-figure="scalp" `, 1)
			name := a.ID + "_scalp_" + f
			if cond != "" {
				name += "_" + cond
			}
			d.add(name, title, svg)
		}
	}
}

// hasName reports whether name is among names.
func hasName(names []string, name string) bool {
	for _, n := range names {
		if n == name {
			return true
		}
	}
	return false
}

// network draws <id>_network for an envelope analysis with three or more
// channels.
func (d *figDraw) network(ev analysis.EnvelopeView) {
	a := ev.Analysis()
	names := ev.Names()
	if len(names) < 3 {
		return
	}
	placed, pos := d.place(a.ID, names)
	if len(placed) < 2 {
		d.note(fmt.Sprintf("%s: no network figure, since only %d of its %d channels have a position", a.ID, len(placed), len(names)))
		return
	}
	at := map[string]int{}
	ss := make([]plot.Sensor, len(placed))
	for i, n := range placed {
		at[n] = i
		ss[i] = plot.Sensor{Name: n, Value: math.NaN()}
		ss[i].X, ss[i].Y = sensors.Project(pos[i])
	}
	type cand struct {
		link plot.Link
		abs  float64
		pos  int
	}
	col, note, tested := sigRule(a)
	var cs []cand
	for k, row := range d.out.Rows {
		if row.Analysis != a.ID || math.IsNaN(row.R) || row.IsGroupRow() {
			continue
		}
		i, ok1 := at[row.Seed]
		j, ok2 := at[row.Target]
		if !ok1 || !ok2 || (tested && !significant(row, col)) {
			continue
		}
		cs = append(cs, cand{plot.Link{A: i, B: j, R: row.R, Directed: ev.CrossFrequency()}, math.Abs(row.R), k})
	}
	total := len(placed) * (len(placed) - 1) / 2
	if ev.CrossFrequency() {
		total = len(placed) * len(placed)
	}
	var legend, title string
	what := "envelope r, " + figBand(ev.SeedFreqs())
	if ev.CrossFrequency() {
		what = "envelope r across bands"
	}
	if a.Orthogonalize != recipe.OrthNone {
		what += ", orthogonalised"
	}
	if tested {
		legend = fmt.Sprintf("lines: %d of %d pairs with %s", len(cs), total, note)
		title = fmt.Sprintf("%s: %s", a.ID, what)
	} else {
		k := min(len(placed), len(cs))
		sort.SliceStable(cs, func(x, y int) bool { return cs[x].abs > cs[y].abs })
		cs = cs[:k]
		legend = fmt.Sprintf("lines: the %d strongest of %d pairs (no test in the recipe)", k, total)
		title = fmt.Sprintf("%s: %s, the %d strongest pairs", a.ID, what, k)
	}
	links := make([]plot.Link, len(cs))
	for i, c := range cs {
		links[i] = c.link
	}
	arrow := ""
	if ev.CrossFrequency() {
		arrow = figBand(ev.SeedFreqs()) + " → " + figBand(ev.TargetFreqs())
	}
	svg, _ := plot.Network(ss, links, plot.NetworkOptions{
		Frame:  figFrame(title, 380, 370),
		Legend: legend, ArrowNote: arrow,
	})
	d.add(a.ID+"_network", title, svg)
}

// matrixMarks marks the cells of an envelope analysis's r matrix that
// pass its test (nil without one).
func (d *figDraw) matrixMarks(ev analysis.EnvelopeView) ([][]bool, string) {
	a := ev.Analysis()
	names := ev.Names()
	col, note, ok := sigRule(a)
	if !ok {
		return nil, ""
	}
	n := len(names)
	at := map[string]int{}
	for i, nm := range names {
		at[nm] = i
	}
	m := make([][]bool, n)
	for i := range m {
		m[i] = make([]bool, n)
	}
	for _, row := range d.out.Rows {
		if row.Analysis != a.ID || math.IsNaN(row.R) || row.IsGroupRow() || !significant(row, col) {
			continue
		}
		i, ok1 := at[row.Seed]
		j, ok2 := at[row.Target]
		if !ok1 || !ok2 {
			continue
		}
		m[i][j] = true
		if !ev.CrossFrequency() {
			m[j][i] = true
		}
	}
	return m, note
}
