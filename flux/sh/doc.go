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
//
// # Conventions
//
// A real expansion is
//
//	f(theta, phi) = sum_{l=0}^{L} sum_{m=0}^{l} N_lm P_l^m(cos theta) (C_lm cos m phi + S_lm sin m phi),
//
// with the Ferrers function (Abramowitz & Stegun 1964, 8.6.6, without the
// phase)
//
//	P_l^m(x) = (1 - x^2)^(m/2) d^m P_l(x) / dx^m,
//
// multiplied by (-1)^m when the convention includes the Condon-Shortley
// phase. The normalizations, with delta_m0 = 1 for m = 0 and 0 otherwise:
//
//	Orthonormal:  N_lm = sqrt((2 - delta_m0) (2l+1)/(4 pi) (l-m)!/(l+m)!)  integral of Y^2 over the sphere = 1
//	FourPi:       N_lm = sqrt((2 - delta_m0) (2l+1) (l-m)!/(l+m)!)         integral = 4 pi (geodesy)
//	Schmidt:      N_lm = sqrt((2 - delta_m0) (l-m)!/(l+m)!)                integral = 4 pi/(2l+1) (geomagnetism)
//	Unnormalized: N_lm = 1                                                 integral = 4 pi/(2l+1) (l+m)!/(l-m)! / (2 - delta_m0)
//
// Unnormalized functions and coefficients overflow or underflow double
// precision beyond degree UnnormalizedMaxDegree (150); conversions and
// Legendre report this instead of returning Inf or NaN (Convention.CheckDegree).
// Coefficients convert as C(to) = C(from) N(from)/N(to) (Coeffs.Convert).
//
// The complex form (ComplexCoeffs) uses Y_l^m = Nc_lm P_l^m(cos theta)
// exp(i m phi) for m >= 0 with Nc_lm = N_lm / sqrt(2 - delta_m0) in the
// normalized conventions and Nc_lm = 1 in the unnormalized one, and
// Y_l^-m = (-1)^m conj(Y_l^m) with the Condon-Shortley phase (SciPy's
// scipy.special.sph_harm), Y_l^-m = conj(Y_l^m) without it. The complex
// coefficients of a real field are A_l0 = C_l0 and, for m > 0,
// A_lm = (C_lm - i S_lm)/sqrt(2) (normalized) or (C_lm - i S_lm)/2
// (unnormalized), with A_l,-m = s_m conj(A_lm), s_m = (-1)^m or 1 as above.
//
// Power spectra and correlations are computed on orthonormal coefficients
// whatever the stored convention: S_l = sum_m (C_lm^2 + S_lm^2) sums over
// degrees to the integral of f^2 over the unit sphere.
package sh
