package sensors

import "math"

// Project maps a head position to the page by the azimuthal equidistant
// projection centred on the vertex: the distance from the centre is the
// polar angle θ = acos(z/|p|) divided by 90°, in the direction of (x, y).
// Cz goes to (0, 0), the 10 % contour (Fpz, T7, Oz) to radius 0.8 and the
// nasion–preauricular–inion plane to radius 1; the nasion is at +y (up on
// the page, where y grows upwards) and the right ear at +x. Distances
// along great circles through the vertex are kept.
func Project(p Point) (x, y float64) {
	n := p.Norm()
	if n == 0 {
		return 0, 0
	}
	theta := math.Acos(math.Max(-1, math.Min(1, p.Z/n)))
	h := math.Hypot(p.X, p.Y)
	if h == 0 {
		return 0, 0
	}
	rho := theta / (math.Pi / 2)
	return rho * p.X / h, rho * p.Y / h
}

// Unproject is the inverse of Project: the unit vector whose projection
// is (x, y).
func Unproject(x, y float64) Point {
	rho := math.Hypot(x, y)
	if rho == 0 {
		return Point{0, 0, 1}
	}
	theta := rho * math.Pi / 2
	s := math.Sin(theta) / rho
	return Point{x * s, y * s, math.Cos(theta)}
}
