package tomo

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"math"
	"sync"
)

// DemoName is the name of the invented demo scenario returned by Demo.
const DemoName = "brindle"

// DemoTitle describes the demo scenario; it is Demo().Title.
const DemoTitle = "brindle: an invented lowermost-mantle scenario for trying cmbflux (not a tomography model of the Earth)"

// DemoDepths are the depth levels of the demo scenario in km.
var DemoDepths = []float64{2600, 2700, 2800, 2850, 2891}

// demoProvince is a slow province of the scenario: a plateau-shaped
// anomaly amp*exp(-rho^4), with rho the elliptic angular radius about the
// centre, semi-axes a (across) and b (along an axis tilted by tilt degrees
// east of north).
type demoProvince struct {
	lon, lat, a, b, tilt, amp float64
}

// demoBump is a small Gaussian anomaly amp*exp(-(delta/r)^2).
type demoBump struct{ lon, lat, r, amp float64 }

// The scenario's structure (all invented; amplitudes in percent).
var (
	// A broad province elongated roughly north-south, and a smaller,
	// rounder one about 180 degrees of longitude away.
	demoBroad = demoProvince{lon: 15, lat: -5, a: 28, b: 50, tilt: 25, amp: -2.6}
	demoRound = demoProvince{lon: 195, lat: 8, a: 24, b: 24, tilt: 0, amp: -2.1}
	// The fast belt sits about 90 degrees from the broad province's centre.
	demoBeltAmp, demoBeltDist, demoBeltWidth = 1.5, 90.0, 28.0
	// Small-scale structure.
	demoBumps = []demoBump{
		{60, 40, 8, 0.6}, {100, -30, 7, -0.5}, {140, 55, 9, 0.5},
		{250, -45, 8, -0.6}, {300, 20, 7, 0.55}, {330, -60, 10, 0.4},
		{170, -10, 6, -0.45}, {40, 70, 9, -0.35}, {220, 35, 7, 0.5},
	}
)

var (
	demoOnce sync.Once
	demoGrid *Grid
)

// Demo returns the embedded demo scenario "brindle", an invented
// lowermost-mantle shear-velocity model (no real data): a broad slow
// province elongated roughly north-south centred near 15 E, 5 S, a smaller,
// rounder slow province near 195 E, 8 N (about 180 degrees of longitude
// away), a belt of fast material about 90 degrees from the first, and nine
// small bumps. Slow regions reach about -2 to -3 %, fast ones +1 to +2 %.
// The large-scale pattern strengthens towards the core-mantle boundary,
// from half its amplitude at 2600 km to full amplitude at 2891 km.
//
// The grid is cell-registered at 2 degrees (Lon 1, 3, ..., 359; Lat -89,
// ..., 89) with the depth levels DemoDepths, values in percent rounded to
// 0.001 %, all valid. Each call returns a new copy. Source.Path is "demo"
// and Source.SHA256 is the sha256 of the grid written by WriteText, which
// is the committed file testdata/demo/brindle.txt.
func Demo() *Grid {
	demoOnce.Do(func() {
		g := demoBuild()
		var buf bytes.Buffer
		if err := WriteText(&buf, g); err != nil {
			panic("tomo: writing the demo: " + err.Error())
		}
		sum := sha256.Sum256(buf.Bytes())
		g.Source = Provenance{Path: "demo", SHA256: hex.EncodeToString(sum[:]), Format: "demo"}
		demoGrid = g
	})
	g := *demoGrid
	g.Lon = append([]float64(nil), demoGrid.Lon...)
	g.Lat = append([]float64(nil), demoGrid.Lat...)
	g.Depth = append([]float64(nil), demoGrid.Depth...)
	g.Values = append([]float64(nil), demoGrid.Values...)
	return &g
}

// demoBuild evaluates the scenario on its grid.
func demoBuild() *Grid {
	g := &Grid{
		Lon: make([]float64, 180), Lat: make([]float64, 90), Depth: append([]float64(nil), DemoDepths...),
		Name: "dvs", Units: UnitPercent, Reg: CellRegistered, Title: DemoTitle,
	}
	for i := range g.Lon {
		g.Lon[i] = 1 + 2*float64(i)
	}
	for j := range g.Lat {
		g.Lat[j] = -89 + 2*float64(j)
	}
	g.Values = make([]float64, len(g.Depth)*len(g.Lat)*len(g.Lon))
	// The horizontal pattern is the same at every level; evaluate it once.
	plane := len(g.Lat) * len(g.Lon)
	largeAt, smallAt := make([]float64, plane), make([]float64, plane)
	for j, lat := range g.Lat {
		for i, lon := range g.Lon {
			largeAt[j*len(g.Lon)+i] = demoLarge(lon, lat)
			smallAt[j*len(g.Lon)+i] = demoSmall(lon, lat)
		}
	}
	for k, d := range g.Depth {
		t := (d - DemoDepths[0]) / (CMBDepthKm - DemoDepths[0])
		large := 0.5 + 0.5*math.Pow(t, 1.5)
		small := 0.7 + 0.3*t
		for s := range plane {
			v := large*largeAt[s] + small*smallAt[s]
			g.Values[k*plane+s] = math.Round(v*1000) / 1000
		}
	}
	return g
}

// unitVec returns the unit vector at (lon, lat) in degrees.
func unitVec(lon, lat float64) [3]float64 {
	l, p := lon*math.Pi/180, lat*math.Pi/180
	return [3]float64{math.Cos(p) * math.Cos(l), math.Cos(p) * math.Sin(l), math.Sin(p)}
}

func dot(a, b [3]float64) float64 { return a[0]*b[0] + a[1]*b[1] + a[2]*b[2] }

// angDist returns the great-circle distance in degrees.
func angDist(lon1, lat1, lon2, lat2 float64) float64 {
	c := dot(unitVec(lon1, lat1), unitVec(lon2, lat2))
	return math.Acos(math.Max(-1, math.Min(1, c))) * 180 / math.Pi
}

// local returns the azimuthal-equidistant coordinates (x east, y north, in
// degrees of arc) of (lon, lat) about the centre (lon0, lat0).
func local(lon0, lat0, lon, lat float64) (x, y float64) {
	c, p := unitVec(lon0, lat0), unitVec(lon, lat)
	l0, p0 := lon0*math.Pi/180, lat0*math.Pi/180
	east := [3]float64{-math.Sin(l0), math.Cos(l0), 0}
	north := [3]float64{-math.Sin(p0) * math.Cos(l0), -math.Sin(p0) * math.Sin(l0), math.Cos(p0)}
	delta := math.Acos(math.Max(-1, math.Min(1, dot(c, p)))) * 180 / math.Pi
	az := math.Atan2(dot(p, east), dot(p, north))
	return delta * math.Sin(az), delta * math.Cos(az)
}

func (pr demoProvince) at(lon, lat float64) float64 {
	x, y := local(pr.lon, pr.lat, lon, lat)
	t := pr.tilt * math.Pi / 180
	across := x*math.Cos(t) - y*math.Sin(t)
	along := x*math.Sin(t) + y*math.Cos(t)
	rho2 := (across/pr.a)*(across/pr.a) + (along/pr.b)*(along/pr.b)
	return pr.amp * math.Exp(-rho2*rho2)
}

// demoLarge is the large-scale part in percent: provinces and fast belt.
func demoLarge(lon, lat float64) float64 {
	v := demoBroad.at(lon, lat) + demoRound.at(lon, lat)
	x, y := local(demoBroad.lon, demoBroad.lat, lon, lat)
	dA := math.Hypot(x, y)
	az := math.Atan2(x, y)
	z := (dA - demoBeltDist) / demoBeltWidth
	v += demoBeltAmp * math.Exp(-z*z) * (1 - 0.3*math.Cos(2*az))
	return v
}

// demoSmall is the small-scale part in percent.
func demoSmall(lon, lat float64) float64 {
	v := 0.0
	for _, b := range demoBumps {
		z := angDist(b.lon, b.lat, lon, lat) / b.r
		v += b.amp * math.Exp(-z*z)
	}
	return v
}
