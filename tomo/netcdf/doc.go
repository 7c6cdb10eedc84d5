// Package netcdf reads and writes netCDF classic files (CDF-1, CDF-2 with
// 64-bit offsets, and CDF-5 with 64-bit data) in pure Go, following the
// netCDF classic format specification published by Unidata.
//
// A File is an in-memory model of the header (dimensions, attributes,
// variables); variable values are read lazily with File.Float64s or
// File.Values, or supplied in Var.Data when building a file for Encode.
package netcdf
