package plot

import (
	"math"
	"strconv"
	"strings"
)

// Frame holds what every figure has: its title, axis titles with units,
// and its size. The zero value is a 360 × 260 viewBox (about one journal
// column of 3.5 in) with 9-unit tick labels and no titles.
type Frame struct {
	Title         string
	XLabel, XUnit string // axis title "label (unit)"; the unit may be empty
	YLabel, YUnit string
	Width, Height float64 // viewBox size; zero → 360 × 260
	FontSize      float64 // tick-label size in viewBox units; zero → 9 (titles are 1 larger)
}

const (
	defaultW    = 360
	defaultH    = 260
	defaultFont = 9
	tickLen     = 3
	inkColour   = "#222222"
	gridColour  = "#d9d9d9"
)

func (f Frame) size() (w, h, font float64) {
	w, h, font = f.Width, f.Height, f.FontSize
	if !(w > 0) || !finite(w) {
		w = defaultW
	}
	if !(h > 0) || !finite(h) {
		h = defaultH
	}
	if !(font > 0) || !finite(font) {
		font = defaultFont
	}
	return w, h, font
}

// axisTitle is "label (unit)", or just one of them.
func axisTitle(label, unit string) string {
	switch {
	case unit == "":
		return label
	case label == "":
		return unit
	}
	return label + " (" + unit + ")"
}

// num formats a coordinate: strconv 'f' with two decimals, trailing zeros
// trimmed, −0 written as 0. A non-finite coordinate is a bug in this
// package and panics.
func num(v float64) string {
	if !finite(v) {
		panic("plot: non-finite coordinate")
	}
	s := strconv.FormatFloat(v, 'f', 2, 64)
	s = trimZeros(s)
	if s == "-0" {
		s = "0"
	}
	return s
}

func trimZeros(s string) string {
	if strings.IndexByte(s, '.') < 0 {
		return s
	}
	s = strings.TrimRight(s, "0")
	return strings.TrimSuffix(s, ".")
}

// typographic minus for labels
func minus(s string) string {
	if strings.HasPrefix(s, "-") {
		return "\u2212" + s[1:]
	}
	return s
}

// fmtTick formats a linear-axis tick with as many decimals as the step
// needs (step 0.2 → one decimal).
func fmtTick(v, step float64) string {
	dec := 0
	if step > 0 && finite(step) {
		dec = int(math.Ceil(-math.Log10(step) - 1e-9))
	}
	dec = max(0, min(dec, 10))
	s := strconv.FormatFloat(v, 'f', dec, 64)
	if strings.Trim(s, "-0.") == "" {
		return "0"
	}
	return minus(s)
}

// fmtSig formats v with at most sig significant digits, trailing zeros
// trimmed; very small or large magnitudes use "1.5e−5".
func fmtSig(v float64, sig int) string {
	if !finite(v) {
		return "undefined"
	}
	if v == 0 {
		return "0"
	}
	mag := int(math.Floor(math.Log10(math.Abs(v))))
	if mag < -4 || mag >= 6 {
		s := strconv.FormatFloat(v, 'e', sig-1, 64)
		mant, exp, _ := strings.Cut(s, "e")
		mant = trimZeros(mant)
		e, _ := strconv.Atoi(exp)
		return minus(mant) + "e" + minus(strconv.Itoa(e))
	}
	dec := max(0, sig-1-mag)
	s := trimZeros(strconv.FormatFloat(v, 'f', dec, 64))
	if strings.Trim(s, "-0.") == "" {
		return "0"
	}
	return minus(s)
}

// fmtP formats a p-value: two significant digits, and "< 0.0001" below.
func fmtP(p float64) string {
	switch {
	case !finite(p):
		return "p undefined"
	case p < 1e-4:
		return "p < 0.0001"
	}
	return "p = " + fmtSig(p, 2)
}

// textWidth estimates the advance width of s in a generic sans-serif face
// at the given size (average glyph widths of common sans faces).
func textWidth(s string, size float64) float64 {
	w := 0.0
	for _, r := range s {
		switch {
		case r == ' ' || r == '.' || r == ',' || r == ':' || r == 'i' || r == 'l' || r == 'j' || r == '|' || r == '\'':
			w += 0.28
		case r == 'f' || r == 't' || r == 'r' || r == '(' || r == ')' || r == '[' || r == ']' || r == '-':
			w += 0.36
		case r == 'm' || r == 'w' || r == 'M' || r == 'W' || r == '%':
			w += 0.86
		case r >= 'A' && r <= 'Z':
			w += 0.68
		case r == '\u2013' || r == '\u2212' || r == '=' || r == '<' || r == '>' || r == '+':
			w += 0.58
		default:
			w += 0.56
		}
	}
	return w * size
}

// svgDoc accumulates one SVG document.
type svgDoc struct {
	b    strings.Builder
	w, h float64
	font float64
}

func newDoc(w, h, font float64, title string) *svgDoc {
	d := &svgDoc{w: w, h: h, font: font}
	d.b.WriteString(`<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 `)
	d.b.WriteString(num(w) + " " + num(h) + `" width="` + num(w) + `" height="` + num(h))
	d.b.WriteString(`" font-family="sans-serif" font-size="` + num(font) + `" role="img">` + "\n")
	if title != "" {
		d.b.WriteString("<title>" + esc(title) + "</title>\n")
	}
	d.b.WriteString(`<rect x="0" y="0" width="` + num(w) + `" height="` + num(h) + `" fill="#ffffff"/>` + "\n")
	return d
}

func (d *svgDoc) raw(parts ...string) {
	for _, p := range parts {
		d.b.WriteString(p)
	}
}

func (d *svgDoc) finish() string {
	d.b.WriteString("</svg>\n")
	return d.b.String()
}

// text writes a <text> element. anchor is "start", "middle" or "end";
// size 0 inherits the document font size; rotate is in degrees about (x, y).
func (d *svgDoc) text(x, y float64, anchor string, size float64, rotate float64, s string, extra string) {
	d.b.WriteString(`<text x="` + num(x) + `" y="` + num(y) + `"`)
	if anchor != "" && anchor != "start" {
		d.b.WriteString(` text-anchor="` + anchor + `"`)
	}
	if size > 0 && size != d.font {
		d.b.WriteString(` font-size="` + num(size) + `"`)
	}
	if rotate != 0 {
		d.b.WriteString(` transform="rotate(` + num(rotate) + " " + num(x) + " " + num(y) + `)"`)
	}
	d.b.WriteString(extra + ">" + esc(s) + "</text>\n")
}

// esc escapes text and attribute content for XML.
func esc(s string) string {
	var b strings.Builder
	for _, r := range s {
		switch r {
		case '&':
			b.WriteString("&amp;")
		case '<':
			b.WriteString("&lt;")
		case '>':
			b.WriteString("&gt;")
		case '"':
			b.WriteString("&quot;")
		case '\'':
			b.WriteString("&#39;")
		default:
			if r < 0x20 && r != '\t' && r != '\n' {
				b.WriteRune(' ')
				continue
			}
			if r == 0xFFFD || (r >= 0xD800 && r <= 0xDFFF) || r == 0xFFFE || r == 0xFFFF {
				b.WriteRune('?')
				continue
			}
			b.WriteRune(r)
		}
	}
	return b.String()
}

// plotAreaRect writes the frame of the plot area with its geometry as
// data-* attributes, for pages that map pointer positions back to data.
func (d *svgDoc) plotAreaRect(g Geometry) {
	d.raw(`<rect id="plot-area" x="`, num(g.Left), `" y="`, num(g.Top), `" width="`, num(g.Width),
		`" height="`, num(g.Height), `" fill="none" stroke="`, inkColour, `" stroke-width="0.8"`,
		` data-left="`, attrNum(g.Left), `" data-top="`, attrNum(g.Top),
		`" data-width="`, attrNum(g.Width), `" data-height="`, attrNum(g.Height),
		`" data-xmin="`, attrNum(g.XMin), `" data-xmax="`, attrNum(g.XMax),
		`" data-ymin="`, attrNum(g.YMin), `" data-ymax="`, attrNum(g.YMax),
		`" data-xlog="`, strconv.FormatBool(g.XLog), `" data-ylog="`, strconv.FormatBool(g.YLog),
		`" data-view-width="`, attrNum(g.ViewW), `" data-view-height="`, attrNum(g.ViewH), `"/>`+"\n")
}

// attrNum writes a data value for the geometry attributes: up to 6 decimals.
func attrNum(v float64) string {
	if !finite(v) {
		panic("plot: non-finite geometry")
	}
	s := trimZeros(strconv.FormatFloat(v, 'f', 6, 64))
	if s == "-0" {
		s = "0"
	}
	return s
}

// inLogRange reports whether t can be placed on a log axis over [lo, hi].
func inLogRange(t, lo, hi float64) bool {
	return t > 0 && t >= lo*(1-1e-9) && t <= hi*(1+1e-9)
}

// axis describes one numeric axis.
type axis struct {
	lo, hi float64
	log    bool
	ticks  []float64
	labels []string
	title  string
}

func linearAxis(lo, hi float64, inner bool, title string) axis {
	var ticks []float64
	var step float64
	if inner {
		ticks, step = InnerTicks(lo, hi, 5)
	} else {
		ticks, step = NiceTicks(lo, hi, 5)
		if len(ticks) > 0 {
			lo, hi = ticks[0], ticks[len(ticks)-1]
		}
	}
	if len(ticks) == 0 {
		// a range too narrow for nice steps: label its ends
		return axis{lo: lo, hi: hi, ticks: []float64{lo, hi}, labels: []string{fmtSig(lo, 3), fmtSig(hi, 3)}, title: title}
	}
	a := axis{lo: lo, hi: hi, ticks: ticks, title: title}
	for _, t := range ticks {
		a.labels = append(a.labels, fmtTick(t, step))
	}
	return a
}

func logAxis(lo, hi float64, grid []float64, title string) axis {
	a := axis{lo: lo, hi: hi, log: true, title: title}
	for _, t := range LogTicks(lo, hi, grid, 6) {
		if inLogRange(t, lo, hi) {
			a.ticks = append(a.ticks, t)
			a.labels = append(a.labels, fmtSig(t, 3))
		}
	}
	return a
}

// overhang is how far the last tick label reaches right of the axis end
// (labels are centred on their ticks), plus a small gap.
func (a axis) overhang(font float64) float64 {
	if len(a.labels) == 0 {
		return 0
	}
	return textWidth(a.labels[len(a.labels)-1], font)/2 + 3
}

func (a axis) maxLabelWidth(font float64) float64 {
	w := 0.0
	for _, l := range a.labels {
		w = max(w, textWidth(l, font))
	}
	return w
}

// layout holds the margins around the plot area.
type layout struct {
	w, h, font  float64
	titleLines  []string
	left, right float64
	top, bottom float64
	yTitleX     float64 // x of the rotated y-axis title
	hasXTitle   bool
	hasYTitle   bool
	xLabelRoom  float64 // extra room under the x axis (rotated labels)
}

func (l layout) titleFont() float64 { return l.font + 1 }

// newLayout works out margins from the title lines and the widest y tick
// label; right is the room wanted right of the plot area.
func newLayout(fr Frame, titleLines []string, yLabelW float64, right float64) layout {
	w, h, font := fr.size()
	l := layout{w: w, h: h, font: font, titleLines: titleLines}
	tf := l.titleFont()
	l.hasXTitle = axisTitle(fr.XLabel, fr.XUnit) != ""
	l.hasYTitle = axisTitle(fr.YLabel, fr.YUnit) != ""
	l.top = 8
	if len(titleLines) > 0 {
		l.top = 6 + float64(len(titleLines))*(tf+3) + 4
	}
	l.bottom = tickLen + 3 + font + 4
	if l.hasXTitle {
		l.bottom += tf + 3
	}
	l.left = 4 + tickLen + 3 + yLabelW + 4
	if l.hasYTitle {
		l.yTitleX = 4 + tf*0.8
		l.left += tf + 3
	}
	l.right = max(right, 10)
	return l
}

// titleLinesFor splits the title and an optional statistics line so that
// each line fits the figure width.
func titleLinesFor(title, stats string, w, size float64) []string {
	switch {
	case title == "" && stats == "":
		return nil
	case stats == "":
		return []string{title}
	case title == "":
		return []string{stats}
	}
	one := title + " \u2014 " + stats
	if textWidth(one, size) <= w-16 {
		return []string{one}
	}
	return []string{title, stats}
}

func (l layout) geometry(xlo, xhi, ylo, yhi float64, xlog, ylog bool) Geometry {
	return Geometry{
		Left: l.left, Top: l.top,
		Width:  max(l.w-l.left-l.right, 10),
		Height: max(l.h-l.top-l.bottom-l.xLabelRoom, 10),
		XMin:   xlo, XMax: xhi, YMin: ylo, YMax: yhi,
		XLog: xlog, YLog: ylog,
		ViewW: l.w, ViewH: l.h,
	}
}

func (d *svgDoc) titles(l layout) {
	tf := l.titleFont()
	for i, line := range l.titleLines {
		y := 6 + float64(i+1)*(tf+3) - 3
		d.text(l.w/2, y, "middle", tf, 0, line, ` font-weight="600"`)
	}
}

// axes draws ticks, tick labels and axis titles for numeric axes.
func (d *svgDoc) axes(l layout, g Geometry, xa, ya axis) {
	var p strings.Builder
	bottom := g.Top + g.Height
	for _, t := range xa.ticks {
		x := g.px(t)
		p.WriteString("M" + num(x) + " " + num(bottom) + "v" + num(tickLen))
	}
	for _, t := range ya.ticks {
		y := g.py(t)
		p.WriteString("M" + num(g.Left) + " " + num(y) + "h" + num(-tickLen))
	}
	if p.Len() > 0 {
		d.raw(`<path d="`, p.String(), `" stroke="`, inkColour, `" stroke-width="0.8" fill="none"/>`+"\n")
	}
	for i, t := range xa.ticks {
		d.text(g.px(t), bottom+tickLen+2+l.font*0.85, "middle", 0, 0, xa.labels[i], "")
	}
	for i, t := range ya.ticks {
		d.text(g.Left-tickLen-3, g.py(t)+l.font*0.35, "end", 0, 0, ya.labels[i], "")
	}
	d.axisTitles(l, g, xa.title, ya.title)
}

func (d *svgDoc) axisTitles(l layout, g Geometry, xt, yt string) {
	tf := l.titleFont()
	if xt != "" {
		d.text(g.Left+g.Width/2, l.h-5, "middle", tf, 0, xt, "")
	}
	if yt != "" {
		d.text(l.yTitleX, g.Top+g.Height/2, "middle", tf, -90, yt, "")
	}
}

// colourBar is a vertical colour scale right of the plot area.
type colourBar struct {
	scale  *Scale
	lo, hi float64 // data values at t = 0 and t = 1
	log    bool
	ticks  []float64
	labels []string
	title  string
}

const (
	barGap   = 10
	barWidth = 9
)

func newColourBar(s *Scale, lo, hi float64, log bool, title string) colourBar {
	c := colourBar{scale: s, lo: lo, hi: hi, log: log, title: title}
	if log {
		for _, t := range LogTicks(lo, hi, nil, 5) {
			if inLogRange(t, lo, hi) {
				c.ticks = append(c.ticks, t)
				c.labels = append(c.labels, fmtSig(t, 2))
			}
		}
		return c
	}
	var step float64
	c.ticks, step = InnerTicks(lo, hi, 5)
	for _, t := range c.ticks {
		c.labels = append(c.labels, fmtTick(t, step))
	}
	return c
}

// room is the width the bar needs right of the plot area.
func (c colourBar) room(font float64) float64 {
	w := 0.0
	for _, l := range c.labels {
		w = max(w, textWidth(l, font))
	}
	r := barGap + barWidth + tickLen + 2 + w + 6
	if c.title != "" {
		r += font + 1 + 4
	}
	return r
}

// t maps a value to [0, 1] along the bar.
func (c colourBar) t(v float64) float64 {
	if c.log {
		return (math.Log10(v) - math.Log10(c.lo)) / (math.Log10(c.hi) - math.Log10(c.lo))
	}
	return (v - c.lo) / (c.hi - c.lo)
}

func (d *svgDoc) colourBar(l layout, g Geometry, c colourBar) {
	x := g.Left + g.Width + barGap
	const steps = 64
	h := g.Height / steps
	for i := 0; i < steps; i++ {
		t := (float64(i) + 0.5) / steps
		y := g.Top + g.Height - float64(i+1)*h
		hh := h + 0.4
		if i == steps-1 {
			hh = h
		}
		d.raw(`<rect x="`, num(x), `" y="`, num(y), `" width="`, num(barWidth), `" height="`, num(hh),
			`" fill="`, c.scale.Hex(t), `"/>`+"\n")
	}
	d.raw(`<rect x="`, num(x), `" y="`, num(g.Top), `" width="`, num(barWidth), `" height="`, num(g.Height),
		`" fill="none" stroke="`, inkColour, `" stroke-width="0.6"/>`+"\n")
	var p strings.Builder
	wmax := 0.0
	for i, v := range c.ticks {
		y := g.Top + g.Height*(1-c.t(v))
		p.WriteString("M" + num(x+barWidth) + " " + num(y) + "h" + num(tickLen))
		d.text(x+barWidth+tickLen+2, y+l.font*0.35, "start", 0, 0, c.labels[i], "")
		wmax = max(wmax, textWidth(c.labels[i], l.font))
	}
	if p.Len() > 0 {
		d.raw(`<path d="`, p.String(), `" stroke="`, inkColour, `" stroke-width="0.6" fill="none"/>`+"\n")
	}
	if c.title != "" {
		tx := x + barWidth + tickLen + 2 + wmax + 4 + l.titleFont()*0.8
		d.text(tx, g.Top+g.Height/2, "middle", l.titleFont(), -90, c.title, "")
	}
}
