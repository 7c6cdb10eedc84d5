package netcdf

import (
	"fmt"
	"io"
	"math"
)

// Dim is a named dimension. Len == 0 marks the record (unlimited)
// dimension, whose current length is File.NumRecs; a file has at most one.
type Dim struct {
	Name string // the dimension's name
	Len  int64  // its length; 0 for the record dimension
}

// Attr is a named attribute. Value holds the values as a Go slice of the
// type's Go counterpart ([]int8 for Byte, []int16 for Short, []int32 for
// Int, []float32 for Float, []float64 for Double, []uint8 for UByte,
// []uint16 for UShort, []uint32 for UInt, []int64 for Int64, []uint64 for
// UInt64), except that a Char attribute holds a string.
type Attr struct {
	Name  string // the attribute's name
	Type  Type   // its external type
	Value any    // its values (see above)
}

// Text returns the value of a Char attribute, or "" for other types.
func (a *Attr) Text() string {
	if s, ok := a.Value.(string); ok {
		return s
	}
	return ""
}

// Len returns the number of values of the attribute (bytes for Char).
func (a *Attr) Len() int {
	if s, ok := a.Value.(string); ok {
		return len(s)
	}
	n, _ := sliceLen(a.Value)
	return n
}

// Float64s returns the numeric values converted to float64, or nil for a
// Char attribute.
func (a *Attr) Float64s() []float64 {
	if _, ok := a.Value.(string); ok {
		return nil
	}
	n, _ := sliceLen(a.Value)
	out := make([]float64, n)
	toFloat64(out, a.Value)
	return out
}

// Var is a variable: a name, dimensions by name (slowest varying first,
// the record dimension, if any, first), an external type and attributes.
//
// When a File is built for Encode, Data holds the values in row-major
// order as a slice of the type's Go counterpart (see Attr; Char data is
// []byte or string), all records included. A decoded File leaves Data nil
// and reads values on demand with File.Float64s or File.Values.
type Var struct {
	Name  string   // the variable's name
	Dims  []string // dimension names, slowest varying first
	Type  Type     // the external type
	Attrs []Attr   // attributes, in file order
	Data  any      // values for Encode (see above); nil when decoded

	begin int64 // offset of the data (first record for record variables)
	vsize int64 // bytes per variable (per record for record variables), unpadded
	shape []int64
}

// Attr returns the attribute called name, or nil.
func (v *Var) Attr(name string) *Attr { return findAttr(v.Attrs, name) }

// SetAttr sets (adds or replaces) the attribute called name and returns v
// for chaining. The type is taken from the Go type of value: string gives
// Char, int8 or []int8 Byte, int16 Short, int32 or int Int, float32 Float,
// float64 Double, uint8 UByte, uint16 UShort, uint32 UInt, int64 Int64,
// uint64 UInt64 (scalars or slices). It panics for any other Go type or an
// int outside the range of int32.
func (v *Var) SetAttr(name string, value any) *Var {
	v.Attrs = setAttr(v.Attrs, name, value)
	return v
}

// Shape returns the length of each dimension of v; the record dimension
// counts File.NumRecs. The result is valid for decoded files and for
// built files after their dimensions are set.
func (f *File) Shape(v *Var) []int64 {
	out := make([]int64, len(v.Dims))
	for i, d := range v.Dims {
		if dim := f.Dim(d); dim != nil {
			out[i] = dim.Len
			if dim.Len == 0 {
				out[i] = f.NumRecs
			}
		}
	}
	return out
}

// IsRecord reports whether v varies along the record dimension.
func (f *File) IsRecord(v *Var) bool {
	if len(v.Dims) == 0 {
		return false
	}
	d := f.Dim(v.Dims[0])
	return d != nil && d.Len == 0
}

// File is a netCDF classic dataset: dimensions, global attributes and
// variables. A File returned by Decode also remembers where its values are
// and reads them on demand; a File built in memory holds them in Var.Data.
type File struct {
	// Version is the format the file was decoded from; Encode takes the
	// version as an argument and ignores this field.
	Version Version
	Dims    []Dim  // dimensions, in file order
	Attrs   []Attr // global attributes, in file order
	Vars    []*Var // variables, in file order
	// NumRecs is the number of records (the current length of the record
	// dimension). Encode computes it from the data of record variables.
	NumRecs int64

	r       io.ReaderAt
	buf     []byte // whole file, when decoded from bytes
	size    int64
	recSize int64 // bytes per record, all record variables
}

// Dim returns the dimension called name, or nil.
func (f *File) Dim(name string) *Dim {
	for i := range f.Dims {
		if f.Dims[i].Name == name {
			return &f.Dims[i]
		}
	}
	return nil
}

// Var returns the variable called name, or nil.
func (f *File) Var(name string) *Var {
	for _, v := range f.Vars {
		if v.Name == name {
			return v
		}
	}
	return nil
}

// Attr returns the global attribute called name, or nil.
func (f *File) Attr(name string) *Attr { return findAttr(f.Attrs, name) }

// SetAttr sets (adds or replaces) the global attribute called name; the
// type follows the Go type of value as described at Var.SetAttr.
func (f *File) SetAttr(name string, value any) {
	f.Attrs = setAttr(f.Attrs, name, value)
}

// AddDim appends a dimension of length n (0 for the record dimension) and
// returns the File for chaining. It panics if a dimension of that name
// exists or n is negative.
func (f *File) AddDim(name string, n int64) *File {
	if f.Dim(name) != nil {
		panic("netcdf: AddDim: dimension " + name + " already defined")
	}
	if n < 0 {
		panic("netcdf: AddDim: negative length for dimension " + name)
	}
	f.Dims = append(f.Dims, Dim{Name: name, Len: n})
	return f
}

// AddVar appends a variable of type t over the named dimensions with its
// values in data (see Var for the Go types; nil has Encode write fill
// values: the _FillValue attribute, else the type's default) and returns
// it so that
// attributes can be chained. A coordinate variable is a one-dimensional
// variable named like its dimension (CF-1.8 section 1.2). Encode only
// reads data, so it need not be copied. AddVar panics if a variable of
// that name exists or a dimension is undefined; sizes and types are
// checked by Encode.
func (f *File) AddVar(name string, t Type, dims []string, data any) *Var {
	if f.Var(name) != nil {
		panic("netcdf: AddVar: variable " + name + " already defined")
	}
	for _, d := range dims {
		if f.Dim(d) == nil {
			panic("netcdf: AddVar " + name + ": dimension " + d + " not defined")
		}
	}
	v := &Var{Name: name, Dims: append([]string(nil), dims...), Type: t, Data: data}
	f.Vars = append(f.Vars, v)
	return v
}

func findAttr(as []Attr, name string) *Attr {
	for i := range as {
		if as[i].Name == name {
			return &as[i]
		}
	}
	return nil
}

func setAttr(as []Attr, name string, value any) []Attr {
	a := makeAttr(name, value)
	for i := range as {
		if as[i].Name == name {
			as[i] = a
			return as
		}
	}
	return append(as, a)
}

func makeAttr(name string, value any) Attr {
	a := Attr{Name: name}
	switch x := value.(type) {
	case string:
		a.Type, a.Value = Char, x
	case int8:
		a.Type, a.Value = Byte, []int8{x}
	case []int8:
		a.Type, a.Value = Byte, x
	case int16:
		a.Type, a.Value = Short, []int16{x}
	case []int16:
		a.Type, a.Value = Short, x
	case int:
		if x < math.MinInt32 || x > math.MaxInt32 {
			panic(fmt.Sprintf("netcdf: attribute %s: int %d out of the range of int32", name, x))
		}
		a.Type, a.Value = Int, []int32{int32(x)}
	case int32:
		a.Type, a.Value = Int, []int32{x}
	case []int32:
		a.Type, a.Value = Int, x
	case float32:
		a.Type, a.Value = Float, []float32{x}
	case []float32:
		a.Type, a.Value = Float, x
	case float64:
		a.Type, a.Value = Double, []float64{x}
	case []float64:
		a.Type, a.Value = Double, x
	case uint8:
		a.Type, a.Value = UByte, []uint8{x}
	case []uint8:
		a.Type, a.Value = UByte, x
	case uint16:
		a.Type, a.Value = UShort, []uint16{x}
	case []uint16:
		a.Type, a.Value = UShort, x
	case uint32:
		a.Type, a.Value = UInt, []uint32{x}
	case []uint32:
		a.Type, a.Value = UInt, x
	case int64:
		a.Type, a.Value = Int64, []int64{x}
	case []int64:
		a.Type, a.Value = Int64, x
	case uint64:
		a.Type, a.Value = UInt64, []uint64{x}
	case []uint64:
		a.Type, a.Value = UInt64, x
	default:
		panic(fmt.Sprintf("netcdf: attribute %s: unsupported Go type %T", name, value))
	}
	return a
}

// sliceLen returns the length of a value slice and whether its Go type is
// one of the value slices.
func sliceLen(data any) (int, bool) {
	switch x := data.(type) {
	case []int8:
		return len(x), true
	case []byte:
		return len(x), true
	case string:
		return len(x), true
	case []int16:
		return len(x), true
	case []int32:
		return len(x), true
	case []float32:
		return len(x), true
	case []float64:
		return len(x), true
	case []uint16:
		return len(x), true
	case []uint32:
		return len(x), true
	case []int64:
		return len(x), true
	case []uint64:
		return len(x), true
	}
	return 0, false
}

// goTypeMatches reports whether data's Go type fits the external type t.
func goTypeMatches(t Type, data any) bool {
	switch data.(type) {
	case []int8:
		return t == Byte
	case []byte:
		return t == Char || t == UByte
	case string:
		return t == Char
	case []int16:
		return t == Short
	case []int32:
		return t == Int
	case []float32:
		return t == Float
	case []float64:
		return t == Double
	case []uint16:
		return t == UShort
	case []uint32:
		return t == UInt
	case []int64:
		return t == Int64
	case []uint64:
		return t == UInt64
	}
	return false
}

// toFloat64 converts the value slice src into dst (len(dst) values).
func toFloat64(dst []float64, src any) {
	switch x := src.(type) {
	case []int8:
		for i := range dst {
			dst[i] = float64(x[i])
		}
	case []byte:
		for i := range dst {
			dst[i] = float64(x[i])
		}
	case string:
		for i := range dst {
			dst[i] = float64(x[i])
		}
	case []int16:
		for i := range dst {
			dst[i] = float64(x[i])
		}
	case []int32:
		for i := range dst {
			dst[i] = float64(x[i])
		}
	case []float32:
		for i := range dst {
			dst[i] = float64(x[i])
		}
	case []float64:
		copy(dst, x)
	case []uint16:
		for i := range dst {
			dst[i] = float64(x[i])
		}
	case []uint32:
		for i := range dst {
			dst[i] = float64(x[i])
		}
	case []int64:
		for i := range dst {
			dst[i] = float64(x[i])
		}
	case []uint64:
		for i := range dst {
			dst[i] = float64(x[i])
		}
	}
}
