package app

import (
	"errors"
	"math"
	"strconv"
)

// fileRef is a file the user gave the page: its name, size, and the
// browser's handle to it (a File; nothing natively).
type fileRef struct {
	Name string
	Size int64
	h    handle
}

var errNative = errors.New("only in the browser")

// geometry is core/plot's plot-area geometry, read back from the data-*
// attributes of <rect id="plot-area">.
type geometry struct {
	Left, Top, Width, Height float64
	XMin, XMax, YMin, YMax   float64
	XLog, YLog               bool
	ViewW, ViewH             float64
}

// geometryAttrs are the attribute names (after "data-") for each field.
var geometryAttrs = []string{"left", "top", "width", "height", "xmin", "xmax", "ymin", "ymax", "xlog", "ylog", "view-width", "view-height"}

// parseGeometry reads the attributes through get (which returns "" for a
// missing one).
func parseGeometry(get func(name string) string) (geometry, bool) {
	var g geometry
	nums := []*float64{&g.Left, &g.Top, &g.Width, &g.Height, &g.XMin, &g.XMax, &g.YMin, &g.YMax}
	for i, dst := range nums {
		v, err := strconv.ParseFloat(get(geometryAttrs[i]), 64)
		if err != nil {
			return g, false
		}
		*dst = v
	}
	g.XLog = get("xlog") == "true"
	g.YLog = get("ylog") == "true"
	g.ViewW, _ = strconv.ParseFloat(get("view-width"), 64)
	g.ViewH, _ = strconv.ParseFloat(get("view-height"), 64)
	return g, g.Width > 0 && g.Height > 0
}

func axis(v float64, log bool) float64 {
	if log {
		return math.Log10(v)
	}
	return v
}

func unaxis(v float64, log bool) float64 {
	if log {
		return math.Pow(10, v)
	}
	return v
}

// toData maps a client position to data coordinates, given the SVG's
// bounding box on screen (left, top, width, height) and its viewBox size:
//
//	vx = (cx − left)·ViewW/width,  x = T⁻¹(T(XMin) + (vx − Left)/Width·(T(XMax) − T(XMin)))
//
// and likewise for y with the pixel axis pointing down; T is log10 on a
// log axis. This is the inverse of core/plot's Geometry.ToPixel.
func (g geometry) toData(cx, cy float64, box [4]float64) (x, y float64) {
	vw, vh := g.ViewW, g.ViewH
	if vw <= 0 || vh <= 0 {
		vw, vh = box[2], box[3]
	}
	vx := (cx - box[0]) * vw / box[2]
	vy := (cy - box[1]) * vh / box[3]
	x0, x1 := axis(g.XMin, g.XLog), axis(g.XMax, g.XLog)
	y0, y1 := axis(g.YMin, g.YLog), axis(g.YMax, g.YLog)
	x = unaxis(x0+(vx-g.Left)/g.Width*(x1-x0), g.XLog)
	y = unaxis(y1-(vy-g.Top)/g.Height*(y1-y0), g.YLog)
	return x, y
}

func abs(v float64) float64 { return math.Abs(v) }
