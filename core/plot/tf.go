package plot

import (
	"math"
	"strings"
)

// Window is a time × frequency rectangle drawn over a map, such as the
// seed or target window of a trial-window analysis. Times in s, frequencies
// in Hz; each range is inclusive and may come in either order.
type Window struct {
	Label  string
	T0, T1 float64
	F0, F1 float64
}

// TFPowerOptions configures TFPower. The zero value draws a linear colour
// scale over the data range, a log frequency axis when the grid is
// geometric, and the axis titles "time (s)", "frequency (Hz)" and
// "power (µV²)".
type TFPowerOptions struct {
	Frame
	LogColour               bool    // colour by log10 power; values ≤ 0 take the lowest colour
	Min, Max                float64 // colour limits; used when Min < Max (and Min > 0 with LogColour)
	FreqAxis                AxisScale
	Windows                 []Window
	ColourLabel, ColourUnit string // colour-bar title; zero → "power", "µV²"
}

func (f *Frame) defaults(xl, xu, yl, yu string) {
	if f.XLabel == "" && f.XUnit == "" {
		f.XLabel, f.XUnit = xl, xu
	}
	if f.YLabel == "" && f.YUnit == "" {
		f.YLabel, f.YUnit = yl, yu
	}
}

// TFPower draws trial-averaged power as a heat map: power[i][j] is the
// power at freqs[i] (Hz) and times[j] (s). Rows are bands between the
// midpoints of neighbouring frequencies (geometric midpoints on a log
// axis), columns likewise between neighbouring times; maps wider than 400
// columns are averaged into 400 bins. Colour uses the sequential Dune
// scale. Windows are outlined and labelled. It panics when the shapes do
// not match or a grid is not strictly increasing.
func TFPower(power [][]float64, freqs, times []float64, opt TFPowerOptions) (string, Geometry) {
	checkMatrix(power, len(freqs), len(times), "TFPower power")
	opt.Frame.defaults("time", "s", "frequency", "Hz")
	if opt.ColourLabel == "" && opt.ColourUnit == "" {
		opt.ColourLabel, opt.ColourUnit = "power", "µV²"
	}
	h := heatFigure{
		fr: opt.Frame, xc: times, yc: freqs,
		ylog:     opt.FreqAxis.isLog(freqs),
		vals:     power,
		scale:    Dune,
		cmap:     newColourMap(power, opt.Min, opt.Max, opt.LogColour),
		barTitle: axisTitle(opt.ColourLabel, opt.ColourUnit),
	}
	return h.draw(func(d *svgDoc, g Geometry, xe, _ []float64) {
		d.zeroLine(g, xe)
		for _, w := range opt.Windows {
			d.window(g, w)
		}
	})
}

// zeroLine marks t = 0 (the event) with a dashed vertical line, white under
// black so it shows on any cell, when the time axis spans it.
func (d *svgDoc) zeroLine(g Geometry, xe []float64) {
	if len(xe) < 2 || !(xe[0] < 0 && xe[len(xe)-1] > 0) {
		return
	}
	x, y0 := g.ToPixel(0, g.YMin)
	_, y1 := g.ToPixel(0, g.YMax)
	l := `<line x1="` + num(x) + `" y1="` + num(y0) + `" x2="` + num(x) + `" y2="` + num(y1) + `"`
	d.raw(l, ` stroke="#ffffff" stroke-width="2.4"/>`+"\n")
	d.raw(l, ` stroke="#111111" stroke-width="1" stroke-dasharray="4 3"><title>t = 0 s: the event</title></line>`+"\n")
}

// window outlines w (clamped to the plot area) in white under black, so it
// shows on dark and light cells, with its label inside the top-left corner.
func (d *svgDoc) window(g Geometry, w Window) {
	if !finite(w.T0) || !finite(w.T1) || !finite(w.F0) || !finite(w.F1) {
		return
	}
	clampAxis := func(v, a, b float64) float64 { return math.Max(math.Min(a, b), math.Min(math.Max(a, b), v)) }
	t0, t1 := clampAxis(w.T0, g.XMin, g.XMax), clampAxis(w.T1, g.XMin, g.XMax)
	f0, f1 := clampAxis(w.F0, g.YMin, g.YMax), clampAxis(w.F1, g.YMin, g.YMax)
	if g.YLog && (f0 <= 0 || f1 <= 0) {
		return
	}
	x0, y0 := g.ToPixel(t0, f0)
	x1, y1 := g.ToPixel(t1, f1)
	x, y := math.Min(x0, x1), math.Min(y0, y1)
	wd, ht := math.Abs(x1-x0), math.Abs(y1-y0)
	r := `<rect x="` + num(x) + `" y="` + num(y) + `" width="` + num(wd) + `" height="` + num(ht) + `" fill="none"`
	d.raw(r, ` stroke="#ffffff" stroke-width="2.6"/>`+"\n")
	d.raw(r, ` stroke="#111111" stroke-width="1.1">`)
	d.raw("<title>", esc(windowTitle(w)), "</title></rect>\n")
	if w.Label != "" {
		ly := y + d.font + 1
		if ht < d.font+3 {
			ly = y - 3
		}
		d.text(x+2.5, ly, "start", 0, 0, w.Label, ` font-weight="600" fill="#111111" stroke="#ffffff" stroke-width="2.2" stroke-linejoin="round" paint-order="stroke"`)
	}
}

func windowTitle(w Window) string {
	var b strings.Builder
	if w.Label != "" {
		b.WriteString(w.Label + ": ")
	}
	t0, t1 := math.Min(w.T0, w.T1), math.Max(w.T0, w.T1)
	f0, f1 := math.Min(w.F0, w.F1), math.Max(w.F0, w.F1)
	b.WriteString(fmtSig(t0, 3) + " to " + fmtSig(t1, 3) + " s, " + fmtSig(f0, 3) + "–" + fmtSig(f1, 3) + " Hz")
	return b.String()
}

// CrossFreqOptions configures CrossFreq. The zero value uses log axes for
// geometric grids, the data's own colour limits and the value name "r".
type CrossFreqOptions struct {
	Frame
	Limit      float64 // diverging: colour limits ±Limit; zero → max|v|
	ValueName  string  // colour-bar title; zero → "r"
	SeedAxis   AxisScale
	TargetAxis AxisScale
}

// CrossFreq draws a seed-frequency × target-frequency map:
// values[i][j] belongs to seedFreqs[i] (x axis, Hz) and targetFreqs[j]
// (y axis, Hz). When any finite value is negative the map uses the
// diverging Heath scale with symmetric limits ±max|v| (or ±Limit);
// otherwise the sequential Dune scale over [min, max]. It panics when the
// shapes do not match or a grid is not strictly increasing.
func CrossFreq(values [][]float64, seedFreqs, targetFreqs []float64, opt CrossFreqOptions) (string, Geometry) {
	checkMatrix(values, len(seedFreqs), len(targetFreqs), "CrossFreq values")
	opt.Frame.defaults("seed frequency", "Hz", "target frequency", "Hz")
	if opt.ValueName == "" {
		opt.ValueName = "r"
	}
	// rows of the picture are target frequencies
	t := make([][]float64, len(targetFreqs))
	neg := false
	for j := range t {
		t[j] = make([]float64, len(seedFreqs))
		for i := range seedFreqs {
			v := values[i][j]
			t[j][i] = v
			if finite(v) && v < 0 {
				neg = true
			}
		}
	}
	h := heatFigure{
		fr: opt.Frame, xc: seedFreqs, yc: targetFreqs,
		xlog: opt.SeedAxis.isLog(seedFreqs), ylog: opt.TargetAxis.isLog(targetFreqs),
		vals: t, barTitle: opt.ValueName,
	}
	if neg {
		lim := symLimit(t, opt.Limit)
		h.scale, h.cmap = Heath, colourMap{lo: -lim, hi: lim}
	} else {
		h.scale, h.cmap = Dune, newColourMap(t, 0, 0, false)
		if finite(opt.Limit) && opt.Limit > 0 {
			h.cmap = colourMap{lo: 0, hi: opt.Limit}
		}
	}
	return h.draw(nil)
}

// TFCorrOptions configures TFCorr. The zero value uses ±max|r| as colour
// limits, a log frequency axis for geometric grids, and the titles
// "time (s)", "frequency (Hz)" and "r".
type TFCorrOptions struct {
	Frame
	Limit     float64 // colour limits ±Limit; zero → max|v|
	ValueName string  // colour-bar title; zero → "r"
	FreqAxis  AxisScale
	Windows   []Window // e.g. the seed window
}

// TFCorr draws a time–frequency correlation map (values[i][j] at freqs[i]
// Hz and times[j] s) on the diverging Heath scale with symmetric limits,
// and outlines clusters: clusters[i][j] is a cluster label (any int), and
// every label listed in outline gets a path along the cell edges that
// separate its cells from the rest. clusters may be nil. It panics when
// the shapes do not match or a grid is not strictly increasing.
func TFCorr(values [][]float64, freqs, times []float64, clusters [][]int, outline []int, opt TFCorrOptions) (string, Geometry) {
	checkMatrix(values, len(freqs), len(times), "TFCorr values")
	if clusters != nil {
		if len(clusters) != len(freqs) {
			panic("plot: TFCorr clusters do not match values")
		}
		for _, r := range clusters {
			if len(r) != len(times) {
				panic("plot: TFCorr clusters do not match values")
			}
		}
	}
	opt.Frame.defaults("time", "s", "frequency", "Hz")
	if opt.ValueName == "" {
		opt.ValueName = "r"
	}
	lim := symLimit(values, opt.Limit)
	h := heatFigure{
		fr: opt.Frame, xc: times, yc: freqs,
		ylog: opt.FreqAxis.isLog(freqs),
		vals: values, scale: Heath, cmap: colourMap{lo: -lim, hi: lim},
		barTitle: opt.ValueName,
	}
	return h.draw(func(d *svgDoc, g Geometry, xe, ye []float64) {
		d.zeroLine(g, xe)
		if clusters != nil && len(outline) > 0 {
			p := clusterOutline(g, xe, ye, clusters, outline)
			if p != "" {
				d.raw(`<path d="`, p, `" fill="none" stroke="#ffffff" stroke-width="2.4" stroke-linecap="square"/>`+"\n")
				d.raw(`<path d="`, p, `" fill="none" stroke="#111111" stroke-width="1.1" stroke-linecap="square"/>`+"\n")
			}
		}
		for _, w := range opt.Windows {
			d.window(g, w)
		}
	})
}

// clusterOutline traces, for each listed label, every cell edge with that
// label on one side only, merging collinear neighbours into one segment.
func clusterOutline(g Geometry, xe, ye []float64, lab [][]int, outline []int) string {
	ny, nx := len(lab), 0
	if ny > 0 {
		nx = len(lab[0])
	}
	xp := make([]float64, len(xe))
	for j, x := range xe {
		xp[j] = g.px(x)
	}
	yp := make([]float64, len(ye))
	for i, y := range ye {
		yp[i] = g.py(y)
	}
	var b strings.Builder
	done := make([]int, 0, len(outline))
outer:
	for _, L := range outline {
		for _, o := range done {
			if o == L {
				continue outer
			}
		}
		done = append(done, L)
		in := func(i, j int) bool { return i >= 0 && i < ny && j >= 0 && j < nx && lab[i][j] == L }
		// horizontal edges at row boundary k (between rows k−1 and k)
		for k := 0; k <= ny; k++ {
			for j := 0; j < nx; {
				if in(k-1, j) == in(k, j) {
					j++
					continue
				}
				e := j + 1
				for e < nx && in(k-1, e) != in(k, e) {
					e++
				}
				b.WriteString("M" + num(xp[j]) + " " + num(yp[k]) + "H" + num(xp[e]))
				j = e
			}
		}
		// vertical edges at column boundary k
		for k := 0; k <= nx; k++ {
			for i := 0; i < ny; {
				if in(i, k-1) == in(i, k) {
					i++
					continue
				}
				e := i + 1
				for e < ny && in(e, k-1) != in(e, k) {
					e++
				}
				b.WriteString("M" + num(xp[k]) + " " + num(yp[i]) + "V" + num(yp[e]))
				i = e
			}
		}
	}
	return b.String()
}
