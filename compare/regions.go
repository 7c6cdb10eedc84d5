package compare

import (
	"fmt"
	"math"
	"sort"

	"cmbflux/flux/contour"
)

// CMBRadiusKm is the radius of the core-mantle boundary in PREM (Dziewonski &
// Anderson 1981, Phys. Earth Planet. Inter. 25, 297), used for areas in km^2.
const CMBRadiusKm = 3480.0

// Region is one connected slow region: the part of the sphere inside one
// exterior contour ring below the level.
type Region struct {
	// Ring is the exterior ring, (lon, lat) degrees, counter-clockwise seen
	// from outside the sphere (package flux/contour's orientation).
	Ring [][2]float64 `json:"-"`
	// Fraction is the area inside Ring as a fraction of the sphere (holes
	// inside the ring are not subtracted; they are listed as separate rings
	// by flux/contour).
	Fraction float64 `json:"area_fraction"`
	// AreaKm2 is that area on the core-mantle boundary (radius CMBRadiusKm).
	AreaKm2 float64 `json:"area_km2"`
	// CentroidLon, CentroidLat locate the centre of mass of the region on
	// the sphere, in degrees.
	CentroidLon float64 `json:"centroid_lon"`
	CentroidLat float64 `json:"centroid_lat"`
}

// SlowRegions returns the regions where the field is below level, largest
// first. A region's area is that of its exterior ring (exact for the
// geodesic polygon; see contour.Area).
func SlowRegions(f contour.Field, level float64) ([]Region, error) {
	s, err := contour.NewSurface(f)
	if err != nil {
		return nil, err
	}
	var out []Region
	for _, r := range s.Rings(level) {
		a := contour.Area(r)
		if a > 2*math.Pi {
			// A clockwise ring (a hole, or the complement of a region
			// larger than a hemisphere) encloses more than half the sphere
			// on its left; it is not an exterior ring of a slow region.
			continue
		}
		lon, lat, ok := contour.Centroid([][][2]float64{r})
		if !ok {
			continue
		}
		out = append(out, Region{
			Ring:        r,
			Fraction:    a / (4 * math.Pi),
			AreaKm2:     a * CMBRadiusKm * CMBRadiusKm,
			CentroidLon: lon,
			CentroidLat: lat,
		})
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].Fraction > out[j].Fraction })
	return out, nil
}

// LevelForFraction returns the level below which the interpolated field
// covers the fraction frac of the sphere, by bisection on
// contour.Surface.FractionBelow to 1e-9 of the field's range.
func LevelForFraction(f contour.Field, frac float64) (float64, error) {
	if !(frac > 0 && frac < 1) {
		return 0, fmt.Errorf("compare: area fraction %g outside (0, 1)", frac)
	}
	s, err := contour.NewSurface(f)
	if err != nil {
		return 0, err
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range f.Values {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	if !(hi > lo) {
		return 0, fmt.Errorf("compare: the field is constant; no level encloses a fraction %g", frac)
	}
	span := hi - lo
	for hi-lo > 1e-9*span {
		mid := 0.5 * (lo + hi)
		if s.FractionBelow(mid) < frac {
			lo = mid
		} else {
			hi = mid
		}
	}
	return 0.5 * (lo + hi), nil
}

// Antipodality returns the angular distance in degrees between the centroids
// of the two largest regions (180 for exactly antipodal regions) and false
// when there are fewer than two regions.
func Antipodality(regions []Region) (float64, bool) {
	if len(regions) < 2 {
		return 0, false
	}
	a, b := regions[0], regions[1]
	return angle(unitVec(a.CentroidLon, a.CentroidLat), unitVec(b.CentroidLon, b.CentroidLat)) * 180 / math.Pi, true
}
