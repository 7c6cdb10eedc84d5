package flux

import (
	"fmt"
	"strings"
)

// Quantity selects a field derived from the boundary heat flux for output.
type Quantity int

const (
	// HeatFlux is q in W/m^2 (mW/m^2 at the edge), positive out of the core.
	HeatFlux Quantity = iota
	// FluxAnomaly is q - q_mean in W/m^2 (mW/m^2 at the edge); positive
	// where the core loses more heat than on average (cold, fast mantle).
	FluxAnomaly
	// FluxRelative is q / q_mean, dimensionless, mean 1; below 0 where the
	// core gains heat.
	FluxRelative
	// SuperAdiabatic is (q - q_ad) / (q_mean - q_ad), the super-adiabatic
	// flux normalised by its mean, dimensionless, mean 1; below 0 where the
	// flux is sub-adiabatic (stratified). Needs an adiabatic reference
	// below the mean flux (Result.Coeffs refuses it otherwise).
	SuperAdiabatic
	// CoreGradient is the radial temperature gradient on the core side of
	// the boundary, dT/dr = -q / k_core in K/m (r outward): negative where
	// heat leaves the core. Needs the core conductivity.
	CoreGradient
)

// QuantityInfo describes a Quantity for file headers.
type QuantityInfo struct {
	// Name is the identifier used on the command line and in files.
	Name string
	// Symbol is the formula of the quantity.
	Symbol string
	// Units are the SI units of the coefficients and values flux returns.
	Units string
	// EdgeUnits are the units users see; multiply SI values by EdgeScale.
	EdgeUnits string
	// EdgeScale converts SI values to EdgeUnits.
	EdgeScale float64
	// Sign says what a positive value means.
	Sign string
}

var quantities = [...]QuantityInfo{
	HeatFlux: {"heat-flux", "q", "W/m^2", "mW/m^2", 1e3,
		"positive: heat leaves the core into the mantle; negative: the core gains heat"},
	FluxAnomaly: {"flux-anomaly", "q - q_mean", "W/m^2", "mW/m^2", 1e3,
		"positive: more heat leaves the core than on average (cold, seismically fast mantle above)"},
	FluxRelative: {"flux-relative", "q / q_mean", "1", "1", 1,
		"mean 1; above 1 where more heat than average leaves the core; below 0 where the core gains heat"},
	SuperAdiabatic: {"super-adiabatic", "(q - q_ad) / (q_mean - q_ad)", "1", "1", 1,
		"mean 1; positive where the flux exceeds the adiabatic flux; negative where it is sub-adiabatic (stratified)"},
	CoreGradient: {"core-gradient", "dT/dr = -q / k_core", "K/m", "K/km", 1e3,
		"radial derivative with r pointing outward, on the core side: negative where heat leaves the core"},
}

// Info returns the description of q. It panics for an unknown Quantity.
func (q Quantity) Info() QuantityInfo {
	if q < 0 || int(q) >= len(quantities) {
		panic(fmt.Sprintf("flux: unknown quantity %d", int(q)))
	}
	return quantities[q]
}

// String returns the quantity's name.
func (q Quantity) String() string {
	if q < 0 || int(q) >= len(quantities) {
		return fmt.Sprintf("Quantity(%d)", int(q))
	}
	return quantities[q].Name
}

// ParseQuantity accepts the names of the quantities (see QuantityInfo.Name).
func ParseQuantity(s string) (Quantity, error) {
	t := strings.ToLower(strings.TrimSpace(s))
	var names []string
	for k, qi := range quantities {
		if t == qi.Name {
			return Quantity(k), nil
		}
		names = append(names, qi.Name)
	}
	return 0, fmt.Errorf("flux: unknown quantity %q (want one of %s)", s, strings.Join(names, ", "))
}
