package netcdf

import (
	"bytes"
	"encoding/binary"
	"errors"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
)

// badBase is a small valid CDF-1 grid (invented data) that the bad-input
// cases below damage.
func badBase() *File {
	f := &File{}
	f.AddDim("lon", 4).AddDim("lat", 3)
	f.SetAttr("title", "invented bad-input test grid")
	f.AddVar("lon", Double, []string{"lon"}, []float64{0, 90, 180, 270}).SetAttr("units", "degrees_east")
	f.AddVar("lat", Double, []string{"lat"}, []float64{-45, 0, 45}).SetAttr("units", "degrees_north")
	f.AddVar("dvs", Float, []string{"lat", "lon"}, []float32{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12}).
		SetAttr("units", "percent").SetAttr("_FillValue", float32(-999))
	return f
}

func encode(t testing.TB, f *File, v Version) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := Encode(&buf, f, v); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// put32 overwrites the big-endian 32-bit word at off.
func put32(b []byte, off int, x uint32) []byte {
	b = bytes.Clone(b)
	binary.BigEndian.PutUint32(b[off:], x)
	return b
}

// Offsets in badBase's CDF-1 header, from the layout of the classic format
// specification: magic (0-3), numrecs (4-7), NC_DIMENSION tag (8-11),
// nelems (12-15), dim "lon": name length (16-19), "lon\0" (20-23),
// dim_length (24-27); dim "lat": 28-31, 32-35, dim_length 36-39; then the
// NC_ATTRIBUTE tag (40-43), nelems (44-47), name "title" (48-51, 52-59),
// nc_type (60-63), attribute nelems (64-67).
const (
	offDimNelems  = 12
	offLatLen     = 36
	offAttrNelems = 64
)

// badCase is a damaged file committed as testdata/bad/<file>: either a
// header-level error (kind, field, variable) or a valid netCDF file whose
// grid is bad (decodes without error; tomo.ReadNetCDF rejects it).
type badCase struct {
	file  string
	data  func(t testing.TB) []byte
	kind  error  // nil: decodes fine
	field string // substring of FormatError.Field
	vr    string // FormatError.Var
	msg   string // substring of the message
}

var badCases = []badCase{
	{file: "nc-truncated.nc", data: func(t testing.TB) []byte {
		b := encode(t, badBase(), CDF1)
		return b[:len(b)-10]
	}, kind: ErrTruncated, field: "begin", vr: "dvs", msg: "beyond the end of the file"},
	{file: "nc-truncated-header.nc", data: func(t testing.TB) []byte {
		return encode(t, badBase(), CDF1)[:50]
	}, kind: ErrTruncated, field: "gatt_list nelems", msg: "only 2 bytes follow"},
	{file: "nc-dim-length-absurd.nc", data: func(t testing.TB) []byte {
		return put32(encode(t, badBase(), CDF1), offLatLen, 2_000_000_000)
	}, kind: ErrTruncated, field: "vsize", vr: "lat", msg: "needs more than"},
	{file: "nc-begin-beyond-end.nc", data: func(t testing.TB) []byte {
		b := encode(t, badBase(), CDF1)
		f, _ := DecodeBytes(b)
		hdrEnd := int(f.Vars[0].begin)        // data of the first variable follows the header
		return put32(b, hdrEnd-4, 0x7FFFFF00) // begin of dvs, the header's last field
	}, kind: ErrTruncated, field: "begin", vr: "dvs", msg: "byte offset 2147483392"},
	{file: "nc-dim-count-billions.nc", data: func(t testing.TB) []byte {
		return put32(encode(t, badBase(), CDF1), offDimNelems, 3_000_000_000)
	}, kind: ErrCorrupt, field: "dim_list nelems", msg: "negative value"},
	{file: "nc-dim-count-two-billion.nc", data: func(t testing.TB) []byte {
		return put32(encode(t, badBase(), CDF1), offDimNelems, 2_000_000_000)
	}, kind: ErrTruncated, field: "dim_list nelems", msg: "claims 2000000000 entries"},
	{file: "nc-attr-count-billions.nc", data: func(t testing.TB) []byte {
		return put32(encode(t, badBase(), CDF1), offAttrNelems, 1_500_000_000)
	}, kind: ErrTruncated, field: "attribute nelems of title", msg: "1500000000 values of char"},
	{file: "nc-numrecs-billions.nc", data: func(t testing.TB) []byte {
		f := &File{}
		f.AddDim("t", 0).AddDim("x", 2)
		f.AddVar("v", Int, []string{"t", "x"}, []int32{1, 2, 3, 4})
		return put32(encode(t, f, CDF1), 4, 2_000_000_000)
	}, kind: ErrTruncated, field: "numrecs", vr: "v", msg: "2000000000 records"},
	{file: "nc-bad-magic.nc", data: func(t testing.TB) []byte {
		b := bytes.Clone(encode(t, badBase(), CDF1))
		copy(b, "CDX")
		return b
	}, kind: ErrNotNetCDF, field: "magic", msg: "want \"CDF\""},
	{file: "nc-bad-version.nc", data: func(t testing.TB) []byte {
		b := bytes.Clone(encode(t, badBase(), CDF1))
		b[3] = 3
		return b
	}, kind: ErrNotNetCDF, field: "magic", msg: "version byte 0x03"},
	{file: "nc-hdf5.nc", data: func(t testing.TB) []byte {
		// HDF5 format signature (HDF5 File Format Specification, "Format
		// Signature"), then a superblock version 0 and zeros.
		return append([]byte("\x89HDF\r\n\x1a\n\x00"), make([]byte, 87)...)
	}, kind: ErrHDF5, field: "magic", msg: "nccopy -k classic in.nc out.nc"},
	{file: "nc-bad-name.nc", data: func(t testing.TB) []byte {
		b := bytes.Clone(encode(t, badBase(), CDF1))
		b[21] = '/' // "lon" -> "l/n"
		return b
	}, kind: ErrCorrupt, field: "dimension name", msg: "contains a control character or '/'"},
	{file: "nc-bad-tag.nc", data: func(t testing.TB) []byte {
		return put32(encode(t, badBase(), CDF1), 8, 0x0B)
	}, kind: ErrCorrupt, field: "dim_list tag", msg: "tag 0xB, want 0xA"},
	// Valid netCDF, bad grids: tomo.ReadNetCDF must reject them.
	{file: "nc-lat-nonmonotonic.nc", data: func(t testing.TB) []byte {
		f := badBase()
		f.Var("lat").Data = []float64{-45, 45, 0}
		return encode(t, f, CDF1)
	}},
	{file: "nc-no-lat-coordinate.nc", data: func(t testing.TB) []byte {
		f := badBase()
		f.Vars = append(f.Vars[:1], f.Vars[2:]...)
		return encode(t, f, CDF1)
	}},
	{file: "nc-all-fill.nc", data: func(t testing.TB) []byte {
		f := badBase()
		f.Var("dvs").Data = nil // all _FillValue
		return encode(t, f, CDF2)
	}},
}

// TestBadFiles checks the committed files in testdata/bad/nc-* against
// the helpers that made them (set NC_UPDATE_BAD=1 to rewrite them) and
// checks each error: kind, header field, variable and message.
func TestBadFiles(t *testing.T) {
	dir := filepath.Join("..", "..", "testdata", "bad")
	for _, tc := range badCases {
		t.Run(tc.file, func(t *testing.T) {
			want := tc.data(t)
			path := filepath.Join(dir, tc.file)
			if os.Getenv("NC_UPDATE_BAD") == "1" {
				if err := os.WriteFile(path, want, 0o644); err != nil {
					t.Fatal(err)
				}
			}
			b, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("%v (run with NC_UPDATE_BAD=1 to create it)", err)
			}
			if !bytes.Equal(b, want) {
				t.Fatalf("%s differs from what its helper makes; run with NC_UPDATE_BAD=1", path)
			}
			for _, how := range []string{"bytes", "ReaderAt"} {
				var f *File
				if how == "bytes" {
					f, err = DecodeBytes(b)
				} else {
					f, err = Decode(bytes.NewReader(b), int64(len(b)))
				}
				if tc.kind == nil {
					if err != nil {
						t.Fatalf("%s: %v; want a valid file", how, err)
					}
					for _, v := range f.Vars {
						if _, err := f.Float64s(v); err != nil {
							t.Errorf("%s: Float64s(%s): %v", how, v.Name, err)
						}
					}
					continue
				}
				var fe *FormatError
				if !errors.As(err, &fe) || !errors.Is(err, tc.kind) {
					t.Fatalf("%s: error %v, want a FormatError of kind %v", how, err, tc.kind)
				}
				if !strings.Contains(fe.Field, tc.field) || fe.Var != tc.vr || !strings.Contains(err.Error(), tc.msg) {
					t.Errorf("%s: error %q (field %q, var %q); want field %q, var %q, message with %q", how, err, fe.Field, fe.Var, tc.field, tc.vr, tc.msg)
				}
			}
		})
	}
}

// TestAbsurdSizesRejectedBeforeAllocating measures the memory allocated
// while decoding headers that claim billions of entries or bytes.
func TestAbsurdSizesRejectedBeforeAllocating(t *testing.T) {
	const limit = 1 << 20 // bytes; the files are a few hundred bytes, the claims gigabytes
	for _, tc := range badCases {
		if tc.kind == nil {
			continue
		}
		b := tc.data(t)
		var m0, m1 runtime.MemStats
		runtime.ReadMemStats(&m0)
		DecodeBytes(b)
		runtime.ReadMemStats(&m1)
		if d := m1.TotalAlloc - m0.TotalAlloc; d > limit {
			t.Errorf("%s: decoding allocated %d bytes", tc.file, d)
		}
	}
}
