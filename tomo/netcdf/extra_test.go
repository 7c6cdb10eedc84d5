package netcdf_test

import (
	"bytes"
	"encoding/binary"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"testing"

	"cmbflux/tomo/netcdf"
)

// TestCFGridMatchesNcgen writes the CF-1.8 grid of Example_cfGrid and
// compares it with what Unidata's ncgen makes of the same content written
// by hand in testdata/cdl/cf_grid.cdl: the bytes and the `ncdump` text
// must agree. ncgen and ncdump are from Debian's netcdf-bin; the test
// skips when they are missing, except under CI=true.
func TestCFGridMatchesNcgen(t *testing.T) {
	ncgen, err1 := exec.LookPath("ncgen")
	ncdump, err2 := exec.LookPath("ncdump")
	if err1 != nil || err2 != nil {
		if os.Getenv("CI") == "true" {
			t.Fatal("ncgen and ncdump (Debian package netcdf-bin) are required under CI=true")
		}
		t.Skip("ncgen/ncdump not installed (Debian package netcdf-bin)")
	}
	dir := t.TempDir()
	ref := filepath.Join(dir, "cf_grid.nc")
	if out, err := exec.Command(ncgen, "-k", "64-bit-offset", "-o", ref, filepath.Join("..", "..", "testdata", "cdl", "cf_grid.cdl")).CombinedOutput(); err != nil {
		t.Fatalf("ncgen: %v\n%s", err, out)
	}
	want, err := os.ReadFile(ref)
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := netcdf.Encode(&buf, cfGrid(), netcdf.CDF2); err != nil {
		t.Fatal(err)
	}
	ours := filepath.Join(dir, "cf_grid_ours.nc")
	if err := os.WriteFile(ours, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(buf.Bytes(), want) {
		t.Errorf("Encode wrote %d bytes that differ from ncgen's %d", buf.Len(), len(want))
	}
	for _, args := range [][]string{{"-h"}, {}} {
		a, err := exec.Command(ncdump, append(args, ours)...).Output()
		if err != nil {
			t.Fatalf("ncdump %v of our file: %v", args, err)
		}
		b, _ := exec.Command(ncdump, append(args, ref)...).Output()
		a, b = a[bytes.IndexByte(a, '\n'):], b[bytes.IndexByte(b, '\n'):] // dataset names differ
		if !bytes.Equal(a, b) {
			t.Errorf("ncdump %v:\n--- ours\n%s--- ncgen\n%s", args, a, b)
		}
	}
}

// sparse is an io.ReaderAt over a virtual file of the given size that is
// zero except for the byte ranges in parts.
type sparse struct {
	size  int64
	parts map[int64][]byte
}

func (s *sparse) ReadAt(p []byte, off int64) (int, error) {
	if off >= s.size {
		return 0, io.EOF
	}
	n := len(p)
	if int64(n) > s.size-off {
		n = int(s.size - off)
	}
	clear(p[:n])
	for at, b := range s.parts {
		for i := range b {
			if j := at + int64(i) - off; j >= 0 && j < int64(n) {
				p[j] = b[i]
			}
		}
	}
	if n < len(p) {
		return n, io.EOF
	}
	return n, nil
}

// TestCDF2OffsetBeyond4GiB moves a variable's data past 4 GiB in a
// virtual CDF-2 file: the 64-bit begin field of the 64-bit offset format
// (netCDF classic format specification, OFFSET = INT64 for version 2)
// must be honoured through Decode on an io.ReaderAt.
func TestCDF2OffsetBeyond4GiB(t *testing.T) {
	f := &netcdf.File{}
	f.AddDim("x", 3)
	f.AddVar("v", netcdf.Double, []string{"x"}, []float64{1.5, -2.5, 3.5})
	var buf bytes.Buffer
	if err := netcdf.Encode(&buf, f, netcdf.CDF2); err != nil {
		t.Fatal(err)
	}
	b := buf.Bytes()
	hdr := len(b) - 24 // three doubles follow the header
	const begin = 5 << 30
	head := bytes.Clone(b[:hdr])
	binary.BigEndian.PutUint64(head[hdr-8:], begin) // begin is the header's last field
	r := &sparse{size: begin + 24, parts: map[int64][]byte{0: head, begin: b[hdr:]}}
	g, err := netcdf.Decode(r, r.size)
	if err != nil {
		t.Fatal(err)
	}
	got, err := g.Values(g.Var("v"))
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(got, []float64{1.5, -2.5, 3.5}) {
		t.Errorf("values = %v", got)
	}
}

// TestStreamingCDF5 sets numrecs to STREAMING (all bits set, 64-bit in
// CDF-5) and expects the record count from the file size.
func TestStreamingCDF5(t *testing.T) {
	f := &netcdf.File{}
	f.AddDim("t", 0)
	f.AddVar("v", netcdf.Int64, []string{"t"}, []int64{7, 8, 9, 10})
	var buf bytes.Buffer
	if err := netcdf.Encode(&buf, f, netcdf.CDF5); err != nil {
		t.Fatal(err)
	}
	b := buf.Bytes()
	binary.BigEndian.PutUint64(b[4:], ^uint64(0))
	g, err := netcdf.DecodeBytes(b)
	if err != nil {
		t.Fatal(err)
	}
	if got, _ := g.Values(g.Var("v")); g.NumRecs != 4 || !reflect.DeepEqual(got, []int64{7, 8, 9, 10}) {
		t.Errorf("NumRecs = %d, values %v; want 4, [7 8 9 10]", g.NumRecs, got)
	}
}

// TestDecodeLargeHeaderReaderAt decodes, through an io.ReaderAt, a header
// longer than the first read (64 KiB) so that the decoder reads more.
func TestDecodeLargeHeaderReaderAt(t *testing.T) {
	f := &netcdf.File{}
	f.AddDim("x", 2)
	f.SetAttr("history", string(bytes.Repeat([]byte("long history line\n"), 20000))) // 360 kB
	f.AddVar("v", netcdf.Short, []string{"x"}, []int16{-3, 4})
	var buf bytes.Buffer
	if err := netcdf.Encode(&buf, f, netcdf.CDF5); err != nil {
		t.Fatal(err)
	}
	g, err := netcdf.Decode(bytes.NewReader(buf.Bytes()), int64(buf.Len()))
	if err != nil {
		t.Fatal(err)
	}
	if got, _ := g.Values(g.Var("v")); !reflect.DeepEqual(got, []int16{-3, 4}) || len(g.Attr("history").Text()) != 360000 {
		t.Errorf("values %v, history of %d bytes", got, len(g.Attr("history").Text()))
	}
}
