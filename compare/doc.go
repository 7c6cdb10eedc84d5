// Package compare measures how seismic tomography models agree at the
// core-mantle boundary: degree power spectra, degree and total correlation
// with significance levels (Eckhardt 1984), maps of the mean and spread
// across models, k-means cluster analysis and vote maps (Lekic et al. 2012),
// outlines of the slow regions with their areas, centroids and antipodality,
// and a Monte Carlo test of how close a set of points lies to those outlines.
//
// Models enter as spherical-harmonic coefficients of dlnVs (sh.Coeffs, any
// convention) already reduced to a common depth or depth range; angles are
// radians (colatitude, east longitude) inside, degrees at the edges.
package compare
