package plot

import (
	"math"
	"strconv"
)

// RGB is a colour in gamma-encoded sRGB, each channel in [0, 1].
type RGB struct{ R, G, B float64 }

// Lab is a colour in OKLab: L is perceived lightness (0 black, 1 white),
// a and b are the green–red and blue–yellow opponent axes.
type Lab struct{ L, A, B float64 }

// LCh is OKLab in polar form: C = √(a² + b²), H = atan2(b, a) in degrees.
type LCh struct{ L, C, H float64 }

// Lab converts polar OKLCh to OKLab: a = C·cos h, b = C·sin h.
func (c LCh) Lab() Lab {
	h := c.H * math.Pi / 180
	return Lab{c.L, c.C * math.Cos(h), c.C * math.Sin(h)}
}

// SRGBToLinear undoes the sRGB transfer function (IEC 61966-2-1):
// v/12.92 for v ≤ 0.04045, else ((v + 0.055)/1.055)^2.4.
func SRGBToLinear(v float64) float64 {
	if v <= 0.04045 {
		return v / 12.92
	}
	return math.Pow((v+0.055)/1.055, 2.4)
}

// LinearToSRGB applies the sRGB transfer function:
// 12.92·v for v ≤ 0.0031308, else 1.055·v^(1/2.4) − 0.055.
func LinearToSRGB(v float64) float64 {
	if v <= 0.0031308 {
		return 12.92 * v
	}
	return 1.055*math.Pow(v, 1/2.4) - 0.055
}

// LinearToOKLab converts linear-light sRGB (D65) to OKLab with the two
// matrices of Ottosson (2020): lms = M1·rgb, lms' = ∛lms, Lab = M2·lms'.
// Channels outside [0, 1] are allowed (the cube root is odd).
func LinearToOKLab(r, g, b float64) Lab {
	l := 0.4122214708*r + 0.5363325363*g + 0.0514459929*b
	m := 0.2119034982*r + 0.6806995451*g + 0.1073969566*b
	s := 0.0883024619*r + 0.2817188376*g + 0.6299787005*b
	l, m, s = math.Cbrt(l), math.Cbrt(m), math.Cbrt(s)
	return Lab{
		L: 0.2104542553*l + 0.7936177850*m - 0.0040720468*s,
		A: 1.9779984951*l - 2.4285922050*m + 0.4505937099*s,
		B: 0.0259040371*l + 0.7827717662*m - 0.8086757660*s,
	}
}

// OKLabToLinear is the inverse of LinearToOKLab: lms' = M2⁻¹·Lab,
// lms = lms'³, rgb = M1⁻¹·lms (Ottosson 2020).
func OKLabToLinear(c Lab) (r, g, b float64) {
	l := c.L + 0.3963377774*c.A + 0.2158037573*c.B
	m := c.L - 0.1055613458*c.A - 0.0638541728*c.B
	s := c.L - 0.0894841775*c.A - 1.2914855480*c.B
	l, m, s = l*l*l, m*m*m, s*s*s
	r = 4.0767416621*l - 3.3077115913*m + 0.2309699292*s
	g = -1.2684380046*l + 2.6097574011*m - 0.3413193965*s
	b = -0.0041960863*l - 0.7034186147*m + 1.7076147010*s
	return r, g, b
}

// OKLab converts a gamma-encoded sRGB colour to OKLab.
func (c RGB) OKLab() Lab {
	return LinearToOKLab(SRGBToLinear(c.R), SRGBToLinear(c.G), SRGBToLinear(c.B))
}

// RGB converts an OKLab colour to gamma-encoded sRGB. Channels are not
// clipped; see InGamut and Clip.
func (c Lab) RGB() RGB {
	r, g, b := OKLabToLinear(c)
	return RGB{signedSRGB(r), signedSRGB(g), signedSRGB(b)}
}

func signedSRGB(v float64) float64 {
	if v < 0 {
		return -LinearToSRGB(-v)
	}
	return LinearToSRGB(v)
}

// InGamut reports whether every channel lies in [−tol, 1 + tol].
func (c RGB) InGamut(tol float64) bool {
	return c.R >= -tol && c.R <= 1+tol && c.G >= -tol && c.G <= 1+tol && c.B >= -tol && c.B <= 1+tol
}

// Clip clamps each channel to [0, 1].
func (c RGB) Clip() RGB {
	return RGB{clamp01(c.R), clamp01(c.G), clamp01(c.B)}
}

// Hex is the colour as "#rrggbb" after clipping, each channel rounded
// to the nearest of 0…255.
func (c RGB) Hex() string {
	c = c.Clip()
	buf := []byte{'#', 0, 0, 0, 0, 0, 0}
	const digits = "0123456789abcdef"
	for i, v := range [3]float64{c.R, c.G, c.B} {
		n := int(math.Round(v * 255))
		buf[1+2*i] = digits[n>>4]
		buf[2+2*i] = digits[n&15]
	}
	return string(buf)
}

// ParseHex reads "#rrggbb". ok is false for anything else.
func ParseHex(s string) (c RGB, ok bool) {
	if len(s) != 7 || s[0] != '#' {
		return RGB{}, false
	}
	var v [3]float64
	for i := range v {
		n, err := strconv.ParseUint(s[1+2*i:3+2*i], 16, 8)
		if err != nil {
			return RGB{}, false
		}
		v[i] = float64(n) / 255
	}
	return RGB{v[0], v[1], v[2]}, true
}

// Simulation matrices of Machado, Oliveira & Fernandes (2009), "A
// physiologically-based model for simulation of color vision deficiency",
// IEEE TVCG 15(6):1291–1298, the severity-1.0 rows of their table of
// protanomaly and deuteranomaly matrices (full protanopia and
// deuteranopia), applied to linear RGB, to the six digits the table gives.
// Each row sums to 1, so white maps to white.
var (
	machadoDeutan = [3][3]float64{
		{0.367322, 0.860646, -0.227968},
		{0.280085, 0.672501, 0.047413},
		{-0.011820, 0.042940, 0.968881},
	}
	machadoProtan = [3][3]float64{
		{0.152286, 1.052583, -0.204868},
		{0.114503, 0.786281, 0.099216},
		{-0.003882, -0.048116, 1.051998},
	}
)

// Deuteranope simulates full deuteranopia (Machado et al. 2009, severity 1):
// rgb_lin' = M_d · rgb_lin, result clipped to [0, 1].
func (c RGB) Deuteranope() RGB { return c.simulate(&machadoDeutan) }

// Protanope simulates full protanopia (Machado et al. 2009, severity 1).
func (c RGB) Protanope() RGB { return c.simulate(&machadoProtan) }

func (c RGB) simulate(m *[3][3]float64) RGB {
	in := [3]float64{SRGBToLinear(c.R), SRGBToLinear(c.G), SRGBToLinear(c.B)}
	var out [3]float64
	for i := range out {
		out[i] = clamp01(m[i][0]*in[0] + m[i][1]*in[1] + m[i][2]*in[2])
		out[i] = LinearToSRGB(out[i])
	}
	return RGB{out[0], out[1], out[2]}
}

// DeltaE is the Euclidean distance between two colours in OKLab.
func DeltaE(p, q Lab) float64 {
	return math.Sqrt((p.L-q.L)*(p.L-q.L) + (p.A-q.A)*(p.A-q.A) + (p.B-q.B)*(p.B-q.B))
}

func clamp01(v float64) float64 {
	switch {
	case v < 0:
		return 0
	case v > 1:
		return 1
	}
	return v
}

// lutSize is the number of colours a scale is quantised to in figures.
const lutSize = 256

// Scale is a colour scale: piecewise-linear interpolation in OKLab between
// stops placed evenly on [0, 1]. A Scale is immutable; its 256-colour
// lookup table is built once when the scale is made.
type Scale struct {
	name      string
	diverging bool
	stops     []Lab
	lut       [lutSize]string
}

func newScale(name string, diverging bool, stops ...LCh) *Scale {
	s := &Scale{name: name, diverging: diverging}
	for _, c := range stops {
		s.stops = append(s.stops, c.Lab())
	}
	for i := range s.lut {
		s.lut[i] = s.Lab(float64(i) / (lutSize - 1)).RGB().Hex()
	}
	return s
}

// Name is the scale's name.
func (s *Scale) Name() string { return s.name }

// Diverging reports whether the scale is centred on a neutral at t = 0.5.
func (s *Scale) Diverging() bool { return s.diverging }

// Lab is the colour at t ∈ [0, 1] (clamped): with k stops at
// t_i = i/(k−1), Lab(t) = (1 − u)·stop_i + u·stop_{i+1}, u = (t − t_i)(k−1).
func (s *Scale) Lab(t float64) Lab {
	if math.IsNaN(t) {
		panic("plot: Scale.Lab of NaN")
	}
	t = clamp01(t)
	n := len(s.stops) - 1
	x := t * float64(n)
	i := int(x)
	if i >= n {
		i = n - 1
	}
	u := x - float64(i)
	p, q := s.stops[i], s.stops[i+1]
	return Lab{p.L + u*(q.L-p.L), p.A + u*(q.A-p.A), p.B + u*(q.B-p.B)}
}

// RGB is the sRGB colour at t ∈ [0, 1], clipped to the gamut.
func (s *Scale) RGB(t float64) RGB { return s.Lab(t).RGB().Clip() }

// Hex is the quantised colour at t ∈ [0, 1] as "#rrggbb": the nearest of
// the scale's 256 table entries.
func (s *Scale) Hex(t float64) string { return s.lut[lutIndex(t)] }

func lutIndex(t float64) int {
	if math.IsNaN(t) {
		return 0
	}
	return int(math.Round(clamp01(t) * (lutSize - 1)))
}

// Dune is the sequential scale: lightness rises monotonically from
// L = 0.24 (deep slate-blue) through a dusky mauve and muted copper to
// L = 0.95 (pale sand). Its hue runs from blue to yellow, the axis that
// deuteranopes and protanopes keep, through a low-chroma middle.
var Dune = newScale("dune", false,
	LCh{0.24, 0.075, 262},
	LCh{0.42, 0.050, 318},
	LCh{0.61, 0.100, 48},
	LCh{0.79, 0.090, 68},
	LCh{0.95, 0.040, 88},
)

// Heath is the diverging scale: deep heather violet (L = 0.34) at t = 0, a
// light cool grey with a trace of lilac (L = 0.95) at t = 0.5 and dark
// olive-gold (L = 0.42) at t = 1; lightness is monotonic on each half.
// Violet against olive-gold is kept apart by the blue–yellow channel that
// dichromats retain.
var Heath = newScale("heath", true,
	LCh{0.34, 0.120, 295},
	LCh{0.64, 0.100, 298},
	LCh{0.95, 0.012, 300},
	LCh{0.72, 0.110, 100},
	LCh{0.42, 0.085, 105},
)

// The pair of line colours for figures that draw two series (the first
// solid, the second dashed) and the two marks of group figures: a heather
// violet at L = 0.40 and a dark gold at L = 0.64, apart in hue for every
// viewer, in lightness for greyscale print, and by the dash.
var (
	LineA = LCh{0.40, 0.120, 295}.Lab().RGB().Hex()
	LineB = LCh{0.64, 0.120, 95}.Lab().RGB().Hex()
	// lineAEdge outlines LineA's dots in scatters: the same violet, darker.
	lineAEdge = LCh{0.28, 0.090, 295}.Lab().RGB().Hex()
)

// undefinedFill is the grey used for undefined (NaN) cells.
const undefinedFill = "#c9c9c9"
