package contour

import (
	"encoding/binary"
	"math"
	"testing"
)

// FuzzRings checks invariants of contouring arbitrary fields on a small
// grid: the area below a level lies in [0, 4 pi], the assembled rings bound
// the same area as the fan sum over the oriented pieces (both exact for the
// same polygon), and the area below the maximum of the samples is 4 pi.
func FuzzRings(f *testing.F) {
	f.Add([]byte{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12}, 0.0)
	f.Add([]byte{0, 0, 0, 0, 255, 255, 255, 255, 0, 0, 0, 0}, 127.5)
	f.Fuzz(func(t *testing.T, data []byte, level float64) {
		const nlat, nlon = 5, 7
		if math.IsNaN(level) || math.IsInf(level, 0) {
			return
		}
		fd := Field{NLon: nlon}
		for i := range nlat {
			fd.Lat = append(fd.Lat, 80-40*float64(i))
		}
		hi := math.Inf(-1)
		for k := range nlat * nlon {
			var v float64
			if len(data) >= 2*(k+1) {
				v = float64(binary.LittleEndian.Uint16(data[2*k:]))
			} else if len(data) > 0 {
				v = float64(data[k%len(data)])
			}
			fd.Values = append(fd.Values, v)
			hi = math.Max(hi, v)
		}
		s, err := NewSurface(fd)
		if err != nil {
			t.Fatal(err)
		}
		a := s.AreaBelow(level)
		if !(a >= 0 && a <= 4*math.Pi) {
			t.Fatalf("area %g outside [0, 4 pi]", a)
		}
		rings := s.Rings(level)
		if len(rings) > 0 {
			if b := RegionArea(rings); math.Abs(a-b) > 1e-9 && math.Abs(math.Abs(a-b)-4*math.Pi) > 1e-9 {
				t.Fatalf("fan sum %g, rings %g (%d rings)", a, b, len(rings))
			}
		}
		if a := s.AreaBelow(hi + 1); a != 4*math.Pi {
			t.Fatalf("area below the maximum %g, want 4 pi", a)
		}
	})
}
