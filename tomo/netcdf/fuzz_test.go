package netcdf

import (
	"bytes"
	"errors"
	"io"
	"testing"
)

// FuzzDecode feeds arbitrary bytes to the decoder through both entry
// points: it must return a File or a *FormatError, never panic, and every
// variable of a decoded File must be readable or fail with a FormatError.
// A decoded File must also encode again.
func FuzzDecode(f *testing.F) {
	for _, v := range []Version{CDF1, CDF2, CDF5} {
		f.Add(encode(f, badBase(), v))
		f.Add(encode(f, classicModel(), v))
	}
	f.Add(encode(f, cdf5Model(), CDF5))
	for _, tc := range badCases {
		f.Add(tc.data(f))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		for _, how := range []string{"bytes", "ReaderAt"} {
			var fl *File
			var err error
			if how == "bytes" {
				fl, err = DecodeBytes(data)
			} else {
				fl, err = Decode(bytes.NewReader(data), int64(len(data)))
			}
			if err != nil {
				var fe *FormatError
				if !errors.As(err, &fe) {
					t.Fatalf("%s: error %T %v is not a *FormatError", how, err, err)
				}
				continue
			}
			for _, v := range fl.Vars {
				if _, err := fl.Float64s(v); err != nil {
					t.Fatalf("%s: Float64s(%s): %v", how, v.Name, err)
				}
				vals, err := fl.Values(v)
				if err != nil {
					t.Fatalf("%s: Values(%s): %v", how, v.Name, err)
				}
				v.Data = vals
			}
			if err := Encode(io.Discard, fl, fl.Version); err != nil {
				var fe *FormatError
				if !errors.As(err, &fe) {
					t.Fatalf("%s: Encode: %v", how, err)
				}
			}
		}
	})
}
