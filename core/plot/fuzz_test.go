package plot

import (
	"encoding/binary"
	"math"
	"testing"
)

// The package reads no files, so its fuzz targets feed arbitrary numbers
// to the tick chooser and to the figures. Seeds come from the golden
// inputs (cases_test.go) plus edge values.

func FuzzNiceTicks(f *testing.F) {
	for _, s := range [][3]float64{{0, 1, 6}, {3, 40, 5}, {-1, 1.5, 5}, {5e-324, 1e-323, 5}, {-1e100, 1e100, 3}, {7, 7, 4}} {
		f.Add(s[0], s[1], int(s[2]))
	}
	f.Fuzz(func(t *testing.T, lo, hi float64, n int) {
		ticks, step := NiceTicks(lo, hi, n)
		if !finite(lo) || !finite(hi) {
			if ticks != nil {
				t.Fatalf("non-finite input gave %v", ticks)
			}
			return
		}
		if ticks == nil {
			return // a range too narrow for float64 steps
		}
		a, b := math.Min(lo, hi), math.Max(lo, hi)
		if lo != hi && (ticks[0] > a || ticks[len(ticks)-1] < b) {
			t.Fatalf("ticks %v do not cover [%v, %v]", ticks, a, b)
		}
		for i := 1; i < len(ticks); i++ {
			if !(ticks[i] > ticks[i-1]) {
				t.Fatalf("ticks %v not increasing", ticks)
			}
		}
		if !(step > 0) || len(ticks) > 1002 {
			t.Fatalf("step %v, %d ticks", step, len(ticks))
		}
		if inner, _ := InnerTicks(lo, hi, n); len(inner) > len(ticks)+1000 {
			t.Fatalf("InnerTicks gave %d ticks", len(inner))
		}
		if lo > 0 && hi > 0 {
			LogTicks(lo, hi, ticks, n)
		}
	})
}

func floatsOf(b []byte) []float64 {
	v := make([]float64, len(b)/8)
	for i := range v {
		v[i] = math.Float64frombits(binary.LittleEndian.Uint64(b[8*i:]))
	}
	return v
}

func bytesOf(v []float64) []byte {
	b := make([]byte, 8*len(v))
	for i, x := range v {
		binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(x))
	}
	return b
}

// FuzzFigures draws every figure from arbitrary float64 values (NaN, Inf,
// subnormals, huge magnitudes) and checks the SVG stays well formed.
func FuzzFigures(f *testing.F) {
	m, _ := matrixInput(4)
	var flat []float64
	for _, r := range m {
		flat = append(flat, r...)
	}
	f.Add(bytesOf(flat))
	x, y := scatterInput(8)
	f.Add(bytesOf(append(x, y...)))
	_, a, b := envelopeInput(16)
	f.Add(bytesOf(append(a, b...)))
	f.Add(bytesOf([]float64{math.Inf(1), math.NaN(), 5e-324, -1e300, 0, 0, 1e-310, 2}))
	f.Fuzz(func(t *testing.T, data []byte) {
		v := floatsOf(data)
		if len(v) < 4 || len(v) > 256 {
			return
		}
		n := int(math.Sqrt(float64(len(v))))
		mat := make([][]float64, n)
		labels := make([]string, n)
		clusters := make([][]int, n)
		for i := range mat {
			mat[i] = v[i*n : (i+1)*n]
			labels[i] = string(rune('A' + i%26))
			clusters[i] = make([]int, n)
			for j, x := range mat[i] {
				if x > 0 {
					clusters[i][j] = 1
				}
			}
		}
		grid := logGrid(2, 50, n)
		times := linGrid(-1, 0.1, n)
		half := len(v) / 2
		svgs := []string{}
		add := func(s string, _ Geometry) { svgs = append(svgs, s) }
		add(Matrix(mat, labels, MatrixOptions{}))
		add(TFPower(mat, grid, times, TFPowerOptions{LogColour: v[0] > 0, Min: v[1], Max: v[2],
			Windows: []Window{{Label: "w", T0: v[0], T1: v[1], F0: v[2], F1: v[3]}}}))
		add(TFCorr(mat, grid, times, clusters, []int{1}, TFCorrOptions{Limit: v[0]}))
		add(CrossFreq(mat, grid, grid, CrossFreqOptions{Limit: v[1]}))
		add(Scatter(v[:half], v[half:2*half], ScatterOptions{Ranks: v[0] > 0, Stat: &Stat{R: v[0], P: v[1], N: half}}))
		tm := linGrid(0, 0.01, half)
		add(EnvelopeTrace(tm, v[:half], v[half:2*half], EnvelopeOptions{}))
		add(GroupDots(labels, v[:n], GroupDotsOptions{Group: &Interval{Mean: v[0], Lo: v[1], Hi: v[2]}}))
		// the head figures: the 10-20 positions with arbitrary values, limits
		// and a field that returns them (NaN and Inf included)
		ss, _ := scalpInput()
		sig := make([][]bool, n)
		for i := range sig {
			sig[i] = make([]bool, n)
			sig[i][(i+1)%n] = v[i] > 0
		}
		add(Matrix(mat, labels, MatrixOptions{Significant: sig, MarkNote: "q"}))
		var links []Link
		for i := range ss {
			ss[i].Value = v[i%len(v)]
			ss[i].Marked = v[(i+1)%len(v)] > 0
			links = append(links, Link{A: i, B: (i * 7) % len(ss), R: v[(i+2)%len(v)], Directed: v[(i+3)%len(v)] > 0})
		}
		field := func(x, y float64) float64 { return v[int(math.Abs(x*y*1000))%len(v)] }
		add(Scalp(ss, ScalpOptions{Field: field, Limit: v[0], MarkNote: "q", SeedNote: "seed", Analysis: "a"}))
		add(Network(ss, links, NetworkOptions{Limit: v[1], ArrowNote: "a → b"}))
		for _, s := range svgs {
			if _, p := checkSVG(s); len(p) > 0 {
				t.Fatal(p)
			}
		}
	})
}
