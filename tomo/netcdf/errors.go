package netcdf

import (
	"errors"
	"fmt"
)

// Sentinel errors wrapped by FormatError; test for them with errors.Is.
var (
	// ErrNotNetCDF: the file does not start with the classic magic number.
	ErrNotNetCDF = errors.New("not a netCDF classic file")
	// ErrHDF5: the file is netCDF-4 (HDF5), which this package does not read.
	ErrHDF5 = errors.New("netCDF-4/HDF5 file, not netCDF classic; convert it with `nccopy -k classic in.nc out.nc` (or `-k cdf5` for 64-bit data) from the standard netCDF utilities")
	// ErrTruncated: the file ends before the header or the data it describes.
	ErrTruncated = errors.New("file truncated")
	// ErrCorrupt: a header field has an impossible value.
	ErrCorrupt = errors.New("corrupt header")
	// ErrInvalid: a File given to Encode breaks a rule of the format.
	ErrInvalid = errors.New("invalid netCDF model")
)

// FormatError reports a problem found while decoding or encoding a file:
// the byte offset (or -1), the header field, the variable (or ""), and the
// sentinel kind with a message saying what is wrong.
type FormatError struct {
	Offset int64  // byte offset in the file where the field starts, or -1
	Field  string // header field per the specification, e.g. "dim_length", "begin"
	Var    string // variable name, or ""
	Kind   error  // ErrNotNetCDF, ErrHDF5, ErrTruncated, ErrCorrupt or ErrInvalid
	Msg    string // what is wrong, and what to do if there is something to do
}

// Error implements the error interface:
// "variable V: byte offset N: FIELD: kind: msg", leaving out the parts
// that do not apply.
func (e *FormatError) Error() string {
	s := ""
	if e.Var != "" {
		s = "variable " + e.Var + ": "
	}
	if e.Offset >= 0 {
		s += fmt.Sprintf("byte offset %d: ", e.Offset)
	}
	if e.Field != "" {
		s += e.Field + ": "
	}
	s += e.Kind.Error()
	if e.Msg != "" {
		s += ": " + e.Msg
	}
	return s
}

// Unwrap returns the sentinel kind.
func (e *FormatError) Unwrap() error { return e.Kind }
