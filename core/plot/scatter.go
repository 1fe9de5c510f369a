package plot

import (
	"math"
	"sort"
	"strconv"
	"strings"
)

// Stat is a correlation to print in a figure's title.
type Stat struct {
	Name string  // e.g. "r" or "ρ"; zero → "r"
	R, P float64 // NaN prints as undefined
	N    int
}

func (s *Stat) line() string {
	if s == nil {
		return ""
	}
	name := s.Name
	if name == "" {
		name = "r"
	}
	r := name + " undefined"
	if finite(s.R) {
		r = name + " = " + fmtTick(s.R, 0.001)
	}
	return r + ", " + fmtP(s.P) + ", n = " + strconv.Itoa(s.N)
}

// ScatterOptions configures Scatter. The zero value plots raw values with
// no statistics line.
type ScatterOptions struct {
	Frame
	Ranks  bool     // plot average ranks (1…n, ties share their mean rank); axis titles say "rank"
	Stat   *Stat    // r, p and n for the title; nil → none
	Labels []string // optional per-point tooltip, e.g. "trial 12"; len must match x when set
}

// Scatter draws one point per pair (x[i], y[i]), such as seed-window
// against target-window power across trials. Pairs with a NaN or ±Inf are
// left out. The axis ranges are padded nice ranges around all points, so
// no point is clipped. Points are semi-transparent so overlaps darken.
// It panics when x and y (or Labels) differ in length.
func Scatter(x, y []float64, opt ScatterOptions) (string, Geometry) {
	if len(x) != len(y) {
		panic("plot: Scatter x and y differ in length")
	}
	if opt.Labels != nil && len(opt.Labels) != len(x) {
		panic("plot: Scatter labels do not match points")
	}
	var xs, ys []float64
	var idx []int
	for i := range x {
		if finite(x[i]) && finite(y[i]) {
			xs, ys, idx = append(xs, x[i]), append(ys, y[i]), append(idx, i)
		}
	}
	if opt.Ranks {
		xs, ys = AverageRanks(nil, xs), AverageRanks(nil, ys)
	}
	xt := axisTitle(opt.XLabel, opt.XUnit)
	yt := axisTitle(opt.YLabel, opt.YUnit)
	if opt.Ranks {
		xt, yt = rankTitle(opt.XLabel), rankTitle(opt.YLabel)
	}
	var xa, ya axis
	if opt.Ranks {
		// ranks lie in [1, n]: show 0 … n+1 with ticks inside
		top := float64(len(xs) + 1)
		xa, ya = linearAxis(0, top, true, xt), linearAxis(0, top, true, yt)
	} else {
		xlo, xhi := padRange(xs)
		ylo, yhi := padRange(ys)
		xa, ya = linearAxis(xlo, xhi, false, xt), linearAxis(ylo, yhi, false, yt)
	}
	w, _, font := opt.Frame.size()
	fr := opt.Frame
	fr.XLabel, fr.XUnit, fr.YLabel, fr.YUnit = xt, "", yt, ""
	l := newLayout(fr, titleLinesFor(opt.Title, opt.Stat.line(), w, font+1), ya.maxLabelWidth(font), xa.overhang(font))
	g := l.geometry(xa.lo, xa.hi, ya.lo, ya.hi, false, false)
	d := newDoc(l.w, l.h, l.font, opt.Title)
	d.titles(l)
	d.gridLines(g, xa, ya)
	if len(xs) == 0 {
		d.text(g.Left+g.Width/2, g.Top+g.Height/2, "middle", 0, 0, "no finite pairs", ` fill="#666666"`)
	}
	d.fitLine(g, xs, ys)
	d.raw(`<g fill="`, LineA, `" fill-opacity="0.45" stroke="`, lineAEdge, `" stroke-opacity="0.8" stroke-width="0.5">`+"\n")
	for k := range xs {
		px, py := g.ToPixel(xs[k], ys[k])
		d.raw(`<circle cx="`, num(px), `" cy="`, num(py), `" r="2.3"`)
		if opt.Labels != nil {
			i := idx[k]
			d.raw("><title>", esc(opt.Labels[i]+": "+fmtSig(x[i], 4)+", "+fmtSig(y[i], 4)), "</title></circle>\n")
		} else {
			d.raw("/>\n")
		}
	}
	d.raw("</g>\n")
	d.plotAreaRect(g)
	d.axes(l, g, xa, ya)
	return d.finish(), g
}

func rankTitle(label string) string {
	if label == "" {
		return "rank"
	}
	return label + " (rank)"
}

// padRange is [min − 4 %, max + 4 %] of the finite values; one value or
// none gives a unit range around it.
func padRange(v []float64) (lo, hi float64) {
	if len(v) == 0 {
		return 0, 1
	}
	lo, hi = v[0], v[0]
	for _, x := range v {
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	if flat(lo, hi) {
		return widen(lo)
	}
	p := (hi - lo) * 0.04
	return lo - p, hi + p
}

// gridLines draws light lines at the ticks inside the plot area.
func (d *svgDoc) gridLines(g Geometry, xa, ya axis) {
	var p strings.Builder
	for _, t := range xa.ticks {
		x := g.px(t)
		if x > g.Left+0.5 && x < g.Left+g.Width-0.5 {
			p.WriteString("M" + num(x) + " " + num(g.Top) + "v" + num(g.Height))
		}
	}
	for _, t := range ya.ticks {
		y := g.py(t)
		if y > g.Top+0.5 && y < g.Top+g.Height-0.5 {
			p.WriteString("M" + num(g.Left) + " " + num(y) + "h" + num(g.Width))
		}
	}
	if p.Len() > 0 {
		d.raw(`<path d="`, p.String(), `" stroke="`, gridColour, `" stroke-width="0.5" fill="none"/>`+"\n")
	}
}

// AverageRanks writes the ranks of x into dst (allocated when nil or too
// short): rank 1 for the smallest value, and tied values all get the mean
// of the ranks they span. NaN values are ranked last, in input order.
func AverageRanks(dst, x []float64) []float64 {
	if len(dst) < len(x) {
		dst = make([]float64, len(x))
	}
	dst = dst[:len(x)]
	ord := make([]int, len(x))
	for i := range ord {
		ord[i] = i
	}
	sort.SliceStable(ord, func(a, b int) bool {
		xa, xb := x[ord[a]], x[ord[b]]
		if math.IsNaN(xb) {
			return !math.IsNaN(xa)
		}
		return xa < xb
	})
	for i := 0; i < len(ord); {
		j := i + 1
		for j < len(ord) && x[ord[j]] == x[ord[i]] {
			j++
		}
		r := float64(i+j+1) / 2 // mean of ranks i+1 … j
		for k := i; k < j; k++ {
			dst[ord[k]] = r
		}
		i = j
	}
	return dst
}

// fitLine draws the least-squares line of y on x across the plot area,
//
//	y = ȳ + b·(x − x̄),  b = Σ(x − x̄)(y − ȳ) / Σ(x − x̄)²
//
// (on the ranks when the points are ranks), so the direction and strength
// of the relation are seen at once. With fewer than three points, or x
// constant, there is no line.
func (d *svgDoc) fitLine(g Geometry, xs, ys []float64) {
	n := float64(len(xs))
	if len(xs) < 3 {
		return
	}
	var mx, my float64
	for i := range xs {
		mx += xs[i]
		my += ys[i]
	}
	mx, my = mx/n, my/n
	var sxy, sxx float64
	for i := range xs {
		sxy += (xs[i] - mx) * (ys[i] - my)
		sxx += (xs[i] - mx) * (xs[i] - mx)
	}
	if sxx == 0 || !finite(sxy/sxx) {
		return
	}
	b := sxy / sxx
	// clip to the plot area: x from XMin to XMax, then y into [YMin, YMax]
	x0, x1 := g.XMin, g.XMax
	at := func(x float64) float64 { return my + b*(x-mx) }
	clip := func(x float64) float64 {
		y := at(x)
		switch {
		case y > g.YMax:
			return mx + (g.YMax-my)/b
		case y < g.YMin:
			return mx + (g.YMin-my)/b
		}
		return x
	}
	x0, x1 = clip(x0), clip(x1)
	px0, py0 := g.ToPixel(x0, at(x0))
	px1, py1 := g.ToPixel(x1, at(x1))
	d.raw(`<line x1="`, num(px0), `" y1="`, num(py0), `" x2="`, num(px1), `" y2="`, num(py1),
		`" stroke="#b5761a" stroke-width="1.6"><title>least-squares line, slope `, fmtSig(b, 3), `</title></line>`+"\n")
}
