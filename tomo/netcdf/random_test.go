package netcdf

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
)

// randomModel builds a small random dataset (fixed seed per case): up to
// three fixed dimensions and maybe a record dimension with 0-3 records,
// variables of random types and shapes, attributes of random types.
func randomModel(rng *rand.Rand, v Version) *File {
	f := &File{}
	var types []Type
	for t := Byte; t <= UInt64; t++ {
		if t.In(v) && t != Int64 { // ncgen 4.9.0 writes int64 as int with -k cdf5
			types = append(types, t)
		}
	}
	nrec := -1
	if rng.IntN(2) == 0 {
		f.AddDim("rec", 0)
		nrec = rng.IntN(4)
	}
	nd := 1 + rng.IntN(3)
	for i := range nd {
		f.AddDim(fmt.Sprintf("d%d", i), int64(1+rng.IntN(5)))
	}
	nv := 1 + rng.IntN(4)
	for i := range nv {
		t := types[rng.IntN(len(types))]
		var dims []string
		n := 1
		if nrec >= 0 && rng.IntN(2) == 0 {
			dims = append(dims, "rec")
			n = nrec
		}
		for j := range nd {
			if rng.IntN(2) == 0 {
				d := f.Dims[len(f.Dims)-nd+j]
				dims = append(dims, d.Name)
				n *= int(d.Len)
			}
		}
		vr := f.AddVar(fmt.Sprintf("v%d", i), t, dims, randomValues(rng, t, n))
		if rng.IntN(2) == 0 {
			vr.SetAttr("units", "m s-1")
		}
		if rng.IntN(2) == 0 {
			vr.Attrs = append(vr.Attrs, Attr{Name: "a_" + t.String(), Type: t, Value: randomValues(rng, t, 1+rng.IntN(3))})
		}
	}
	t := types[rng.IntN(len(types))]
	f.Attrs = append(f.Attrs, Attr{Name: "g_" + t.String(), Type: t, Value: randomValues(rng, t, 1+rng.IntN(4))})
	f.SetAttr("title", "random model")
	return f
}

// randomValues returns n random values of type t, avoiding the default
// fill values (ncdump prints those as "_", which ncgen reads back as fill).
func randomValues(rng *rand.Rand, t Type, n int) any {
	switch t {
	case Byte:
		x := make([]int8, n)
		for i := range x {
			x[i] = int8(rng.IntN(250) - 125)
		}
		return x
	case Char:
		x := make([]byte, n)
		for i := range x {
			x[i] = byte('a' + rng.IntN(26))
		}
		if n > 0 && rng.IntN(2) == 0 {
			return string(x) // attributes hold text as string
		}
		return x
	case Short:
		x := make([]int16, n)
		for i := range x {
			x[i] = int16(rng.IntN(60000) - 30000)
		}
		return x
	case Int:
		x := make([]int32, n)
		for i := range x {
			x[i] = int32(rng.Int64N(4e9) - 2e9)
		}
		return x
	case Float:
		x := make([]float32, n)
		for i := range x {
			x[i] = float32(rng.NormFloat64() * math.Pow(10, float64(rng.IntN(20)-10)))
		}
		return x
	case Double:
		x := make([]float64, n)
		for i := range x {
			// Below 1e15, so that %.17g keeps a decimal point: ncgen reads
			// longer digit strings as integer constants.
			x[i] = rng.NormFloat64() * math.Pow(10, float64(rng.IntN(34)-20))
		}
		return x
	case UByte:
		x := make([]uint8, n)
		for i := range x {
			x[i] = uint8(rng.IntN(255))
		}
		return x
	case UShort:
		x := make([]uint16, n)
		for i := range x {
			x[i] = uint16(rng.IntN(65535))
		}
		return x
	case UInt:
		x := make([]uint32, n)
		for i := range x {
			x[i] = uint32(rng.Int64N(4294967295))
		}
		return x
	case UInt64:
		x := make([]uint64, n)
		for i := range x {
			x[i] = rng.Uint64() >> 1
		}
		return x
	}
	panic("randomValues: type " + t.String())
}

// TestRandomModelsThroughNcdumpNcgen writes random datasets with Encode,
// prints them with Unidata's `ncdump -p 9,17` (enough digits to round-trip
// float and double) and rebuilds them with `ncgen`: for CDF-1 and CDF-2
// the rebuilt file must equal ours byte for byte; for CDF-5 (rebuilt via
// -k nc4 and nccopy, which pads data with zeros) the ncdump text of both
// must agree, and ours must decode to the model.
func TestRandomModelsThroughNcdumpNcgen(t *testing.T) {
	tool(t, "ncgen")
	tool(t, "ncdump")
	dir := t.TempDir()
	for _, v := range []Version{CDF1, CDF2, CDF5} {
		for seed := range uint64(8) {
			rng := rand.New(rand.NewPCG(seed, uint64(v)))
			f := randomModel(rng, v)
			var buf bytes.Buffer
			if err := Encode(&buf, f, v); err != nil {
				t.Fatalf("%v seed %d: %v", v, seed, err)
			}
			ours := filepath.Join(dir, fmt.Sprintf("ours-%d-%d.nc", v, seed))
			os.WriteFile(ours, buf.Bytes(), 0o644)
			cdl := filepath.Join(dir, fmt.Sprintf("r-%d-%d.cdl", v, seed))
			os.WriteFile(cdl, run(t, "ncdump", "-p", "9,17", ours), 0o644)
			back := filepath.Join(dir, fmt.Sprintf("back-%d-%d.nc", v, seed))
			if v == CDF5 {
				nc4 := back + "4"
				run(t, "ncgen", "-k", "nc4", "-o", nc4, cdl)
				run(t, "nccopy", "-k", "cdf5", nc4, back)
			} else {
				kind := map[Version]string{CDF1: "classic", CDF2: "64-bit-offset"}[v]
				run(t, "ncgen", "-k", kind, "-o", back, cdl)
			}
			ref, err := os.ReadFile(back)
			if err != nil {
				t.Fatal(err)
			}
			if v != CDF5 {
				if !bytes.Equal(ref, buf.Bytes()) {
					t.Errorf("%v seed %d: ncgen rebuilt %d bytes that differ from our %d\n%s", v, seed, len(ref), buf.Len(), run(t, "ncdump", "-p", "9,17", ours))
				}
				continue
			}
			a := dropFirstLine(run(t, "ncdump", "-p", "9,17", ours))
			b := dropFirstLine(run(t, "ncdump", "-p", "9,17", back))
			if a != b {
				t.Errorf("%v seed %d: ncdump differs:\n--- ours\n%s--- rebuilt\n%s", v, seed, a, b)
			}
			g, err := DecodeBytes(buf.Bytes())
			if err != nil {
				t.Fatalf("%v seed %d: %v", v, seed, err)
			}
			for _, vr := range f.Vars {
				got, err := g.Float64s(g.Var(vr.Name))
				want, _ := f.Float64s(vr)
				if err != nil || !equalFloats(got, want) {
					t.Errorf("%v seed %d: %s = %v, want %v (%v)", v, seed, vr.Name, got, want, err)
				}
			}
		}
	}
}

func equalFloats(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}
