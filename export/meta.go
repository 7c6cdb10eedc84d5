package export

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
)

// DefaultRadiusKm is the reference radius written when Meta.RadiusKm is
// zero: the core-mantle boundary of PREM (Dziewonski & Anderson 1981).
const DefaultRadiusKm = 3480.0

// FormatVersion is the version of the file layouts described in doc.go.
const FormatVersion = 1

// Meta says what a data file holds and where it came from. The command line
// fills it; every writer in this package puts it into the file's header.
type Meta struct {
	// Quantity names the field, e.g. "heat flux through the core-mantle
	// boundary".
	Quantity string
	// Units of the values as written, e.g. "mW/m^2". Writers do not scale.
	Units string
	// Sign states the sign convention, e.g. "positive = heat out of the core".
	Sign string
	// RadiusKm is the reference radius of the sphere in km; 0 means
	// DefaultRadiusKm.
	RadiusKm float64
	// Version is the cmbflux version that made the file.
	Version string
	// Inputs lists the input files with their sha256.
	Inputs []Input
	// Params holds every parameter of the build as key = value, defaults
	// resolved. Keys are written sorted; keys and values must be one line.
	Params map[string]string
}

// Input names an input file and the hex sha256 of its bytes.
type Input struct {
	Name   string `json:"name" yaml:"name"`     // path or label as given by the user
	SHA256 string `json:"sha256" yaml:"sha256"` // hex sha256 of the file's bytes
}

func (m *Meta) radiusKm() float64 {
	if m.RadiusKm == 0 {
		return DefaultRadiusKm
	}
	return m.RadiusKm
}

// sortedKeys returns the keys of a string map in ascending order, so that
// map iteration order never reaches a file.
func sortedKeys[V any](m map[string]V) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}

// kv is one header line, key = value.
type kv struct{ k, v string }

// check rejects metadata that would break a header line.
func (m *Meta) check() error {
	one := func(what, s string) error {
		if strings.ContainsAny(s, "\r\n") {
			return fmt.Errorf("export: %s %q spans several lines", what, s)
		}
		return nil
	}
	errs := []error{one("quantity", m.Quantity), one("units", m.Units), one("sign", m.Sign), one("version", m.Version)}
	for _, in := range m.Inputs {
		errs = append(errs, one("input name", in.Name), one("input sha256", in.SHA256))
		if strings.ContainsAny(in.SHA256, " \t") {
			errs = append(errs, fmt.Errorf("export: input sha256 %q contains blanks", in.SHA256))
		}
	}
	for k, v := range m.Params {
		errs = append(errs, one("parameter name", k), one("parameter "+k, v))
		if k == "" || strings.ContainsAny(k, " \t=") {
			errs = append(errs, fmt.Errorf("export: parameter name %q is empty or contains blanks or '='", k))
		}
	}
	if math.IsNaN(m.RadiusKm) || math.IsInf(m.RadiusKm, 0) || m.RadiusKm < 0 {
		errs = append(errs, fmt.Errorf("export: reference radius %v km is not a positive number", m.RadiusKm))
	}
	return errors.Join(errs...)
}

// provenance returns the header lines shared by every format: version,
// inputs (in the given order) and parameters (sorted by key).
func (m *Meta) provenance() []kv {
	out := []kv{{"cmbflux_version", m.Version}}
	for _, in := range m.Inputs {
		out = append(out, kv{"input", in.SHA256 + " " + in.Name})
	}
	for _, k := range sortedKeys(m.Params) {
		out = append(out, kv{"param." + k, m.Params[k]})
	}
	return out
}

// fmtFloat prints v so that strconv.ParseFloat gives back the same bits.
func fmtFloat(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// ErrBadInput is wrapped by every error that reports a malformed input file
// read by this package (the command line maps it, like tomo.ErrBadInput, to
// exit status 2).
var ErrBadInput = errors.New("bad input")

// InputError reports a problem in a file read by this package. It prints as
// "file:line: cause", or "file: field: cause" where no line applies.
type InputError struct {
	File  string // path as given by the caller
	Line  int    // 1-based line, or 0
	Field string // JSON member, CSV column or similar, or ""
	Err   error  // the cause
}

// Error implements the error interface.
func (e *InputError) Error() string {
	loc := e.File
	if e.Line > 0 {
		loc = fmt.Sprintf("%s:%d", loc, e.Line)
	}
	if e.Field != "" {
		loc += ": " + e.Field
	}
	return loc + ": " + e.Err.Error()
}

// Unwrap lets errors.Is find both the cause and ErrBadInput.
func (e *InputError) Unwrap() []error { return []error{e.Err, ErrBadInput} }

func inputErr(file string, line int, format string, args ...any) error {
	return &InputError{File: file, Line: line, Err: fmt.Errorf(format, args...)}
}

// orUnspecified returns s, or "unspecified" when s is empty, so that a
// header never leaves a key blank.
func orUnspecified(s string) string {
	if s == "" {
		return "unspecified"
	}
	return s
}
