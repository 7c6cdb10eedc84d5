package tomo

import (
	"errors"
	"fmt"
)

// ErrBadInput is wrapped by every error that reports a malformed or
// implausible input file; the command line maps it to exit status 2.
var ErrBadInput = errors.New("bad input")

// InputError reports a problem in an input file, located by line (text and
// CSV) or by variable (netCDF). It prints as "file:line: cause" or
// "file: variable NAME: cause".
type InputError struct {
	File string // path as given by the user
	Line int    // 1-based line number, or 0 when not applicable
	Var  string // netCDF variable or CSV column, or "" when not applicable
	Err  error  // the cause
}

// Error implements the error interface.
func (e *InputError) Error() string {
	loc := e.File
	if e.Line > 0 {
		loc = fmt.Sprintf("%s:%d", loc, e.Line)
	}
	if e.Var != "" {
		if loc != "" {
			loc += ": "
		}
		loc += "variable " + e.Var
	}
	if loc == "" {
		return e.Err.Error()
	}
	return loc + ": " + e.Err.Error()
}

// Unwrap lets errors.Is find both the cause and ErrBadInput.
func (e *InputError) Unwrap() []error { return []error{e.Err, ErrBadInput} }

// ReadOptions selects what to read from a file. The zero value detects the
// format and the columns or variables automatically.
type ReadOptions struct {
	// Format is "" (detect from the content), "text", "csv" or "netcdf".
	Format string
	// Var names the value column (CSV, or text with a "# columns:" line)
	// or variable (netCDF); "" picks the only candidate or fails listing
	// the candidates.
	Var string
	// LonName, LatName and DepthName name the coordinate columns (CSV,
	// or text with a "# columns:" line) or variables (netCDF) when
	// automatic recognition is not wanted.
	LonName, LatName, DepthName string
	// Vertical says what the third coordinate is: "depth" (km below the
	// surface) or "radius" (km from the Earth's centre, converted to depth
	// as EarthRadiusKm - r). "" decides from the column or variable name
	// (depth, radius, r, ...) and takes depth for a text file without a
	// "# columns:" line.
	Vertical string
	// Missing lists sentinel values that mark missing data, in addition to
	// NaN (e.g. -999 or 99999). A value equal to a sentinel is masked.
	Missing []float64
}

// inputErr builds an *InputError with a formatted cause.
func inputErr(file string, line int, format string, args ...any) *InputError {
	return &InputError{File: file, Line: line, Err: fmt.Errorf(format, args...)}
}
