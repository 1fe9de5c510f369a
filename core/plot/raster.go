package plot

import (
	"bytes"
	"encoding/base64"
	"image"
	"image/color"
	"image/png"
	"sort"
	"strconv"
)

// rasterCells is the number of cells above which a heat map is drawn as an
// embedded PNG instead of vector cells. A time-frequency power map of 36
// frequencies × 300 columns as vector paths is some 180 KB that a browser
// parses, lays out and paints on its main thread for hundreds of
// milliseconds each time it is shown; the same map as an image is a few
// kilobytes and decodes off that thread. Axes, labels and outlines stay
// vector text and lines.
const rasterCells = 4000

// rasterScale is how many image pixels each viewBox unit gets, so the
// image stays sharp when the figure is shown larger than its viewBox.
const rasterScale = 2

// rasterHeatmap draws vals as an image covering the plot area: pixel
// (px, py) takes the colour of the cell whose edges (xp, yp, viewBox
// units) enclose its centre.
func (d *svgDoc) rasterHeatmap(g Geometry, xp, yp []float64, vals [][]float64, s *Scale, index func(float64) int) {
	w, h := int(g.Width*rasterScale+0.5), int(g.Height*rasterScale+0.5)
	if w < 1 || h < 1 {
		return
	}
	// the cell of each pixel column and row (edges may run either way)
	cell := func(edges []float64, v float64) int {
		n := len(edges) - 1
		asc := edges[n] >= edges[0]
		k := sort.Search(n, func(i int) bool {
			if asc {
				return edges[i+1] > v
			}
			return edges[i+1] < v
		})
		return min(k, n-1)
	}
	cols := make([]int, w)
	for x := range cols {
		cols[x] = cell(xp, g.Left+(float64(x)+0.5)/rasterScale)
	}
	// a palette of the colours used (a PNG palette holds at most 256;
	// the scale has 256 and undefined cells add grey)
	slot := make([]int, lutSize+1) // colour index + 1 → palette entry + 1
	var pal color.Palette
	pix := make([]uint16, w*h)
	for y := 0; y < h; y++ {
		row := vals[cell(yp, g.Top+(float64(y)+0.5)/rasterScale)]
		for x, j := range cols {
			k := index(row[j]) + 1
			if slot[k] == 0 {
				c := hexColour(undefinedFill)
				if k > 0 {
					c = hexColour(s.lut[k-1])
				}
				pal = append(pal, c)
				slot[k] = len(pal)
			}
			pix[y*w+x] = uint16(slot[k] - 1)
		}
	}
	var img image.Image
	if len(pal) <= 256 {
		p8 := make([]uint8, len(pix))
		for i, v := range pix {
			p8[i] = uint8(v)
		}
		img = &image.Paletted{Pix: p8, Stride: w, Rect: image.Rect(0, 0, w, h), Palette: pal}
	} else {
		rgba := image.NewRGBA(image.Rect(0, 0, w, h))
		for i, v := range pix {
			c := pal[v].(color.RGBA)
			copy(rgba.Pix[4*i:], []uint8{c.R, c.G, c.B, 255})
		}
		img = rgba
	}
	var buf bytes.Buffer
	enc := png.Encoder{CompressionLevel: png.DefaultCompression}
	if err := enc.Encode(&buf, img); err != nil {
		panic("plot: " + err.Error()) // encoding to memory does not fail
	}
	d.raw(`<image x="`, num(g.Left), `" y="`, num(g.Top), `" width="`, num(g.Width), `" height="`, num(g.Height),
		`" preserveAspectRatio="none" image-rendering="optimizeSpeed" href="data:image/png;base64,`,
		base64.StdEncoding.EncodeToString(buf.Bytes()), `"/>`+"\n")
}

// hexColour parses "#rrggbb".
func hexColour(s string) color.RGBA {
	v, _ := strconv.ParseUint(s[1:], 16, 32)
	return color.RGBA{R: uint8(v >> 16), G: uint8(v >> 8), B: uint8(v), A: 255}
}
