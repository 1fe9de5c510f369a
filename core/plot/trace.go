package plot

import (
	"math"
	"strings"
)

// EnvelopeOptions configures EnvelopeTrace. The zero value names the
// traces "A" and "B" and titles the axes "time (s)" and "amplitude".
type EnvelopeOptions struct {
	Frame
	NameA, NameB string // legend entries
}

// maxTracePoints is the most samples a trace draws as they are; longer
// traces keep the minimum and maximum of each of maxTracePoints/2 buckets,
// so peaks survive.
const maxTracePoints = 1000

// EnvelopeTrace draws two envelopes over time: a[k] and b[k] at times[k]
// (s). A is a solid violet line (LineA), B a dashed dark-gold one (LineB),
// so the two stay apart in greyscale. NaN samples break the line. The value axis includes
// 0 when no value is negative. It panics when the lengths differ.
func EnvelopeTrace(times, a, b []float64, opt EnvelopeOptions) (string, Geometry) {
	if len(a) != len(times) || len(b) != len(times) {
		panic("plot: EnvelopeTrace lengths differ")
	}
	opt.Frame.defaults("time", "s", "amplitude", "")
	if opt.NameA == "" {
		opt.NameA = "A"
	}
	if opt.NameB == "" {
		opt.NameB = "B"
	}
	tlo, thi := math.Inf(1), math.Inf(-1)
	vlo, vhi := math.Inf(1), math.Inf(-1)
	for k, t := range times {
		if !finite(t) {
			continue
		}
		tlo, thi = math.Min(tlo, t), math.Max(thi, t)
		for _, v := range [2]float64{a[k], b[k]} {
			if finite(v) {
				vlo, vhi = math.Min(vlo, v), math.Max(vhi, v)
			}
		}
	}
	if tlo > thi {
		tlo, thi = 0, 1
	} else if flat(tlo, thi) {
		tlo, thi = widen(tlo)
	}
	if vlo > vhi {
		vlo, vhi = 0, 1
	}
	if vlo >= 0 {
		vlo = 0
	}
	xa := linearAxis(tlo, thi, true, axisTitle(opt.XLabel, opt.XUnit))
	ya := linearAxis(vlo, vhi, false, axisTitle(opt.YLabel, opt.YUnit))
	w, _, font := opt.Frame.size()
	titles := titleLinesFor(opt.Title, "", w, font+1)
	l := newLayout(opt.Frame, titles, ya.maxLabelWidth(font), xa.overhang(font))
	l.top += font + 4 // legend row
	g := l.geometry(xa.lo, xa.hi, ya.lo, ya.hi, false, false)
	d := newDoc(l.w, l.h, l.font, opt.Title)
	d.titles(l)
	d.gridLines(g, xa, ya)
	type style struct{ colour, dash, name string }
	styles := [2]style{{LineA, "", opt.NameA}, {LineB, "4.5 2.5", opt.NameB}}
	for s, v := range [2][]float64{a, b} {
		p := tracePath(g, times, v)
		if p == "" {
			continue
		}
		dash := ""
		if styles[s].dash != "" {
			dash = ` stroke-dasharray="` + styles[s].dash + `"`
		}
		d.raw(`<path d="`, p, `" fill="none" stroke="`, styles[s].colour, `" stroke-width="1.2" stroke-linejoin="round"`, dash, "/>\n")
	}
	d.plotAreaRect(g)
	d.axes(l, g, xa, ya)
	// legend, right-aligned above the plot area
	x := g.Left + g.Width
	y := g.Top - 5
	for s := 1; s >= 0; s-- {
		st := styles[s]
		// the label's width is an estimate: leave room for a wider font
		// (or wider glyphs such as ⊥), so the swatch never runs into it
		tw := textWidth(st.name, font) * 1.15
		d.text(x, y, "end", 0, 0, st.name, "")
		x -= tw + 8
		dash := ""
		if st.dash != "" {
			dash = ` stroke-dasharray="` + st.dash + `"`
		}
		d.raw(`<path d="M`, num(x-18), " ", num(y-font*0.32), "h18", `" stroke="`, st.colour, `" stroke-width="1.4"`, dash, "/>\n")
		x -= 18 + 10
	}
	return d.finish(), g
}

// tracePath is the polyline of v over t, broken at non-finite samples, and
// min/max-decimated when long.
func tracePath(g Geometry, t, v []float64) string {
	idx := make([]int, 0, min(len(t), maxTracePoints))
	if len(t) <= maxTracePoints {
		for k := range t {
			idx = append(idx, k)
		}
	} else {
		nb := maxTracePoints / 2
		for bkt := 0; bkt < nb; bkt++ {
			s, e := bkt*len(t)/nb, (bkt+1)*len(t)/nb
			lo, hi := -1, -1
			for k := s; k < e; k++ {
				if !finite(v[k]) || !finite(t[k]) {
					// keep a break in the line
					if lo >= 0 {
						idx = appendPair(idx, lo, hi)
						lo, hi = -1, -1
					}
					idx = append(idx, k)
					continue
				}
				if lo < 0 || v[k] < v[lo] {
					lo = k
				}
				if hi < 0 || v[k] > v[hi] {
					hi = k
				}
			}
			if lo >= 0 {
				idx = appendPair(idx, lo, hi)
			}
		}
	}
	var b strings.Builder
	pen := false
	for _, k := range idx {
		if !finite(v[k]) || !finite(t[k]) {
			pen = false
			continue
		}
		px, py := g.ToPixel(t[k], v[k])
		if pen {
			b.WriteString("L")
		} else {
			b.WriteString("M")
			pen = true
		}
		b.WriteString(num(px) + " " + num(py))
	}
	return b.String()
}

func appendPair(idx []int, lo, hi int) []int {
	switch {
	case lo == hi:
		return append(idx, lo)
	case lo < hi:
		return append(idx, lo, hi)
	}
	return append(idx, hi, lo)
}

// Interval is a group summary: a mean with its interval, e.g. a 95 %
// confidence interval.
type Interval struct {
	Mean, Lo, Hi float64
	Label        string // row label; zero → "group mean"
	Note         string // e.g. "95% CI"; shown after the row label when set
}

// GroupDotsOptions configures GroupDots. The zero value titles the value
// axis "r" and draws no group row.
type GroupDotsOptions struct {
	Frame // XLabel/XUnit title the value axis; YLabel titles the rows
	Group *Interval
}

// GroupDots draws one labelled dot per recording (values[i] for
// labels[i], one row each, top to bottom) and, when Group is set, a
// last row with the group mean (diamond) and its interval (line with
// whiskers), plus a dashed line at the mean across all rows and a grey
// line at 0. A NaN value shows as "undefined" in its row. The geometry
// uses x in value units and y in row units (row i spans [i, i+1], row 0
// at the top). It panics when the lengths differ.
func GroupDots(labels []string, values []float64, opt GroupDotsOptions) (string, Geometry) {
	if len(labels) != len(values) {
		panic("plot: GroupDots labels and values differ in length")
	}
	if opt.XLabel == "" && opt.XUnit == "" {
		opt.XLabel = "r"
	}
	rowLabels := append([]string(nil), labels...)
	grp := opt.Group
	if grp != nil {
		gl := grp.Label
		if gl == "" {
			gl = "group mean"
		}
		if grp.Note != "" {
			gl += " (" + grp.Note + ")"
		}
		rowLabels = append(rowLabels, gl)
	}
	rows := len(rowLabels)
	lo, hi := 0.0, 0.0 // include 0
	for _, v := range values {
		if finite(v) {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	if grp != nil {
		for _, v := range [3]float64{grp.Mean, grp.Lo, grp.Hi} {
			if finite(v) {
				lo, hi = math.Min(lo, v), math.Max(hi, v)
			}
		}
	}
	plo, phi := padRange([]float64{lo, hi})
	xa := linearAxis(plo, phi, false, axisTitle(opt.XLabel, opt.XUnit))
	w, h, font := opt.Frame.size()
	labW := 0.0
	for _, s := range rowLabels {
		labW = max(labW, textWidth(s, font))
	}
	fr := opt.Frame
	fr.YUnit = ""
	l := newLayout(fr, titleLinesFor(opt.Title, "", w, font+1), labW, xa.overhang(font))
	g := l.geometry(xa.lo, xa.hi, float64(max(rows, 1)), 0, false, false)
	rowH := g.Height / float64(max(rows, 1))
	lf := math.Min(font, math.Max(rowH*0.9, 5))
	if lf < font {
		// smaller row labels need less room
		l = newLayout(fr, l.titleLines, labW*lf/font, xa.overhang(font))
		g = l.geometry(xa.lo, xa.hi, float64(max(rows, 1)), 0, false, false)
	}
	stride := max(1, int(math.Ceil(lf/(rowH*0.95))))
	d := newDoc(w, h, font, opt.Title)
	d.titles(l)
	d.gridLines(g, xa, axis{})
	zx := g.px(0)
	d.raw(`<path d="M`, num(zx), " ", num(g.Top), "v", num(g.Height), `" stroke="#8c8c8c" stroke-width="0.8" fill="none"/>`+"\n")
	cy := func(i int) float64 { return g.py(float64(i) + 0.5) }
	if grp != nil && finite(grp.Mean) {
		mx := g.px(grp.Mean)
		d.raw(`<path d="M`, num(mx), " ", num(g.Top), "v", num(g.Height), `" stroke="`, LineB, `" stroke-width="0.8" stroke-dasharray="3 2" fill="none"/>`+"\n")
	}
	if grp != nil && len(values) > 0 {
		sy := g.py(float64(len(values)))
		d.raw(`<path d="M`, num(g.Left), " ", num(sy), "h", num(g.Width), `" stroke="#bdbdbd" stroke-width="0.6" fill="none"/>`+"\n")
	}
	r := math.Min(2.8, math.Max(rowH*0.3, 1.2))
	d.raw(`<g fill="`, LineA, `" stroke="#ffffff" stroke-width="0.5">`+"\n")
	for i, v := range values {
		if !finite(v) {
			continue
		}
		d.raw(`<circle cx="`, num(g.px(v)), `" cy="`, num(cy(i)), `" r="`, num(r), `"><title>`,
			esc(labels[i]+": "+axisTitle(opt.XLabel, "")+" = "+fmtTick(v, 0.001)), "</title></circle>\n")
	}
	d.raw("</g>\n")
	for i, v := range values {
		if !finite(v) {
			d.text(g.Left+3, cy(i)+lf*0.35, "start", lf, 0, "undefined", ` fill="#666666" font-style="italic"`)
		}
	}
	if grp != nil {
		y := cy(rows - 1)
		var p strings.Builder
		if finite(grp.Lo) && finite(grp.Hi) {
			x0, x1 := g.px(grp.Lo), g.px(grp.Hi)
			c := math.Min(rowH*0.3, 4)
			p.WriteString("M" + num(x0) + " " + num(y) + "H" + num(x1))
			p.WriteString("M" + num(x0) + " " + num(y-c) + "v" + num(2*c))
			p.WriteString("M" + num(x1) + " " + num(y-c) + "v" + num(2*c))
			d.raw(`<path d="`, p.String(), `" stroke="#222222" stroke-width="1.2" fill="none"/>`+"\n")
		}
		if finite(grp.Mean) {
			mx := g.px(grp.Mean)
			s := math.Min(3.6, math.Max(rowH*0.35, 1.6))
			tip := "mean " + fmtTick(grp.Mean, 0.001)
			if finite(grp.Lo) && finite(grp.Hi) {
				tip += ", interval " + fmtTick(grp.Lo, 0.001) + " to " + fmtTick(grp.Hi, 0.001)
			}
			d.raw(`<path d="M`, num(mx), " ", num(y-s), "l", num(s), " ", num(s), "l", num(-s), " ", num(s), "l", num(-s), " ", num(-s), `z" fill="`, LineB, `" stroke="#222222" stroke-width="0.6"><title>`, esc(tip), "</title></path>\n")
		} else {
			d.text(g.Left+3, y+lf*0.35, "start", lf, 0, "undefined", ` fill="#666666" font-style="italic"`)
		}
	}
	d.plotAreaRect(g)
	// value axis
	var p strings.Builder
	bottom := g.Top + g.Height
	for _, t := range xa.ticks {
		p.WriteString("M" + num(g.px(t)) + " " + num(bottom) + "v" + num(tickLen))
	}
	d.raw(`<path d="`, p.String(), `" stroke="`, inkColour, `" stroke-width="0.8" fill="none"/>`+"\n")
	for i, t := range xa.ticks {
		d.text(g.px(t), bottom+tickLen+2+font*0.85, "middle", 0, 0, xa.labels[i], "")
	}
	// row labels
	for i := 0; i < rows; i += stride {
		d.text(g.Left-4, cy(i)+lf*0.35, "end", lf, 0, rowLabels[i], "")
	}
	if grp != nil && (rows-1)%stride != 0 {
		d.text(g.Left-4, cy(rows-1)+lf*0.35, "end", lf, 0, rowLabels[rows-1], "")
	}
	d.axisTitles(l, g, xa.title, opt.YLabel)
	return d.finish(), g
}
