package sensors

import (
	"encoding/json"
	"math"
	"os"
	"testing"
)

// angle between two positions in degrees
func angleDeg(p, q Point) float64 {
	return math.Acos(math.Max(-1, math.Min(1, p.unit().Dot(q.unit())))) * 180 / math.Pi
}

// TestDefinition checks the positions against the system's definition
// (Jurcak et al. 2007, NeuroImage 34:1600; common practice): the
// nasion–inion arc is 180° on the unit sphere, so 10 % is 18°.
func TestDefinition(t *testing.T) {
	get := func(n string) Point {
		p, _, ok := Standard(n)
		if !ok {
			t.Fatalf("no position for %s", n)
		}
		return p
	}
	nz, iz, lpa, rpa := midline(0), midline(1), Point{-1, 0, 0}, Point{1, 0, 0}
	cases := []struct {
		what      string
		got, want float64
	}{
		{"Cz is the vertex (z)", get("Cz").Z, 1},
		{"Cz–nasion = 50 % of the arc", angleDeg(get("Cz"), nz), 90},
		{"Fz–Cz = 20 % of the arc", angleDeg(get("Fz"), get("Cz")), 36},
		{"Pz–Cz = 20 % of the arc", angleDeg(get("Pz"), get("Cz")), 36},
		{"Fz on the midline (x)", get("Fz").X, 0},
		{"Pz on the midline (x)", get("Pz").X, 0},
		{"Fz in front (y > 0 → 1)", math.Copysign(1, get("Fz").Y), 1},
		{"Fpz–nasion = 10 %", angleDeg(get("Fpz"), nz), 18},
		{"Oz–inion = 10 %", angleDeg(get("Oz"), iz), 18},
		{"T7 on the preauricular line (y)", get("T7").Y, 0},
		{"T8 on the preauricular line (y)", get("T8").Y, 0},
		{"T7–left preauricular = 10 %", angleDeg(get("T7"), lpa), 18},
		{"T8–right preauricular = 10 %", angleDeg(get("T8"), rpa), 18},
		{"C3–Cz = 20 % of the coronal arc", angleDeg(get("C3"), get("Cz")), 36},
		{"C4 on the coronal arc (y)", get("C4").Y, 0},
		{"T3 is T7 (alias)", angleDeg(get("T3"), get("T7")), 0},
		{"T6 is P8 (alias)", angleDeg(get("t6"), get("P8")), 0},
		{"FP1 is Fp1 (case)", angleDeg(get("FP1"), get("Fp1")), 0},
		{"EEG Fz-Ref is Fz", angleDeg(get("EEG Fz-Ref"), get("Fz")), 0},
		// the 10 % contour: Fp1, F7, T7, P7 and O1 at 18° elevation, 10 % and
		// 20 % steps (18°, 36°) of its half circumference apart
		{"Fp1 elevation", math.Asin(get("Fp1").Z) * 180 / math.Pi, 18},
		{"O2 elevation", math.Asin(get("O2").Z) * 180 / math.Pi, 18},
		{"F7 elevation", math.Asin(get("F7").Z) * 180 / math.Pi, 18},
		{"F3 halfway F7–Fz", angleDeg(get("F7"), get("F3")) - angleDeg(get("F3"), get("Fz")), 0},
		{"P3 halfway P7–Pz", angleDeg(get("P7"), get("P3")) - angleDeg(get("P3"), get("Pz")), 0},
		{"F3, F4 mirror images (x)", get("F3").X + get("F4").X, 0},
		{"T9 at the left preauricular point", angleDeg(get("T9"), lpa), 0},
	}
	for _, c := range cases {
		if math.Abs(c.got-c.want) > 1e-9 {
			t.Errorf("%s: got %.12g, want %g", c.what, c.got, c.want)
		}
	}
	for _, n := range Names() {
		if p := builtin[n]; math.Abs(p.Norm()-1) > 1e-12 {
			t.Errorf("%s is off the unit sphere: |p| = %g", n, p.Norm())
		}
	}
	for _, n := range System1020 {
		get(n)
	}
	for _, n := range []string{"ch1", "A1", "", "EOG", "Fz2"} {
		if _, _, ok := Standard(n); ok {
			t.Errorf("%q has a position", n)
		}
	}
}

// TestProject: the azimuthal equidistant projection keeps the polar angle
// as the radius (90° → 1) and inverts exactly.
func TestProject(t *testing.T) {
	cases := []struct {
		name string
		x, y float64
	}{
		{"Cz", 0, 0}, {"Fz", 0, 0.4}, {"Pz", 0, -0.4}, {"T7", -0.8, 0}, {"T8", 0.8, 0}, {"Fpz", 0, 0.8}, {"Oz", 0, -0.8}, {"Nz", 0, 1},
	}
	for _, c := range cases {
		p, _, _ := Standard(c.name)
		x, y := Project(p)
		if math.Abs(x-c.x) > 1e-12 || math.Abs(y-c.y) > 1e-12 {
			t.Errorf("%s projects to (%g, %g), want (%g, %g)", c.name, x, y, c.x, c.y)
		}
	}
	for _, n := range Names() {
		p := builtin[n]
		x, y := Project(p)
		if q := Unproject(x, y); angleDeg(p, q) > 1e-6 {
			t.Errorf("%s: unproject(project) is %g° off", n, angleDeg(p, q))
		}
		if n != "Cz" && math.Abs(math.Hypot(x, y)-angleDeg(p, Point{0, 0, 1})/90) > 1e-12 {
			t.Errorf("%s: radius is not the polar angle over 90°", n)
		}
	}
}

type splineRef struct {
	M, Terms int
	G        []struct{ X, G float64 }
	Montage  []struct{ Theta, Phi float64 }
	Values   []float64
	Queries  []struct{ Theta, Phi float64 }
	Cases    []struct {
		Lambda float64
		C0     float64
		C      []float64
		At     []float64
	}
}

func fromAngles(theta, phi float64) Point {
	t, p := deg(theta), deg(phi)
	return Point{math.Sin(t) * math.Sin(p), math.Sin(t) * math.Cos(p), math.Cos(t)}
}

// TestSplineScipy compares the kernel, the coefficients and interpolated
// values with testdata/sensors/ref.json, the same formula (Perrin et al.
// 1989) computed by testdata/sensors/make_ref.py with
// scipy.special.eval_legendre and numpy.linalg.solve.
func TestSplineScipy(t *testing.T) {
	b, err := os.ReadFile("../../testdata/sensors/ref.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref splineRef
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if ref.M != SplineOrder || ref.Terms != SplineTerms {
		t.Fatalf("reference has m = %d, N = %d; the package uses %d, %d", ref.M, ref.Terms, SplineOrder, SplineTerms)
	}
	for _, c := range ref.G {
		if got := G(c.X, ref.M, ref.Terms); math.Abs(got-c.G) > 1e-14 {
			t.Errorf("g(%g) = %.17g, scipy %.17g", c.X, got, c.G)
		}
	}
	pos := make([]Point, len(ref.Montage))
	for i, m := range ref.Montage {
		pos[i] = fromAngles(m.Theta, m.Phi)
	}
	if len(ref.Cases) == 0 {
		t.Fatal("no cases")
	}
	for _, c := range ref.Cases {
		s, err := NewSpline(pos, ref.Values, c.Lambda)
		if err != nil {
			t.Fatal(err)
		}
		c0, cs := s.Coefficients()
		if math.Abs(c0-c.C0) > 1e-9*math.Max(1, math.Abs(c.C0)) {
			t.Errorf("λ = %g: c0 = %.12g, scipy %.12g", c.Lambda, c0, c.C0)
		}
		for i := range cs {
			if math.Abs(cs[i]-c.C[i]) > 1e-8*math.Max(1, math.Abs(c.C[i])) {
				t.Errorf("λ = %g: c%d = %.12g, scipy %.12g", c.Lambda, i+1, cs[i], c.C[i])
			}
		}
		for i, q := range ref.Queries {
			if got := s.At(fromAngles(q.Theta, q.Phi)); math.Abs(got-c.At[i]) > 1e-9 {
				t.Errorf("λ = %g: U(θ=%g, φ=%g) = %.12g, scipy %.12g", c.Lambda, q.Theta, q.Phi, got, c.At[i])
			}
		}
		if c.Lambda == 0 {
			for i, p := range pos { // an exact interpolant passes through the data
				if got := s.At(p); math.Abs(got-ref.Values[i]) > 1e-9 {
					t.Errorf("U at electrode %d = %g, want %g", i, got, ref.Values[i])
				}
			}
		}
	}
}

func TestSplineErrors(t *testing.T) {
	p := []Point{{0, 0, 1}, {1, 0, 0}}
	if _, err := NewSpline(p[:1], []float64{1}, 0); err == nil {
		t.Error("one position: no error")
	}
	if _, err := NewSpline(p, []float64{1, math.NaN()}, 0); err == nil {
		t.Error("NaN value: no error")
	}
	if _, err := NewSpline([]Point{{0, 0, 1}, {0, 0, 2}}, []float64{1, 2}, 0); err == nil {
		t.Error("two positions at one point: no error")
	}
}
