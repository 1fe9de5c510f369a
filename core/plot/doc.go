// Package plot renders the analysis figures as self-contained SVG strings.
//
// Every figure function takes plain data (slices, matrices, labels) and a
// small options struct whose zero value is usable, and returns the SVG text
// together with the Geometry of its plot area, so that a page can map a
// pointer position (in viewBox units) back to data coordinates:
//
//	x = XMin + (px − Left)/Width · (XMax − XMin)     (linear axis)
//	x = 10^(log10 XMin + (px − Left)/Width · log10(XMax/XMin))   (log axis)
//
// and likewise for y, with the pixel y axis pointing down (YMax at Top).
// The same numbers are written as data-* attributes on the element
// <rect id="plot-area">.
//
// Output is deterministic: numbers are written with strconv 'f' at a
// bounded precision, nothing depends on map order or the clock, and the
// SVG refers to nothing outside itself (no href, no fonts, no scripts).
// Text is <text> in the generic sans-serif family.
//
// Colour scales are interpolated in OKLab (Ottosson 2020). Dune is a
// sequential scale (lightness rises monotonically from a deep slate-blue
// through muted copper to a pale sand); Heath is a diverging scale through
// a light cool grey at its centre, from a heather violet to a dark
// olive-gold, two hues that stay apart for deuteranopes and protanopes.
// LineA (violet, solid) and LineB (dark gold, dashed) draw two series.
//
// Shapes that do not match (a matrix row of the wrong length, labels that
// do not match the matrix) are programming errors and panic with the
// prefix "plot: ". Values that are NaN, ±Inf or beyond ±1e100 are data: they are drawn as
// undefined cells or left out, and never reach an attribute.
package plot
