package tomo

import (
	"fmt"
	"math"
)

// Registration says how grid coordinates relate to the data: at grid nodes
// (values sampled at the coordinates) or at cell centres (values are cell
// averages and the coordinates are the centres of cells of equal size).
type Registration int

const (
	// NodeRegistered grids sample the field at the coordinates; a global
	// node-registered grid may contain the poles.
	NodeRegistered Registration = iota
	// CellRegistered grids hold cell averages at cell centres; a global
	// cell-registered grid never contains the poles.
	CellRegistered
)

// String returns "node" or "cell".
func (r Registration) String() string {
	if r == CellRegistered {
		return "cell"
	}
	return "node"
}

// Provenance records where a grid came from.
type Provenance struct {
	Path   string // file path as given by the user ("-" for stdin, "demo" for the embedded scenario)
	SHA256 string // hex sha256 of the file's bytes
	Format string // "text", "csv", "netcdf-cdf1", "netcdf-cdf2", "netcdf-cdf5", "demo"
}

// Grid is a scalar field on a regular longitude-latitude grid with an
// optional depth axis.
//
// Values are stored depth-major, then latitude, then longitude:
// Values[k*len(Lat)*len(Lon) + j*len(Lon) + i] is at Depth[k], Lat[j], Lon[i].
// A grid without a depth axis has Depth == nil and len(Values) ==
// len(Lat)*len(Lon). Lon is ascending in [0, 360); Lat is ascending (south
// to north) after reading, whatever the order in the file.
type Grid struct {
	Lon   []float64 // degrees east, ascending, in [0, 360)
	Lat   []float64 // degrees north, ascending
	Depth []float64 // km below the surface, ascending; nil for a single layer
	// Values holds the field in the units named by Units.
	Values []float64
	// Valid marks the points that carry data; nil means all are valid.
	// The text and CSV readers store NaN in Values at invalid points.
	Valid []bool
	// Name is the variable's name in the file (e.g. the CSV column or netCDF
	// variable); Units its units as given ("percent", "fraction", "km/s", or
	// the file's own string).
	Name, Units string
	// Reg is the registration detected from the coordinates (see the
	// package notes); use Lon and Lat themselves for the geometry.
	Reg Registration
	// Source records where the grid came from.
	Source Provenance
	// Title is a one-line description of the model (from a "# title:"
	// comment, a netCDF title attribute, or the demo's name); "" if none.
	Title string
	// Notes lists what the reader did to bring the file to this form
	// (longitude convention converted, latitude order reversed, radius
	// converted to depth, seam column merged), for the user's record.
	Notes []string
	// Warnings lists suspicious but usable features of the input (identical
	// duplicate points merged, partial latitude coverage, an all-missing
	// depth level). They are meant to be printed, never dropped.
	Warnings []string
}

// DLon returns the longitude spacing in degrees,
// (Lon[last]-Lon[0])/(NLon-1): 360/NLon for a global grid.
func (g *Grid) DLon() float64 {
	if len(g.Lon) < 2 {
		return 360
	}
	return (g.Lon[len(g.Lon)-1] - g.Lon[0]) / float64(len(g.Lon)-1)
}

// DLat returns the latitude spacing in degrees, (Lat[last]-Lat[0])/(NLat-1).
func (g *Grid) DLat() float64 {
	if len(g.Lat) < 2 {
		return 180
	}
	return (g.Lat[len(g.Lat)-1] - g.Lat[0]) / float64(len(g.Lat)-1)
}

// Index returns the position in Values of depth index k, latitude index j
// and longitude index i: (k*NLat + j)*NLon + i.
func (g *Grid) Index(k, j, i int) int { return (k*len(g.Lat)+j)*len(g.Lon) + i }

// Check returns an error describing the first broken invariant of g, or
// nil: at least one longitude and latitude, Lon ascending in [0, 360), Lat
// ascending in [-90, 90], Depth (if any) ascending in [0, 6371] km, both
// horizontal axes evenly spaced (each coordinate within 1e-3 of a step of
// its place; coordinates stored in single precision fit), len(Values) =
// NDepth*NLat*NLon, and Valid nil or as long as Values. SelectLayer checks
// its grid with Check.
func (g *Grid) Check() error {
	nlon, nlat := len(g.Lon), len(g.Lat)
	if nlon == 0 || nlat == 0 {
		return fmt.Errorf("tomo: grid has %d longitudes and %d latitudes", nlon, nlat)
	}
	if len(g.Values) != g.NDepth()*nlat*nlon {
		return fmt.Errorf("tomo: grid has %d values for %d x %d x %d points", len(g.Values), g.NDepth(), nlat, nlon)
	}
	if g.Valid != nil && len(g.Valid) != len(g.Values) {
		return fmt.Errorf("tomo: grid has %d validity flags for %d values", len(g.Valid), len(g.Values))
	}
	even := func(name string, v []float64, lo, hi float64, hiOpen bool) error {
		step := 0.0
		if len(v) > 1 {
			step = (v[len(v)-1] - v[0]) / float64(len(v)-1)
		}
		for i, x := range v {
			if !(x >= lo && (x < hi || (!hiOpen && x == hi))) {
				return fmt.Errorf("tomo: grid %s %g outside [%g, %g%s", name, x, lo, hi, map[bool]string{true: ")", false: "]"}[hiOpen])
			}
			if i > 0 && !(x > v[i-1]) {
				return fmt.Errorf("tomo: grid %s not ascending at %g", name, x)
			}
		}
		for i, x := range v {
			if name != "depth" && math.Abs(x-v[0]-float64(i)*step) > 1e-3*step {
				return fmt.Errorf("tomo: grid %s not evenly spaced at %g", name, x)
			}
		}
		return nil
	}
	if err := even("longitude", g.Lon, 0, 360, true); err != nil {
		return err
	}
	if err := even("latitude", g.Lat, -90, 90, false); err != nil {
		return err
	}
	return even("depth", g.Depth, 0, EarthRadiusKm, false)
}

// NLon returns len(g.Lon).
func (g *Grid) NLon() int { return len(g.Lon) }

// NLat returns len(g.Lat).
func (g *Grid) NLat() int { return len(g.Lat) }

// NDepth returns the number of depth levels (1 for a grid without a depth
// axis).
func (g *Grid) NDepth() int {
	if g.Depth == nil {
		return 1
	}
	return len(g.Depth)
}

// At returns the value and validity at depth index k, latitude index j and
// longitude index i.
func (g *Grid) At(k, j, i int) (v float64, ok bool) {
	n := (k*len(g.Lat)+j)*len(g.Lon) + i
	v = g.Values[n]
	ok = g.Valid == nil || g.Valid[n]
	return v, ok
}
