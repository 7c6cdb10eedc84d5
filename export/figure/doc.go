// Package figure draws the figures of a heat-flux build: global maps of a
// field on the sphere in an equal-area (Mollweide, Hammer) or plain
// equirectangular projection, panels of maps on one shared colour scale,
// degree power spectra, degree correlation with significance curves, and
// parameter-sweep summaries, as PNG or SVG.
//
// The package takes plain data only: a regular longitude-latitude Grid of
// values or a callback func(lon, lat float64) float64 in degrees, outlines as
// rings of (lon, lat) degree pairs, markers with labels, spectra as one value
// per degree and sweep tables as slices. Angles are degrees at the API and
// radians inside the projection formulas.
//
// Maps use the package's own diverging colour scale (Diverging), designed in
// CIELAB: lightness falls symmetrically from a light centre, placed on a
// given value such as the mean, to a dark blue low end and a dark rust high
// end, so values read in order from lightness alone and the two sides stay
// apart for the common colour-vision deficiencies. Regions below given
// values can be hatched, so they show without colour.
//
// Output is deterministic: the same data and options give byte-identical
// files, so a manifest of sha256 sums stays stable from run to run. In PNG
// one point is one pixel; SVG files embed the map raster as a PNG image
// under vector graticule, outlines and text.
package figure
