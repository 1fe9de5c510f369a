package app

import (
	"fmt"
	"strings"

	goapp "github.com/maxence-charriere/go-app/v9/pkg/app"

	"amplink/wasm/wire"
)

// Scalp maps on the page. A scalp map of a seed-to-all analysis
// (<id>_scalp_<seed>, drawn by core/recipe with data-analysis on its
// electrodes) is put into the page as inline SVG rather than as an image,
// so that its electrodes can be clicked: a click on an electrode, or Enter
// (or Space) on a focused one, makes that channel the seed of the analysis
// in the form. The next run uses it, so a user can walk the head one seed
// at a time.

// scalpState is what the page keeps for its scalp maps.
type scalpState struct {
	rev  int               // the results revision the texts belong to
	svgs map[string]string // figure name → SVG text, read from its buffer once
	msg  string            // what the last click did
}

// isScalp reports whether a figure is a clickable scalp map.
func isScalp(f wire.Figure) bool { return strings.Contains(f.Name, "_scalp_") }

// scalpSVG returns the SVG text of figure i, read from its buffer the
// first time it is asked for after a run.
func (p *Page) scalpSVG(i int) string {
	s := &p.scalp
	if s.rev != p.resultsRev || s.svgs == nil {
		// a new run (or redrawn results): texts of older runs go
		if s.svgs == nil || !sameFigures(s.svgs, p.figures) {
			s.svgs, s.msg = map[string]string{}, ""
		}
		s.rev = p.resultsRev
	}
	name := p.figures[i].Name
	if v, ok := s.svgs[name]; ok {
		return v
	}
	if i >= len(p.figBufs) {
		return ""
	}
	v := svgOnly(bufferText(p.figBufs[i]))
	s.svgs[name] = v
	return v
}

func sameFigures(m map[string]string, figs []wire.Figure) bool {
	for name := range m {
		found := false
		for _, f := range figs {
			if f.Name == name {
				found = true
				break
			}
		}
		if !found {
			return false
		}
	}
	return true
}

// scalpFigure draws figure i when it is a scalp map; ok is false for
// every other figure.
func (p *Page) scalpFigure(i int) (goapp.UI, bool) {
	f := p.figures[i]
	if !isScalp(f) {
		return nil, false
	}
	svg := p.scalpSVG(i)
	id, _, _ := strings.Cut(f.Name, "_scalp_")
	hint := fmt.Sprintf("Click an electrode, or Tab to it and press Enter, to make it the seed channel of %s; the next run uses it.", id)
	box := goapp.Div().Class("svgbox scalp-view").ID("scalp-"+f.Name).DataSet("analysis", id).
		OnClick(p.onScalpClick).OnKeyDown(p.onScalpKey)
	if svg != "" {
		box = box.Body(goapp.Raw(svg))
	}
	return goapp.Details().Class("figure").Body(
		goapp.Summary().Text(f.Title),
		goapp.P().Class("hint").Text(hint),
		box,
		goapp.If(p.scalp.msg != "", goapp.P().Class("okay scalp-msg").Aria("live", "polite").Text(p.scalp.msg)),
	), true
}

// scalpTarget finds the electrode an event happened on: its channel and
// analysis, or "" when the event was elsewhere.
func scalpTarget(e goapp.Event) (channel, analysis string) {
	t := e.Get("target")
	if !t.Truthy() {
		return "", ""
	}
	g := t.Call("closest", "[data-channel][data-analysis]")
	if !g.Truthy() {
		return "", ""
	}
	return g.Call("getAttribute", "data-channel").String(), g.Call("getAttribute", "data-analysis").String()
}

func (p *Page) onScalpClick(ctx goapp.Context, e goapp.Event) {
	ch, id := scalpTarget(e)
	if ch == "" {
		ctx.PreventUpdate()
		return
	}
	p.setSeed(id, ch)
}

func (p *Page) onScalpKey(ctx goapp.Context, e goapp.Event) {
	switch e.Get("key").String() {
	case "Enter", " ":
		ch, id := scalpTarget(e)
		if ch == "" {
			ctx.PreventUpdate()
			return
		}
		e.PreventDefault()
		p.setSeed(id, ch)
	default:
		ctx.PreventUpdate()
	}
}

// setSeed makes channel the seed of the analysis whose id is id, opens
// that analysis in the form and says so.
func (p *Page) setSeed(id, channel string) {
	for i := 0; i < p.form.Analyses; i++ {
		pre := fmt.Sprintf("analyses.%d.", i)
		if p.form.get(pre+"id") != id {
			continue
		}
		p.form.set(pre+"seed.channel", channel)
		p.expanded = i
		p.scalp.msg = fmt.Sprintf("The seed channel of %s (analysis %d) is now %s. Run again to see its map.", id, i+1, channel)
		p.resultsRev++
		p.scalp.rev = p.resultsRev
		p.validate()
		return
	}
	p.scalp.msg = fmt.Sprintf("No analysis %s in the form, so the seed was not changed.", id)
	p.resultsRev++
	p.scalp.rev = p.resultsRev
}
