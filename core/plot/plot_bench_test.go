package plot

import "testing"

// BenchmarkFigures renders a 40 × 1250 time–frequency map (decimated to
// 400 columns) and a 64 × 64 matrix (one titled cell each) and reports
// the SVG size.
func BenchmarkFigures(b *testing.B) {
	p, f, tm := tfPowerInput(40, 1250)
	m, labels := matrixInput(64)
	v, c, f2, t2 := tfCorrInput(40, 1250)
	for _, bc := range []struct {
		name string
		run  func() string
	}{
		{"TFPower/40x1250", func() string { s, _ := TFPower(p, f, tm, TFPowerOptions{LogColour: true}); return s }},
		{"TFCorr/40x1250", func() string { s, _ := TFCorr(v, f2, t2, c, []int{1, 2}, TFCorrOptions{}); return s }},
		{"Matrix/64x64", func() string { s, _ := Matrix(m, labels, MatrixOptions{}); return s }},
	} {
		b.Run(bc.name, func(b *testing.B) {
			var n int
			b.ReportAllocs()
			for b.Loop() {
				n = len(bc.run())
			}
			b.ReportMetric(float64(n), "svg-bytes")
		})
	}
}
