// Package flux turns a spherical-harmonic expansion of the seismic velocity
// anomaly dlnVs at the base of the mantle into heat-flux boundary
// conditions at the core-mantle boundary (CMB), with amplitude control by the
// heterogeneity ratio q*, a physical mode from thermal constants,
// diagnostics (extrema, negative and sub-adiabatic areas and their
// outlines), idealised single-harmonic patterns and time sequences.
//
// Sign. Heat flux q is positive out of the core. Slow (hot) mantle lowers
// the temperature contrast across the thermal boundary layer above the CMB
// and so draws less heat from the core: the flux anomaly has the sign of
// dlnVs (low flux under slow mantle). This linear, purely thermal mapping is
// common practice in the dynamo literature (reviewed by Amit & Choblet 2012,
// Phys. Earth Planet. Inter. 190-191; Amit et al. 2015, Prog. Earth Planet.
// Sci. 2, 26).
//
// Use. NewPattern (or Ideal for harmonics) does the work that does not
// depend on the amplitude: truncation, taper, the extremum search on a
// Gauss-Legendre grid with Newton refinement, the contour surface. Then
// WithQStar, WithMeasure or WithPhysical build a Result cheaply for each
// amplitude, with Coeffs/At/OnGrid for every Quantity, Diagnostics,
// Outlines and Warnings. Rotate, Blend, SpinSequence and BlendSequence make
// time sequences.
//
// Inside the package angles are colatitude and east longitude in radians,
// units SI (W/m^2, K, m, W); Diagnostics, at the edge, uses degrees,
// mW/m^2 and TW. Coefficients are sh.Coeffs in sh.Canonical.
package flux
