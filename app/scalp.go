package app

import (
	"fmt"
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
	msg string // what the last click did
}

// isScalp reports whether a figure is a clickable scalp map.
func isScalp(f wire.Figure) bool { return strings.Contains(f.Name, "_scalp_") }

// scalpLarge is the full-width view of a scalp map: its SVG inline, with a
// hint, and the message of the last click under it.
func (p *Page) scalpLarge(f wire.Figure) goapp.UI {
	id, _, _ := strings.Cut(f.Name, "_scalp_")
	hint := fmt.Sprintf("Click an electrode, or Tab to it and press Enter, to make it the seed channel of %s; the next run uses it.", id)
	return goapp.Div().Body(
		goapp.P().Class("hint").Text(hint),
		goapp.Div().Class("svglarge scalp-view").ID(scalpBoxID(f.Name)).DataSet("analysis", id).
			OnClick(p.onScalpClick).OnKeyDown(p.onScalpKey).Body(goapp.Raw(svgOnly(p.bigSVG))),
		goapp.P().ID(scalpBoxID(f.Name)+"-msg").Class("okay scalp-msg").Aria("live", "polite").Text(p.scalp.msg),
	)
}

func scalpBoxID(name string) string { return "scalp-" + name }

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
// that analysis in the form, and says so under the map.
func (p *Page) setSeed(id, channel string) {
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
	// the handler redraws the results it belongs to; the form is the
	// page's, so the page is redrawn
	if p.ctx != nil {
		p.ctx.Dispatch(func(goapp.Context) {})
	}
}
