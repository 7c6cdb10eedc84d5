// Package tomo reads, validates and normalises seismic tomography models on
// regular longitude-latitude grids (optionally with a depth axis) and reduces
// them to a single lowermost-mantle layer of dlnVs.
//
// Longitudes are degrees east in [0, 360) inside the package, latitudes
// degrees north, depths kilometres below the surface. Velocity anomalies are
// carried as read (Units says what they are) until Normalize turns them into
// dlnVs as a fraction.
//
// The path from a file to a layer:
//
//	g, err := tomo.ReadFile(path, tomo.ReadOptions{})        // text, CSV or netCDF classic
//	l, err := tomo.SelectLayer(g, tomo.LayerOptions{})       // deepest level, units guessed
//	lim := tomo.SafeDegree(l)                                // degree the coverage supports
//
// ReadText and ReadCSV accept scattered points in any order and assemble
// them into a regular grid (see ReadText for the rules, including the
// registration rule); ReadNetCDF reads CF-1.8 grids. Every malformed file
// gives an *InputError naming the file and the line (or variable) and
// wrapping ErrBadInput. Demo returns the invented scenario "brindle" that
// is also committed under testdata/demo.
package tomo
