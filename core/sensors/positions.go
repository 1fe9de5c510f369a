package sensors

import (
	"math"
	"sort"
	"strings"
)

// Point is a position in head coordinates (see the package comment).
type Point struct{ X, Y, Z float64 }

func (p Point) add(q Point) Point { return Point{p.X + q.X, p.Y + q.Y, p.Z + q.Z} }
func (p Point) sub(q Point) Point { return Point{p.X - q.X, p.Y - q.Y, p.Z - q.Z} }

// Scale is s·p.
func (p Point) Scale(s float64) Point { return Point{s * p.X, s * p.Y, s * p.Z} }

// Dot is the scalar product.
func (p Point) Dot(q Point) float64 { return p.X*q.X + p.Y*q.Y + p.Z*q.Z }

// Norm is the length |p|.
func (p Point) Norm() float64 { return math.Sqrt(p.Dot(p)) }
func (p Point) cross(q Point) Point {
	return Point{p.Y*q.Z - p.Z*q.Y, p.Z*q.X - p.X*q.Z, p.X*q.Y - p.Y*q.X}
}
func (p Point) unit() Point  { return p.Scale(1 / p.Norm()) }
func (p Point) finite() bool { return finite(p.X) && finite(p.Y) && finite(p.Z) }
func finite(v float64) bool  { return !math.IsNaN(v) && !math.IsInf(v, 0) }
func deg(d float64) float64  { return d * math.Pi / 180 }
func onRing(elev, azim float64) Point { // elevation above the equator, azimuth from the front towards the right, both in degrees
	e, a := deg(elev), deg(azim)
	return Point{math.Cos(e) * math.Sin(a), math.Cos(e) * math.Cos(a), math.Sin(e)}
}

// midline is the point at fraction f of the nasion–inion arc over the
// vertex: f = 0 at the nasion, 0.5 at the vertex (Cz), 1 at the inion.
func midline(f float64) Point {
	a := math.Pi * f
	return Point{0, math.Cos(a), math.Sin(a)}
}

// arc returns the points that divide the arc of the circle through a, m
// and b (the intersection of the sphere with the plane through the three
// points) into n equal angles from a to m and n from m to b: 2n+1 points,
// a first, m in the middle, b last.
func arc(a, m, b Point, n int) []Point {
	// circumcentre of the triangle a, m, b
	u, v := m.sub(a), b.sub(a)
	w := u.cross(v)
	c := a.add(v.cross(w).Scale(u.Dot(u)).add(w.cross(u).Scale(v.Dot(v))).Scale(1 / (2 * w.Dot(w))))
	axis := w.unit()
	rot := func(p Point, ang float64) Point { // Rodrigues' rotation of p − c about axis
		r := p.sub(c)
		return c.add(r.Scale(math.Cos(ang)).add(axis.cross(r).Scale(math.Sin(ang))))
	}
	angle := func(p, q Point) float64 {
		r, s := p.sub(c), q.sub(c)
		return math.Atan2(r.cross(s).Dot(axis), r.Dot(s))
	}
	t1, t2 := angle(a, m), angle(m, b)
	out := make([]Point, 0, 2*n+1)
	for k := 0; k <= n; k++ {
		out = append(out, rot(a, t1*float64(k)/float64(n)))
	}
	for k := 1; k <= n; k++ {
		out = append(out, rot(m, t2*float64(k)/float64(n)))
	}
	return out
}

// The 10-10 system after its geometric definition (Jurcak, Tsuzuki &
// Dan 2007, NeuroImage 34:1600, "10/20, 10/10, and 10/5 systems
// revisited"; Oostenveld & Praamstra 2001, Clin Neurophysiol 112:713,
// for the 10-10 and 10-5 extensions), on the unit sphere:
//
//   - the midline (nasion–vertex–inion arc, 180°) carries Nz at 0 %, Fpz
//     10 %, AFz 20 %, Fz 30 %, FCz 40 %, Cz 50 %, CPz 60 %, Pz 70 %, POz
//     80 %, Oz 90 % and Iz 100 %;
//   - the circumference through Fpz, T7 and Oz (the 10 % contour, 18°
//     above the plane of the nasion, inion and preauricular points) is
//     divided in steps of 10 % of its half: Fp1/Fp2 at 18° of azimuth from
//     Fpz, AF7/AF8 36°, F7/F8 54°, FT7/FT8 72°, T7/T8 90° (10 % up the
//     preauricular arc), TP7/TP8 108°, P7/P8 126°, PO7/PO8 144°, O1/O2
//     162°;
//   - each row from a left contour point over its midline point to the
//     right one (AF7–AFz–AF8, F7–Fz–F8, FT7–FCz–FT8, T7–Cz–T8,
//     TP7–CPz–TP8, P7–Pz–P8, PO7–POz–PO8) is the circle where the plane
//     through those three points cuts the sphere, divided into four equal
//     angles each side: the 5, 3, 1 positions on the left, 2, 4, 6 on the
//     right (the C row names its ends T7 and T8 and its inner points C5 …
//     C6; the FC and CP rows likewise name theirs FT and TP);
//   - the 9/10 positions (AF9 … PO10, T9/T10 at the preauricular points)
//     and Nz, I1, Iz, I2 lie on the 0 % contour, below their row's
//     contour point at the same azimuth.
//
// On this sphere Cz is the vertex, Fz and Pz lie on the midline 36° (20 %
// of the arc) from it, and T7/T8 lie on the preauricular (coronal) arc 18°
// above the preauricular points. The 10-20 positions are the subset named
// in System1020.
var builtin = buildPositions()

// contour azimuths (degrees from the front) of the rows' end points
var rowAzim = []struct {
	prefix, end string  // row letters and the name of the end points' row
	mid         float64 // midline fraction
	azim        float64
}{
	{"AF", "AF", 0.2, 36},
	{"F", "F", 0.3, 54},
	{"FC", "FT", 0.4, 72},
	{"C", "T", 0.5, 90},
	{"CP", "TP", 0.6, 108},
	{"P", "P", 0.7, 126},
	{"PO", "PO", 0.8, 144},
}

func buildPositions() map[string]Point {
	m := map[string]Point{}
	ring := 18.0 // the 10 % contour's elevation: 10 % of 180°
	m["Nz"], m["Fpz"], m["Oz"], m["Iz"] = midline(0), midline(0.1), midline(0.9), midline(1)
	m["Fp1"], m["Fp2"] = onRing(ring, -18), onRing(ring, 18)
	m["O1"], m["O2"] = onRing(ring, -162), onRing(ring, 162)
	m["I1"], m["I2"] = onRing(0, -162), onRing(0, 162)
	for _, r := range rowAzim {
		left, right := onRing(ring, -r.azim), onRing(ring, r.azim)
		ps := arc(left, midline(r.mid), right, 4)
		names := []string{r.end + "7", r.prefix + "5", r.prefix + "3", r.prefix + "1", r.prefix + "z",
			r.prefix + "2", r.prefix + "4", r.prefix + "6", r.end + "8"}
		for i, n := range names {
			m[n] = ps[i]
		}
		m[r.end+"9"], m[r.end+"10"] = onRing(0, -r.azim), onRing(0, r.azim)
	}
	m["Cz"] = Point{0, 0, 1} // the vertex exactly
	return m
}

// System1020 lists the 10-20 positions in their current names (T7, T8,
// P7, P8 for the older T3, T4, T5, T6), with the midline reference points
// Fpz and Oz.
var System1020 = []string{"Fp1", "Fpz", "Fp2", "F7", "F3", "Fz", "F4", "F8", "T7", "C3", "Cz", "C4", "T8",
	"P7", "P3", "Pz", "P4", "P8", "O1", "Oz", "O2"}

// aliases maps the older 10-20 names to the current ones (common practice).
var aliases = map[string]string{"t3": "T7", "t4": "T8", "t5": "P7", "t6": "P8"}

var byLower = func() map[string]string {
	m := map[string]string{}
	for n := range builtin {
		m[strings.ToLower(n)] = n
	}
	return m
}()

// Standard returns the built-in 10-10 position of a channel name,
// case-insensitively (FP1, fp1 and Fp1 are the same), with the aliases
// T3 = T7, T4 = T8, T5 = P7 and T6 = P8. The name may carry a prefix
// word and a reference ("EEG Fz-Ref" is Fz). ok is false for names that
// are not 10-10 positions.
func Standard(name string) (p Point, canonical string, ok bool) {
	n := shortName(name)
	l := strings.ToLower(n)
	if a, ok := aliases[l]; ok {
		return builtin[a], a, true
	}
	if c, ok := byLower[l]; ok {
		return builtin[c], c, true
	}
	return Point{}, "", false
}

// shortName is the last word of a label, cut at its first '-'.
func shortName(s string) string {
	f := strings.Fields(s)
	if len(f) == 0 {
		return ""
	}
	w := f[len(f)-1]
	if i := strings.IndexByte(w, '-'); i > 0 {
		w = w[:i]
	}
	return w
}

// Names lists every built-in position name, sorted.
func Names() []string {
	out := make([]string, 0, len(builtin))
	for n := range builtin {
		out = append(out, n)
	}
	sort.Strings(out)
	return out
}
