package plot

import (
	"context"
	"fmt"
	"image"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

const chromiumPath = "/usr/bin/chromium"

// screenshot renders the figures inline on one page, two per row, each
// at 720 × 520 (twice its viewBox), with one headless Chromium process,
// and decodes the PNG.
func screenshot(dir string, svgs []string) (image.Image, error) {
	var page strings.Builder
	page.WriteString(`<!DOCTYPE html><html><head><meta charset="utf-8"><style>html,body{margin:0;background:#fff}` +
		`div{display:grid;grid-template-columns:720px 720px}svg{display:block;width:720px;height:520px}</style></head><body><div>`)
	for _, s := range svgs {
		page.WriteString(s)
	}
	page.WriteString("</div></body></html>")
	html := filepath.Join(dir, "figures.html")
	shot := filepath.Join(dir, "figures.png")
	if err := os.WriteFile(html, []byte(page.String()), 0o644); err != nil {
		return nil, err
	}
	rows := (len(svgs) + 1) / 2
	ctx, cancel := context.WithTimeout(context.Background(), 60*time.Second)
	defer cancel()
	cmd := exec.CommandContext(ctx, chromiumPath, "--headless", "--no-sandbox", "--disable-gpu",
		"--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--no-first-run", "--hide-scrollbars", "--user-data-dir="+filepath.Join(dir, "profile"),
		"--screenshot="+shot, fmt.Sprintf("--window-size=%d,%d", 2*cellW, rows*cellH), "file://"+html)
	if out, err := cmd.CombinedOutput(); err != nil {
		return nil, fmt.Errorf("chromium: %v\n%s", err, out)
	}
	f, err := os.Open(shot)
	if err != nil {
		return nil, fmt.Errorf("no screenshot: %v", err)
	}
	defer f.Close()
	return png.Decode(f)
}

const cellW, cellH = 720, 520

// TestRender draws every figure in headless Chromium and checks that each
// figure's region is not blank: more than 2 % of its pixels differ from
// the white background and it has at least 3 distinct colours. Set
// PLOT_PNG_DIR to keep the page and one PNG per figure for inspection.
func TestRender(t *testing.T) {
	if testing.Short() {
		t.Skip("render test skipped in -short mode")
	}
	if _, err := os.Stat(chromiumPath); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("chromium not found at %s", chromiumPath)
		}
		t.Skipf("chromium not found at %s", chromiumPath)
	}
	keep := os.Getenv("PLOT_PNG_DIR")
	dir := keep
	if dir == "" {
		dir = t.TempDir()
	} else if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	cases := figureCases()
	var svgs []string
	for _, c := range cases {
		s, _ := c.render()
		svgs = append(svgs, s)
	}
	page, err := screenshot(dir, svgs)
	if err != nil {
		t.Fatal(err)
	}
	if b := page.Bounds(); b.Dx() != 2*cellW || b.Dy() != (len(cases)+1)/2*cellH {
		t.Fatalf("screenshot is %d×%d, want %d×%d", b.Dx(), b.Dy(), 2*cellW, (len(cases)+1)/2*cellH)
	}
	sub, ok := page.(interface {
		SubImage(image.Rectangle) image.Image
	})
	if !ok {
		t.Fatalf("cannot crop a %T", page)
	}
	for i, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			x0, y0 := (i%2)*cellW, (i/2)*cellH
			img := sub.SubImage(image.Rect(x0, y0, x0+cellW, y0+cellH))
			if keep != "" {
				writePNG(t, filepath.Join(keep, c.name+".png"), img)
			}
			b := img.Bounds()
			colours := map[uint32]bool{}
			ink := 0
			for y := b.Min.Y; y < b.Max.Y; y++ {
				for x := b.Min.X; x < b.Max.X; x++ {
					r, g, bl, _ := img.At(x, y).RGBA()
					r, g, bl = r>>8, g>>8, bl>>8
					colours[r<<16|g<<8|bl] = true
					if r < 250 || g < 250 || bl < 250 {
						ink++
					}
				}
			}
			frac := float64(ink) / float64(b.Dx()*b.Dy())
			t.Logf("%.1f %% ink, %d colours", 100*frac, len(colours))
			if frac <= 0.02 {
				t.Errorf("only %.2f %% of pixels differ from the background", 100*frac)
			}
			if len(colours) < 3 {
				t.Errorf("only %d distinct colours", len(colours))
			}
		})
	}
}

func writePNG(t *testing.T, path string, img image.Image) {
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if err := png.Encode(f, img); err != nil {
		t.Fatal(err)
	}
}
