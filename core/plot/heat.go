package plot

import (
	"math"
	"strconv"
	"strings"
)

// AxisScale chooses a linear or logarithmic axis.
type AxisScale int

const (
	// AxisAuto is logarithmic when the grid is geometric (constant ratio,
	// three or more positive values) and linear otherwise.
	AxisAuto AxisScale = iota
	AxisLinear
	AxisLog
)

func (s AxisScale) isLog(grid []float64) bool {
	switch s {
	case AxisLinear:
		return false
	case AxisLog:
		return len(grid) > 0 && grid[0] > 0
	}
	return isGeometric(grid)
}

// isGeometric reports whether grid has ≥ 3 positive values with a constant
// ratio (relative spread < 1e-3) other than 1.
func isGeometric(grid []float64) bool {
	if len(grid) < 3 || !(grid[0] > 0) {
		return false
	}
	r := grid[1] / grid[0]
	if !(r > 1) {
		return false
	}
	for i := 2; i < len(grid); i++ {
		if math.Abs(grid[i]/grid[i-1]/r-1) > 1e-3 {
			return false
		}
	}
	return true
}

// CellEdges returns the len(c)+1 boundaries of cells centred on the
// strictly increasing values c: arithmetic midpoints (c_i + c_{i+1})/2 on
// a linear axis, geometric midpoints √(c_i·c_{i+1}) on a log axis, and the
// outer edges mirrored (c_0 − (c_1 − c_0)/2, or c_0/√(c_1/c_0)). A single
// value gets c ± 0.5, or c/√2…c·√2 on a log axis. It panics when c is
// empty, not strictly increasing or (log) not positive: grids are made by
// the program, not read from files.
func CellEdges(c []float64, log bool) []float64 {
	if len(c) == 0 {
		panic("plot: empty grid")
	}
	for i, v := range c {
		if !finite(v) || (log && v <= 0) || (i > 0 && !(v > c[i-1])) {
			panic("plot: grid not finite, strictly increasing (and positive on a log axis)")
		}
	}
	e := make([]float64, len(c)+1)
	if len(c) == 1 {
		if log {
			e[0], e[1] = c[0]/math.Sqrt2, c[0]*math.Sqrt2
		} else {
			e[0], e[1] = c[0]-0.5, c[0]+0.5
		}
		return e
	}
	n := len(c)
	for i := 1; i < n; i++ {
		if log {
			e[i] = math.Sqrt(c[i-1] * c[i])
		} else {
			e[i] = (c[i-1] + c[i]) / 2
		}
	}
	if log {
		e[0] = c[0] * c[0] / e[1]
		e[n] = c[n-1] * c[n-1] / e[n-1]
	} else {
		e[0] = 2*c[0] - e[1]
		e[n] = 2*c[n-1] - e[n-1]
	}
	return e
}

func checkMatrix(m [][]float64, rows, cols int, what string) {
	if len(m) != rows {
		panic("plot: " + what + " has " + strconv.Itoa(len(m)) + " rows, want " + strconv.Itoa(rows))
	}
	for _, r := range m {
		if len(r) != cols {
			panic("plot: " + what + " row has " + strconv.Itoa(len(r)) + " columns, want " + strconv.Itoa(cols))
		}
	}
}

// maxHeatCols is the most columns a heat map draws; wider maps are
// averaged into this many bins.
const maxHeatCols = 400

// seamOverlap is how far (viewBox units) a cell reaches under its right
// and lower neighbours, so anti-aliasing leaves no hairline between them.
const seamOverlap = 0.3

// decimate averages columns into at most maxHeatCols bins (finite values
// only; a bin with none is NaN) and returns the bins' edges.
func decimate(vals [][]float64, xe []float64) ([][]float64, []float64) {
	nx := len(xe) - 1
	if nx <= maxHeatCols {
		return vals, xe
	}
	nb := maxHeatCols
	start := func(k int) int { return k * nx / nb }
	ne := make([]float64, nb+1)
	for k := 0; k <= nb; k++ {
		ne[k] = xe[start(k)]
	}
	out := make([][]float64, len(vals))
	for i, row := range vals {
		o := make([]float64, nb)
		for k := 0; k < nb; k++ {
			s, c := 0.0, 0
			for j := start(k); j < start(k+1); j++ {
				if finite(row[j]) {
					s += row[j]
					c++
				}
			}
			if c == 0 {
				o[k] = math.NaN()
			} else {
				o[k] = s / float64(c)
			}
		}
		out[i] = o
	}
	return out, ne
}

// heatmap draws vals[i][j] as cells spanning xe[j]…xe[j+1] by ye[i]…ye[i+1]
// (data units). index maps a value to a table entry of s, or −1 for an
// undefined cell (grey). Cells of one colour share one path, and equal
// neighbours along a row merge into one run.
func (d *svgDoc) heatmap(g Geometry, xe, ye []float64, vals [][]float64, s *Scale, index func(float64) int) {
	vals, xe = decimate(vals, xe)
	xp := make([]float64, len(xe))
	for j, x := range xe {
		xp[j] = g.px(x)
	}
	if len(vals) > 0 && len(vals)*len(vals[0]) > rasterCells {
		yp := make([]float64, len(ye))
		for i, y := range ye {
			yp[i] = g.py(y)
		}
		d.rasterHeatmap(g, xp, yp, vals, s, index)
		return
	}
	var paths [lutSize + 1]strings.Builder
	for i, row := range vals {
		y0, y1 := g.py(ye[i]), g.py(ye[i+1])
		top, h := math.Min(y0, y1), math.Abs(y1-y0)
		if top+h < g.Top+g.Height-0.01 {
			h += seamOverlap // cover the anti-aliased seam to the row below
		}
		for j := 0; j < len(row); {
			k := index(row[j])
			e := j + 1
			for e < len(row) && index(row[e]) == k {
				e++
			}
			b := &paths[k+1]
			w := xp[e] - xp[j]
			if e < len(row) {
				w += seamOverlap
			}
			b.WriteString("M" + num(xp[j]) + " " + num(top) + "h" + num(w) + "v" + num(h) + "h" + num(-w) + "z")
			j = e
		}
	}
	// crispEdges plus the overlap keeps Chromium from leaving light seams
	// between cells; renderers that ignore the hint still get the overlap.
	d.raw(`<g shape-rendering="crispEdges">` + "\n")
	for k := range paths {
		if paths[k].Len() == 0 {
			continue
		}
		fill := undefinedFill
		if k > 0 {
			fill = s.lut[k-1]
		}
		d.raw(`<path fill="`, fill, `" d="`, paths[k].String(), `"/>`+"\n")
	}
	d.raw("</g>\n")
}

// colourMap maps values to a scale's table.
type colourMap struct {
	lo, hi float64
	log    bool
}

// newColourMap picks limits: lim[0] < lim[1] (both > 0 on a log scale)
// are used as given; otherwise the range of the finite (positive, on a
// log scale) values; a flat range is widened.
func newColourMap(vals [][]float64, lo, hi float64, log bool) colourMap {
	if !(finite(lo) && finite(hi) && hi > lo && (!log || lo > 0)) {
		lo, hi = math.Inf(1), math.Inf(-1)
		for _, r := range vals {
			for _, v := range r {
				if finite(v) && (!log || v > 0) {
					lo, hi = math.Min(lo, v), math.Max(hi, v)
				}
			}
		}
		if lo > hi {
			lo, hi = 0, 1
			if log {
				lo, hi = 1, 10
			}
		}
	}
	if flat(lo, hi) {
		if log {
			lo, hi = lo/2, hi*2
		} else {
			lo, hi = widen(lo)
		}
	}
	if !(hi > lo) || (log && !(math.Log10(hi) > math.Log10(lo))) {
		lo, hi = 0, 1
		if log {
			lo, hi = 1, 10
		}
	}
	return colourMap{lo: lo, hi: hi, log: log}
}

// index is the table entry of v: t = (v − lo)/(hi − lo), or with log
// t = (log10 v − log10 lo)/(log10 hi − log10 lo), clamped to [0, 1]; on a
// log scale v ≤ 0 takes the lowest colour. NaN and ±Inf are undefined (−1).
func (c colourMap) index(v float64) int {
	if !finite(v) {
		return -1
	}
	var t float64
	if c.log {
		if v <= 0 {
			return 0
		}
		t = (math.Log10(v) - math.Log10(c.lo)) / (math.Log10(c.hi) - math.Log10(c.lo))
	} else {
		t = (v - c.lo) / (c.hi - c.lo)
	}
	return lutIndex(t)
}

// symLimit is the given limit if positive and finite, else max|v| over
// the finite values, else 1.
func symLimit(vals [][]float64, limit float64) float64 {
	if finite(limit) && limit > 0 {
		return limit
	}
	m := 0.0
	for _, r := range vals {
		for _, v := range r {
			if finite(v) {
				m = math.Max(m, math.Abs(v))
			}
		}
	}
	if m == 0 {
		return 1
	}
	return m
}

// heatFigure is the common frame of the time/frequency maps.
type heatFigure struct {
	fr         Frame
	xc, yc     []float64 // cell centres
	xlog, ylog bool
	vals       [][]float64 // [row = y][col = x]
	scale      *Scale
	cmap       colourMap
	barTitle   string
	statsLine  string
}

// draw writes the map, axes and colour bar; after is called with the
// geometry to add overlays before the frame is drawn.
func (h heatFigure) draw(after func(d *svgDoc, g Geometry, xe, ye []float64)) (string, Geometry) {
	xe := CellEdges(h.xc, h.xlog)
	ye := CellEdges(h.yc, h.ylog)
	w, _, font := h.fr.size()
	xt := axisTitle(h.fr.XLabel, h.fr.XUnit)
	yt := axisTitle(h.fr.YLabel, h.fr.YUnit)
	var xa, ya axis
	if h.xlog {
		xa = logAxis(xe[0], xe[len(xe)-1], h.xc, xt)
	} else {
		xa = linearAxis(xe[0], xe[len(xe)-1], true, xt)
	}
	if h.ylog {
		ya = logAxis(ye[0], ye[len(ye)-1], h.yc, yt)
	} else {
		ya = linearAxis(ye[0], ye[len(ye)-1], true, yt)
	}
	bar := newColourBar(h.scale, h.cmap.lo, h.cmap.hi, h.cmap.log, h.barTitle)
	l := newLayout(h.fr, titleLinesFor(h.fr.Title, h.statsLine, w, font+1), ya.maxLabelWidth(font), bar.room(font))
	g := l.geometry(xa.lo, xa.hi, ya.lo, ya.hi, h.xlog, h.ylog)
	d := newDoc(l.w, l.h, l.font, h.fr.Title)
	d.titles(l)
	d.heatmap(g, xe, ye, h.vals, h.scale, h.cmap.index)
	if after != nil {
		after(d, g, xe, ye)
	}
	d.plotAreaRect(g)
	d.axes(l, g, xa, ya)
	d.colourBar(l, g, bar)
	return d.finish(), g
}
