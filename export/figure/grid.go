package figure

import (
	"fmt"
	"math"
)

// Grid is a regular longitude-latitude grid of values on the sphere,
// periodic in longitude.
//
// Value (i, j) lies at longitude Lon0 + j*360/NLon and latitude
// Lat0 + i*DLat and is stored at Values[i*NLon+j]. A grid whose rows run
// from north to south has DLat < 0; a grid laid out ring by ring from the
// north pole with longitudes from 0 eastward has Lat0 = 90 (or the first
// ring's latitude), Lon0 = 0 and DLat = -180/(rings) for equally spaced
// rings. NaN values are missing data.
type Grid struct {
	// NLon and NLat are the numbers of columns (longitudes) and rows
	// (latitudes).
	NLon, NLat int
	// Lon0 is the longitude of column 0 in degrees east.
	Lon0 float64
	// Lat0 is the latitude of row 0 in degrees north.
	Lat0 float64
	// DLat is the latitude step from one row to the next in degrees;
	// negative when rows run from north to south.
	DLat float64
	// Values holds NLat*NLon values, row by row.
	Values []float64
}

// check reports what is wrong with g's shape, if anything.
func (g *Grid) check() error {
	switch {
	case g.NLon < 2 || g.NLat < 2:
		return fmt.Errorf("figure: grid of %d x %d values, want at least 2 x 2", g.NLon, g.NLat)
	case len(g.Values) != g.NLon*g.NLat:
		return fmt.Errorf("figure: grid has %d values, want NLon*NLat = %d", len(g.Values), g.NLon*g.NLat)
	case !(math.Abs(g.DLat) > 0) || math.IsInf(g.DLat, 0):
		return fmt.Errorf("figure: grid latitude step %v, want a finite non-zero number", g.DLat)
	}
	for _, lat := range []float64{g.Lat0, g.Lat0 + float64(g.NLat-1)*g.DLat} {
		if lat < -90-1e-9 || lat > 90+1e-9 || math.IsNaN(lat) {
			return fmt.Errorf("figure: grid latitude %v outside [-90, 90]", lat)
		}
	}
	return nil
}

// At returns the value at longitude lon and latitude lat (degrees) by
// bilinear interpolation in longitude and latitude, periodic in longitude.
// North of the northernmost row and south of the southernmost row the
// nearest row is interpolated in longitude only. The result is NaN when a
// neighbouring value is NaN, and when lon or lat is NaN or lon infinite.
// At panics if the grid's shape is invalid.
func (g *Grid) At(lon, lat float64) float64 {
	if err := g.check(); err != nil {
		panic(err.Error())
	}
	return g.at(lon, lat)
}

func (g *Grid) at(lon, lat float64) float64 {
	if math.IsNaN(lon) || math.IsNaN(lat) || math.IsInf(lon, 0) {
		return math.NaN()
	}
	n := g.NLon
	u := math.Mod((lon-g.Lon0)/360*float64(n), float64(n))
	if u < 0 {
		u += float64(n)
	}
	j0 := int(u)
	if j0 >= n {
		j0 = n - 1
	}
	fu := u - float64(j0)
	j1 := j0 + 1
	if j1 == n {
		j1 = 0
	}
	v := (lat - g.Lat0) / g.DLat
	last := float64(g.NLat - 1)
	if v <= 0 {
		v = 0
	} else if v >= last {
		v = last
	}
	i0 := int(v)
	if i0 >= g.NLat-1 {
		i0 = g.NLat - 2
	}
	fv := v - float64(i0)
	r0 := g.Values[i0*n:]
	r1 := g.Values[(i0+1)*n:]
	a := r0[j0] + fu*(r0[j1]-r0[j0])
	b := r1[j0] + fu*(r1[j1]-r1[j0])
	return a + fv*(b-a)
}

// lonLat returns the coordinates of value (i, j) in degrees.
func (g *Grid) lonLat(i, j int) (lon, lat float64) {
	return wrapLon(g.Lon0 + float64(j)*360/float64(g.NLon)), g.Lat0 + float64(i)*g.DLat
}
