package plot

import (
	"math"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"
)

func TestGeometry(t *testing.T) {
	for _, c := range []struct {
		name string
		g    Geometry
		x, y float64
		px   float64
		py   float64
	}{
		// pixel positions follow from the mapping by hand
		{"linear centre", Geometry{Left: 40, Top: 20, Width: 200, Height: 100, XMin: -1, XMax: 1, YMin: 0, YMax: 10}, 0, 5, 140, 70},
		{"linear corner", Geometry{Left: 40, Top: 20, Width: 200, Height: 100, XMin: -1, XMax: 1, YMin: 0, YMax: 10}, -1, 10, 40, 20},
		{"log y decade", Geometry{Left: 0, Top: 0, Width: 100, Height: 100, XMin: 0, XMax: 1, YMin: 1, YMax: 100, YLog: true}, 0.5, 10, 50, 50},
		{"log x", Geometry{Left: 10, Top: 0, Width: 300, Height: 100, XMin: 1, XMax: 1000, XLog: true, YMin: 0, YMax: 1}, 10, 0, 110, 100},
		{"index rows top-down", Geometry{Left: 0, Top: 10, Width: 60, Height: 60, XMin: 0, XMax: 6, YMin: 6, YMax: 0}, 2.5, 1.5, 25, 25},
	} {
		t.Run(c.name, func(t *testing.T) {
			px, py := c.g.ToPixel(c.x, c.y)
			if !near(px, c.px, 1e-9) || !near(py, c.py, 1e-9) {
				t.Errorf("ToPixel(%v, %v) = %v, %v, want %v, %v", c.x, c.y, px, py, c.px, c.py)
			}
			x, y := c.g.ToData(px, py)
			if !near(x, c.x, 1e-9*max(1, abs(c.x))) || !near(y, c.y, 1e-9*max(1, abs(c.y))) {
				t.Errorf("ToData(%v, %v) = %v, %v, want %v, %v", px, py, x, y, c.x, c.y)
			}
			if !c.g.Contains(px, py) {
				t.Errorf("(%v, %v) not inside", px, py)
			}
		})
	}
}

// Every figure's own geometry maps its plot-area corners to its limits.
func TestFigureGeometryRoundTrip(t *testing.T) {
	for _, c := range figureCases() {
		t.Run(c.name, func(t *testing.T) {
			_, g := c.render()
			x, y := g.ToData(g.Left, g.Top)
			if !near(x, g.XMin, 1e-9*max(1, abs(g.XMin))) || !near(y, g.YMax, 1e-9*max(1, abs(g.YMax))) {
				t.Errorf("top-left maps to %v, %v; want %v, %v", x, y, g.XMin, g.YMax)
			}
			x, y = g.ToData(g.Left+g.Width, g.Top+g.Height)
			if !near(x, g.XMax, 1e-9*max(1, abs(g.XMax))) || !near(y, g.YMin, 1e-9*max(1, abs(g.YMin))) {
				t.Errorf("bottom-right maps to %v, %v; want %v, %v", x, y, g.XMax, g.YMin)
			}
		})
	}
}

func TestCellEdges(t *testing.T) {
	for _, c := range []struct {
		name string
		in   []float64
		log  bool
		want []float64
	}{
		{"linear", []float64{1, 2, 4}, false, []float64{0.5, 1.5, 3, 5}},
		{"log geometric midpoints", []float64{2, 8, 32}, true, []float64{1, 4, 16, 64}}, // √(2·8) = 4
		{"single linear", []float64{3}, false, []float64{2.5, 3.5}},
		{"single log", []float64{10}, true, []float64{10 / math.Sqrt2, 10 * math.Sqrt2}},
	} {
		t.Run(c.name, func(t *testing.T) {
			got := CellEdges(c.in, c.log)
			if len(got) != len(c.want) {
				t.Fatalf("got %v, want %v", got, c.want)
			}
			for i := range got {
				if !near(got[i], c.want[i], 1e-12) {
					t.Fatalf("got %v, want %v", got, c.want)
				}
			}
		})
	}
	for _, bad := range [][]float64{nil, {1, 1}, {2, 1}, {math.NaN()}} {
		func() {
			defer func() {
				r := recover()
				if s, _ := r.(string); !strings.HasPrefix(s, "plot: ") {
					t.Errorf("CellEdges(%v) panic = %v, want a plot: panic", bad, r)
				}
			}()
			CellEdges(bad, false)
		}()
	}
}

func TestDecimate(t *testing.T) {
	nx := 1250
	row := make([]float64, nx)
	for j := range row {
		row[j] = float64(j)
	}
	row[5] = math.NaN()
	xe := make([]float64, nx+1)
	for j := range xe {
		xe[j] = float64(j)
	}
	v, e := decimate([][]float64{row}, xe)
	if len(v[0]) != maxHeatCols || len(e) != maxHeatCols+1 {
		t.Fatalf("%d bins, %d edges", len(v[0]), len(e))
	}
	if e[0] != 0 || e[maxHeatCols] != float64(nx) {
		t.Errorf("edges span %v…%v", e[0], e[maxHeatCols])
	}
	// bin 0 holds columns 0, 1, 2 (1250·1/400 = 3.125 → 3); bin 1 holds 3…5 with 5 NaN
	if v[0][0] != 1 || v[0][1] != 3.5 {
		t.Errorf("bins 0, 1 = %v, %v; want 1, 3.5", v[0][0], v[0][1])
	}
	// every column lands in exactly one bin: weighted mean of bins = mean of columns
	same, _ := decimate([][]float64{row[:10]}, xe[:11])
	if !slices.Equal(same[0][:5], row[:5]) {
		t.Error("narrow maps must not be decimated")
	}
}

func TestClusterOutline(t *testing.T) {
	g := Geometry{Left: 0, Top: 0, Width: 3, Height: 3, XMin: 0, XMax: 3, YMin: 0, YMax: 3}
	edges := []float64{0, 1, 2, 3}
	lab := [][]int{
		{0, 0, 0},
		{0, 7, 0},
		{0, 0, 0},
	}
	// one cell (row 1, column 1) spans x 1…2 and y 1…2; pixel y = 3 − y,
	// and vertical edges run from the lower row boundary to the upper
	got := clusterOutline(g, edges, edges, lab, []int{7})
	want := "M1 2H2" + "M1 1H2" + "M1 2V1" + "M2 2V1"
	if got != want {
		t.Errorf("outline %q, want %q", got, want)
	}
	if got := clusterOutline(g, edges, edges, lab, []int{3}); got != "" {
		t.Errorf("absent label outlined: %q", got)
	}
	// an L-shaped cluster along the border (row 0 is the bottom row, at
	// pixels 2…3): edges merge along a row and a column
	lab = [][]int{
		{1, 1, 1},
		{1, 0, 0},
		{0, 0, 0},
	}
	got = clusterOutline(g, edges, edges, lab, []int{1, 1})
	for _, seg := range []string{"M0 3H3", "M1 2H3", "M0 1H1", "M0 3V1", "M1 2V1", "M3 3V2"} {
		if !strings.Contains(got, seg) {
			t.Errorf("outline %q lacks %s", got, seg)
		}
	}
	if n := strings.Count(got, "M"); n != 6 {
		t.Errorf("%d segments, want 6 (a repeated label is outlined once)", n)
	}
}

var titleRE = regexp.MustCompile(`<title>([^<]*)</title>`)

func TestMatrixCells(t *testing.T) {
	v := [][]float64{
		{math.NaN(), 0.5, -0.25},
		{0.5, math.NaN(), 0.123},
		{-0.25, 0.123, math.Inf(1)},
	}
	svg, g := Matrix(v, []string{"A", "B", "C"}, MatrixOptions{})
	var titles []string
	for _, m := range titleRE.FindAllStringSubmatch(svg, -1) {
		titles = append(titles, m[1])
	}
	want := []string{"A–A: undefined", "A–B: r = 0.500", "A–C: r = \u22120.250",
		"B–A: r = 0.500", "B–B: undefined", "B–C: r = 0.123",
		"C–A: r = \u22120.250", "C–B: r = 0.123", "C–C: undefined"}
	if !slices.Equal(titles, want) {
		t.Errorf("cell titles\n%q\nwant\n%q", titles, want)
	}
	// symmetric limits ±max|v| = ±0.5: +0.5 takes the top of the scale,
	// −0.25 the quarter point, and undefined cells are grey
	for _, c := range []string{Heath.Hex(1), Heath.Hex(0.25), undefinedFill} {
		if !strings.Contains(svg, `fill="`+c+`"`) {
			t.Errorf("no cell filled %s", c)
		}
	}
	if strings.Contains(svg, `fill="`+Heath.Hex(0)+`"`) && Heath.Hex(0) != Heath.Hex(0.25) {
		t.Errorf("−0.5 end used though the minimum is −0.25")
	}
	if g.XMax != 3 || g.YMin != 3 || g.YMax != 0 {
		t.Errorf("index geometry %+v", g)
	}
	// cell (row 1, column 2) is at index coordinates (2.5, 1.5)
	px, py := g.ToPixel(2.5, 1.5)
	cell := g.Width / 3
	if !near(px, g.Left+2.5*cell, 1e-9) || !near(py, g.Top+1.5*cell, 1e-9) {
		t.Errorf("cell centre at %v, %v", px, py)
	}
	// a given limit overrides max|v|
	svg, _ = Matrix(v, []string{"A", "B", "C"}, MatrixOptions{Limit: 1, ValueName: "z"})
	if !strings.Contains(svg, `fill="`+Heath.Hex(0.75)+`"`) || !strings.Contains(svg, "A–B: z = 0.500") {
		t.Error("Limit 1 should colour 0.5 at t = 0.75 and name the value z")
	}
}

func TestScatterPoints(t *testing.T) {
	x := []float64{1, 2, math.NaN(), 4, 1000}
	y := []float64{1, 3, 2, math.Inf(-1), -50}
	svg, g := Scatter(x, y, ScatterOptions{Frame: Frame{Title: "T"}, Stat: &Stat{R: 0.5, P: 0.01, N: 3}})
	cx := regexp.MustCompile(`<circle cx="([^"]+)" cy="([^"]+)"`).FindAllStringSubmatch(svg, -1)
	if len(cx) != 3 {
		t.Fatalf("%d points drawn, want the 3 finite pairs", len(cx))
	}
	for _, m := range cx {
		px, _ := strconv.ParseFloat(m[1], 64)
		py, _ := strconv.ParseFloat(m[2], 64)
		if !g.Contains(px, py) {
			t.Errorf("point %v, %v outside the plot area %+v", px, py, g)
		}
	}
	if !strings.Contains(svg, "r = 0.500, p = 0.01, n = 3") {
		t.Error("title lacks r, p and n")
	}
	// the outlier (1000, −50) sets the ranges
	if g.XMax < 1000 || g.YMin > -50 {
		t.Errorf("ranges %v…%v, %v…%v clip the outlier", g.XMin, g.XMax, g.YMin, g.YMax)
	}
	svg, g = Scatter(x, y, ScatterOptions{Frame: Frame{XLabel: "seed", YLabel: "target"}, Ranks: true})
	if !strings.Contains(svg, ">seed (rank)</text>") || !strings.Contains(svg, ">target (rank)</text>") {
		t.Error("rank axes are not labelled rank")
	}
	if g.XMin != 0 || g.XMax != 4 {
		t.Errorf("rank axis %v…%v, want 0…4 for 3 points", g.XMin, g.XMax)
	}
	svg, _ = Scatter(nil, nil, ScatterOptions{})
	if _, p := checkSVG(svg); len(p) > 0 || !strings.Contains(svg, "no finite pairs") {
		t.Errorf("empty scatter: %v", p)
	}
}

// scipy 1.10.1 scipy.stats.rankdata(method="average"):
// [1,2,2,3,4,5] → [1, 2.5, 2.5, 4, 5, 6]; [2,1,3,3,5,4] → [2, 1, 3.5, 3.5, 6, 5];
// [3.5,-1,3.5,3.5,0,10] → [4, 1, 4, 4, 2, 6].
func TestAverageRanks(t *testing.T) {
	for _, c := range []struct{ in, want []float64 }{
		{[]float64{1, 2, 2, 3, 4, 5}, []float64{1, 2.5, 2.5, 4, 5, 6}},
		{[]float64{2, 1, 3, 3, 5, 4}, []float64{2, 1, 3.5, 3.5, 6, 5}},
		{[]float64{3.5, -1, 3.5, 3.5, 0, 10}, []float64{4, 1, 4, 4, 2, 6}},
	} {
		if got := AverageRanks(nil, c.in); !slices.Equal(got, c.want) {
			t.Errorf("AverageRanks(%v) = %v, want %v", c.in, got, c.want)
		}
	}
}

func TestTFPowerColour(t *testing.T) {
	p := [][]float64{{0, 1, 10, 100}, {math.NaN(), 1, 10, 100}}
	svg, g := TFPower(p, []float64{10, 20}, []float64{0, 0.1, 0.2, 0.3}, TFPowerOptions{LogColour: true})
	// log colour over the positive values 1…100: 0 takes the lowest colour,
	// 10 the middle, NaN the undefined grey
	for _, c := range []string{Dune.Hex(0), Dune.Hex(0.5), Dune.Hex(1), undefinedFill} {
		if !strings.Contains(svg, `fill="`+c+`"`) {
			t.Errorf("no cell filled %s", c)
		}
	}
	if g.YLog {
		t.Error("two frequencies are not a geometric grid")
	}
	for _, s := range []string{">time (s)</text>", ">frequency (Hz)</text>", ">power (µV²)</text>"} {
		if !strings.Contains(svg, s) {
			t.Errorf("missing default title %s", s)
		}
	}
	_, g = TFPower([][]float64{{1}, {2}, {3}}, []float64{4, 8, 16}, []float64{0}, TFPowerOptions{})
	if !g.YLog || !near(g.YMin, 4/math.Sqrt2, 1e-9) || !near(g.YMax, 16*math.Sqrt2, 1e-9) {
		t.Errorf("geometric grid: YLog %v, %v…%v", g.YLog, g.YMin, g.YMax)
	}
}

func TestTFPowerLarge(t *testing.T) {
	p, f, tm := tfPowerInput(40, 1250)
	svg, _ := TFPower(p, f, tm, TFPowerOptions{})
	if _, probs := checkSVG(svg); len(probs) > 0 {
		t.Fatal(probs)
	}
	// at most 400 columns × 40 rows of runs
	if runs := strings.Count(svg, "z"); runs > 400*40 {
		t.Errorf("%d cell runs for 40 × 1250; decimation missing", runs)
	}
	if len(svg) > 600_000 {
		t.Errorf("SVG is %d bytes", len(svg))
	}
}

func TestWindowsAndOutlines(t *testing.T) {
	p, f, tm := tfPowerInput(12, 51)
	svg, _ := TFPower(p, f, tm, TFPowerOptions{Windows: []Window{{Label: "seed", T0: -0.1, T1: -0.5, F0: 25, F1: 15}}})
	if !strings.Contains(svg, ">seed</text>") || !strings.Contains(svg, "<title>seed: \u22120.5 to \u22120.1 s, 15–25 Hz</title>") {
		t.Error("window label or title missing")
	}
	v, c, f2, t2 := tfCorrInput(10, 31)
	with, _ := TFCorr(v, f2, t2, c, []int{1}, TFCorrOptions{})
	without, _ := TFCorr(v, f2, t2, c, nil, TFCorrOptions{})
	if strings.Count(with, `stroke="#111111" stroke-width="1.1" stroke-linecap`) != 1 || strings.Contains(without, "stroke-linecap") {
		t.Error("cluster outline drawn wrongly")
	}
}

func TestEnvelopeAndGroup(t *testing.T) {
	tm, a, b := envelopeInput(5000)
	a[10] = math.NaN()
	svg, _ := EnvelopeTrace(tm, a, b, EnvelopeOptions{})
	if _, probs := checkSVG(svg); len(probs) > 0 {
		t.Fatal(probs)
	}
	if !strings.Contains(svg, `stroke-dasharray="4.5 2.5"`) {
		t.Error("second trace is not dashed")
	}
	if n := strings.Count(svg, "L"); n > 2*maxTracePoints+10 {
		t.Errorf("%d line segments for 5000 samples; decimation missing", n)
	}
	// the NaN breaks trace A into two pieces
	first := svg[strings.Index(svg, `<path d="M`):]
	first = first[:strings.Index(first, `"/>`)]
	if strings.Count(first, "M") < 2 {
		t.Error("NaN sample does not break the line")
	}
	svg, g := GroupDots([]string{"a", "b"}, []float64{0.2, math.NaN()}, GroupDotsOptions{Group: &Interval{Mean: 0.2, Lo: -0.9, Hi: 1.3}})
	if !strings.Contains(svg, ">undefined</text>") || !strings.Contains(svg, ">group mean</text>") {
		t.Error("undefined row or group row missing")
	}
	if g.XMin > -0.9 || g.XMax < 1.3 || g.YMin != 3 || g.YMax != 0 {
		t.Errorf("geometry %+v does not cover the interval and three rows", g)
	}
}

func TestCheckSVGCatches(t *testing.T) {
	for _, c := range []struct{ name, svg string }{
		{"external image", `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 1 1"><image href="x.png"/><text>a</text><rect/></svg>`},
		{"xlink", `<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink" viewBox="0 0 1 1"><rect xlink:href="#a"/><text>a</text></svg>`},
		{"NaN", `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 1 1"><rect x="NaN"/><text>a</text></svg>`},
		{"no viewBox", `<svg xmlns="http://www.w3.org/2000/svg"><rect/><text>a</text></svg>`},
		{"no text", `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 1 1"><rect/></svg>`},
		{"url fill", `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 1 1"><rect fill="url(http://x/#g)"/><text>a</text></svg>`},
		{"broken XML", `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 1 1"><rect><text>a</text></svg>`},
	} {
		if _, p := checkSVG(c.svg); len(p) == 0 {
			t.Errorf("%s: not caught", c.name)
		}
	}
}

func TestShapePanics(t *testing.T) {
	for name, f := range map[string]func(){
		"TFPower rows":   func() { TFPower([][]float64{{1}}, []float64{1, 2}, []float64{0}, TFPowerOptions{}) },
		"Matrix square":  func() { Matrix([][]float64{{1, 2}}, []string{"a"}, MatrixOptions{}) },
		"Scatter length": func() { Scatter([]float64{1}, nil, ScatterOptions{}) },
		"TFCorr labels":  func() { TFCorr([][]float64{{1}}, []float64{1}, []float64{0}, [][]int{{1, 2}}, nil, TFCorrOptions{}) },
		"Envelope":       func() { EnvelopeTrace([]float64{1}, nil, nil, EnvelopeOptions{}) },
		"GroupDots":      func() { GroupDots([]string{"a"}, nil, GroupDotsOptions{}) },
	} {
		t.Run(name, func(t *testing.T) {
			defer func() {
				r := recover()
				if s, _ := r.(string); !strings.HasPrefix(s, "plot: ") {
					t.Errorf("panic %v, want a plot: panic", r)
				}
			}()
			f()
		})
	}
}

// All-NaN and flat data are data, not bugs: every figure still renders
// valid SVG.
func TestDegenerateData(t *testing.T) {
	nan := math.NaN()
	for name, f := range map[string]func() string{
		"tf all NaN": func() string {
			s, _ := TFPower([][]float64{{nan, nan}}, []float64{10}, []float64{0, 1}, TFPowerOptions{LogColour: true})
			return s
		},
		"tf flat": func() string {
			s, _ := TFPower([][]float64{{2, 2}}, []float64{10}, []float64{0, 1}, TFPowerOptions{})
			return s
		},
		"matrix NaN":   func() string { s, _ := Matrix([][]float64{{nan}}, []string{"A"}, MatrixOptions{}); return s },
		"matrix empty": func() string { s, _ := Matrix(nil, nil, MatrixOptions{}); return s },
		"cross zeros": func() string {
			s, _ := CrossFreq([][]float64{{0, 0}}, []float64{5}, []float64{20, 40}, CrossFreqOptions{})
			return s
		},
		"tfcorr NaN": func() string {
			s, _ := TFCorr([][]float64{{nan}}, []float64{5}, []float64{0}, [][]int{{1}}, []int{1}, TFCorrOptions{})
			return s
		},
		"envelope NaN": func() string {
			s, _ := EnvelopeTrace([]float64{0, 1}, []float64{nan, nan}, []float64{nan, nan}, EnvelopeOptions{})
			return s
		},
		"envelope none": func() string { s, _ := EnvelopeTrace(nil, nil, nil, EnvelopeOptions{}); return s },
		"group empty":   func() string { s, _ := GroupDots(nil, nil, GroupDotsOptions{}); return s },
		"group NaN": func() string {
			s, _ := GroupDots([]string{"a"}, []float64{nan}, GroupDotsOptions{Group: &Interval{Mean: nan, Lo: nan, Hi: nan}})
			return s
		},
		"scatter flat": func() string {
			s, _ := Scatter([]float64{1, 1}, []float64{2, 2}, ScatterOptions{Stat: &Stat{R: nan, P: nan}})
			return s
		},
	} {
		t.Run(name, func(t *testing.T) {
			if _, p := checkSVG(f()); len(p) > 0 {
				t.Error(p)
			}
		})
	}
}

func TestCustomFrame(t *testing.T) {
	fr := Frame{Title: "wide", Width: 504, Height: 300, FontSize: 10}
	svg, g := Scatter([]float64{1, 2, 3}, []float64{3, 1, 2}, ScatterOptions{Frame: fr})
	if !strings.Contains(svg, `viewBox="0 0 504 300"`) || !strings.Contains(svg, `font-size="10"`) {
		t.Error("custom size or font not applied")
	}
	if g.ViewW != 504 || g.ViewH != 300 || g.Left+g.Width > 504 {
		t.Errorf("geometry %+v", g)
	}
	long := strings.Repeat("a long title ", 6)
	svg, _ = Scatter([]float64{1, 2}, []float64{1, 2}, ScatterOptions{Frame: Frame{Title: long}, Stat: &Stat{R: 1, P: 0, N: 2}})
	if !strings.Contains(svg, ">"+long+"</text>") || !strings.Contains(svg, ">r = 1.000, p &lt; 0.0001, n = 2</text>") {
		t.Error("a long title should put the statistics on their own line")
	}
}
