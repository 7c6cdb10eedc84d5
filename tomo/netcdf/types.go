package netcdf

import (
	"fmt"
	"math"
)

// Version is the variant of the classic format, the fourth byte of the
// magic number.
type Version int

const (
	// CDF1 is the original classic format: 32-bit offsets and sizes.
	CDF1 Version = 1
	// CDF2 is the 64-bit offset format: 64-bit variable begin offsets.
	CDF2 Version = 2
	// CDF5 is the 64-bit data format: 64-bit sizes and counts throughout,
	// and the unsigned and 64-bit integer types.
	CDF5 Version = 5
)

// String returns "CDF-1", "CDF-2" or "CDF-5".
func (v Version) String() string {
	switch v {
	case CDF1, CDF2, CDF5:
		return fmt.Sprintf("CDF-%d", int(v))
	}
	return fmt.Sprintf("Version(%d)", int(v))
}

// Type is an external data type (nc_type) of the classic format.
type Type int32

// The external types. Byte to Double exist in every version; UByte to
// UInt64 only in CDF-5.
const (
	Byte   Type = 1  // signed 8-bit integer; Go int8
	Char   Type = 2  // 8-bit character; Go byte (text attributes as string)
	Short  Type = 3  // signed 16-bit integer; Go int16
	Int    Type = 4  // signed 32-bit integer; Go int32
	Float  Type = 5  // IEEE 754 binary32; Go float32
	Double Type = 6  // IEEE 754 binary64; Go float64
	UByte  Type = 7  // unsigned 8-bit integer (CDF-5); Go uint8
	UShort Type = 8  // unsigned 16-bit integer (CDF-5); Go uint16
	UInt   Type = 9  // unsigned 32-bit integer (CDF-5); Go uint32
	Int64  Type = 10 // signed 64-bit integer (CDF-5); Go int64
	UInt64 Type = 11 // unsigned 64-bit integer (CDF-5); Go uint64
)

var typeNames = [...]string{"", "byte", "char", "short", "int", "float", "double",
	"ubyte", "ushort", "uint", "int64", "uint64"}

// String returns the CDL name of the type ("byte", "char", "short", ...).
func (t Type) String() string {
	if t.valid() {
		return typeNames[t]
	}
	return fmt.Sprintf("Type(%d)", int32(t))
}

func (t Type) valid() bool { return t >= Byte && t <= UInt64 }

// In reports whether the type is allowed in files of version v.
func (t Type) In(v Version) bool {
	if v == CDF5 {
		return t.valid()
	}
	return t >= Byte && t <= Double
}

// Size returns the size in bytes of one value of the type, or 0 for an
// unknown type.
func (t Type) Size() int {
	switch t {
	case Byte, Char, UByte:
		return 1
	case Short, UShort:
		return 2
	case Int, Float, UInt:
		return 4
	case Double, Int64, UInt64:
		return 8
	}
	return 0
}

// DefaultFill returns the default fill value of the type as given by the
// netCDF classic format specification (section "Note on fill values":
// NC_FILL_BYTE = -127, NC_FILL_CHAR = 0, NC_FILL_SHORT = -32767,
// NC_FILL_INT = -2147483647, NC_FILL_FLOAT = 9.9692099683868690e+36,
// NC_FILL_DOUBLE = 9.9692099683868690e+36, and for CDF-5 NC_FILL_UBYTE =
// 255, NC_FILL_USHORT = 65535, NC_FILL_UINT = 4294967295, NC_FILL_INT64 =
// -9223372036854775806, NC_FILL_UINT64 = 18446744073709551614). Float's
// value is the binary32 rounding of 9.9692099683868690e+36. Integer fills
// beyond 2^53 are rounded to the nearest float64.
func (t Type) DefaultFill() float64 {
	switch t {
	case Byte:
		return -127
	case Char:
		return 0
	case Short:
		return -32767
	case Int:
		return -2147483647
	case Float:
		return float64(float32(FillDouble))
	case Double:
		return FillDouble
	case UByte:
		return 255
	case UShort:
		return 65535
	case UInt:
		return 4294967295
	case Int64:
		return -9223372036854775806
	case UInt64:
		return 18446744073709551614
	}
	return math.NaN()
}

// FillDouble is the default fill value of double (and, rounded, of float)
// variables, NC_FILL_DOUBLE in the netCDF classic format specification.
const FillDouble = 9.9692099683868690e+36
