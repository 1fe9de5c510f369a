package plot

import (
	"strings"
	"testing"
)

// TestScatterFitLine: the scatter's line is the least-squares line. Worked
// example: (1, 2), (2, 4), (3, 5) give x̄ = 2, ȳ = 11/3, Σ(x − x̄)(y − ȳ) = 3
// and Σ(x − x̄)² = 2, so the slope is 1.5 (numpy.polyfit(x, y, 1) gives the
// same, from memory of its definition as least squares).
func TestScatterFitLine(t *testing.T) {
	cases := []struct {
		name string
		x, y []float64
		want string // "" for no line
	}{
		{"worked example", []float64{1, 2, 3}, []float64{2, 4, 5}, "slope 1.5<"},
		{"falling", []float64{1, 2, 3, 4}, []float64{4, 3, 2, 1}, "slope −1<"},
		{"two points", []float64{1, 2}, []float64{1, 2}, ""},
		{"constant x", []float64{1, 1, 1}, []float64{1, 2, 3}, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			svg, _ := Scatter(c.x, c.y, ScatterOptions{Frame: Frame{Title: "t"}})
			has := strings.Contains(svg, "least-squares line")
			if c.want == "" {
				if has {
					t.Error("a line where none can be fitted")
				}
				return
			}
			if !strings.Contains(svg, c.want) {
				t.Errorf("want %q in the line's title; svg has line: %v", c.want, has)
			}
		})
	}
}
