package plot

import (
	"math"
	"strings"
)

// MatrixOptions configures Matrix. The zero value uses ±max|v| as colour
// limits and the value name "r".
type MatrixOptions struct {
	Frame             // XLabel/YLabel name the axes (e.g. "target", "seed"); units are unused
	Limit     float64 // colour limits ±Limit; zero → max|v|
	ValueName string  // in cell titles and on the colour bar; zero → "r"
	// Significant marks cells (same shape as the values; nil → none) with
	// a dark inner outline and a bold value; MarkNote says what the
	// outline means ("q ≤ 0.05, fdr") on a line under the matrix.
	Significant [][]bool
	MarkNote    string
}

// matrixValuesMax is the largest matrix whose cells print their values.
const matrixValuesMax = 20

// Matrix draws an N × N connectivity matrix: values[i][j] between
// labels[i] (row, y axis) and labels[j] (column, x axis), on the diverging
// Heath scale with limits ±max|v| (or ±Limit), so 0 is the light neutral.
// Every cell carries a <title> "A–B: r = 0.123"; NaN and ±Inf cells are
// grey with a diagonal hatch and the title "A–B: undefined". The geometry
// uses index coordinates: column j spans x ∈ [j, j+1], row i spans
// y ∈ [i, i+1] with row 0 at the top. With at most matrixValuesMax
// labels every finite cell prints its value (two decimals, dark on light
// cells and white on dark ones). It panics when values (or Significant,
// when given) is not len(labels) × len(labels).
func Matrix(values [][]float64, labels []string, opt MatrixOptions) (string, Geometry) {
	n := len(labels)
	checkMatrix(values, n, n, "Matrix values")
	if opt.Significant != nil {
		if len(opt.Significant) != n {
			panic("plot: Matrix significance is not the shape of the values")
		}
		for _, r := range opt.Significant {
			if len(r) != n {
				panic("plot: Matrix significance is not the shape of the values")
			}
		}
	}
	note := opt.MarkNote != "" && opt.Significant != nil
	if opt.ValueName == "" {
		opt.ValueName = "r"
	}
	w, h, font := opt.Frame.size()
	lim := symLimit(values, opt.Limit)
	bar := newColourBar(Heath, -lim, lim, false, opt.ValueName)
	tf := font + 1
	top := 8.0
	titles := titleLinesFor(opt.Title, "", w, tf)
	if len(titles) > 0 {
		top = 6 + float64(len(titles))*(tf+3) + 4
	}
	xt, yt := opt.XLabel, opt.YLabel

	// First guess of the label size, then fit the square.
	lw := 0.0
	for _, s := range labels {
		lw = max(lw, textWidth(s, font))
	}
	lf := font
	cell, stride, vertical := 0.0, 1, false
	var left, bottom float64
	for iter := 0; iter < 3; iter++ {
		wl := lw * lf / font
		left = 4 + wl + 4
		if yt != "" {
			left += tf + 3
		}
		bottom = 3
		vertical = n > 0 && cell > 0 && wl > cell*float64(stride)*0.95
		if vertical {
			bottom += wl + 3
		} else {
			bottom += lf + 3
		}
		if xt != "" {
			bottom += tf + 3
		}
		if note {
			bottom += font + 4
		}
		avail := math.Min(w-left-bar.room(font), h-top-bottom)
		avail = math.Max(avail, 10)
		cell = avail / math.Max(float64(n), 1)
		lf = math.Min(font, math.Max(cell*0.9, 5))
		stride = int(math.Ceil(lf / (cell * 0.95)))
		stride = max(stride, 1)
	}
	side := cell * float64(n)
	if n == 0 {
		side = math.Max(math.Min(w-left-bar.room(font), h-top-bottom), 10)
	}
	// centre the matrix and its colour bar
	off := math.Max(0, (w-left-side-bar.room(font))/2)
	left += off
	g := Geometry{
		Left: left, Top: top, Width: side, Height: side,
		XMin: 0, XMax: float64(max(n, 1)), YMin: float64(max(n, 1)), YMax: 0,
		ViewW: w, ViewH: h,
	}
	d := newDoc(w, h, font, opt.Title)
	d.b.Grow(n * n * 110)
	l := layout{w: w, h: h, font: font, titleLines: titles}
	d.titles(l)

	var hatch strings.Builder
	d.raw(`<g shape-rendering="crispEdges">` + "\n")
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			v := values[i][j]
			x, y := left+float64(j)*cell, top+float64(i)*cell
			fill := undefinedFill
			tip := labels[i] + "–" + labels[j] + ": "
			if finite(v) {
				fill = Heath.Hex((v + lim) / (2 * lim))
				tip += opt.ValueName + " = " + fmtTick(v, 0.001)
			} else {
				tip += "undefined"
				hatch.WriteString("M" + num(x) + " " + num(y+cell) + "l" + num(cell) + " " + num(-cell))
			}
			cw, ch := cell, cell
			if j < n-1 {
				cw += seamOverlap
			}
			if i < n-1 {
				ch += seamOverlap
			}
			d.raw(`<rect x="`, num(x), `" y="`, num(y), `" width="`, num(cw), `" height="`, num(ch),
				`" fill="`, fill, `"><title>`, esc(tip), "</title></rect>\n")
		}
	}
	d.raw("</g>\n")
	if hatch.Len() > 0 {
		d.raw(`<path d="`, hatch.String(), `" stroke="#7a7a7a" stroke-width="0.7" fill="none" pointer-events="none"/>`+"\n")
	}
	if n <= matrixValuesMax {
		vf := math.Min(font, cell*0.3)
		var marks strings.Builder
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				v := values[i][j]
				sig := opt.Significant != nil && opt.Significant[i][j]
				x, y := left+float64(j)*cell, top+float64(i)*cell
				if sig {
					in := math.Min(1.2, cell*0.08)
					marks.WriteString("M" + num(x+in) + " " + num(y+in) + "h" + num(cell-2*in) + "v" + num(cell-2*in) + "h" + num(2*in-cell) + "Z")
				}
				if !finite(v) {
					continue
				}
				t := (v + lim) / (2 * lim)
				fill := inkColour
				if Heath.Lab(t).L < 0.62 {
					fill = "#ffffff"
				}
				weight := ""
				if sig {
					weight = ` font-weight="700"`
				}
				d.raw(`<text x="`, num(x+cell/2), `" y="`, num(y+cell/2+vf*0.35), `" text-anchor="middle" font-size="`, num(vf),
					`" fill="`, fill, `"`, weight, ` pointer-events="none">`, fmtTick(v, 0.01), "</text>\n")
			}
		}
		if marks.Len() > 0 {
			d.raw(`<path d="`, marks.String(), `" fill="none" stroke="`, inkColour, `" stroke-width="`, num(math.Min(1.4, cell*0.09)), `" pointer-events="none"/>`+"\n")
		}
	}
	d.plotAreaRect(g)

	// channel labels
	extra := ""
	if lf != font {
		extra = ` font-size="` + num(lf) + `"`
	}
	for i := 0; i < n; i += stride {
		c := top + (float64(i)+0.5)*cell
		d.raw(`<text x="`, num(left-3), `" y="`, num(c+lf*0.35), `" text-anchor="end"`, extra, ">", esc(labels[i]), "</text>\n")
	}
	for j := 0; j < n; j += stride {
		c := left + (float64(j)+0.5)*cell
		if vertical {
			x, y := c+lf*0.35, top+side+3
			d.raw(`<text x="`, num(x), `" y="`, num(y), `" text-anchor="end" transform="rotate(-90 `, num(x), " ", num(y), `)"`, extra, ">", esc(labels[j]), "</text>\n")
		} else {
			d.raw(`<text x="`, num(c), `" y="`, num(top+side+3+lf*0.85), `" text-anchor="middle"`, extra, ">", esc(labels[j]), "</text>\n")
		}
	}
	xy := top + side + bottom - 5
	if note {
		d.text(left+side/2, xy, "middle", 0, 0, "outlined: "+opt.MarkNote, "")
		xy -= font + 4
	}
	if xt != "" {
		d.text(left+side/2, xy, "middle", tf, 0, xt, "")
	}
	if yt != "" {
		d.text(off+4+tf*0.8, top+side/2, "middle", tf, -90, yt, "")
	}
	d.colourBar(l, g, bar)
	return d.finish(), g
}
