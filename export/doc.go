// Package export writes what cmbflux makes -- spherical-harmonic coefficient
// tables, grids, outlines and build manifests -- and reads the coefficient
// tables, grids and manifests back. Every file states its own conventions; nothing
// is implicit. All writers produce the same bytes for the same inputs (no
// timestamps, map keys sorted), and the *File helpers write atomically
// (temporary file in the destination folder, fsync, rename). Stage builds a
// whole output folder the same way.
//
// # Coefficient tables
//
// Three formats carry the same content: text (.txt), CSV (.csv) and JSON
// (.json). Text and CSV start with header lines "# key = value" after a
// title line; JSON has the same keys as members of one object. The keys,
// in the order written (header_lines comes first, right after the title):
//
//	header_lines          number of '#' lines, title line included (text and CSV only)
//	format                cmbflux-coefficients/1 (layout version)
//	quantity              what the field is, e.g. heat flux through the core-mantle boundary
//	units                 units of the coefficients (those of the field), e.g. mW/m^2
//	sign                  sign convention, e.g. positive = heat out of the core
//	form                  real (columns l m cos sin) or complex (columns l m re im)
//	normalization         orthonormal, fully-normalized (4 pi), schmidt (semi-normalized) or unnormalized
//	condon_shortley_phase included or excluded: whether P_l^m carries (-1)^m
//	expansion             the series the coefficients belong to, written out
//	normalization_factor  N_lm written out
//	legendre              P_l^m written out, with or without the phase
//	colatitude            theta = 0 at the north pole, pi at the south pole
//	longitude_origin      phi = 0 at the Greenwich meridian
//	longitude_direction   phi increases eastward
//	reference_radius_km   radius of the sphere the field lives on, in km
//	lmax                  highest degree
//	degree_0              included or omitted (rows of l = 0 left out)
//	orders                0..l, or -l..l (complex form only); for the complex
//	                      form with 0..l the header gives c_l,-m in terms of c_lm
//	row_order             l-major (l ascending, then m) or m-major (m, then l)
//	rows                  number of data rows
//	columns               l m cos sin, or l m re im
//	cmbflux_version       version of the program that wrote the file
//	input                 "<sha256> <name>" of an input file (one line per input)
//	param.<name>          every parameter of the build, defaults resolved, sorted by name
//
// A quantity, units or sign the caller left empty is written as
// "unspecified". In JSON, reference_radius_km, lmax and rows are numbers, columns a list,
// the inputs a list "inputs" of {"name", "sha256"} objects, the parameters
// an object "parameters", and the rows a list "data" of [l, m, a, b].
//
// The real form is
//
//	f(theta, phi) = sum_l sum_{m=0..l} N_lm P_l^m(cos theta) [C_lm cos(m phi) + S_lm sin(m phi)]
//
// with N_lm = sqrt((2 - delta_m0) (2l+1)/(4 pi) (l-m)!/(l+m)!) for
// orthonormal, the same without 1/(4 pi) for fully-normalized, without
// (2l+1)/(4 pi) for Schmidt, and 1 for unnormalized; S_l0 is always 0. The
// complex form is that of flux/sh's ComplexCoeffs, in the same
// normalization and phase but without the (2 - delta_m0) factor:
//
//	f(theta, phi) = sum_l sum_{m=-l..l} c_lm Y_l^m(theta, phi),
//	Y_l^m = N_lm P_l^m(cos theta) exp(i m phi) for m >= 0,  Y_l^-m = s_m conj(Y_l^m),
//
// with s_m = (-1)^m when the Condon-Shortley phase is included (the physics
// convention, as in scipy.special.sph_harm) and 1 otherwise; so c_l0 = C_l0,
// c_lm = (C_lm - i S_lm)/sqrt(2) and c_l,-m = s_m conj(c_lm) for m > 0 (for
// unnormalized functions, where N_lm = 1 in both forms, c_lm =
// (C_lm - i S_lm)/2).
//
// Data rows follow the header: "l m a b" separated by one space (text) or
// a comma (CSV, after a heading record "l,m,cos,sin" or "l,m,re,im", RFC
// 4180). Numbers are printed with the fewest digits that read back to the
// same float64, so a table read in its own convention is exact (a negative
// zero is written as 0). The CSV header lines start with '#'; tools that do
// not skip comment lines can skip header_lines lines instead.
//
// ReadCoeffs reads all three, and also plain "l m cos sin" tables made
// elsewhere (no header, '#' comments, or non-numeric heading lines before
// the data; Fortran D exponents accepted) once the caller declares their
// convention. Errors name the file, the line and the cause; (l, m) pairs
// the table lacks are read as zero and reported as a warning.
//
// # Grids
//
// WriteGridText writes "lon lat value" lines and WriteGridCSV the records
// "lon,lat,NAME", both after "# key = value" lines: header_lines, format
// (cmbflux-grid/1), quantity, units, sign, variable, grid
// (gauss-legendre, equiangular or user), nlon, nlat, lon_units
// (degrees_east), lat_units (degrees_north), row_order, reference_radius_km,
// registration (node: the values are point samples), columns and the
// provenance keys above. WriteGridNetCDF writes netCDF
// classic (CDF-1) with CF-1.8 metadata: coordinate variables lat and lon
// (units degrees_north and degrees_east, standard_name, long_name, axis Y
// and X), the field NAME(lat, lon) with units, long_name (the quantity),
// standard_name if given, comment (the sign) and cell_methods = "lat: point
// lon: point" (point samples, CF-1.8 section 7.3); global attributes
// Conventions = "CF-1.8", title, source and history (without a time), and
// cmbflux_format, cmbflux_version, cmbflux_grid, cmbflux_reference_radius_km, cmbflux_sign,
// cmbflux_inputs and cmbflux_parameters (one "key = value" per line).
// Units should be UDUNITS strings (such as mW/m^2) so that CF tools read
// them. ReadGrid reads all three back exactly.
//
// # Outlines
//
// WriteOutlines writes regions (slow provinces, sub-adiabatic or negative
// flux patches) as a GeoJSON FeatureCollection (RFC 7946): positions
// [lon, lat] in degrees with lon in [-180, 180], polygons cut at the
// antimeridian, closed rings of at least four positions, exteriors
// counter-clockwise and holes clockwise. Each feature carries area_km2,
// area_fraction, centroid_lon and centroid_lat, computed on the sphere, and
// the caller's properties; with Outline.Split each connected patch is its
// own feature, numbered by "patch". The foreign member "cmbflux" carries format
// (cmbflux-outlines/1), quantity, units, sign, reference_radius_km,
// cmbflux_version, inputs and parameters.
//
// # Manifests
//
// Stage.WriteManifest writes manifest.yaml into a staged folder: format
// (cmbflux-manifest/1), cmbflux_version, platform (Go version, GOOS/GOARCH), created (optional time, the only
// one in a build), command, inputs (name, sha256, size, format),
// parameters, diagnostics, and files (name, size, sha256, sorted by name).
// Verify checks a folder against it.
package export
