package tomo

import (
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"os"
)

// Magic numbers recognised by ReadBytes.
const (
	// netCDF classic format specification (Unidata): "CDF" followed by the
	// version byte 1, 2 or 5.
	netcdfMagic = "CDF"
	// HDF5 format specification (The HDF Group): the superblock signature
	// used by netCDF-4 files.
	hdf5Magic = "\x89HDF\r\n\x1a\n"
	// gzip file format (RFC 1952): ID1 ID2 = 0x1f 0x8b, then the method 8
	// (deflate).
	gzipMagic = "\x1f\x8b\x08"
)

// ReadFile reads a tomography grid from the file at path, or from standard
// input when path is "-". See ReadBytes for the formats.
func ReadFile(path string, opts ReadOptions) (*Grid, error) {
	var data []byte
	var err error
	if path == "-" {
		data, err = io.ReadAll(os.Stdin)
	} else {
		data, err = os.ReadFile(path)
	}
	if err != nil {
		var pe *os.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		return nil, &InputError{File: path, Err: fmt.Errorf("cannot read the file: %w", err)}
	}
	return ReadBytes(path, data, opts)
}

// Read reads a tomography grid from r; name labels it in messages and in
// the provenance ("-" for standard input). See ReadBytes for the formats.
func Read(name string, r io.Reader, opts ReadOptions) (*Grid, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, &InputError{File: name, Err: fmt.Errorf("cannot read: %w", err)}
	}
	return ReadBytes(name, data, opts)
}

// ReadBytes reads a tomography grid from the bytes of a file; name labels
// it in messages and in the provenance.
//
// The format is opts.Format when set ("text", "csv", "netcdf"); otherwise
// it is detected from the content: netCDF classic by its magic number
// "CDF\x01", "CDF\x02" or "CDF\x05" (any other control byte after "CDF"
// goes to the netCDF reader too, which names the bad version); a netCDF-4
// (HDF5) file is refused with advice to convert it; any other file with a
// NUL byte in its first kilobyte is refused as binary; CSV when the first line that is neither blank
// nor a '#' comment contains a comma; whitespace-separated text otherwise.
// A gzip-compressed file (RFC 1952) is decompressed first; a UTF-16 file
// is refused with advice. Source records name, the sha256 of data (as
// given, compressed or not) and the format.
func ReadBytes(name string, data []byte, opts ReadOptions) (*Grid, error) {
	raw := data
	var notes []string
	if bytes.HasPrefix(data, []byte(gzipMagic)) {
		zr, err := gzip.NewReader(bytes.NewReader(data))
		if err == nil {
			data, err = io.ReadAll(zr)
		}
		if err != nil {
			return nil, inputErr(name, 0, "the file looks gzip-compressed but cannot be decompressed: %v", err)
		}
		notes = append(notes, "decompressed from gzip (the sha256 is of the compressed file)")
	}
	format := opts.Format
	if format == "" {
		format = DetectFormat(data)
	}
	var g *Grid
	var err error
	switch format {
	case "hdf5":
		return nil, inputErr(name, 0, "this is a netCDF-4 (HDF5) file, which cmbflux does not read; convert it to netCDF classic with `nccopy -k classic in.nc out.nc` (or `nccopy -k cdf5` for 64-bit data) from the standard netCDF utilities")
	case "binary":
		n := min(len(data), 8)
		return nil, inputErr(name, 0, "a binary file (it holds NUL bytes; first bytes % x) that is none of the formats cmbflux reads: netCDF classic (magic \"CDF\" then version byte 1, 2 or 5), text or CSV; netCDF-4/HDF5 must be converted to classic first (`nccopy -k classic in.nc out.nc`), UTF-16 text saved as UTF-8", data[:n])
	case "utf16":
		return nil, inputErr(name, 0, "the file is encoded as UTF-16; save it as UTF-8 (or plain ASCII) text")
	case "netcdf":
		g, err = ReadNetCDF(name, data, opts)
	case "text":
		g, err = ReadText(name, data, opts)
	case "csv":
		g, err = ReadCSV(name, data, opts)
	default:
		return nil, inputErr(name, 0, "format %q not understood: use text, csv or netcdf", format)
	}
	if err != nil {
		return nil, err
	}
	sum := sha256.Sum256(raw)
	g.Source.Path = name
	g.Source.SHA256 = hex.EncodeToString(sum[:])
	if g.Source.Format == "" {
		g.Source.Format = format
	}
	g.Notes = append(notes, g.Notes...)
	return g, nil
}

// DetectFormat names the format of a file from its first bytes: "netcdf",
// "hdf5", "utf16", "binary", "csv" or "text", by the rules documented on ReadBytes
// (it does not look inside gzip-compressed data).
func DetectFormat(data []byte) string {
	// "CDF" followed by a byte that text does not hold (a control
	// character other than tab, newline or carriage return) is taken as
	// netCDF, so that an unknown version byte (say 3) is reported by the
	// netCDF reader as such rather than as a bad text line.
	if len(data) >= 4 && string(data[:3]) == netcdfMagic && data[3] < 0x20 && data[3] != '\t' && data[3] != '\n' && data[3] != '\r' {
		return "netcdf"
	}
	if bytes.HasPrefix(data, []byte(hdf5Magic)) {
		return "hdf5"
	}
	// Byte-order marks of UTF-16: U+FEFF little- or big-endian (The
	// Unicode Standard; from memory).
	if bytes.HasPrefix(data, []byte("\xff\xfe")) || bytes.HasPrefix(data, []byte("\xfe\xff")) {
		return "utf16"
	}
	// Text and CSV hold no NUL byte; a file that does, in its first
	// kilobyte, is some binary format we do not read.
	head := data
	if len(head) > 1024 {
		head = head[:1024]
	}
	if bytes.IndexByte(head, 0) >= 0 {
		return "binary"
	}
	for rest := data; len(rest) > 0; {
		line := rest
		if i := bytes.IndexByte(rest, '\n'); i >= 0 {
			line, rest = rest[:i], rest[i+1:]
		} else {
			rest = nil
		}
		t := bytes.TrimSpace(line)
		if len(t) == 0 || t[0] == '#' {
			continue
		}
		if bytes.IndexByte(t, ',') >= 0 {
			return "csv"
		}
		return "text"
	}
	return "text"
}
