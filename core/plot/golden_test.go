package plot

import (
	"bytes"
	"encoding/xml"
	"errors"
	"flag"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the golden SVG files in testdata/plot")

const goldenDir = "../../testdata/plot"

// TestGolden renders each figure's small input and compares it byte for
// byte with testdata/plot/<name>.svg. On a mismatch it writes
// <name>.svg.got next to the golden file. go test -update rewrites them.
func TestGolden(t *testing.T) {
	for _, c := range figureCases() {
		t.Run(c.name, func(t *testing.T) {
			svg, _ := c.render()
			path := filepath.Join(goldenDir, c.name+".svg")
			if *update {
				if err := os.WriteFile(path, []byte(svg), 0o644); err != nil {
					t.Fatal(err)
				}
				return
			}
			want, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("%v (run go test -update to create it)", err)
			}
			if !bytes.Equal(want, []byte(svg)) {
				got := path + ".got"
				if err := os.WriteFile(got, []byte(svg), 0o644); err != nil {
					t.Fatal(err)
				}
				t.Errorf("%s differs from the golden file; wrote %s", c.name, got)
			}
		})
	}
}

// TestDeterministic renders every figure twice and expects identical bytes.
func TestDeterministic(t *testing.T) {
	for _, c := range figureCases() {
		t.Run(c.name, func(t *testing.T) {
			a, ga := c.render()
			b, gb := c.render()
			if a != b || ga != gb {
				t.Error("two renderings differ")
			}
		})
	}
}

// svgInfo is what checkSVG learns from one document.
type svgInfo struct {
	viewBox  string
	texts    []string
	titles   []string
	plotArea map[string]string
	elements map[string]int
}

// checkSVG walks the document with encoding/xml and reports every
// structural rule it breaks: it must parse, have an <svg> root with a
// viewBox, refer to nothing outside itself (no href of any kind, no
// url(…), no script, foreignObject or style element; an <image> only
// as an embedded PNG, data:image/png;base64, which is a large heat map's
// cells, see rasterCells), carry no
// NaN or Inf in any attribute, and keep text as <text>.
func checkSVG(svg string) (svgInfo, []string) {
	info := svgInfo{plotArea: map[string]string{}, elements: map[string]int{}}
	var problems []string
	dec := xml.NewDecoder(strings.NewReader(svg))
	var stack []string
	var chars strings.Builder
	for {
		tok, err := dec.Token()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			problems = append(problems, "XML: "+err.Error())
			break
		}
		switch tk := tok.(type) {
		case xml.StartElement:
			name := tk.Name.Local
			info.elements[name]++
			if len(stack) == 0 {
				if name != "svg" || tk.Name.Space != "http://www.w3.org/2000/svg" {
					problems = append(problems, "root is not an SVG element")
				}
			}
			switch name {
			case "script", "foreignObject", "style", "use", "a", "iframe", "link":
				problems = append(problems, "forbidden element <"+name+">")
			}
			id := ""
			for _, a := range tk.Attr {
				an := strings.ToLower(a.Name.Local)
				v := a.Value
				if name == "image" && an == "href" && a.Name.Space == "" && strings.HasPrefix(v, "data:image/png;base64,") {
					continue // the embedded cells of a large heat map
				}
				if an == "href" || strings.HasSuffix(an, "href") || a.Name.Space != "" && a.Name.Space != "http://www.w3.org/2000/svg" && a.Name.Space != "xmlns" {
					problems = append(problems, "external reference attribute "+a.Name.Local+"="+v)
				}
				if strings.Contains(v, "url(") || strings.Contains(v, "@import") {
					problems = append(problems, "reference in "+an+"="+v)
				}
				if an != "xmlns" && strings.Contains(v, "://") {
					problems = append(problems, "address in "+an+"="+v)
				}
				if strings.Contains(v, "NaN") || strings.Contains(v, "Inf") {
					problems = append(problems, "non-finite number in "+an+"="+v)
				}
				if strings.HasPrefix(an, "on") {
					problems = append(problems, "event handler "+an)
				}
				if name == "svg" && len(stack) == 0 && an == "viewbox" {
					info.viewBox = v
				}
				if an == "id" {
					id = v
				}
			}
			if id == "plot-area" {
				for _, a := range tk.Attr {
					info.plotArea[a.Name.Local] = a.Value
				}
			}
			stack = append(stack, name)
			chars.Reset()
		case xml.EndElement:
			name := stack[len(stack)-1]
			stack = stack[:len(stack)-1]
			switch name {
			case "text":
				info.texts = append(info.texts, chars.String())
			case "title":
				info.titles = append(info.titles, chars.String())
			}
			chars.Reset()
		case xml.CharData:
			chars.Write(tk)
		}
	}
	if info.viewBox == "" {
		problems = append(problems, "no viewBox on the root")
	} else if f := strings.Fields(info.viewBox); len(f) != 4 || f[0] != "0" || f[1] != "0" {
		problems = append(problems, "odd viewBox "+info.viewBox)
	}
	if len(info.texts) == 0 {
		problems = append(problems, "no <text> labels")
	}
	for _, s := range info.texts {
		if strings.TrimSpace(s) == "" {
			problems = append(problems, "empty <text>")
		}
	}
	if info.elements["path"]+info.elements["rect"] == 0 {
		problems = append(problems, "nothing drawn")
	}
	return info, problems
}

func TestStructure(t *testing.T) {
	for _, c := range figureCases() {
		t.Run(c.name, func(t *testing.T) {
			svg, g := c.render()
			info, problems := checkSVG(svg)
			for _, p := range problems {
				t.Error(p)
			}
			if want := "0 0 " + num(g.ViewW) + " " + num(g.ViewH); info.viewBox != want {
				t.Errorf("viewBox %q, geometry says %q", info.viewBox, want)
			}
			// the plot-area rect carries the returned geometry
			pa := info.plotArea
			for _, f := range []struct {
				attr string
				v    float64
			}{
				{"data-left", g.Left}, {"data-top", g.Top}, {"data-width", g.Width}, {"data-height", g.Height},
				{"data-xmin", g.XMin}, {"data-xmax", g.XMax}, {"data-ymin", g.YMin}, {"data-ymax", g.YMax},
				{"data-view-width", g.ViewW}, {"data-view-height", g.ViewH},
			} {
				got, err := strconv.ParseFloat(pa[f.attr], 64)
				if err != nil || abs(got-f.v) > 1e-6*max(1, abs(f.v)) {
					t.Errorf("%s = %q, geometry has %v", f.attr, pa[f.attr], f.v)
				}
			}
			if pa["data-xlog"] != strconv.FormatBool(g.XLog) || pa["data-ylog"] != strconv.FormatBool(g.YLog) {
				t.Errorf("data-xlog/ylog %q/%q, geometry %v/%v", pa["data-xlog"], pa["data-ylog"], g.XLog, g.YLog)
			}
			// the plot area lies inside the viewBox
			if g.Left < 0 || g.Top < 0 || g.Left+g.Width > g.ViewW || g.Top+g.Height > g.ViewH {
				t.Errorf("plot area %+v outside the viewBox", g)
			}
			// font sizes stay readable: tick labels 9 units in a 360-wide figure
			if !strings.Contains(svg, `font-family="sans-serif" font-size="9"`) {
				t.Error("root font is not sans-serif 9")
			}
		})
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}
