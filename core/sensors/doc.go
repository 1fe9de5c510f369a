// Package sensors places electrodes on the head: the 10-20 and 10-10
// positions built from the system's geometric definition on a unit sphere,
// channel-name lookup with the usual aliases, the azimuthal equidistant
// projection of the sphere onto the page, and spherical-spline
// interpolation of values given at the electrodes (Perrin et al. 1989).
//
// Coordinates are head coordinates on a unit sphere: x towards the right
// preauricular point, y towards the nasion, z towards the vertex (the
// right–anterior–superior orientation of many BIDS coordinate systems).
// The sphere's centre lies on the plane through the nasion, the inion and
// the preauricular points.
package sensors
