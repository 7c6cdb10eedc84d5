package tomo

// Reference radii of the Preliminary Reference Earth Model (PREM,
// Dziewonski & Anderson 1981, Phys. Earth Planet. Inter. 25, 297-356).
// The CMB radius is checked against the publication; the mean Earth radius
// of 6371 km is from memory.
const (
	// EarthRadiusKm is the mean radius of the Earth, 6371 km.
	EarthRadiusKm = 6371.0
	// CMBRadiusKm is the radius of the core-mantle boundary, 3480 km.
	CMBRadiusKm = 3480.0
	// CMBDepthKm is the depth of the core-mantle boundary,
	// EarthRadiusKm - CMBRadiusKm = 2891 km.
	CMBDepthKm = EarthRadiusKm - CMBRadiusKm
)

// RadiusOfDepth returns r = EarthRadiusKm - depth, both in km.
func RadiusOfDepth(depth float64) float64 { return EarthRadiusKm - depth }

// DepthOfRadius returns depth = EarthRadiusKm - r, both in km.
func DepthOfRadius(r float64) float64 { return EarthRadiusKm - r }
