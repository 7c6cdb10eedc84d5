package netcdf

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math/bits"
	"unicode/utf8"
)

// Header tags and markers of the classic format specification.
const (
	tagDimension = 0x0A // NC_DIMENSION
	tagVariable  = 0x0B // NC_VARIABLE
	tagAttribute = 0x0C // NC_ATTRIBUTE
	streaming32  = 0xFFFFFFFF
)

// hdf5Magic is the HDF5 format signature (HDF5 File Format Specification,
// section "Format Signature"), which starts every netCDF-4 file.
const hdf5Magic = "\x89HDF\r\n\x1a\n"

// Decode reads the header of the netCDF classic file in r, which is size
// bytes long. Variable values stay in r and are read by Float64s or
// Values, so r must remain readable for as long as the File is used.
// Every count and size in the header is checked against size before
// anything is allocated for it. Errors are *FormatError.
func Decode(r io.ReaderAt, size int64) (*File, error) {
	if size < 0 {
		return nil, &FormatError{Offset: -1, Kind: ErrCorrupt, Msg: "negative file size"}
	}
	n := min(size, 64<<10)
	for {
		buf := make([]byte, n)
		if got, err := r.ReadAt(buf, 0); int64(got) < n {
			return nil, &FormatError{Offset: int64(got), Kind: ErrTruncated, Msg: fmt.Sprintf("reading header: %v (file size given as %d)", err, size)}
		}
		f, err := decodeHeader(buf, size)
		if err == errNeedMore {
			n = min(size, 2*n)
			continue
		}
		if err != nil {
			return nil, err
		}
		f.r = r
		return f, nil
	}
}

// DecodeBytes is Decode for a file held in memory; the File keeps b and
// reads values from it without copying the file.
func DecodeBytes(b []byte) (*File, error) {
	f, err := decodeHeader(b, int64(len(b)))
	if err == errNeedMore { // cannot happen: the buffer is the whole file
		err = &FormatError{Offset: int64(len(b)), Kind: ErrTruncated}
	}
	if err != nil {
		return nil, err
	}
	f.buf = b
	f.r = bytes.NewReader(b)
	return f, nil
}

var errNeedMore = errors.New("netcdf: header continues beyond buffer")

// hdr walks the header bytes.
type hdr struct {
	b    []byte
	off  int64
	size int64 // file size
	wide bool  // CDF-5: 64-bit NON_NEG fields
	v    Version
	vr   string // variable being decoded, for messages
}

func (h *hdr) fail(off int64, field string, kind error, format string, args ...any) error {
	return &FormatError{Offset: off, Field: field, Var: h.vr, Kind: kind, Msg: fmt.Sprintf(format, args...)}
}

// take returns the next n bytes or an error naming field.
func (h *hdr) take(n int64, field string) ([]byte, error) {
	if n < 0 || n > h.size-h.off {
		return nil, h.fail(h.off, field, ErrTruncated, "needs %d bytes, only %d left in the file of %d bytes", n, h.size-h.off, h.size)
	}
	if h.off+n > int64(len(h.b)) {
		return nil, errNeedMore
	}
	p := h.b[h.off : h.off+n]
	h.off += n
	return p, nil
}

func (h *hdr) u32(field string) (uint32, error) {
	p, err := h.take(4, field)
	if err != nil {
		return 0, err
	}
	return binary.BigEndian.Uint32(p), nil
}

// nonNeg reads a NON_NEG field: a non-negative 32-bit INT, or a 64-bit
// INT64 in CDF-5.
func (h *hdr) nonNeg(field string) (int64, error) {
	off := h.off
	if h.wide {
		p, err := h.take(8, field)
		if err != nil {
			return 0, err
		}
		x := int64(binary.BigEndian.Uint64(p))
		if x < 0 {
			return 0, h.fail(off, field, ErrCorrupt, "negative value %d", x)
		}
		return x, nil
	}
	x, err := h.u32(field)
	if err != nil {
		return 0, err
	}
	if int32(x) < 0 {
		return 0, h.fail(off, field, ErrCorrupt, "negative value %d", int32(x))
	}
	return int64(x), nil
}

// count reads an nelems field and checks that count items of at least
// minItem bytes each fit in the rest of the file.
func (h *hdr) count(field string, minItem int64) (int64, error) {
	off := h.off
	n, err := h.nonNeg(field)
	if err != nil {
		return 0, err
	}
	if rest := h.size - h.off; minItem > 0 && n > rest/minItem {
		return 0, h.fail(off, field, ErrTruncated, "claims %d entries of at least %d bytes each, but only %d bytes follow (truncated file or corrupt header)", n, minItem, rest)
	}
	return n, nil
}

func pad4(n int64) int64 { return (n + 3) &^ 3 }

func (h *hdr) name(field string) (string, error) {
	off := h.off
	n, err := h.nonNeg(field + " length")
	if err != nil {
		return "", err
	}
	if n > h.size-h.off {
		return "", h.fail(off, field, ErrTruncated, "name length %d exceeds the %d bytes left in the file", n, h.size-h.off)
	}
	p, err := h.take(pad4(n), field)
	if err != nil {
		return "", err
	}
	s := string(p[:n])
	if msg := checkName(s); msg != "" {
		return "", h.fail(off, field, ErrCorrupt, "%s", msg)
	}
	return s, nil
}

// checkName returns "" if s is a valid netCDF name, or what is wrong. The
// rules are those of the classic format specification ("name"): UTF-8,
// first character alphanumeric, '_' or multibyte, no control characters
// or '/', no trailing white space. NFC normalisation is not checked.
func checkName(s string) string {
	if s == "" {
		return "empty name"
	}
	if !utf8.ValidString(s) {
		return fmt.Sprintf("name %q is not valid UTF-8", s)
	}
	c := s[0]
	if !(c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || c == '_' || c >= 0x80) {
		return fmt.Sprintf("name %q must start with a letter, digit, '_' or a multibyte UTF-8 character", s)
	}
	for i := 0; i < len(s); i++ {
		if c := s[i]; c < 0x20 || c == 0x7F || c == '/' {
			return fmt.Sprintf("name %q contains a control character or '/'", s)
		}
	}
	if s[len(s)-1] == ' ' {
		return fmt.Sprintf("name %q ends with white space", s)
	}
	return ""
}

// listHeader reads the tag and nelems of a dim_list, att_list or var_list;
// ABSENT (ZERO ZERO) gives 0.
func (h *hdr) listHeader(tag uint32, list string, minItem int64) (int64, error) {
	off := h.off
	t, err := h.u32(list + " tag")
	if err != nil {
		return 0, err
	}
	noff := h.off
	n, err := h.count(list+" nelems", minItem)
	if err != nil {
		return 0, err
	}
	if t == 0 {
		if n != 0 {
			return 0, h.fail(noff, list+" nelems", ErrCorrupt, "ABSENT list (tag 0) with %d elements", n)
		}
		return 0, nil
	}
	if t != tag {
		return 0, h.fail(off, list+" tag", ErrCorrupt, "tag 0x%X, want 0x%X or 0 (ABSENT)", t, tag)
	}
	return n, nil
}

func (h *hdr) attrs(list string) ([]Attr, error) {
	w := int64(4)
	if h.wide {
		w = 8
	}
	n, err := h.listHeader(tagAttribute, list, w+4+4+w)
	if err != nil || n == 0 {
		return nil, err
	}
	as := make([]Attr, 0, n)
	seen := make(map[string]bool, n)
	for range n {
		name, err := h.name("attribute name")
		if err != nil {
			return nil, err
		}
		toff := h.off
		tc, err := h.u32("attribute nc_type of " + name)
		if err != nil {
			return nil, err
		}
		t := Type(tc)
		if !t.In(h.v) {
			return nil, h.fail(toff, "attribute nc_type of "+name, ErrCorrupt, "type code %d is not a %v type", tc, h.v)
		}
		coff := h.off
		cnt, err := h.nonNeg("attribute nelems of " + name)
		if err != nil {
			return nil, err
		}
		sz := int64(t.Size())
		if cnt > (h.size-h.off)/sz {
			return nil, h.fail(coff, "attribute nelems of "+name, ErrTruncated, "%d values of %v need %d bytes, only %d left", cnt, t, cnt*sz, h.size-h.off)
		}
		p, err := h.take(pad4(cnt*sz), "attribute values of "+name)
		if err != nil {
			return nil, err
		}
		if seen[name] {
			return nil, h.fail(toff, "attribute name", ErrCorrupt, "attribute %s defined twice", name)
		}
		seen[name] = true
		as = append(as, Attr{Name: name, Type: t, Value: decodeTyped(t, p[:cnt*sz], int(cnt))})
	}
	return as, nil
}

func decodeHeader(b []byte, size int64) (*File, error) {
	h := &hdr{b: b, size: size}
	if size >= 8 && len(b) >= 8 && string(b[:8]) == hdf5Magic {
		return nil, &FormatError{Offset: 0, Field: "magic", Kind: ErrHDF5}
	}
	magic, err := h.take(4, "magic")
	if err != nil {
		if err != errNeedMore {
			return nil, &FormatError{Offset: 0, Field: "magic", Kind: ErrNotNetCDF, Msg: fmt.Sprintf("file of %d bytes is too short", size)}
		}
		return nil, err
	}
	if string(magic[:3]) != "CDF" {
		// HDF5 may also place its signature after a user block of 512,
		// 1024, 2048, ... bytes (HDF5 File Format Specification, "Format
		// Signature").
		for off := 512; off+8 <= len(b) && off <= 1<<16; off *= 2 {
			if string(b[off:off+8]) == hdf5Magic {
				return nil, &FormatError{Offset: int64(off), Field: "magic", Kind: ErrHDF5}
			}
		}
		return nil, &FormatError{Offset: 0, Field: "magic", Kind: ErrNotNetCDF, Msg: fmt.Sprintf("starts with % X, want \"CDF\" followed by 0x01, 0x02 or 0x05", magic)}
	}
	h.v = Version(magic[3])
	switch h.v {
	case CDF1, CDF2:
	case CDF5:
		h.wide = true
	default:
		return nil, &FormatError{Offset: 3, Field: "magic", Kind: ErrNotNetCDF, Msg: fmt.Sprintf("version byte 0x%02X, want 0x01 (CDF-1), 0x02 (CDF-2) or 0x05 (CDF-5)", magic[3])}
	}
	f := &File{Version: h.v, size: size}

	// numrecs
	stream := false
	roff := h.off
	if h.wide {
		p, err := h.take(8, "numrecs")
		if err != nil {
			return nil, err
		}
		x := binary.BigEndian.Uint64(p)
		if x == 1<<64-1 {
			stream = true
		} else if int64(x) < 0 {
			return nil, h.fail(roff, "numrecs", ErrCorrupt, "negative value %d", int64(x))
		} else {
			f.NumRecs = int64(x)
		}
	} else {
		x, err := h.u32("numrecs")
		if err != nil {
			return nil, err
		}
		if x == streaming32 {
			stream = true
		} else if int32(x) < 0 {
			return nil, h.fail(roff, "numrecs", ErrCorrupt, "negative value %d", int32(x))
		} else {
			f.NumRecs = int64(x)
		}
	}

	// dim_list
	w := int64(4)
	if h.wide {
		w = 8
	}
	nd, err := h.listHeader(tagDimension, "dim_list", w+4+w)
	if err != nil {
		return nil, err
	}
	f.Dims = make([]Dim, 0, nd)
	dimSeen := make(map[string]bool, nd)
	recDim := -1
	for i := range nd {
		name, err := h.name("dimension name")
		if err != nil {
			return nil, err
		}
		loff := h.off
		n, err := h.nonNeg("dim_length of " + name)
		if err != nil {
			return nil, err
		}
		if dimSeen[name] {
			return nil, h.fail(loff, "dimension name", ErrCorrupt, "dimension %s defined twice", name)
		}
		dimSeen[name] = true
		if n == 0 {
			if recDim >= 0 {
				return nil, h.fail(loff, "dim_length of "+name, ErrCorrupt, "second record dimension (length 0); %s is already the record dimension", f.Dims[recDim].Name)
			}
			recDim = int(i)
		}
		f.Dims = append(f.Dims, Dim{Name: name, Len: n})
	}

	// gatt_list
	if f.Attrs, err = h.attrs("gatt_list"); err != nil {
		return nil, err
	}

	// var_list
	boff := int64(4)
	if h.v != CDF1 {
		boff = 8
	}
	nv, err := h.listHeader(tagVariable, "var_list", w+4+w+4+w+4+w+boff)
	if err != nil {
		return nil, err
	}
	f.Vars = make([]*Var, 0, nv)
	varSeen := make(map[string]bool, nv)
	dimids := make([][]int64, 0, nv)
	for range nv {
		name, err := h.name("variable name")
		if err != nil {
			return nil, err
		}
		if varSeen[name] {
			return nil, h.fail(h.off, "variable name", ErrCorrupt, "variable %s defined twice", name)
		}
		varSeen[name] = true
		h.vr = name
		v := &Var{Name: name}
		ndims, err := h.count("nelems (number of dimensions)", w)
		if err != nil {
			return nil, err
		}
		v.Dims = make([]string, 0, ndims)
		ids := make([]int64, 0, ndims)
		for j := range ndims {
			doff := h.off
			id, err := h.nonNeg("dimid")
			if err != nil {
				return nil, err
			}
			if id >= nd {
				return nil, h.fail(doff, "dimid", ErrCorrupt, "dimension id %d, but the file defines %d dimensions", id, nd)
			}
			if int(id) == recDim && j != 0 {
				return nil, h.fail(doff, "dimid", ErrCorrupt, "record dimension %s is not the first dimension", f.Dims[id].Name)
			}
			v.Dims = append(v.Dims, f.Dims[id].Name)
			ids = append(ids, id)
		}
		dimids = append(dimids, ids)
		if v.Attrs, err = h.attrs("vatt_list"); err != nil {
			return nil, err
		}
		toff := h.off
		tc, err := h.u32("nc_type")
		if err != nil {
			return nil, err
		}
		v.Type = Type(tc)
		if !v.Type.In(h.v) {
			return nil, h.fail(toff, "nc_type", ErrCorrupt, "type code %d is not a %v type", tc, h.v)
		}
		if _, err := h.nonNeg("vsize"); err != nil { // recomputed below, as readers must for large variables
			return nil, err
		}
		bo := h.off
		if h.v == CDF1 {
			x, err := h.u32("begin")
			if err != nil {
				return nil, err
			}
			v.begin = int64(int32(x))
		} else {
			p, err := h.take(8, "begin")
			if err != nil {
				return nil, err
			}
			v.begin = int64(binary.BigEndian.Uint64(p))
		}
		if v.begin < 0 {
			return nil, h.fail(bo, "begin", ErrCorrupt, "negative offset %d", v.begin)
		}
		f.Vars = append(f.Vars, v)
		h.vr = ""
	}
	headerEnd := h.off

	// Layout: sizes from the dimensions, checked against the file size.
	var recVars []*Var
	for i, v := range f.Vars {
		h.vr = v.Name
		ids := dimids[i]
		isRec := len(ids) > 0 && int(ids[0]) == recDim
		v.shape = make([]int64, len(ids))
		for j, id := range ids {
			v.shape[j] = f.Dims[id].Len
		}
		if isRec {
			v.shape[0] = f.NumRecs
		}
		n := uint64(v.Type.Size())
		for j, d := range v.shape {
			if j == 0 && isRec {
				continue
			}
			hi, lo := bits.Mul64(n, uint64(d))
			if hi != 0 || lo > uint64(size) {
				return nil, h.fail(-1, "vsize", ErrTruncated, "shape %v of %v needs more than the %d bytes of the file", v.shape, v.Type, size)
			}
			n = lo
		}
		v.vsize = int64(n)
		if v.begin < headerEnd {
			return nil, h.fail(-1, "begin", ErrCorrupt, "data offset %d lies inside the header, which ends at %d", v.begin, headerEnd)
		}
		if isRec {
			recVars = append(recVars, v)
			continue
		}
		if v.begin > size || v.vsize > size-v.begin {
			return nil, h.fail(-1, "begin", ErrTruncated, "data at byte offset %d..%d lies beyond the end of the file (%d bytes); the file is incomplete or its header damaged: obtain a complete copy", v.begin, v.begin+v.vsize, size)
		}
	}
	h.vr = ""
	if len(recVars) == 0 {
		return f, nil
	}
	// One record holds each record variable's slab padded to 4 bytes,
	// except that a sole record variable is not padded (specification,
	// "Note on padding").
	if len(recVars) == 1 {
		f.recSize = recVars[0].vsize
	} else {
		for _, v := range recVars {
			f.recSize += pad4(v.vsize)
			if f.recSize > size {
				break
			}
		}
	}
	recBegin := recVars[0].begin
	for _, v := range recVars {
		recBegin = min(recBegin, v.begin)
	}
	if stream {
		if f.recSize == 0 || recBegin > size {
			f.NumRecs = 0
		} else {
			f.NumRecs = (size - recBegin) / f.recSize
		}
		for _, v := range recVars {
			v.shape[0] = f.NumRecs
		}
	}
	for _, v := range recVars {
		h.vr = v.Name
		if f.NumRecs == 0 || v.vsize == 0 {
			continue
		}
		hi, lo := bits.Mul64(uint64(f.NumRecs-1), uint64(f.recSize))
		end := lo + uint64(v.begin) + uint64(v.vsize)
		if hi != 0 || lo > uint64(size) || end > uint64(size) {
			return nil, h.fail(-1, "numrecs", ErrTruncated, "%d records of %d bytes from byte offset %d need more than the %d bytes of the file; the file is incomplete or its header damaged: obtain a complete copy", f.NumRecs, f.recSize, v.begin, size)
		}
	}
	return f, nil
}

// Len returns the number of values of v (all records included).
func (f *File) Len(v *Var) int64 {
	n := int64(1)
	for _, d := range f.Shape(v) {
		n *= d
	}
	return n
}

// chunks calls fn with the bytes of each contiguous run of v's values: the
// whole variable, or one record at a time. scratch is reused for reads.
func (f *File) chunks(v *Var, fn func(p []byte, first int64) error) error {
	if f.r == nil {
		panic("netcdf: reading values from a File that was not decoded")
	}
	nrec := int64(1)
	stride := int64(0)
	if f.IsRecord(v) {
		nrec, stride = f.NumRecs, f.recSize
	}
	if v.vsize == 0 || nrec == 0 {
		return nil // no values (a zero-length dimension)
	}
	per := v.vsize / int64(v.Type.Size())
	var scratch []byte
	for r := range nrec {
		off := v.begin + r*stride
		var p []byte
		if f.buf != nil {
			p = f.buf[off : off+v.vsize]
		} else {
			if scratch == nil {
				scratch = make([]byte, v.vsize)
			}
			if got, err := f.r.ReadAt(scratch, off); got < len(scratch) {
				return &FormatError{Offset: off + int64(got), Var: v.Name, Kind: ErrTruncated, Msg: fmt.Sprintf("reading data: %v", err)}
			}
			p = scratch
		}
		if err := fn(p, r*per); err != nil {
			return err
		}
	}
	return nil
}

// Float64s returns all values of v converted to float64, in row-major
// order (records first). Values are returned as stored: fill values,
// scale_factor and add_offset are left to the caller. For a File built
// in memory it converts v.Data (all of it for a record variable), and nil
// Data reads as the fill value that Encode would write (the _FillValue
// attribute, else the type's default) for f.NumRecs records.
func (f *File) Float64s(v *Var) ([]float64, error) {
	n := f.Len(v)
	if f.r == nil || v.Data != nil {
		if m, ok := sliceLen(v.Data); ok && f.IsRecord(v) {
			n = int64(m) // all records in Data, however many f.NumRecs says
		}
		out := make([]float64, n)
		if v.Data == nil {
			one := make([]float64, 1)
			decodeFloat64(one, fillBytes(v), v.Type)
			fill := one[0]
			for i := range out {
				out[i] = fill
			}
			return out, nil
		}
		if m, ok := sliceLen(v.Data); !ok || int64(m) != n {
			return nil, &FormatError{Offset: -1, Var: v.Name, Kind: ErrInvalid, Msg: fmt.Sprintf("Data holds %d values of %T, shape needs %d", m, v.Data, n)}
		}
		toFloat64(out, v.Data)
		return out, nil
	}
	out := make([]float64, n)
	err := f.chunks(v, func(p []byte, first int64) error {
		decodeFloat64(out[first:], p, v.Type)
		return nil
	})
	if err != nil {
		return nil, err
	}
	return out, nil
}

// Values returns all values of v in row-major order as a slice of the
// type's Go counterpart ([]int8, []byte for Char, []int16, []int32,
// []float32, []float64, []uint8, []uint16, []uint32, []int64, []uint64).
// For a File built in memory it returns v.Data.
func (f *File) Values(v *Var) (any, error) {
	if f.r == nil || v.Data != nil {
		return v.Data, nil
	}
	n := f.Len(v)
	raw := make([]byte, n*int64(v.Type.Size()))
	err := f.chunks(v, func(p []byte, first int64) error {
		copy(raw[first*int64(v.Type.Size()):], p)
		return nil
	})
	if err != nil {
		return nil, err
	}
	out := decodeTyped(v.Type, raw, int(n))
	if s, ok := out.(string); ok {
		return []byte(s), nil
	}
	return out, nil
}
