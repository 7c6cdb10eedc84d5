// Package sh provides real and complex spherical harmonics of a real field on
// the unit sphere: associated Legendre functions stable to high degree,
// explicit normalization and phase conventions with exact conversion between
// them, quadrature grids, analysis and synthesis transforms, least-squares
// fits to irregular grids, spectra, correlation, rotation and tapers.
//
// Angles are radians: colatitude theta in [0, pi] measured from the north
// pole, east longitude phi in [0, 2*pi). Coefficients of type Coeffs always
// carry their Convention; the canonical internal convention is
// Canonical (orthonormal, no Condon-Shortley phase, real cos/sin form,
// degree 0 kept).
package sh
