package plot

import (
	"math"
	"regexp"
	"strings"
	"testing"
)

var channelRE = regexp.MustCompile(`data-channel="([^"]*)"`)

// TestScalpMarks: every sensor is labelled and focusable, the seed is a
// diamond, significant sensors are filled, the field's colours come from
// the Heath bands and the colour bar is symmetric around 0.
func TestScalpMarks(t *testing.T) {
	ss, field := scalpInput()
	svg, g := Scalp(ss, ScalpOptions{Field: field, MarkNote: "q ≤ 0.05", SeedNote: "seed C4", Analysis: "a1"})
	info, problems := checkSVG(svg)
	for _, p := range problems {
		t.Error(p)
	}
	var got []string
	for _, m := range channelRE.FindAllStringSubmatch(svg, -1) {
		got = append(got, m[1])
	}
	if len(got) != len(ss) {
		t.Fatalf("%d electrodes drawn, want %d", len(got), len(ss))
	}
	texts := strings.Join(info.texts, "|")
	for _, s := range ss {
		if !strings.Contains("|"+texts+"|", "|"+s.Name+"|") {
			t.Errorf("%s has no label", s.Name)
		}
	}
	if n := strings.Count(svg, `data-analysis="a1" tabindex="0" role="button"`); n != len(ss) {
		t.Errorf("%d focusable electrodes, want %d", n, len(ss))
	}
	// the C4 group holds a diamond path; Pz (marked) a filled circle
	c4 := svg[strings.Index(svg, `data-channel="C4"`):]
	c4 = c4[:strings.Index(c4, "</g>")]
	if !strings.Contains(c4, "<path d=\"M") || !strings.Contains(c4, "Z\" fill=\"#ffffff\"") {
		t.Errorf("C4 (seed) is not a white diamond: %s", c4)
	}
	pz := svg[strings.Index(svg, `data-channel="Pz"`):]
	pz = pz[:strings.Index(pz, "</g>")]
	if !strings.Contains(pz, `<circle`) || !strings.Contains(pz, `fill="`+inkColour+`"`) {
		t.Errorf("Pz (significant) is not a filled disc: %s", pz)
	}
	// limits ±max|v|: the colour bar labels come in ± pairs around 0
	lim := 0.0
	for _, s := range ss {
		lim = math.Max(lim, math.Abs(s.Value))
	}
	bar := newColourBar(Heath, -lim, lim, false, "r")
	for i, v := range bar.ticks {
		if j := len(bar.ticks) - 1 - i; math.Abs(v+bar.ticks[j]) > 1e-12 {
			t.Errorf("colour bar ticks %v are not symmetric", bar.ticks)
		}
	}
	// the highest value (Pz) takes the top band; a band never used by the
	// values (the darkest blue: nothing is below −lim·7/8) is absent
	if !strings.Contains(svg, `fill="`+Heath.Hex((scalpBands-0.5)/scalpBands)+`"`) {
		t.Error("no cell in the top band")
	}
	if !strings.Contains(svg, `<path fill="`+Heath.Hex((scalpBands-0.5)/scalpBands)+`" d="M`) {
		t.Error("the top band is not drawn as a path of cells")
	}
	if strings.Contains(svg, `<path fill="`+Heath.Hex(0.5/scalpBands)+`" d="`) {
		t.Error("a cell in the bottom band, though no value is that low")
	}
	if g.XMin != -g.XMax || g.YMin != -g.YMax || g.XMax < 1 {
		t.Errorf("geometry %+v is not centred on the vertex", g)
	}
	// no field: the head and its sensors only
	bare, _ := Scalp(ss, ScalpOptions{})
	if strings.Contains(bare, "evenodd") || len(channelRE.FindAllString(bare, -1)) != len(ss) {
		t.Error("a map without a field draws colour, or loses sensors")
	}
}

func TestNetworkLinks(t *testing.T) {
	ss, _ := scalpInput()
	links := []Link{{A: 17, B: 18, R: 0.6}, {A: 13, B: 15, R: -0.3}}
	svg, _ := Network(ss, links, NetworkOptions{Legend: "lines: q ≤ 0.05"})
	if n := strings.Count(svg, "<title>O1–O2: r = 0.600</title>"); n != 1 {
		t.Errorf("O1–O2 drawn %d times", n)
	}
	if !strings.Contains(svg, "<title>P3–P4: r = −0.300</title>") {
		t.Error("no P3–P4 line")
	}
	// width 0.8 + 3.2·|r|/lim: the strongest is 4 units wide
	if !strings.Contains(svg, `stroke-width="4"`) || !strings.Contains(svg, `stroke-width="2.4"`) {
		t.Error("line widths do not follow |r|")
	}
	// weaker first, so the strongest is drawn on top
	if strings.Index(svg, "P3–P4") > strings.Index(svg, "O1–O2") {
		t.Error("the stronger link is drawn under the weaker")
	}
	dir, _ := Network(ss, []Link{{A: 7, B: 11, R: 0.4, Directed: true}, {A: 7, B: 7, R: 0.2, Directed: true}}, NetworkOptions{ArrowNote: "a → b"})
	if !strings.Contains(dir, "T7 → T8: r = 0.400") || !strings.Contains(dir, "Q") || !strings.Contains(dir, "arrows: a → b") {
		t.Error("a directed link is not a curved arrow with its legend")
	}
	if !strings.Contains(dir, "T7 → T7: r = 0.200</title><circle") {
		t.Error("a self link is not a loop")
	}
	defer func() {
		if recover() == nil {
			t.Error("a link outside the sensors does not panic")
		}
	}()
	Network(ss, []Link{{A: 0, B: 99}}, NetworkOptions{})
}

// TestMatrixValues: cells print their values up to 20 channels, not above;
// significant cells get an outline and a bold value.
func TestMatrixValues(t *testing.T) {
	for _, n := range []int{4, 20, 21} {
		v, l := matrixInput(n)
		svg, _ := Matrix(v, l, MatrixOptions{})
		printed := strings.Count(svg, `pointer-events="none">`)
		want := n * (n - 1) // the diagonal is undefined
		if n > matrixValuesMax {
			want = 0
		}
		if printed != want {
			t.Errorf("n = %d: %d values printed, want %d", n, printed, want)
		}
	}
	v, l := matrixInput(3)
	sig := [][]bool{{false, true, false}, {true, false, false}, {false, false, false}}
	svg, _ := Matrix(v, l, MatrixOptions{Significant: sig, MarkNote: "q ≤ 0.05"})
	if strings.Count(svg, `font-weight="700"`) != 2 || !strings.Contains(svg, "outlined: q ≤ 0.05") {
		t.Error("significant cells are not bold with a note")
	}
	if !strings.Contains(svg, ">"+fmtTick(v[0][1], 0.01)+"</text>") {
		t.Errorf("no value %s in the cells", fmtTick(v[0][1], 0.01))
	}
}
