package flux

import "math"

// CMBRadius is the radius of the core-mantle boundary in metres, 3480 km
// (PREM, Dziewonski & Anderson 1981, Phys. Earth Planet. Inter. 25, 297).
const CMBRadius = 3480e3

// CMBArea is the area of the core-mantle boundary, 4 pi CMBRadius^2 in m^2
// (about 1.5218e14 m^2).
const CMBArea = 4 * math.Pi * CMBRadius * CMBRadius

// TW is one terawatt in watts, the unit of CMB heat flow at the edges.
const TW = 1e12

// MilliWattsPerSquareMetre is 1 mW/m^2 in W/m^2, the unit of CMB heat flux
// at the edges.
const MilliWattsPerSquareMetre = 1e-3

// FluxFromHeatFlow returns the mean CMB heat flux in W/m^2 for a total CMB
// heat flow Q in W: q = Q / (4 pi rc^2), rc = CMBRadius.
func FluxFromHeatFlow(q float64) float64 { return q / CMBArea }

// HeatFlowFromFlux returns the CMB heat flow in W for a mean heat flux q in
// W/m^2: Q = 4 pi rc^2 q.
func HeatFlowFromFlux(q float64) float64 { return q * CMBArea }
