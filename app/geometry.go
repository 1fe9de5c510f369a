package app

import (
	"errors"
	"math"
	"strconv"

	"amplink/core/plot"
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
type geometry struct{ plot.Geometry }

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

// toData maps a client position to data coordinates, given the SVG's
// bounding box on screen (left, top, width, height): the position in
// viewBox units, vx = (cx − left)·ViewW/width (likewise vy), goes through
// core/plot's Geometry.ToData.
func (g geometry) toData(cx, cy float64, box [4]float64) (x, y float64) {
	vw, vh := g.ViewW, g.ViewH
	if vw <= 0 || vh <= 0 {
		vw, vh = box[2], box[3]
	}
	return g.ToData((cx-box[0])*vw/box[2], (cy-box[1])*vh/box[3])
}

func abs(v float64) float64 { return math.Abs(v) }
