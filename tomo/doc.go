// Package tomo reads, validates and normalises seismic tomography models on
// regular longitude-latitude grids (optionally with a depth axis) and reduces
// them to a single lowermost-mantle layer of dlnVs.
//
// Longitudes are degrees east in [0, 360) inside the package, latitudes
// degrees north, depths kilometres below the surface. Velocity anomalies are
// carried as read (Units says what they are) until Normalize turns them into
// dlnVs as a fraction.
package tomo
