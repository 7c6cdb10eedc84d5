package figure

import "math"

// demoField is an invented scenario for tests and examples: a mean CMB
// heat flux of 65 mW/m² with two broad antipodal equatorial lows and
// high flux in a ring between them.
func demoField(lon, lat float64) float64 {
	d2r := math.Pi / 180
	dist := func(lon0, lat0 float64) float64 {
		c := math.Sin(lat*d2r)*math.Sin(lat0*d2r) + math.Cos(lat*d2r)*math.Cos(lat0*d2r)*math.Cos((lon-lon0)*d2r)
		return math.Acos(math.Max(-1, math.Min(1, c))) / d2r
	}
	q := 65.0
	q -= 38 * math.Exp(-math.Pow(dist(15, -8)/28, 2))
	q -= 34 * math.Exp(-math.Pow(dist(-165, -5)/32, 2))
	q += 22 * math.Exp(-math.Pow(dist(100, 40)/25, 2))
	q += 18 * math.Exp(-math.Pow(dist(-75, 10)/22, 2))
	return q
}

// demoGrid samples demoField on a 2-degree grid from the north pole down.
func demoGrid() *Grid {
	g := &Grid{NLon: 180, NLat: 91, Lon0: 0, Lat0: 90, DLat: -2}
	g.Values = make([]float64, g.NLon*g.NLat)
	for i := range g.NLat {
		for j := range g.NLon {
			lon, lat := g.lonLat(i, j)
			g.Values[i*g.NLon+j] = demoField(lon, lat)
		}
	}
	return g
}

// circleRing returns a closed ring of radius r degrees about (lon0, lat0).
func circleRing(lon0, lat0, r float64) [][2]float64 {
	d2r := math.Pi / 180
	var ring [][2]float64
	for k := 0; k <= 72; k++ {
		az := float64(k%72) * 5 * d2r
		la := math.Asin(math.Sin(lat0*d2r)*math.Cos(r*d2r) + math.Cos(lat0*d2r)*math.Sin(r*d2r)*math.Cos(az))
		lo := lon0*d2r + math.Atan2(math.Sin(az)*math.Sin(r*d2r)*math.Cos(lat0*d2r), math.Cos(r*d2r)-math.Sin(lat0*d2r)*math.Sin(la))
		ring = append(ring, [2]float64{wrapLon(lo / d2r), la / d2r})
	}
	return ring
}

func demoMap() *Map {
	return &Map{
		Title:    "CMB heat flux, invented demo scenario, q* = 1.0",
		Subtitle: "lmax 12, linear mapping, mean 65 mW/m²",
		Levels:   []Level{{Value: 40, Label: "q_ad"}},
		Hatches:  []Hatch{{Below: 40, Label: "below q_ad"}},
		Grid:     demoGrid(),
		Center:   65,
		Label:    "heat flux q",
		Units:    "mW/m²",
		Outlines: []Outline{
			{Rings: [][][2]float64{circleRing(15, -8, 24), circleRing(-165, -5, 27)}, Label: "slow province edge", Style: Solid},
			{Rings: [][][2]float64{circleRing(15, -8, 12)}, Label: "q below adiabat", Style: Dashed},
		},
	}
}
