package plot

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
)

func near(a, b, tol float64) bool { return math.Abs(a-b) <= tol }

func TestOKLabKnown(t *testing.T) {
	for _, c := range []struct {
		name string
		in   RGB
		want Lab
		tol  float64
	}{
		// Ottosson (2020): white maps to L = 1, a = b = 0 (the M2 rows are
		// scaled so); the matrices are rounded to 10 digits, hence 1e-4.
		{"white", RGB{1, 1, 1}, Lab{1, 0, 0}, 1e-4},
		{"black", RGB{0, 0, 0}, Lab{0, 0, 0}, 1e-12},
		// sRGB #ff0000: L 0.62796, a 0.22486, b 0.12585 — from memory of
		// Ottosson's post and the CSS Color 4 examples (oklab(62.8% 0.2249 0.1258)).
		{"red", RGB{1, 0, 0}, Lab{0.62796, 0.22486, 0.12585}, 5e-5},
	} {
		t.Run(c.name, func(t *testing.T) {
			got := c.in.OKLab()
			if !near(got.L, c.want.L, c.tol) || !near(got.A, c.want.A, c.tol) || !near(got.B, c.want.B, c.tol) {
				t.Errorf("OKLab(%v) = %+v, want %+v ± %g", c.in, got, c.want, c.tol)
			}
		})
	}
}

type colourRef struct {
	Source string `json:"source"`
	Numpy  string `json:"numpy"`
	OKLab  []struct {
		Hex string     `json:"hex"`
		Lab [3]float64 `json:"lab"`
	} `json:"oklab"`
	Deuteranope []struct {
		Hex string     `json:"hex"`
		RGB [3]float64 `json:"rgb"`
	} `json:"deuteranope"`
	Protanope []struct {
		Hex string     `json:"hex"`
		RGB [3]float64 `json:"rgb"`
	} `json:"protanope"`
}

func loadColourRef(t *testing.T) colourRef {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(goldenDir, "colour_ref.json"))
	if err != nil {
		t.Fatal(err)
	}
	var r colourRef
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	if len(r.OKLab) == 0 || len(r.Deuteranope) == 0 || len(r.Protanope) == 0 {
		t.Fatal("colour_ref.json has no vectors")
	}
	return r
}

// numpy 1.24.2, testdata/plot/make_ref.py: OKLab through XYZ (the sRGB
// matrix of IEC 61966-2-1, then Ottosson's XYZ→LMS M1); the Go code uses
// the pre-multiplied linear-sRGB matrix, so the routes differ by the
// 4-digit rounding of the XYZ matrix (≤ 3e-4).
func TestOKLabAgainstNumpy(t *testing.T) {
	ref := loadColourRef(t)
	for _, c := range ref.OKLab {
		t.Run(c.Hex, func(t *testing.T) {
			in, ok := ParseHex(c.Hex)
			if !ok {
				t.Fatalf("bad hex %q", c.Hex)
			}
			got := in.OKLab()
			const tol = 5e-4
			if !near(got.L, c.Lab[0], tol) || !near(got.A, c.Lab[1], tol) || !near(got.B, c.Lab[2], tol) {
				t.Errorf("OKLab(%s) = %+v, numpy %v", c.Hex, got, c.Lab)
			}
		})
	}
}

// numpy 1.24.2, testdata/plot/make_ref.py: Machado et al. (2009)
// severity-1 matrices applied to linear sRGB.
func TestDichromatAgainstNumpy(t *testing.T) {
	ref := loadColourRef(t)
	check := func(name, hex string, want [3]float64, f func(RGB) RGB) {
		t.Run(name+"/"+hex, func(t *testing.T) {
			in, _ := ParseHex(hex)
			got := f(in)
			if !near(got.R, want[0], 1e-6) || !near(got.G, want[1], 1e-6) || !near(got.B, want[2], 1e-6) {
				t.Errorf("%s(%s) = %+v, numpy %v", name, hex, got, want)
			}
		})
	}
	for _, c := range ref.Deuteranope {
		check("deuteranope", c.Hex, c.RGB, RGB.Deuteranope)
	}
	for _, c := range ref.Protanope {
		check("protanope", c.Hex, c.RGB, RGB.Protanope)
	}
}

func TestOKLabRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 0x706c6f74))
	for i := 0; i < 2000; i++ {
		in := RGB{rng.Float64(), rng.Float64(), rng.Float64()}
		out := in.OKLab().RGB()
		// 1e-5 is 1/400 of an 8-bit step; the published inverse matrices
		// carry 10 digits, which limits the round trip near black.
		if !near(in.R, out.R, 1e-5) || !near(in.G, out.G, 1e-5) || !near(in.B, out.B, 1e-5) {
			t.Fatalf("round trip %+v → %+v", in, out)
		}
	}
	// LCh ↔ Lab: C = √(a²+b²), h = atan2(b, a)
	l := LCh{0.7, 0.1, 120}.Lab()
	if !near(math.Hypot(l.A, l.B), 0.1, 1e-12) || !near(math.Atan2(l.B, l.A)*180/math.Pi, 120, 1e-9) {
		t.Errorf("LCh to Lab gave %+v", l)
	}
}

func TestHex(t *testing.T) {
	for _, c := range []struct {
		in   RGB
		want string
	}{
		{RGB{1, 1, 1}, "#ffffff"},
		{RGB{0, 0, 0}, "#000000"},
		{RGB{1.2, -0.1, 0.5}, "#ff0080"},
		{RGB{0x12 / 255.0, 0x34 / 255.0, 0xab / 255.0}, "#1234ab"},
	} {
		if got := c.in.Hex(); got != c.want {
			t.Errorf("%+v.Hex() = %s, want %s", c.in, got, c.want)
		}
		if c.in.InGamut(0) {
			back, ok := ParseHex(c.want)
			if !ok || back.Hex() != c.want {
				t.Errorf("ParseHex(%s) = %+v, %v", c.want, back, ok)
			}
		}
	}
	for _, bad := range []string{"", "#fff", "ffffff0", "#gg0000"} {
		if _, ok := ParseHex(bad); ok {
			t.Errorf("ParseHex(%q) accepted", bad)
		}
	}
}

// luminance is the relative luminance of an sRGB colour, the grey a
// greyscale print gives it: Y = 0.2126·R + 0.7152·G + 0.0722·B on linear
// channels (IEC 61966-2-1 / ITU-R BT.709 primaries, D65).
func luminance(c RGB) float64 {
	return 0.2126*SRGBToLinear(c.R) + 0.7152*SRGBToLinear(c.G) + 0.0722*SRGBToLinear(c.B)
}

// dichromats are the two simulations of Machado et al. (2009), severity 1.
var dichromats = []struct {
	name string
	f    func(RGB) RGB
}{{"deuteranope", RGB.Deuteranope}, {"protanope", RGB.Protanope}}

// The properties of the scales, computed from the definitions: OKLab
// lightness (Ottosson 2020) for perceptual order, the Machado et al. (2009)
// simulations for dichromats, and relative luminance for greyscale print.
// Thresholds, in OKLab ΔE (Euclidean): a just-noticeable difference is
// about 0.02 (common practice for OKLab); neighbouring shades 0.1 apart on
// the sequential scale must differ by ≥ 0.05 (2.5 JND) for every viewer,
// and the two sides of the diverging scale by ≥ 0.15 at the ends and the
// quarter points and ≥ 0.08 at t = 0.4 vs 0.6.
func TestScales(t *testing.T) {
	const n = 201
	at := func(i int) float64 { return float64(i) / (n - 1) }
	t.Run("dune lightness rises monotonically, dark to light", func(t *testing.T) {
		prev := -1.0
		for i := 0; i < n; i++ {
			l := Dune.Lab(at(i)).L
			if l <= prev {
				t.Fatalf("L(%d/%d) = %v ≤ %v", i, n-1, l, prev)
			}
			prev = l
		}
		if lo, hi := Dune.Lab(0).L, Dune.Lab(1).L; lo > 0.3 || hi < 0.9 {
			t.Errorf("lightness span %v…%v too narrow", lo, hi)
		}
	})
	t.Run("dune is ordered for dichromats and in greyscale", func(t *testing.T) {
		views := append([]struct {
			name string
			f    func(RGB) RGB
		}{{"full colour", func(c RGB) RGB { return c }}}, dichromats...)
		for _, v := range views {
			prevL, prevY := -1.0, -1.0
			for i := 0; i < n; i++ {
				c := v.f(Dune.RGB(at(i)))
				l, y := c.OKLab().L, luminance(c)
				if l <= prevL || y <= prevY {
					t.Fatalf("%s: at t = %v, L %v (before %v), Y %v (before %v): not rising", v.name, at(i), l, prevL, y, prevY)
				}
				prevL, prevY = l, y
			}
			for i := 0; i+20 < n; i++ {
				a, b := v.f(Dune.RGB(at(i))).OKLab(), v.f(Dune.RGB(at(i+20))).OKLab()
				if d := DeltaE(a, b); d < 0.05 {
					t.Errorf("%s: t = %v and %v differ by ΔE %.3f < 0.05", v.name, at(i), at(i+20), d)
				}
			}
		}
		// greyscale print: the ends' luminance contrast (Y+0.05)/(Y+0.05)
		// of WCAG 2 is at least 7:1
		if lo, hi := luminance(Dune.RGB(0)), luminance(Dune.RGB(1)); (hi+0.05)/(lo+0.05) < 7 {
			t.Errorf("greyscale ends Y %.3f and %.3f: contrast %.1f:1 < 7:1", lo, hi, (hi+0.05)/(lo+0.05))
		}
	})
	t.Run("heath lightness monotonic on each half, light neutral centre", func(t *testing.T) {
		prev := -1.0
		for i := 0; i <= (n-1)/2; i++ {
			l := Heath.Lab(at(i)).L
			if l <= prev {
				t.Fatalf("left half: L(%d) = %v ≤ %v", i, l, prev)
			}
			prev = l
		}
		for i := (n-1)/2 + 1; i < n; i++ {
			l := Heath.Lab(at(i)).L
			if l >= prev {
				t.Fatalf("right half: L(%d) = %v ≥ %v", i, l, prev)
			}
			prev = l
		}
		c := Heath.Lab(0.5)
		if c.L < 0.9 || math.Hypot(c.A, c.B) > 0.02 {
			t.Errorf("centre %+v is not a light neutral", c)
		}
	})
	for _, s := range []*Scale{Dune, Heath} {
		t.Run(s.Name()+" stays in the sRGB gamut", func(t *testing.T) {
			for i := 0; i < n; i++ {
				c := s.Lab(at(i)).RGB()
				if !c.InGamut(0.002) {
					t.Fatalf("t = %v gives %+v", at(i), c)
				}
			}
		})
	}
	// The two sides of the diverging scale must stay apart for dichromats:
	// OKLab ΔE after the Machado et al. (2009) simulation.
	for _, sim := range dichromats {
		t.Run("heath sides distinct for a "+sim.name, func(t *testing.T) {
			for _, p := range []struct{ lo, hi, min float64 }{{0, 1, 0.15}, {0.1, 0.9, 0.15}, {0.25, 0.75, 0.15}, {0.4, 0.6, 0.08}} {
				a := sim.f(Heath.RGB(p.lo)).OKLab()
				b := sim.f(Heath.RGB(p.hi)).OKLab()
				if d := DeltaE(a, b); d < p.min {
					t.Errorf("t = %v vs %v: ΔE = %.3f < %v in a %s view", p.lo, p.hi, d, p.min, sim.name)
				}
			}
		})
	}
	t.Run("quantised table matches the scale", func(t *testing.T) {
		for _, s := range []*Scale{Dune, Heath} {
			for _, v := range []float64{0, 0.3, 0.5, 1} {
				want := s.RGB(float64(lutIndex(v)) / (lutSize - 1)).Hex()
				if got := s.Hex(v); got != want {
					t.Errorf("%s.Hex(%v) = %s, want %s", s.Name(), v, got, want)
				}
			}
		}
		if Dune.Hex(-3) != Dune.Hex(0) || Dune.Hex(9) != Dune.Hex(1) {
			t.Error("out-of-range t is not clamped")
		}
	})
}

// The two line colours stay apart for every viewer (ΔE ≥ 0.2 in OKLab,
// ten JND, after each simulation) and in greyscale (OKLab L of the
// luminance grey differs by ≥ 0.15), and both are in gamut.
func TestLinePair(t *testing.T) {
	a, okA := ParseHex(LineA)
	b, okB := ParseHex(LineB)
	if !okA || !okB {
		t.Fatalf("LineA %q, LineB %q are not #rrggbb", LineA, LineB)
	}
	for _, c := range []LCh{{0.40, 0.120, 295}, {0.64, 0.120, 95}} {
		if !c.Lab().RGB().InGamut(0.002) {
			t.Errorf("%+v is outside the sRGB gamut", c)
		}
	}
	views := append([]struct {
		name string
		f    func(RGB) RGB
	}{{"full colour", func(c RGB) RGB { return c }}}, dichromats...)
	for _, v := range views {
		if d := DeltaE(v.f(a).OKLab(), v.f(b).OKLab()); d < 0.2 {
			t.Errorf("%s: ΔE(LineA, LineB) = %.3f < 0.2", v.name, d)
		}
	}
	grey := func(c RGB) float64 { y := luminance(c); return LinearToOKLab(y, y, y).L }
	if d := math.Abs(grey(a) - grey(b)); d < 0.15 {
		t.Errorf("greyscale: lightness %.3f vs %.3f differ by %.3f < 0.15", grey(a), grey(b), d)
	}
}
