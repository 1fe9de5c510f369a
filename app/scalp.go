package app

import (
	"fmt"
	"html"
	"strings"

	goapp "github.com/maxence-charriere/go-app/v9/pkg/app"

	"amplink/app/wire"
)

// Scalp maps on the page. A scalp map of a seed-to-all analysis
// (<id>_scalp_<seed>, drawn by core/recipe with data-analysis on its
// electrodes) is put into the page as inline SVG rather than as an image,
// so that its electrodes can be clicked: a click on an electrode, or Enter
// (or Space) on a focused one, makes that channel the seed of the analysis
// in the form. The next run uses it, so a user can walk the head one seed
// at a time.

// scalpState is what the page keeps for its scalp maps; a new run's
// results start it afresh.
type scalpState struct {
	svgs map[string]string // figure name → SVG text, read from its buffer once
	open map[string]bool   // figures whose SVG is in the page
	msg  string            // what the last click did
}

// isScalp reports whether a figure is a clickable scalp map.
func isScalp(f wire.Figure) bool { return strings.Contains(f.Name, "_scalp_") }

// scalpSVG returns the SVG text of figure i, read from its buffer the
// first time it is asked for.
func (p *Page) scalpSVG(i int) string {
	s := &p.scalp
	if s.svgs == nil {
		s.svgs = map[string]string{}
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

// scalpFigure draws figure i when it is a scalp map; ok is false for
// every other figure.
func (p *Page) scalpFigure(i int) (goapp.UI, bool) {
	f := p.figures[i]
	if !isScalp(f) {
		return nil, false
	}
	id, _, _ := strings.Cut(f.Name, "_scalp_")
	hint := fmt.Sprintf("Click an electrode, or Tab to it and press Enter, to make it the seed channel of %s; the next run uses it.", id)
	// The SVG goes into the box when the figure is first opened (as the
	// other figures' images load when they are opened), written there
	// directly rather than drawn by go-app: parsing a map's cells is then
	// neither part of drawing the results nor of redrawing them. go-app
	// leaves the box's content alone, since the box has no children of its
	// own.
	box := goapp.Div().Class("svgbox scalp-view").ID(scalpBoxID(f.Name)).DataSet("analysis", id).
		OnClick(p.onScalpClick).OnKeyDown(p.onScalpKey)
	return goapp.Details().Class("figure").OnToggle(p.onScalpToggle(f.Name), f.Name).Body(
		goapp.Summary().Text(f.Title),
		goapp.P().Class("hint").Text(hint),
		box,
		goapp.P().ID(scalpBoxID(f.Name)+"-msg").Class("okay scalp-msg").Aria("live", "polite"),
	), true
}

func scalpBoxID(name string) string { return "scalp-" + name }

// onScalpToggle puts a scalp map's SVG into the page when it is first
// opened.
func (p *Page) onScalpToggle(name string) goapp.EventHandler {
	return func(ctx goapp.Context, e goapp.Event) {
		ctx.PreventUpdate()
		if !ctx.JSSrc().Get("open").Bool() || p.scalp.open[name] {
			return
		}
		for i, f := range p.figures {
			if f.Name == name {
				if svg := p.scalpSVG(i); svg != "" {
					setBodyHTML(scalpBoxID(name), svg)
					if p.scalp.open == nil {
						p.scalp.open = map[string]bool{}
					}
					p.scalp.open[name] = true
				}
				return
			}
		}
	}
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
	p.setSeed(id, ch, scalpFigureOf(e))
}

// scalpFigureOf is the id of the scalp box an event happened in.
func scalpFigureOf(e goapp.Event) string {
	b := e.Get("target").Call("closest", ".scalp-view")
	if !b.Truthy() {
		return ""
	}
	return b.Get("id").String()
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
		p.setSeed(id, ch, scalpFigureOf(e))
	default:
		ctx.PreventUpdate()
	}
}

// setSeed makes channel the seed of the analysis whose id is id, opens
// that analysis in the form, and says so under the map (box is the map's
// element id).
func (p *Page) setSeed(id, channel, box string) {
	msg := fmt.Sprintf("No analysis %s in the form, so the seed was not changed.", id)
	for i := 0; i < p.form.Analyses; i++ {
		pre := fmt.Sprintf("analyses.%d.", i)
		if p.form.get(pre+"id") != id {
			continue
		}
		p.form.set(pre+"seed.channel", channel)
		p.expanded = i
		msg = fmt.Sprintf("The seed channel of %s (analysis %d) is now %s. Run again to see its map.", id, i+1, channel)
		p.validate()
		break
	}
	p.scalp.msg = msg
	if box != "" {
		setBodyHTML(box+"-msg", html.EscapeString(msg))
	}
	// the handler redraws the results it belongs to; the form is the
	// page's, so the page is redrawn
	if p.ctx != nil {
		p.ctx.Dispatch(func(goapp.Context) {})
	}
}
