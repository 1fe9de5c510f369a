package figures

import (
	"fmt"
	"strings"

	"amplink/core/analysis"
	"amplink/core/data"
	"amplink/core/plot"
	"amplink/core/recipe"
)

// matrix draws <id>_matrix for an envelope analysis with at least three
// channels, or any cross-frequency one.
func (d *figDraw) matrix(ev analysis.EnvelopeView) {
	a := ev.Analysis()
	names := ev.Names()
	n := len(names)
	if n < 3 && !ev.CrossFrequency() {
		return
	}
	m := findMap(d.out, a.ID+"_r")
	if !squareMap(m, n, n) {
		return
	}
	opt := plot.MatrixOptions{Frame: plot.Frame{XLabel: "channel", YLabel: "channel", Width: 360, Height: 300}}
	opt.Significant, opt.MarkNote = d.matrixMarks(ev) // sensors.go
	var title string
	if ev.CrossFrequency() {
		title = fmt.Sprintf("%s: envelope r across bands", a.ID)
		opt.YLabel = "seed, " + figBand(ev.SeedFreqs())
		opt.XLabel = "target, " + figBand(ev.TargetFreqs())
	} else {
		title = fmt.Sprintf("%s: envelope r, %s", a.ID, figBand(ev.SeedFreqs()))
		if a.Orthogonalize != recipe.OrthNone {
			title += ", orthogonalised (" + string(a.Orthogonalize) + ")"
		}
	}
	opt.Title = title
	opt.Width = figFrame(title, 360, 300).Width
	svg, _ := plot.Matrix(m.Values, names, opt)
	d.add(a.ID+"_matrix", title, svg)
}

// comodulogram draws <id>_comodulogram from the comodulogram map.
func (d *figDraw) comodulogram(ev analysis.EnvelopeView) {
	a := ev.Analysis()
	sf, tf := ev.SeedFreqs(), ev.TargetFreqs()
	m := findMap(d.out, a.ID+"_comodulogram")
	if !squareMap(m, len(sf), len(tf)) {
		return
	}
	names := ev.Names()
	seed, target := names[0], names[len(names)-1]
	title := fmt.Sprintf("%s: envelope r of %s and %s across frequencies", a.ID, seed, target)
	if seed == target {
		title = fmt.Sprintf("%s: envelope r across frequencies on %s", a.ID, seed)
	}
	svg, _ := plot.CrossFreq(m.Values, sf, tf, plot.CrossFreqOptions{
		Frame: plot.Frame{Title: title, XLabel: seed + " frequency", XUnit: "Hz", YLabel: target + " frequency", YUnit: "Hz", Width: figFrame(title, 360, 300).Width, Height: 300},
	})
	d.add(a.ID+"_comodulogram", title, svg)
}

// envelopes draws <id>_envelopes_<a>_<b>: the two envelopes of the pair
// analysis.EnvelopeView.Trace picks, over the first figStretch seconds
// after the discarded edge of a recording, or over the first trial.
func (d *figDraw) envelopes(ev analysis.EnvelopeView) error {
	tr, err := ev.Trace(d.ctx, figStretch)
	if err != nil || tr == nil {
		return err
	}
	a := ev.Analysis()
	names := ev.Names()
	where := "trial 1"
	if !tr.Trial {
		where = fmt.Sprintf("first %s s", figSec(tr.Length))
	}
	nameA, nameB := names[tr.I], names[tr.J]
	note := ""
	if tr.OrthB {
		nameB = names[tr.J] + " ⊥ " + names[tr.I]
	}
	if tr.Before {
		note = ", before orthogonalisation"
	}
	if a.Envelope == "log-power" {
		note += ", amplitude (r uses log power)"
	}
	if ev.CrossFrequency() {
		nameA += ", " + figBand(ev.SeedFreqs())
		nameB += ", " + figBand(ev.TargetFreqs())
	}
	title := fmt.Sprintf("%s: %s and %s envelopes, %s, %s%s", a.ID, names[tr.I], names[tr.J], figBand(ev.SeedFreqs()), where, note)
	if ev.CrossFrequency() {
		title = fmt.Sprintf("%s: %s and %s envelopes, %s%s", a.ID, nameA, nameB, where, note)
	}
	unit := strings.TrimSuffix(unitSquared(data.Channel{Unit: tr.Unit}), "²")
	svg, _ := plot.EnvelopeTrace(tr.Times, tr.A, tr.B, plot.EnvelopeOptions{
		Frame: plot.Frame{Title: title, YLabel: "amplitude", YUnit: unit, Width: figFrame(title, 480, 220).Width, Height: 220},
		NameA: nameA, NameB: nameB,
	})
	d.add(a.ID+"_envelopes_"+names[tr.I]+"_"+names[tr.J], title, svg)
	return nil
}
