package plot

import (
	"math"
	"math/rand/v2"
	"strconv"

	"amplink/core/sensors"
)

// Small deterministic inputs, one per figure, shared by the golden,
// structural and render tests. The data are synthetic shapes chosen to
// exercise each feature (log rows, zeros on a log colour scale, NaN cells,
// outliers, clusters, ties); they are not reference values.

func logGrid(lo, hi float64, n int) []float64 {
	g := make([]float64, n)
	for i := range g {
		g[i] = lo * math.Pow(hi/lo, float64(i)/float64(n-1))
	}
	return g
}

func linGrid(lo, step float64, n int) []float64 {
	g := make([]float64, n)
	for i := range g {
		g[i] = math.Round((lo+float64(i)*step)*1e9) / 1e9
	}
	return g
}

func tfPowerInput(nf, nt int) ([][]float64, []float64, []float64) {
	freqs := logGrid(3, 40, nf)
	times := linGrid(-1, 2.5/float64(nt-1), nt)
	p := make([][]float64, nf)
	for i, f := range freqs {
		p[i] = make([]float64, nt)
		for j, t := range times {
			v := 20/f + 6*math.Exp(-sq((t-0.5)/0.2)-sq((f-3.5)/1.5))
			v += 3 * math.Exp(-sq((t+0.3)/0.25)-sq((f-20)/4))
			p[i][j] = v
		}
	}
	p[nf-1][0] = 0 // a zero on a log colour scale takes the lowest colour
	return p, freqs, times
}

func sq(x float64) float64 { return x * x }

type figureCase struct {
	name   string
	render func() (string, Geometry)
}

func figureCases() []figureCase {
	return []figureCase{
		{"tfpower", func() (string, Geometry) {
			p, f, t := tfPowerInput(12, 51)
			return TFPower(p, f, t, TFPowerOptions{
				Frame:     Frame{Title: "C4 power, mean of 40 trials"},
				LogColour: true,
				Windows: []Window{
					{Label: "seed", T0: -0.5, T1: -0.1, F0: 15, F1: 25},
					{Label: "target", T0: 0.3, T1: 0.8, F0: 3, F1: 5},
				},
			})
		}},
		{"scatter", func() (string, Geometry) {
			x, y := scatterInput(40)
			return Scatter(x, y, ScatterOptions{
				Frame: Frame{Title: "C4 beta → Pz theta",
					XLabel: "seed power", XUnit: "µV²", YLabel: "target power", YUnit: "µV²"},
				Stat: &Stat{Name: "r", R: 0.512, P: 0.00071, N: 40},
			})
		}},
		{"scatter_rank", func() (string, Geometry) {
			x, y := scatterInput(40)
			x[3], x[4] = x[2], x[2] // ties share a mean rank
			return Scatter(x, y, ScatterOptions{
				Frame: Frame{Title: "C4 beta → Pz theta", XLabel: "seed power", YLabel: "target power"},
				Ranks: true,
				Stat:  &Stat{Name: "ρ", R: 0.48, P: 0.0017, N: 40},
			})
		}},
		{"matrix", func() (string, Geometry) {
			v, l := matrixInput(6)
			return Matrix(v, l, MatrixOptions{Frame: Frame{Title: "Alpha envelope correlation"}})
		}},
		{"matrix_marked", func() (string, Geometry) {
			v, l := matrixInput(4)
			sig := make([][]bool, 4)
			for i := range sig {
				sig[i] = make([]bool, 4)
			}
			sig[0][1], sig[1][0] = true, true
			return Matrix(v, l, MatrixOptions{Frame: Frame{Title: "Alpha envelope correlation"}, Significant: sig, MarkNote: "q ≤ 0.05 (fdr)"})
		}},
		{"scalp", func() (string, Geometry) {
			ss, field := scalpInput()
			return Scalp(ss, ScalpOptions{Frame: Frame{Title: "beta-to-delta: r with the C4 seed", Width: 360, Height: 320},
				Field: field, MarkNote: "q ≤ 0.05 (fdr)", SeedNote: "seed C4", Analysis: "beta-to-delta"})
		}},
		{"network", func() (string, Geometry) {
			ss, _ := scalpInput()
			idx := map[string]int{}
			for i, s := range ss {
				ss[i].Value, ss[i].Marked, ss[i].Seed = math.NaN(), false, false
				idx[s.Name] = i
			}
			links := []Link{{A: idx["O1"], B: idx["O2"], R: 0.62}, {A: idx["P3"], B: idx["P4"], R: 0.21}, {A: idx["O1"], B: idx["P4"], R: -0.12}}
			return Network(ss, links, NetworkOptions{Frame: Frame{Title: "posterior-alpha: envelope r", Width: 360, Height: 330},
				Legend: "lines: pairs with q ≤ 0.05 (fdr)"})
		}},
		{"network_directed", func() (string, Geometry) {
			ss, _ := scalpInput()
			idx := map[string]int{}
			for i, s := range ss {
				ss[i].Value, ss[i].Marked, ss[i].Seed = math.NaN(), false, false
				idx[s.Name] = i
			}
			links := []Link{{A: idx["T7"], B: idx["T8"], R: 0.45, Directed: true}, {A: idx["T8"], B: idx["T7"], R: 0.08, Directed: true},
				{A: idx["T7"], B: idx["T7"], R: -0.2, Directed: true}}
			return Network(ss, links, NetworkOptions{Frame: Frame{Title: "temporal-beta-gamma: envelope r across bands", Width: 360, Height: 340},
				Legend: "lines: the 3 strongest pairs", ArrowNote: "14–18 Hz → 60–80 Hz"})
		}},
		{"crossfreq", func() (string, Geometry) {
			s := logGrid(4, 40, 10)
			t := logGrid(20, 80, 8)
			v := make([][]float64, len(s))
			for i, fs := range s {
				v[i] = make([]float64, len(t))
				for j, ft := range t {
					v[i][j] = 0.4*math.Exp(-sq(math.Log(fs/10))/0.3-sq(math.Log(ft/60))/0.2) - 0.15*math.Exp(-sq(math.Log(fs/25))/0.2)
				}
			}
			return CrossFreq(v, s, t, CrossFreqOptions{Frame: Frame{Title: "C3 → C4 envelope coupling"}})
		}},
		{"tfcorr", func() (string, Geometry) {
			v, c, f, t := tfCorrInput(10, 31)
			return TFCorr(v, f, t, c, []int{1, 2}, TFCorrOptions{
				Frame:   Frame{Title: "Seed C4 15–25 Hz vs Pz"},
				Windows: []Window{{Label: "seed", T0: -0.5, T1: -0.1, F0: 15, F1: 25}},
			})
		}},
		{"envelope", func() (string, Geometry) {
			t, a, b := envelopeInput(500)
			return EnvelopeTrace(t, a, b, EnvelopeOptions{
				Frame: Frame{Title: "8–12 Hz envelopes", YLabel: "amplitude", YUnit: "µV"},
				NameA: "P3", NameB: "P4 (orthogonalised)",
			})
		}},
		{"groupdots", func() (string, Geometry) {
			l := []string{"sub-01", "sub-02", "sub-03", "sub-04", "sub-05", "sub-06", "sub-07", "sub-08"}
			v := []float64{0.42, 0.31, 0.55, math.NaN(), 0.12, -0.08, 0.37, 0.29}
			return GroupDots(l, v, GroupDotsOptions{
				Frame: Frame{Title: "P3–P4 alpha AEC by recording", XLabel: "r"},
				Group: &Interval{Mean: 0.283, Lo: 0.13, Hi: 0.42, Note: "95% CI"},
			})
		}},
	}
}

// scalpInput places the 19 channels of the 10-20 system and gives each
// a value from a smooth bump centred on Pz, with a spherical spline
// through them as the field.
func scalpInput() ([]Sensor, func(x, y float64) float64) {
	names := []string{"Fp1", "Fp2", "F7", "F3", "Fz", "F4", "F8", "T7", "C3", "Cz", "C4", "T8", "P7", "P3", "Pz", "P4", "P8", "O1", "O2"}
	pz, _, _ := sensors.Standard("Pz")
	var ss []Sensor
	var pos []sensors.Point
	var vals []float64
	for _, n := range names {
		p, _, _ := sensors.Standard(n)
		x, y := sensors.Project(p)
		v := math.Round(1000*(0.6*math.Exp(-2.5*(1-p.Dot(pz))*4)-0.08)) / 1000
		ss = append(ss, Sensor{Name: n, X: x, Y: y, Value: v, Marked: v > 0.3, Seed: n == "C4"})
		pos = append(pos, p)
		vals = append(vals, v)
	}
	sp, err := sensors.NewSpline(pos, vals, 0)
	if err != nil {
		panic(err)
	}
	return ss, func(x, y float64) float64 { return sp.At(sensors.Unproject(x, y)) }
}

func scatterInput(n int) ([]float64, []float64) {
	rng := rand.New(rand.NewPCG(1, 0x706c6f74))
	x := make([]float64, n)
	y := make([]float64, n)
	for i := range x {
		z := rng.NormFloat64()
		x[i] = math.Exp(0.5*z) * 10
		y[i] = math.Exp(0.3*z+0.4*rng.NormFloat64()) * 4
	}
	x[n-1], y[n-1] = 60, 3 // an outlier far right
	return x, y
}

func matrixInput(n int) ([][]float64, []string) {
	names := []string{"Fz", "Cz", "Pz", "C3", "C4", "O1", "O2", "P3", "P4", "T7", "T8", "F3", "F4"}
	labels := make([]string, n)
	for i := range labels {
		if i < len(names) {
			labels[i] = names[i]
		} else {
			labels[i] = "E" + strconv.Itoa(i+1)
		}
	}
	v := make([][]float64, n)
	for i := range v {
		v[i] = make([]float64, n)
		for j := range v[i] {
			switch {
			case i == j:
				v[i][j] = math.NaN()
			default:
				v[i][j] = math.Round(1000*0.8*math.Cos(float64(i+j)*0.9)*math.Exp(-math.Abs(float64(i-j))/4)) / 1000
			}
		}
	}
	return v, labels
}

func tfCorrInput(nf, nt int) ([][]float64, [][]int, []float64, []float64) {
	f := logGrid(4, 40, nf)
	t := linGrid(-0.5, 0.05, nt)
	v := make([][]float64, nf)
	c := make([][]int, nf)
	for i, fi := range f {
		v[i] = make([]float64, nt)
		c[i] = make([]int, nt)
		for j, tj := range t {
			r := 0.6*math.Exp(-sq((tj-0.5)/0.2)-sq(math.Log(fi/6)/0.3)) - 0.45*math.Exp(-sq((tj-0.1)/0.15)-sq(math.Log(fi/25)/0.15))
			v[i][j] = math.Round(r*1000) / 1000
			switch {
			case r > 0.3:
				c[i][j] = 1
			case r < -0.25:
				c[i][j] = 2
			}
		}
	}
	return v, c, f, t
}

func envelopeInput(n int) ([]float64, []float64, []float64) {
	t := linGrid(0, 0.004, n)
	a := make([]float64, n)
	b := make([]float64, n)
	for k, tk := range t {
		a[k] = 3 + 2*math.Sin(2*math.Pi*0.7*tk) + 0.8*math.Sin(2*math.Pi*2.3*tk)
		b[k] = 2.5 + 1.5*math.Sin(2*math.Pi*0.7*tk-0.6) + 0.6*math.Cos(2*math.Pi*3.1*tk)
	}
	return t, a, b
}
