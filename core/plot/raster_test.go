package plot

import (
	"bytes"
	"encoding/base64"
	"image/png"
	"math"
	"regexp"
	"strings"
	"testing"
)

var embedded = regexp.MustCompile(`href="data:image/png;base64,([A-Za-z0-9+/=]+)"`)

// TestRasterHeatmap: a large map's cells are an embedded PNG of twice the
// plot area's size whose pixels take the colour of the cell they lie in,
// the colour the vector cells would have; a small map stays vector.
func TestRasterHeatmap(t *testing.T) {
	nf, nt := 20, 300 // 6000 cells
	freqs := logGrid(4, 40, nf)
	times := linGrid(-1, 0.01, nt)
	p := make([][]float64, nf)
	for i := range p {
		p[i] = make([]float64, nt)
		for j := range p[i] {
			p[i][j] = float64(1 + i) // one value per frequency row
		}
	}
	p[3][150] = math.NaN()
	svg, g := TFPower(p, freqs, times, TFPowerOptions{})
	m := embedded.FindStringSubmatch(svg)
	if m == nil {
		t.Fatal("no embedded image for a 6000-cell map")
	}
	b, err := base64.StdEncoding.DecodeString(m[1])
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	w, h := img.Bounds().Dx(), img.Bounds().Dy()
	if w != int(g.Width*rasterScale+0.5) || h != int(g.Height*rasterScale+0.5) {
		t.Errorf("image %d × %d for a %g × %g plot area", w, h, g.Width, g.Height)
	}
	cmap := newColourMap(p, 0, 0, false)
	hex := func(x, y int) string {
		r, gg, bb, _ := img.At(x, y).RGBA()
		return RGB{float64(r>>8) / 255, float64(gg>>8) / 255, float64(bb>>8) / 255}.Hex()
	}
	// the top pixel row is the highest frequency, the bottom the lowest
	if got, want := hex(w/4, 0), Dune.lut[cmap.index(float64(nf))]; got != want {
		t.Errorf("top row %s, want %s (the %d Hz row)", got, want, int(freqs[nf-1]))
	}
	if got, want := hex(w/4, h-1), Dune.lut[cmap.index(1)]; got != want {
		t.Errorf("bottom row %s, want %s", got, want)
	}
	// the undefined cell is grey: row 3 from the bottom, column 150
	x, y := g.ToPixel(times[150], freqs[3])
	if got := hex(int((x-g.Left)*rasterScale), int((y-g.Top)*rasterScale)); got != undefinedFill {
		t.Errorf("undefined cell %s, want %s", got, undefinedFill)
	}
	small, _ := TFPower(p[:5], freqs[:5], times, TFPowerOptions{}) // 1500 cells
	if strings.Contains(small, "<image") {
		t.Error("a 1500-cell map should stay vector")
	}
}
