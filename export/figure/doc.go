// Package figure draws the figures of a heat-flux build: global maps of a
// field on the sphere in an equal-area (Mollweide, Hammer) or plain
// equirectangular projection, degree power spectra, degree correlation with
// significance curves, and parameter-sweep summaries, as PNG or SVG.
//
// The package takes plain data only: a regular longitude-latitude Grid of
// values or a callback func(lon, lat float64) float64 in degrees, outlines as
// rings of (lon, lat) degree pairs, markers with labels, spectra as one value
// per degree and sweep tables as slices. Angles are degrees at the API and
// radians inside the projection formulas.
//
// Output is deterministic: the same data and options give byte-identical
// files, so a manifest of sha256 sums stays stable from run to run.
package figure
