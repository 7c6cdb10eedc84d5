// Package config holds the build parameters of cmbflux as one table of keys
// shared by the command-line flags, build.yaml files and sweep files, and
// parses those files with line and column numbers in every error.
package config

import (
	"sort"
	"strings"
)

// Kind is the type of a parameter's value.
type Kind int

const (
	// String values are taken as written.
	String Kind = iota
	// Float values are decimal numbers.
	Float
	// Int values are decimal integers.
	Int
	// Bool values are true or false (flags without a value mean true).
	Bool
	// List values are comma-separated on the command line or YAML sequences.
	List
)

// Key describes one build parameter: its long flag name (also its key in
// YAML files), the kind of its value and its help text.
type Key struct {
	Name  string
	Kind  Kind
	Arg   string // placeholder in help, e.g. "FILE"
	Group string // help section
	Usage string
	// NoVary keys cannot be varied in a sweep (they would make run folders
	// collide or escape the sweep's output folder).
	NoVary bool
}

// Groups lists the help sections in the order they are printed.
var Groups = []string{"Input", "Pattern", "Amplitude", "Output"}

// BuildKeys lists every build parameter.
var BuildKeys = []Key{
	{Name: "input", Kind: String, Arg: "FILE", Group: "Input", Usage: "tomography grid (text, CSV or netCDF); - reads standard input"},
	{Name: "demo", Kind: Bool, Group: "Input", Usage: "use the embedded demo scenario instead of --input"},
	{Name: "pattern", Kind: List, Arg: "TERMS", Group: "Input", Usage: "an idealised pattern instead of --input or --demo: harmonics L:M[:cos|sin][:WEIGHT] separated by commas (orthonormal, no Condon-Shortley phase; positive weights raise the flux), e.g. 2:2:cos or 2:2:cos:1,1:0:cos:0.3; lmax defaults to the highest degree"},
	{Name: "var", Kind: String, Arg: "NAME", Group: "Input", Usage: "variable (netCDF) or column (CSV) holding dVs; default: the only candidate"},
	{Name: "units", Kind: String, Arg: "U", Group: "Input", Usage: "units of the values: percent, fraction (dlnVs), km/s or m/s (absolute Vs, with --vref); default: from the file, or guessed from the values (inspect says which)"},
	{Name: "vref", Kind: String, Arg: "KMS", Group: "Input", Usage: "reference shear velocity in km/s for absolute velocities, dlnVs = (v - vref)/vref; mean takes each depth's area-weighted mean velocity"},
	{Name: "force-amplitude", Kind: Bool, Group: "Input", Usage: "accept |dlnVs| above 20 % (refused otherwise as a likely unit mistake), with a warning"},
	{Name: "missing", Kind: List, Arg: "X[,Y]", Group: "Input", Usage: "values that mark missing data (e.g. -999,99999), in addition to NaN and what the file declares"},
	{Name: "lon-name", Kind: String, Arg: "NAME", Group: "Input", Usage: "longitude column (CSV, text with a '# columns:' line) or variable (netCDF); default: recognised by name or units"},
	{Name: "lat-name", Kind: String, Arg: "NAME", Group: "Input", Usage: "latitude column or variable; default: recognised by name or units"},
	{Name: "depth-name", Kind: String, Arg: "NAME", Group: "Input", Usage: "depth or radius column or variable; default: recognised by name or units"},
	{Name: "vertical", Kind: String, Arg: "V", Group: "Input", Usage: "the third coordinate is depth (km below the surface) or radius (km from the centre, depth = 6371 - r); default: from its name"},
	{Name: "depth", Kind: Float, Arg: "KM", Group: "Input", Usage: "use the layer nearest to this depth (km)"},
	{Name: "depth-range", Kind: String, Arg: "KM:KM", Group: "Input", Usage: "average the layers in this depth range, weighted by radius^2"},
	{Name: "lmax", Kind: Int, Arg: "N", Group: "Pattern", Usage: "truncation degree (default 12)"},
	{Name: "force-lmax", Kind: Bool, Group: "Pattern", Usage: "fit an lmax above the degree the input's grid spacing and coverage support (refused otherwise); the degrees above are then fitting artefacts"},
	{Name: "taper", Kind: String, Arg: "SPEC", Group: "Pattern", Usage: "none, cut:L, cos:L1:L2 (raised-cosine roll-off from degree L1 to L2) or gauss:DEG (Gaussian, half-width in degrees of arc)"},
	{Name: "rotate", Kind: Float, Arg: "DEG", Group: "Pattern", Usage: "turn the pattern eastward about the rotation axis by DEG degrees"},
	{Name: "qstar", Kind: Float, Arg: "X", Group: "Amplitude", Usage: "heterogeneity q* = (q_max - q_min) / q_mean of the output field"},
	{Name: "measure", Kind: String, Arg: "M", Group: "Amplitude", Usage: "what --amplitude sets: qstar (q_max - q_min)/q_mean (default), qstar-superadiabatic (q_max - q_min)/(q_mean - q_ad), rms rms(q - q_mean)/q_mean over the sphere, or max-deviation max|q - q_mean|/q_mean"},
	{Name: "amplitude", Kind: Float, Arg: "X", Group: "Amplitude", Usage: "the value of the --measure, instead of --qstar (--qstar X is --measure qstar --amplitude X)"},
	{Name: "qstar-on", Kind: String, Arg: "WHERE", Group: "Amplitude", Usage: "where q_max and q_min are taken: continuous (the band-limited field, default) or grid (the --grid points, for codes that see only a grid)"},
	{Name: "qmean", Kind: Float, Arg: "MW_M2", Group: "Amplitude", Usage: "mean CMB heat flux (mW/m^2)"},
	{Name: "heatflow", Kind: Float, Arg: "TW", Group: "Amplitude", Usage: "total CMB heat flow (TW), instead of --qmean"},
	{Name: "qad", Kind: Float, Arg: "MW_M2", Group: "Amplitude", Usage: "heat flux conducted down the core adiabat (mW/m^2)"},
	{Name: "adiabatic-heatflow", Kind: Float, Arg: "TW", Group: "Amplitude", Usage: "adiabatic heat flow (TW), instead of --qad"},
	{Name: "physical", Kind: Bool, Group: "Amplitude", Usage: "amplitude from physical constants instead of --qstar"},
	{Name: "dlnvs-dt", Kind: Float, Arg: "X", Group: "Amplitude", Usage: "physical mode: d ln Vs / dT (per K, negative, e.g. -2e-5)"},
	{Name: "conductivity", Kind: Float, Arg: "K", Group: "Amplitude", Usage: "physical mode: thermal conductivity of the lowermost mantle (W/m/K, e.g. 8.4)"},
	{Name: "thickness", Kind: Float, Arg: "KM", Group: "Amplitude", Usage: "physical mode: thermal boundary layer thickness (km)"},
	{Name: "core-conductivity", Kind: Float, Arg: "K", Group: "Output", Usage: "thermal conductivity of the outermost core (W/m/K), for --quantity dtdr"},
	{Name: "quantity", Kind: String, Arg: "Q", Group: "Output", Usage: "flux (q, mW/m^2), anomaly (q - q_mean), relative (q/q_mean), superadiabatic ((q - q_ad)/(q_mean - q_ad)), dtdr (-q/k_core, K/km) or dvs (percent) (default flux)"},
	{Name: "norm", Kind: String, Arg: "N", Group: "Output", Usage: "orthonormal, fully-normalized, schmidt or unnormalized (default orthonormal)"},
	{Name: "condon-shortley", Kind: Bool, Group: "Output", Usage: "include the Condon-Shortley phase (-1)^m (default off)"},
	{Name: "no-degree0", Kind: Bool, Group: "Output", Usage: "leave degree 0 (the mean) out of the coefficient tables"},
	{Name: "form", Kind: String, Arg: "F", Group: "Output", Usage: "real (cos/sin) or complex (default real)"},
	{Name: "grid", Kind: String, Arg: "G", Group: "Output", Usage: "grid for grid outputs and diagnostics: gauss:NLAT, equiangular:N or lonlat:STEP (default lonlat:1)"},
	{Name: "formats", Kind: List, Arg: "LIST", Group: "Output", Usage: "extra outputs, comma-separated: txt, json, csv, nc, geojson, png, svg, html (txt is always written)"},
	{Name: "out", Kind: String, Arg: "DIR", Group: "Output", Usage: "output folder (created; must not exist or be empty unless --force)", NoVary: true},
}

var keyIndex = func() map[string]*Key {
	m := make(map[string]*Key, len(BuildKeys))
	for i := range BuildKeys {
		m[BuildKeys[i].Name] = &BuildKeys[i]
	}
	return m
}()

// Lookup returns the key named name, or nil.
func Lookup(name string) *Key { return keyIndex[name] }

// Suggest returns the known key closest to name (by edit distance), or "".
func Suggest(name string) string {
	best, bestD := "", 4
	names := make([]string, 0, len(keyIndex))
	for n := range keyIndex {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		if d := distance(strings.ToLower(name), n); d < bestD {
			best, bestD = n, d
		}
	}
	return best
}

// distance is the Levenshtein edit distance.
func distance(a, b string) int {
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			c := 1
			if a[i-1] == b[j-1] {
				c = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+c)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}
