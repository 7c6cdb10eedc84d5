package netcdf

import (
	"encoding/binary"
	"math"
)

var be = binary.BigEndian

// decodeFloat64 converts the big-endian values in p (of type t) into dst.
func decodeFloat64(dst []float64, p []byte, t Type) {
	switch t {
	case Byte:
		for i, c := range p {
			dst[i] = float64(int8(c))
		}
	case Char, UByte:
		for i, c := range p {
			dst[i] = float64(c)
		}
	case Short:
		n := len(p) / 2
		for i := range n {
			dst[i] = float64(int16(be.Uint16(p[2*i:])))
		}
	case UShort:
		n := len(p) / 2
		for i := range n {
			dst[i] = float64(be.Uint16(p[2*i:]))
		}
	case Int:
		n := len(p) / 4
		for i := range n {
			dst[i] = float64(int32(be.Uint32(p[4*i:])))
		}
	case UInt:
		n := len(p) / 4
		for i := range n {
			dst[i] = float64(be.Uint32(p[4*i:]))
		}
	case Float:
		n := len(p) / 4
		d := dst[:n]
		for i := range d {
			d[i] = float64(math.Float32frombits(be.Uint32(p[4*i:])))
		}
	case Double:
		n := len(p) / 8
		d := dst[:n]
		for i := range d {
			d[i] = math.Float64frombits(be.Uint64(p[8*i:]))
		}
	case Int64:
		n := len(p) / 8
		for i := range n {
			dst[i] = float64(int64(be.Uint64(p[8*i:])))
		}
	case UInt64:
		n := len(p) / 8
		for i := range n {
			dst[i] = float64(be.Uint64(p[8*i:]))
		}
	}
}

// decodeTyped converts n big-endian values of type t in p into a Go slice
// (a string for Char).
func decodeTyped(t Type, p []byte, n int) any {
	switch t {
	case Byte:
		out := make([]int8, n)
		for i := range out {
			out[i] = int8(p[i])
		}
		return out
	case Char:
		return string(p[:n])
	case UByte:
		return append([]uint8(nil), p[:n]...)
	case Short:
		out := make([]int16, n)
		for i := range out {
			out[i] = int16(be.Uint16(p[2*i:]))
		}
		return out
	case UShort:
		out := make([]uint16, n)
		for i := range out {
			out[i] = be.Uint16(p[2*i:])
		}
		return out
	case Int:
		out := make([]int32, n)
		for i := range out {
			out[i] = int32(be.Uint32(p[4*i:]))
		}
		return out
	case UInt:
		out := make([]uint32, n)
		for i := range out {
			out[i] = be.Uint32(p[4*i:])
		}
		return out
	case Float:
		out := make([]float32, n)
		for i := range out {
			out[i] = math.Float32frombits(be.Uint32(p[4*i:]))
		}
		return out
	case Double:
		out := make([]float64, n)
		for i := range out {
			out[i] = math.Float64frombits(be.Uint64(p[8*i:]))
		}
		return out
	case Int64:
		out := make([]int64, n)
		for i := range out {
			out[i] = int64(be.Uint64(p[8*i:]))
		}
		return out
	case UInt64:
		out := make([]uint64, n)
		for i := range out {
			out[i] = be.Uint64(p[8*i:])
		}
		return out
	}
	return nil
}

// appendValues appends the big-endian encoding of the value slice data
// (elements lo..hi) to p.
func appendValues(p []byte, data any, lo, hi int) []byte {
	switch x := data.(type) {
	case []int8:
		for _, c := range x[lo:hi] {
			p = append(p, byte(c))
		}
	case []byte:
		p = append(p, x[lo:hi]...)
	case string:
		p = append(p, x[lo:hi]...)
	case []int16:
		for _, c := range x[lo:hi] {
			p = be.AppendUint16(p, uint16(c))
		}
	case []uint16:
		for _, c := range x[lo:hi] {
			p = be.AppendUint16(p, c)
		}
	case []int32:
		for _, c := range x[lo:hi] {
			p = be.AppendUint32(p, uint32(c))
		}
	case []uint32:
		for _, c := range x[lo:hi] {
			p = be.AppendUint32(p, c)
		}
	case []float32:
		for _, c := range x[lo:hi] {
			p = be.AppendUint32(p, math.Float32bits(c))
		}
	case []float64:
		for _, c := range x[lo:hi] {
			p = be.AppendUint64(p, math.Float64bits(c))
		}
	case []int64:
		for _, c := range x[lo:hi] {
			p = be.AppendUint64(p, uint64(c))
		}
	case []uint64:
		for _, c := range x[lo:hi] {
			p = be.AppendUint64(p, c)
		}
	}
	return p
}

// appendFill appends n default fill values of type t.
func appendFill(p []byte, t Type, n int) []byte {
	for range n {
		switch t {
		case Byte:
			p = append(p, 0x81) // -127
		case Char:
			p = append(p, 0)
		case UByte:
			p = append(p, 0xFF)
		case Short:
			p = be.AppendUint16(p, uint16(0x8001)) // -32767
		case UShort:
			p = be.AppendUint16(p, 0xFFFF)
		case Int:
			p = be.AppendUint32(p, 0x80000001) // -2147483647
		case UInt:
			p = be.AppendUint32(p, 0xFFFFFFFF)
		case Float:
			p = be.AppendUint32(p, math.Float32bits(float32(FillDouble)))
		case Double:
			p = be.AppendUint64(p, math.Float64bits(FillDouble))
		case Int64:
			p = be.AppendUint64(p, 0x8000000000000002) // -9223372036854775806
		case UInt64:
			p = be.AppendUint64(p, 0xFFFFFFFFFFFFFFFE)
		}
	}
	return p
}
