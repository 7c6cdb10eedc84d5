package netcdf

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"io"
	"math"
)

// Encode writes f to w as a netCDF classic file of version v (CDF1, CDF2
// or CDF5), following the netCDF classic format specification: header,
// then the non-record variables in order, then the records, each holding
// one slab of every record variable. Each variable's values come from
// Var.Data (see Var); a variable with nil Data is written as fill values
// (its _FillValue, else the type's default). Padding in data also uses
// the fill value; padding in the header uses zero bytes.
//
// The number of records is taken from the record variables' Data and must
// agree between them; f.NumRecs is used only when no record variable has
// Data. Encode checks f first and returns a *FormatError wrapping
// ErrInvalid, naming the variable or attribute, if a name is invalid or
// repeated, a type is not allowed in v, Data has the wrong Go type or
// length, a _FillValue differs from its variable's type, or a size
// exceeds the limits of v (use CDF5 for large data). Encode does not
// modify f. The output contains no timestamp.
func Encode(w io.Writer, f *File, v Version) error {
	l, err := layout(f, v)
	if err != nil {
		return err
	}
	bw := bufio.NewWriterSize(w, 1<<16)
	hdr := l.header(f)
	if int64(len(hdr)) != l.headerSize {
		panic("netcdf: internal error: header size mismatch")
	}
	if _, err := bw.Write(hdr); err != nil {
		return err
	}
	buf := make([]byte, 0, 1<<16)
	const chunk = 8192 // values per write
	writeSlab := func(vr *Var, lo, hi int64, padded bool) error {
		fill := fillBytes(vr)
		for a := lo; a < hi; a += chunk {
			b := min(a+chunk, hi)
			buf = buf[:0]
			if vr.Data == nil {
				for range b - a {
					buf = append(buf, fill...)
				}
			} else {
				buf = appendValues(buf, vr.Data, int(a), int(b))
			}
			if _, err := bw.Write(buf); err != nil {
				return err
			}
		}
		if padded {
			n := (hi - lo) * int64(vr.Type.Size())
			buf = buf[:0]
			for i := 0; int64(len(buf)) < pad4(n)-n; i++ {
				buf = append(buf, fill[i%len(fill)])
			}
			if _, err := bw.Write(buf); err != nil {
				return err
			}
		}
		return nil
	}
	for i, vr := range f.Vars {
		if l.isRec[i] {
			continue
		}
		if err := writeSlab(vr, 0, l.count[i], true); err != nil {
			return err
		}
	}
	single := len(l.recVars) == 1
	recBytes := int64(0)
	for _, i := range l.recVars {
		recBytes += l.vsize[i]
	}
	if recBytes == 0 {
		return bw.Flush() // records of zero size: nothing to write, however many
	}
	for r := range l.numRecs {
		for _, i := range l.recVars {
			n := l.count[i]
			if err := writeSlab(f.Vars[i], r*n, (r+1)*n, !single); err != nil {
				return err
			}
		}
	}
	return bw.Flush()
}

// fillBytes returns the encoding of one fill value of vr: its _FillValue
// when that has vr's type, else the type's default.
func fillBytes(vr *Var) []byte {
	if a := vr.Attr("_FillValue"); a != nil && a.Type == vr.Type && a.Len() > 0 {
		return appendValues(nil, a.Value, 0, 1)
	}
	return appendFill(nil, vr.Type, 1)
}

type encLayout struct {
	v          Version
	numRecs    int64
	headerSize int64
	isRec      []bool
	count      []int64 // values per variable, or per record for record variables
	vsize      []int64 // bytes, padded to 4
	begin      []int64
	recVars    []int
	dimID      map[string]int
}

func invalid(vr, field, format string, args ...any) error {
	return &FormatError{Offset: -1, Field: field, Var: vr, Kind: ErrInvalid, Msg: fmt.Sprintf(format, args...)}
}

func checkAttrs(vr string, as []Attr, v Version) error {
	seen := map[string]bool{}
	for _, a := range as {
		if msg := checkName(a.Name); msg != "" {
			return invalid(vr, "attribute name", "%s", msg)
		}
		if seen[a.Name] {
			return invalid(vr, "attribute name", "attribute %s set twice", a.Name)
		}
		seen[a.Name] = true
		if !a.Type.In(v) {
			return invalid(vr, "attribute "+a.Name, "type %v is not allowed in %v; use CDF5 or a classic type", a.Type, v)
		}
		if !goTypeMatches(a.Type, a.Value) {
			return invalid(vr, "attribute "+a.Name, "value of Go type %T does not match type %v", a.Value, a.Type)
		}
	}
	return nil
}

func layout(f *File, v Version) (*encLayout, error) {
	if v != CDF1 && v != CDF2 && v != CDF5 {
		return nil, invalid("", "version", "unknown version %d; use CDF1, CDF2 or CDF5", int(v))
	}
	l := &encLayout{v: v, dimID: map[string]int{}}
	maxLen := int64(math.MaxInt32)
	if v == CDF5 {
		maxLen = math.MaxInt64
	}
	rec := ""
	for i, d := range f.Dims {
		if msg := checkName(d.Name); msg != "" {
			return nil, invalid("", "dimension name", "%s", msg)
		}
		if _, ok := l.dimID[d.Name]; ok {
			return nil, invalid("", "dimension name", "dimension %s defined twice", d.Name)
		}
		if d.Len < 0 || d.Len > maxLen {
			return nil, invalid("", "dim_length", "dimension %s has length %d, outside 0..%d for %v", d.Name, d.Len, maxLen, v)
		}
		if d.Len == 0 {
			if rec != "" {
				return nil, invalid("", "dim_length", "dimensions %s and %s both have length 0; only one record dimension is allowed", rec, d.Name)
			}
			rec = d.Name
		}
		l.dimID[d.Name] = i
	}
	if err := checkAttrs("", f.Attrs, v); err != nil {
		return nil, err
	}
	n := len(f.Vars)
	l.isRec, l.count, l.vsize, l.begin = make([]bool, n), make([]int64, n), make([]int64, n), make([]int64, n)
	l.numRecs = -1
	names := map[string]bool{}
	for i, vr := range f.Vars {
		if msg := checkName(vr.Name); msg != "" {
			return nil, invalid(vr.Name, "variable name", "%s", msg)
		}
		if names[vr.Name] {
			return nil, invalid(vr.Name, "variable name", "variable defined twice")
		}
		names[vr.Name] = true
		if !vr.Type.In(v) {
			return nil, invalid(vr.Name, "nc_type", "type %v is not allowed in %v; use CDF5 or a classic type", vr.Type, v)
		}
		if err := checkAttrs(vr.Name, vr.Attrs, v); err != nil {
			return nil, err
		}
		if a := vr.Attr("_FillValue"); a != nil && (a.Type != vr.Type || a.Len() != 1) {
			return nil, invalid(vr.Name, "attribute _FillValue", "must be one value of the variable's type %v (CF-1.8 section 2.5.1), got %d of %v", vr.Type, a.Len(), a.Type)
		}
		cnt := int64(1)
		for j, d := range vr.Dims {
			id, ok := l.dimID[d]
			if !ok {
				return nil, invalid(vr.Name, "dimid", "dimension %s is not defined", d)
			}
			dl := f.Dims[id].Len
			if dl == 0 {
				if j != 0 {
					return nil, invalid(vr.Name, "dimid", "record dimension %s must be the first dimension", d)
				}
				l.isRec[i] = true
				continue
			}
			if cnt > math.MaxInt64/8/dl {
				return nil, invalid(vr.Name, "vsize", "shape too large")
			}
			cnt *= dl
		}
		l.count[i] = cnt
		l.vsize[i] = pad4(cnt * int64(vr.Type.Size()))
		if v != CDF5 && l.vsize[i] > math.MaxUint32-3 {
			return nil, invalid(vr.Name, "vsize", "%d bytes per variable or record exceed the 4 GiB limit of %v; write CDF5", l.vsize[i], v)
		}
		if vr.Data != nil {
			m, ok := sliceLen(vr.Data)
			if !ok || !goTypeMatches(vr.Type, vr.Data) {
				return nil, invalid(vr.Name, "data", "Data of Go type %T does not match type %v", vr.Data, vr.Type)
			}
			if l.isRec[i] {
				if cnt == 0 {
					if m != 0 {
						return nil, invalid(vr.Name, "data", "%d values for a record variable of zero size per record", m)
					}
				} else {
					if int64(m)%cnt != 0 {
						return nil, invalid(vr.Name, "data", "%d values is not a whole number of records of %d values", m, cnt)
					}
					nr := int64(m) / cnt
					if l.numRecs >= 0 && nr != l.numRecs {
						return nil, invalid(vr.Name, "data", "%d records, but other record variables have %d", nr, l.numRecs)
					}
					l.numRecs = nr
				}
			} else if int64(m) != cnt {
				return nil, invalid(vr.Name, "data", "%d values, the shape %v needs %d", m, vr.Dims, cnt)
			}
		}
		if l.isRec[i] {
			l.recVars = append(l.recVars, i)
		}
	}
	if l.numRecs < 0 {
		l.numRecs = f.NumRecs
	}
	if v != CDF5 && l.numRecs > math.MaxInt32 {
		return nil, invalid("", "numrecs", "%d records exceed the limit of %v; write CDF5", l.numRecs, v)
	}
	l.headerSize = int64(len(l.header(f)))
	off := l.headerSize
	for i := range f.Vars {
		if !l.isRec[i] {
			l.begin[i] = off
			off += l.vsize[i]
		}
	}
	for _, i := range l.recVars {
		l.begin[i] = off
		off += l.vsize[i]
	}
	if v == CDF1 {
		for i, vr := range f.Vars {
			if l.begin[i] > math.MaxInt32 {
				return nil, invalid(vr.Name, "begin", "offset %d exceeds the 2 GiB limit of CDF-1; write CDF2 or CDF5", l.begin[i])
			}
		}
	}
	return l, nil
}

// header encodes the header with the begin offsets currently in l.
func (l *encLayout) header(f *File) []byte {
	wide := l.v == CDF5
	var p []byte
	nonNeg := func(x int64) {
		if wide {
			p = binary.BigEndian.AppendUint64(p, uint64(x))
		} else {
			p = binary.BigEndian.AppendUint32(p, uint32(x))
		}
	}
	name := func(s string) {
		nonNeg(int64(len(s)))
		p = append(p, s...)
		for len(p)%4 != 0 {
			p = append(p, 0)
		}
	}
	list := func(tag uint32, n int) {
		if n == 0 {
			tag = 0
		}
		p = binary.BigEndian.AppendUint32(p, tag)
		nonNeg(int64(n))
	}
	attrs := func(as []Attr) {
		list(tagAttribute, len(as))
		for _, a := range as {
			name(a.Name)
			p = binary.BigEndian.AppendUint32(p, uint32(a.Type))
			m := a.Len()
			nonNeg(int64(m))
			p = appendValues(p, a.Value, 0, m)
			for len(p)%4 != 0 {
				p = append(p, 0)
			}
		}
	}
	p = append(p, 'C', 'D', 'F', byte(l.v))
	nonNeg(l.numRecs)
	list(tagDimension, len(f.Dims))
	for _, d := range f.Dims {
		name(d.Name)
		nonNeg(d.Len)
	}
	attrs(f.Attrs)
	list(tagVariable, len(f.Vars))
	for i, vr := range f.Vars {
		name(vr.Name)
		nonNeg(int64(len(vr.Dims)))
		for _, d := range vr.Dims {
			nonNeg(int64(l.dimID[d]))
		}
		attrs(vr.Attrs)
		p = binary.BigEndian.AppendUint32(p, uint32(vr.Type))
		nonNeg(l.vsize[i])
		if l.v == CDF1 {
			p = binary.BigEndian.AppendUint32(p, uint32(l.begin[i]))
		} else {
			p = binary.BigEndian.AppendUint64(p, uint64(l.begin[i]))
		}
	}
	return p
}
