package plot

import "math"

// Geometry is where a figure's plot area sits and which data range it
// shows. Left, Top, Width and Height are in viewBox units; ViewW and ViewH
// are the viewBox size. XMin…YMax are the data values at the plot area's
// edges: XMin at Left, XMax at Left+Width, YMin at Top+Height (bottom) and
// YMax at Top. A log axis (XLog, YLog) maps log10 of the value linearly.
//
// Figures with categorical axes (Matrix, GroupDots) use index coordinates:
// category i spans [i, i+1], and YMin > YMax there so that row 0 is at the
// top.
type Geometry struct {
	Left, Top, Width, Height float64
	XMin, XMax, YMin, YMax   float64
	XLog, YLog               bool
	ViewW, ViewH             float64
}

func axisFwd(v float64, log bool) float64 {
	if log {
		return math.Log10(v)
	}
	return v
}

func axisInv(v float64, log bool) float64 {
	if log {
		return math.Pow(10, v)
	}
	return v
}

// ToPixel maps data (x, y) to viewBox units:
//
//	px = Left + (T(x) − T(XMin))/(T(XMax) − T(XMin))·Width
//	py = Top  + (T(YMax) − T(y))/(T(YMax) − T(YMin))·Height
//
// where T is log10 on a log axis and the identity otherwise.
func (g Geometry) ToPixel(x, y float64) (px, py float64) {
	x0, x1 := axisFwd(g.XMin, g.XLog), axisFwd(g.XMax, g.XLog)
	y0, y1 := axisFwd(g.YMin, g.YLog), axisFwd(g.YMax, g.YLog)
	px = g.Left + (axisFwd(x, g.XLog)-x0)/(x1-x0)*g.Width
	py = g.Top + (y1-axisFwd(y, g.YLog))/(y1-y0)*g.Height
	return px, py
}

// ToData is the inverse of ToPixel: it maps a position in viewBox units
// (for example a pointer position) to data coordinates. Positions outside
// the plot area extrapolate.
func (g Geometry) ToData(px, py float64) (x, y float64) {
	x0, x1 := axisFwd(g.XMin, g.XLog), axisFwd(g.XMax, g.XLog)
	y0, y1 := axisFwd(g.YMin, g.YLog), axisFwd(g.YMax, g.YLog)
	x = axisInv(x0+(px-g.Left)/g.Width*(x1-x0), g.XLog)
	y = axisInv(y1-(py-g.Top)/g.Height*(y1-y0), g.YLog)
	return x, y
}

// Contains reports whether (px, py), in viewBox units, lies inside the
// plot area (edges included).
func (g Geometry) Contains(px, py float64) bool {
	return px >= g.Left && px <= g.Left+g.Width && py >= g.Top && py <= g.Top+g.Height
}

func (g Geometry) px(x float64) float64 {
	p, _ := g.ToPixel(x, g.YMax)
	return p
}

func (g Geometry) py(y float64) float64 {
	_, p := g.ToPixel(g.XMin, y)
	return p
}
