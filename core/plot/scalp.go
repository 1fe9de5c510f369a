package plot

import (
	"math"
	"sort"
	"strings"
)

// Sensor is one electrode on a head figure. X and Y are its position on
// the page plane of the azimuthal equidistant projection (the vertex at
// the origin, the nasion–ear plane at radius 1, the nose towards +Y, the
// right ear towards +X).
type Sensor struct {
	Name   string
	X, Y   float64
	Value  float64 // the mapped value (scalp maps); NaN when it has none
	Marked bool    // significant: drawn filled
	Seed   bool    // the seed channel: drawn as a diamond
}

// ScalpOptions configures Scalp. Field gives the interpolated value at a
// point of the page plane (for example a spherical spline through the
// sensors' values); Limit sets the colour limits ±Limit (zero → max
// |Value|); ValueName names the value ("r"); MarkNote says what a filled
// marker means ("q ≤ 0.05, fdr") and SeedNote what the diamond is
// ("seed C4"); Analysis, when set, goes into a data-analysis attribute of
// every electrode (with data-channel, tabindex and role="button") so that a
// page can act on a click on an electrode.
type ScalpOptions struct {
	Frame
	Field     func(x, y float64) float64
	Limit     float64
	ValueName string
	MarkNote  string
	SeedNote  string
	Analysis  string
}

// scalpBands is the number of colour bands of a scalp map: the field is
// drawn in discrete bands of equal width over [−Limit, Limit], so equal
// colours are equal ranges and band edges read as contours.
const scalpBands = 16

// scalpCells is the number of cells across the coloured disc.
const scalpCells = 128

// Head drawing. The outline is the circle at radius r ≥ 1 (the nasion–ear
// plane, or a little beyond the outermost sensor when a sensor lies
// lower); the nose is a blunt wedge at the top and the ears are short
// brackets on the sides. The colour field fills the disc up to a tenth
// beyond the outermost sensor, never past the outline.
type head struct {
	g      Geometry
	r      float64 // outline radius in page-plane units
	rField float64 // radius of the coloured disc
}

func headFor(sensors []Sensor) (r, rField float64) {
	m := 0.0
	for _, s := range sensors {
		m = math.Max(m, math.Hypot(s.X, s.Y))
	}
	r = math.Max(1, m+0.08)
	return r, math.Min(r, m+0.1)
}

// headLayout fits the head (with room for the nose and ears) into the
// frame under the title and above a legend of legendLines lines, leaving
// right for a colour bar.
func headLayout(fr Frame, sensors []Sensor, right float64, legendLines int) (head, layout, *svgDoc) {
	w, h, font := fr.size()
	tf := font + 1
	titles := titleLinesFor(fr.Title, "", w, tf)
	l := layout{w: w, h: h, font: font, titleLines: titles}
	top := 8.0
	if len(titles) > 0 {
		top = 6 + float64(len(titles))*(tf+3) + 4
	}
	bottom := 6 + float64(legendLines)*(font+5)
	r, rf := headFor(sensors)
	span := r * 1.14 // nose and ears
	side := math.Max(10, math.Min(w-8-right, h-top-bottom))
	left := math.Max(4, (w-side-right)/2)
	g := Geometry{Left: left, Top: top, Width: side, Height: side,
		XMin: -span, XMax: span, YMin: -span, YMax: span, ViewW: w, ViewH: h}
	d := newDoc(w, h, font, fr.Title)
	d.titles(l)
	return head{g: g, r: r, rField: rf}, l, d
}

// scale is viewBox units per page-plane unit.
func (hd head) scale() float64 { return hd.g.Width / (hd.g.XMax - hd.g.XMin) }

func (hd head) centre() (float64, float64) { return hd.g.ToPixel(0, 0) }

// headOutline draws the head outline, nose and ears over the field.
func (d *svgDoc) headOutline(hd head) {
	cx, cy := hd.centre()
	k := hd.scale()
	R := hd.r * k
	var p strings.Builder
	// the outline as two arcs
	p.WriteString("M" + num(cx-R) + " " + num(cy) + "A" + num(R) + " " + num(R) + " 0 1 1 " + num(cx+R) + " " + num(cy))
	p.WriteString("A" + num(R) + " " + num(R) + " 0 1 1 " + num(cx-R) + " " + num(cy))
	// nose: a blunt wedge from ±8° off the top
	a := 8 * math.Pi / 180
	nx, ny := R*math.Sin(a), R*math.Cos(a)
	p.WriteString("M" + num(cx-nx) + " " + num(cy-ny) + "L" + num(cx-R*0.035) + " " + num(cy-R*1.09) +
		"L" + num(cx+R*0.035) + " " + num(cy-R*1.09) + "L" + num(cx+nx) + " " + num(cy-ny))
	// ears: brackets from 14° above to 14° below the ear line
	b := 14 * math.Pi / 180
	ex, ey := R*math.Cos(b), R*math.Sin(b)
	for _, s := range []float64{-1, 1} {
		p.WriteString("M" + num(cx+s*ex) + " " + num(cy-ey) + "L" + num(cx+s*R*1.05) + " " + num(cy-ey*0.8) +
			"L" + num(cx+s*R*1.05) + " " + num(cy+ey*0.8) + "L" + num(cx+s*ex) + " " + num(cy+ey))
	}
	d.raw(`<path d="`, p.String(), `" fill="none" stroke="`, inkColour, `" stroke-width="1.3" stroke-linejoin="round"/>`+"\n")
}

// headArea writes the invisible plot-area rectangle with the geometry
// (page-plane coordinates), for pages that map pointer positions back.
func (d *svgDoc) headArea(g Geometry) {
	d.raw(`<rect id="plot-area" x="`, num(g.Left), `" y="`, num(g.Top), `" width="`, num(g.Width),
		`" height="`, num(g.Height), `" fill="none" stroke="none"`,
		` data-left="`, attrNum(g.Left), `" data-top="`, attrNum(g.Top),
		`" data-width="`, attrNum(g.Width), `" data-height="`, attrNum(g.Height),
		`" data-xmin="`, attrNum(g.XMin), `" data-xmax="`, attrNum(g.XMax),
		`" data-ymin="`, attrNum(g.YMin), `" data-ymax="`, attrNum(g.YMax),
		`" data-xlog="false" data-ylog="false" data-view-width="`, attrNum(g.ViewW), `" data-view-height="`, attrNum(g.ViewH), `"/>`+"\n")
}

// labelSize is the electrode label size: smaller when electrodes crowd.
func labelSize(hd head, sensors []Sensor, font float64) float64 {
	k := hd.scale()
	dmin := math.Inf(1)
	for i := range sensors {
		for j := i + 1; j < len(sensors); j++ {
			dmin = math.Min(dmin, math.Hypot(sensors[i].X-sensors[j].X, sensors[i].Y-sensors[j].Y)*k)
		}
	}
	if math.IsInf(dmin, 1) {
		return font - 1
	}
	return math.Max(4.5, math.Min(font-1, dmin*0.42))
}

// electrodes draws every sensor's marker and label. Markers: a white disc
// with a dark rim; filled dark when Marked (significant); a diamond for
// the seed (filled dark when also Marked). Labels sit above their marker
// with a white halo, so they read over any colour. Each electrode is a
// focusable group carrying data-channel (and data-analysis), with a
// <title> giving its value.
func (d *svgDoc) electrodes(hd head, sensors []Sensor, opt ScalpOptions, valued bool) {
	lf := labelSize(hd, sensors, d.font)
	ms := math.Max(1.6, lf*0.32) // marker radius
	for _, s := range sensors {
		x, y := hd.g.ToPixel(s.X, s.Y)
		tip := s.Name
		if valued {
			if finite(s.Value) {
				tip += ": " + opt.ValueName + " = " + fmtTick(s.Value, 0.001)
			} else {
				tip += ": undefined"
			}
			if s.Marked && opt.MarkNote != "" {
				tip += " (" + opt.MarkNote + ")"
			}
		}
		if s.Seed {
			tip += " (seed)"
		}
		d.raw(`<g class="electrode" data-channel="`, esc(s.Name), `"`)
		if opt.Analysis != "" {
			d.raw(` data-analysis="`, esc(opt.Analysis), `" tabindex="0" role="button"`)
		}
		d.raw(` aria-label="`, esc(tip), `"><title>`, esc(tip), "</title>\n")
		fill := "#ffffff"
		if s.Marked {
			fill = inkColour
		}
		if s.Seed {
			q := ms * 1.9
			d.raw(`<path d="M`, num(x), " ", num(y-q), "L", num(x+q), " ", num(y), "L", num(x), " ", num(y+q), "L", num(x-q), " ", num(y),
				`Z" fill="`, fill, `" stroke="`, inkColour, `" stroke-width="1.2"/>`+"\n")
			if !s.Marked {
				d.raw(`<circle cx="`, num(x), `" cy="`, num(y), `" r="`, num(ms*0.5), `" fill="`, inkColour, `"/>`+"\n")
			}
		} else {
			r := ms
			if s.Marked {
				r = ms * 1.3
			}
			d.raw(`<circle cx="`, num(x), `" cy="`, num(y), `" r="`, num(r), `" fill="`, fill, `" stroke="`, inkColour, `" stroke-width="0.8"/>`+"\n")
		}
		weight := ""
		if s.Marked || s.Seed {
			weight = ` font-weight="700"`
		}
		d.raw(`<text x="`, num(x), `" y="`, num(y-ms*1.9-1.2), `" text-anchor="middle" font-size="`, num(lf), `"`, weight,
			` stroke="#ffffff" stroke-width="`, num(lf*0.3), `" stroke-linejoin="round" paint-order="stroke">`, esc(s.Name), "</text>\n")
		d.raw("</g>\n")
	}
}

// Scalp draws a scalp map: the field interpolated over the head (inside
// the outline) in scalpBands bands of the diverging Heath scale over
// [−Limit, Limit], symmetric around 0, with a colour bar, every sensor
// marked and labelled (the seed as a diamond, significant sensors
// filled, so that the marks survive greyscale), and a legend of the
// markers under the head. The geometry is in page-plane units (see
// Sensor). A nil Field draws only the head and the sensors.
func Scalp(sensors []Sensor, opt ScalpOptions) (string, Geometry) {
	if opt.ValueName == "" {
		opt.ValueName = "r"
	}
	_, _, font := opt.Frame.size()
	vs := make([]float64, len(sensors))
	for i, s := range sensors {
		vs[i] = s.Value
	}
	lim := symLimit([][]float64{vs}, opt.Limit)
	bar := newColourBar(Heath, -lim, lim, false, opt.ValueName)
	hd, l, d := headLayout(opt.Frame, sensors, bar.room(font), 1)
	g := hd.g
	cx, cy := hd.centre()
	k := hd.scale()
	if opt.Field != nil {
		rf := hd.rField
		n := scalpCells
		cell := 2 * rf / float64(n)
		band := func(v float64) int {
			if !finite(v) {
				return -1
			}
			b := int(math.Floor((v + lim) / (2 * lim) * scalpBands))
			return max(0, min(scalpBands-1, b))
		}
		// one path per band, a rectangle per run of equal band in a row (16
		// elements rather than one per run keeps the page's parsing short)
		runs := make([]strings.Builder, scalpBands)
		for i := 0; i < n; i++ {
			yc := rf - (float64(i)+0.5)*cell // page-plane y of the row centre
			if math.Abs(yc)-cell/2 > rf {
				continue
			}
			e := math.Max(0, math.Abs(yc)-cell/2)
			half := math.Sqrt(math.Max(0, rf*rf-e*e))
			j0 := max(0, int(math.Floor((rf-half)/cell)))
			j1 := min(n, int(math.Ceil((rf+half)/cell)))
			run, runStart := -2, j0
			flush := func(j int) {
				if run >= 0 {
					x0 := cx + (-rf+float64(runStart)*cell)*k
					x1 := cx + (-rf+float64(j)*cell)*k
					y0 := cy - (yc+cell/2)*k
					b := &runs[run]
					b.WriteString("M" + num(x0) + " " + num(y0) + "h" + num(x1-x0+0.3) + "v" + num(cell*k+0.3) + "h" + num(-(x1 - x0 + 0.3)) + "z")
				}
			}
			for j := j0; j < j1; j++ {
				xc := -rf + (float64(j)+0.5)*cell
				b := band(opt.Field(xc, yc))
				if b != run {
					flush(j)
					run, runStart = b, j
				}
			}
			flush(j1)
		}
		d.raw(`<g shape-rendering="crispEdges">` + "\n")
		for b := range runs {
			if runs[b].Len() > 0 {
				d.raw(`<path fill="`, Heath.Hex((float64(b)+0.5)/scalpBands), `" d="`, runs[b].String(), `"/>`+"\n")
			}
		}
		d.raw("</g>\n")
		// white out what lies outside the disc (even-odd: a square with the
		// disc cut out of it)
		R := rf * k
		m := R + 2*cell*k
		d.raw(`<path fill="#ffffff" fill-rule="evenodd" d="M`, num(cx-m), " ", num(cy-m), "H", num(cx+m), "V", num(cy+m), "H", num(cx-m), "Z",
			"M", num(cx-R), " ", num(cy), "A", num(R), " ", num(R), " 0 1 0 ", num(cx+R), " ", num(cy),
			"A", num(R), " ", num(R), " 0 1 0 ", num(cx-R), " ", num(cy), `Z"/>`+"\n")
	}
	d.headArea(g)
	d.headOutline(hd)
	d.electrodes(hd, sensors, opt, true)
	// the colour bar beside the head's outline
	R := hd.r * k
	bg := g
	bg.Top, bg.Height = cy-R, 2*R
	d.colourBar(l, bg, bar)
	d.markerLegend(l, g, opt.MarkNote, opt.SeedNote, hasSeed(sensors), hasMarked(sensors))
	return d.finish(), g
}

func hasSeed(ss []Sensor) bool {
	for _, s := range ss {
		if s.Seed {
			return true
		}
	}
	return false
}

func hasMarked(ss []Sensor) bool {
	for _, s := range ss {
		if s.Marked {
			return true
		}
	}
	return false
}

// markerLegend writes the line under the head that explains the markers.
func (d *svgDoc) markerLegend(l layout, g Geometry, markNote, seedNote string, seed, marked bool) {
	y := l.h - 8
	type item struct {
		kind string
		text string
	}
	items := []item{{"plain", "electrode"}}
	if markNote != "" {
		items = append(items, item{"marked", markNote})
	}
	if seed && seedNote != "" {
		items = append(items, item{"seed", seedNote})
	}
	total := 0.0
	for _, it := range items {
		total += 10 + textWidth(it.text, l.font) + 12
	}
	x := math.Max(4, g.Left+g.Width/2-total/2)
	for _, it := range items {
		mx, my := x+4, y-l.font*0.33
		switch it.kind {
		case "plain":
			d.raw(`<circle cx="`, num(mx), `" cy="`, num(my), `" r="2.6" fill="#ffffff" stroke="`, inkColour, `" stroke-width="0.8"/>`+"\n")
		case "marked":
			d.raw(`<circle cx="`, num(mx), `" cy="`, num(my), `" r="3.2" fill="`, inkColour, `" stroke="`, inkColour, `" stroke-width="0.8"/>`+"\n")
		case "seed":
			q := 4.2
			d.raw(`<path d="M`, num(mx), " ", num(my-q), "L", num(mx+q), " ", num(my), "L", num(mx), " ", num(my+q), "L", num(mx-q), " ", num(my),
				`Z" fill="#ffffff" stroke="`, inkColour, `" stroke-width="1.2"/>`+"\n")
		}
		d.text(x+10, y, "start", 0, 0, it.text, "")
		x += 10 + textWidth(it.text, l.font) + 12
	}
}

// Link is one line of a network figure: sensors A and B (indices into the
// sensors) with value R. Directed links (cross-frequency coupling, band A
// of A with band B of B) are drawn as arrows from A to B; a directed link
// of a sensor with itself is a loop beside it.
type Link struct {
	A, B     int
	R        float64
	Directed bool
}

// NetworkOptions configures Network: Limit sets the colour and width
// scale ±Limit (zero → max |R|), ValueName names the value ("r"), Legend
// says which links are drawn ("q ≤ 0.05, fdr" or "the 6 strongest
// pairs"), and ArrowNote what an arrow means ("14–18 Hz → 60–80 Hz").
type NetworkOptions struct {
	Frame
	Limit     float64
	ValueName string
	Legend    string
	ArrowNote string
	Analysis  string
}

// Network draws connections on the head: every sensor marked and
// labelled, and a line for each link, its width growing with |R|
// (0.8 + 3.2·|R|/Limit units) and its colour from the diverging Heath
// scale over [−Limit, Limit]; weaker links are drawn first. A colour bar
// and a legend of line widths explain the scale.
func Network(sensors []Sensor, links []Link, opt NetworkOptions) (string, Geometry) {
	if opt.ValueName == "" {
		opt.ValueName = "r"
	}
	for _, ln := range links {
		if ln.A < 0 || ln.B < 0 || ln.A >= len(sensors) || ln.B >= len(sensors) {
			panic("plot: network link outside the sensors")
		}
	}
	_, _, font := opt.Frame.size()
	rs := make([]float64, len(links))
	for i, ln := range links {
		rs[i] = ln.R
	}
	lim := symLimit([][]float64{rs}, opt.Limit)
	bar := newColourBar(Heath, -lim, lim, false, opt.ValueName)
	lines := 2
	if opt.ArrowNote != "" {
		lines = 3
	}
	hd, l, d := headLayout(opt.Frame, sensors, bar.room(font), lines)
	g := hd.g
	d.headArea(g)
	d.headOutline(hd)
	width := func(r float64) float64 { return 0.8 + 3.2*math.Min(1, math.Abs(r)/lim) }
	order := make([]int, 0, len(links))
	for i, ln := range links {
		if finite(ln.R) {
			order = append(order, i)
		}
	}
	sort.SliceStable(order, func(i, j int) bool { return math.Abs(links[order[i]].R) < math.Abs(links[order[j]].R) })
	lf := labelSize(hd, sensors, font)
	ms := math.Max(1.6, lf*0.32)
	for _, i := range order {
		ln := links[i]
		a, b := sensors[ln.A], sensors[ln.B]
		x0, y0 := g.ToPixel(a.X, a.Y)
		x1, y1 := g.ToPixel(b.X, b.Y)
		col := Heath.Hex((ln.R + lim) / (2 * lim))
		wd := width(ln.R)
		tip := a.Name + "–" + b.Name + ": " + opt.ValueName + " = " + fmtTick(ln.R, 0.001)
		if ln.Directed {
			tip = a.Name + " → " + b.Name + ": " + opt.ValueName + " = " + fmtTick(ln.R, 0.001)
		}
		casing := `" stroke="#4a4a4a" stroke-width="` + num(wd+1.1) + `" stroke-linecap="round" fill="none"/>` + "\n"
		if ln.A == ln.B {
			// a loop outside the sensor, away from the head's centre
			rl := ms * 2.6
			cx, cy := hd.centre()
			ox, oy := x0-cx, y0-cy
			if h := math.Hypot(ox, oy); h > 0 {
				ox, oy = ox/h, oy/h
			} else {
				ox, oy = 0.7, 0.7
			}
			lx, ly := x0+ox*rl*1.2, y0+oy*rl*1.2
			d.raw(`<g><title>`, esc(tip), `</title><circle cx="`, num(lx), `" cy="`, num(ly), `" r="`, num(rl), casing)
			d.raw(`<circle cx="`, num(lx), `" cy="`, num(ly), `" r="`, num(rl), `" fill="none" stroke="`, col, `" stroke-width="`, num(wd), `"/></g>`+"\n")
			continue
		}
		dx, dy := x1-x0, y1-y0
		dist := math.Hypot(dx, dy)
		if dist == 0 {
			continue
		}
		ux, uy := dx/dist, dy/dist
		if ln.Directed {
			// a curve bowing to the right of its direction, so that A → B
			// and B → A stay apart, ending in an arrowhead
			bow := dist * 0.16
			qx, qy := (x0+x1)/2-uy*bow, (y0+y1)/2+ux*bow // control point
			// start and end directions of the curve
			sx0, sy0 := qx-x0, qy-y0
			h0 := math.Hypot(sx0, sy0)
			sx0, sy0 = sx0/h0, sy0/h0
			ex0, ey0 := x1-qx, y1-qy
			h1 := math.Hypot(ex0, ey0)
			ex0, ey0 = ex0/h1, ey0/h1
			sx, sy := x0+sx0*ms*1.5, y0+sy0*ms*1.5
			ex, ey := x1-ex0*ms*1.5, y1-ey0*ms*1.5
			ah := 3.5 + wd*1.6 // arrowhead length
			bx, by := ex-ex0*ah, ey-ey0*ah
			curve := "M" + num(sx) + " " + num(sy) + "Q" + num(qx) + " " + num(qy) + " " + num(bx) + " " + num(by)
			hw := ah * 0.55
			head := "M" + num(ex) + " " + num(ey) + "L" + num(bx-ey0*hw) + " " + num(by+ex0*hw) + "L" + num(bx+ey0*hw) + " " + num(by-ex0*hw) + "Z"
			d.raw(`<g><title>`, esc(tip), `</title><path d="`, curve, casing)
			d.raw(`<path d="`, curve, `" stroke="`, col, `" stroke-width="`, num(wd), `" stroke-linecap="round" fill="none"/>`)
			d.raw(`<path d="`, head, `" fill="`, col, `" stroke="#4a4a4a" stroke-width="0.6"/></g>`+"\n")
			continue
		}
		sx, sy := x0+ux*ms*1.4, y0+uy*ms*1.4
		ex, ey := x1-ux*ms*1.4, y1-uy*ms*1.4
		seg := "M" + num(sx) + " " + num(sy) + "L" + num(ex) + " " + num(ey)
		d.raw(`<g><title>`, esc(tip), `</title><path d="`, seg, casing)
		d.raw(`<path d="`, seg, `" stroke="`, col, `" stroke-width="`, num(wd), `" stroke-linecap="round" fill="none"/></g>`+"\n")
	}
	d.electrodes(hd, sensors, ScalpOptions{ValueName: opt.ValueName, Analysis: ""}, false)
	_, cy := hd.centre()
	R := hd.r * hd.scale()
	bg := g
	bg.Top, bg.Height = cy-R, 2*R
	d.colourBar(l, bg, bar)
	// legend: which links, then line widths
	y := l.h - 8 - float64(lines-1)*(font+5)
	what := opt.Legend
	if what == "" {
		what = "lines: every pair"
	}
	d.text(g.Left+g.Width/2, y, "middle", 0, 0, what, "")
	y += font + 5
	var items []float64
	for _, f := range []float64{1.0 / 3, 2.0 / 3, 1} {
		items = append(items, f*lim)
	}
	total := 0.0
	labels := make([]string, len(items))
	for i, v := range items {
		labels[i] = "|" + opt.ValueName + "| = " + fmtSig(v, 2)
		total += 18 + 4 + textWidth(labels[i], font) + 16
	}
	x := math.Max(4, g.Left+g.Width/2-total/2)
	for i, v := range items {
		my := y - font*0.33
		d.raw(`<path d="M`, num(x), " ", num(my), "h18", `" stroke="`, inkColour, `" stroke-width="`, num(width(v)), `" stroke-linecap="round"/>`+"\n")
		d.text(x+22, y, "start", 0, 0, labels[i], "")
		x += 18 + 4 + textWidth(labels[i], font) + 16
	}
	if opt.ArrowNote != "" {
		y += font + 5
		d.text(g.Left+g.Width/2, y, "middle", 0, 0, "arrows: "+opt.ArrowNote, "")
	}
	return d.finish(), g
}
