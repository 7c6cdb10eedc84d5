// Package netcdf reads and writes netCDF classic files (CDF-1, CDF-2 with
// 64-bit offsets, and CDF-5 with 64-bit data) in pure Go, following the
// netCDF classic format specification published by Unidata.
//
// A File is an in-memory model of a dataset: dimensions (at most one of
// them the record dimension), global attributes and variables. Decode and
// DecodeBytes read the header and check every count and size in it
// against the file size before allocating anything; variable values are
// read on demand with File.Float64s or File.Values. To write a file, build
// a File with AddDim, AddVar and SetAttr, with the values in Var.Data, and
// call Encode with the version wanted; see the example for a CF-1.8 grid.
//
// Problems in a file, and models that Encode cannot write, are reported as
// *FormatError with the byte offset, the header field and the variable,
// wrapping one of the sentinel errors ErrNotNetCDF, ErrHDF5, ErrTruncated,
// ErrCorrupt or ErrInvalid.
//
// Not supported: netCDF-4 (HDF5) files, which are recognised and refused
// with advice to convert them; checking that names are in Unicode
// normalisation form NFC, which the specification asks for (names are
// checked for valid UTF-8 and the other rules).
package netcdf
