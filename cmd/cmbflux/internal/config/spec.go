package config

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"cmbflux/flux"
)

// CMBRadius is the radius of the core-mantle boundary in metres (PREM,
// Dziewonski & Anderson 1981).
const CMBRadius = 3480e3

// CMBArea is 4 pi CMBRadius^2 in m^2.
const CMBArea = 4 * math.Pi * CMBRadius * CMBRadius

// Formats lists the accepted output formats.
var Formats = []string{"txt", "json", "csv", "nc", "geojson", "png", "svg", "html"}

// Units lists the accepted units of input values (--units).
var Units = []string{"percent", "fraction", "km/s", "m/s"}

// Quantities lists the accepted output quantities.
var Quantities = []string{"flux", "anomaly", "relative", "superadiabatic", "dtdr", "dvs"}

// Spec is a resolved, validated build: SI units throughout.
type Spec struct {
	Input string // path ("-" for standard input); "" with Demo
	Demo  bool
	Var   string

	// Pattern holds the terms of an idealised pattern (--pattern); nil
	// for a tomography input.
	Pattern []flux.Term

	// Reading options (tomo.ReadOptions, tomo.UnitOptions).
	Units          string  // percent, fraction, km/s, m/s; "" guesses
	VRef           float64 // km/s; 0 when not given
	VRefMean       bool    // v_ref is each depth's mean velocity
	ForceAmplitude bool    // accept |dlnVs| above the plausible range
	Missing        []float64
	LonName        string
	LatName        string
	DepthName      string
	Vertical       string // depth or radius; "" decides from the name

	Depth              float64 // km; used when HasDepth
	HasDepth           bool
	DepthMin, DepthMax float64 // km; used when HasRange
	HasRange           bool

	LMax int
	// ForceLMax fits an LMax above what the input's sampling supports
	// (tomo.SafeDegree) instead of refusing it.
	ForceLMax bool
	Taper     string // as written; "none" by default
	Rotate    float64

	// QStar is the value of the amplitude Measure (--qstar, or
	// --amplitude with --measure); HasQStar reports that one was given.
	QStar    float64
	HasQStar bool
	// Measure is what QStar sets (--measure; flux.PeakToPeak by default).
	Measure flux.Measure
	// QStarOnGrid measures q* on the Grid points instead of the continuous
	// field.
	QStarOnGrid bool
	QMean       float64 // W/m^2; used when HasQMean
	HasQMean    bool
	QAd         float64 // W/m^2; used when HasQAd
	HasQAd      bool

	Physical     bool
	DlnVsDT      float64 // per K
	Conductivity float64 // W/m/K; 0 when not given
	Thickness    float64 // m
	// CoreConductivity is the outermost core's conductivity in W/m/K for
	// the dtdr quantity; 0 when not given.
	CoreConductivity float64

	Quantity       string
	Norm           string
	CondonShortley bool
	NoDegree0      bool
	Form           string
	Grid           string
	Formats        []string // always contains "txt"
	Out            string
}

// DefaultLMax is the truncation degree when --lmax is not given.
const DefaultLMax = 12

// Resolve checks a full parameter set and returns the build it describes.
// Errors name the parameter and where it was set.
func Resolve(s Set) (*Spec, error) {
	sp := &Spec{LMax: DefaultLMax, Taper: "none", Quantity: "flux", Norm: "orthonormal", Form: "real", Grid: "lonlat:1"}
	f := func(name string) (float64, bool) {
		v, ok := s[name]
		if !ok {
			return 0, false
		}
		x, _ := strconv.ParseFloat(v.Raw, 64) // syntax checked when set
		return x, true
	}
	b := func(name string) bool {
		v, ok := s[name]
		if !ok {
			return false
		}
		x, _ := parseBool(v.Raw)
		return x
	}
	bad := func(name, format string, args ...any) error {
		v, ok := s[name]
		if !ok {
			return &Error{Key: name, Err: fmt.Errorf(format, args...)}
		}
		return v.errorf(name, format, args...)
	}
	has := func(name string) bool { _, ok := s[name]; return ok }

	// Input.
	sp.Demo = b("demo")
	if err := resolvePattern(s, sp); err != nil {
		return nil, err
	}
	if v, ok := s["input"]; ok {
		if sp.Demo {
			return nil, bad("input", "give either --input or --demo, not both")
		}
		if v.Raw == "" {
			return nil, bad("input", "empty file name")
		}
		sp.Input = v.Raw
		if v.Raw != "-" && !filepath.IsAbs(v.Raw) && v.Src.Dir != "" {
			sp.Input = filepath.Join(v.Src.Dir, v.Raw)
		}
	} else if !sp.Demo && sp.Pattern == nil {
		return nil, &Error{Key: "input", Err: errors.New("no input: give --input FILE, --demo or --pattern TERMS")}
	}
	if v, ok := s["var"]; ok {
		sp.Var = v.Raw
	}
	if v, ok := s["units"]; ok {
		u := strings.TrimSpace(v.Raw)
		if !slices.Contains(Units, u) {
			return nil, bad("units", "%q is not one of %s", v.Raw, strings.Join(Units, ", "))
		}
		sp.Units = u
	}
	if v, ok := s["vref"]; ok {
		if r := strings.TrimSpace(v.Raw); r == "mean" {
			sp.VRefMean = true
		} else {
			x, err := strconv.ParseFloat(r, 64)
			// PREM's Vs just above the core-mantle boundary is 7.26 km/s
			// (Dziewonski & Anderson 1981); 20 km/s bounds any mantle
			// velocity and catches m/s given as km/s.
			if err != nil || !(x > 0 && x < 20) {
				return nil, bad("vref", "%q is not a shear velocity in km/s (e.g. 7.26, PREM at the base of the mantle) or mean", v.Raw)
			}
			sp.VRef = x
		}
	}
	sp.ForceAmplitude = b("force-amplitude")
	if v, ok := s["missing"]; ok {
		for _, p := range strings.Split(v.Raw, ",") {
			p = strings.TrimSpace(p)
			if p == "" {
				continue
			}
			x, err := strconv.ParseFloat(p, 64)
			if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
				return nil, bad("missing", "%q is not a number (NaN is always missing)", p)
			}
			sp.Missing = append(sp.Missing, x)
		}
		if len(sp.Missing) == 0 {
			return nil, bad("missing", "no values given; want X[,Y...], e.g. -999,99999")
		}
	}
	for _, n := range []struct {
		key string
		dst *string
	}{{"lon-name", &sp.LonName}, {"lat-name", &sp.LatName}, {"depth-name", &sp.DepthName}} {
		if v, ok := s[n.key]; ok {
			if strings.TrimSpace(v.Raw) == "" {
				return nil, bad(n.key, "empty name")
			}
			*n.dst = strings.TrimSpace(v.Raw)
		}
	}
	if v, ok := s["vertical"]; ok {
		if v.Raw != "depth" && v.Raw != "radius" {
			return nil, bad("vertical", "%q is not depth or radius", v.Raw)
		}
		sp.Vertical = v.Raw
	}
	if d, ok := f("depth"); ok {
		if has("depth-range") {
			return nil, bad("depth", "give either --depth or --depth-range, not both")
		}
		if d < 0 || d > 6371 {
			return nil, bad("depth", "%g km is outside the Earth (0 to 6371 km)", d)
		}
		sp.Depth, sp.HasDepth = d, true
	}
	if v, ok := s["depth-range"]; ok {
		lo, hi, ok := strings.Cut(v.Raw, ":")
		a, e1 := strconv.ParseFloat(strings.TrimSpace(lo), 64)
		c, e2 := strconv.ParseFloat(strings.TrimSpace(hi), 64)
		if !ok || e1 != nil || e2 != nil || !(a < c) || a < 0 || c > 6371 {
			return nil, bad("depth-range", "%q is not a range KM:KM with the smaller depth first, e.g. 2700:2891", v.Raw)
		}
		sp.DepthMin, sp.DepthMax, sp.HasRange = a, c, true
	}

	// Pattern.
	if v, ok := s["lmax"]; ok {
		n, _ := strconv.Atoi(v.Raw)
		if n < 1 || n > 1000 {
			return nil, bad("lmax", "%d is outside 1 to 1000", n)
		}
		sp.LMax = n
	}
	sp.ForceLMax = b("force-lmax")
	if v, ok := s["taper"]; ok {
		sp.Taper = strings.TrimSpace(v.Raw)
	}
	if r, ok := f("rotate"); ok {
		sp.Rotate = r
	}

	// Amplitude.
	sp.Physical = b("physical")
	if q, ok := f("qstar"); ok {
		if sp.Physical {
			return nil, bad("qstar", "give either --qstar or --physical, not both (physical mode sets the amplitude from the constants)")
		}
		if q < 0 {
			return nil, bad("qstar", "%g is negative; q* = (q_max - q_min)/q_mean is at least 0", q)
		}
		sp.QStar, sp.HasQStar = q, true
	}
	if v, ok := s["qstar-on"]; ok {
		switch v.Raw {
		case "continuous":
		case "grid":
			sp.QStarOnGrid = true
		default:
			return nil, bad("qstar-on", "%q is not continuous or grid", v.Raw)
		}
	}
	if q, ok := f("qmean"); ok {
		if has("heatflow") {
			return nil, bad("qmean", "give either --qmean or --heatflow, not both")
		}
		sp.QMean, sp.HasQMean = q*1e-3, true
	}
	if q, ok := f("heatflow"); ok {
		sp.QMean, sp.HasQMean = q*1e12/CMBArea, true
	}
	if q, ok := f("qad"); ok {
		if has("adiabatic-heatflow") {
			return nil, bad("qad", "give either --qad or --adiabatic-heatflow, not both")
		}
		sp.QAd, sp.HasQAd = q*1e-3, true
	}
	if q, ok := f("adiabatic-heatflow"); ok {
		sp.QAd, sp.HasQAd = q*1e12/CMBArea, true
	}
	if sp.HasQMean && sp.QMean <= 0 {
		return nil, bad(firstSet(s, "qmean", "heatflow"), "the mean heat flux must be positive (heat leaves the core)")
	}
	if k, ok := f("conductivity"); ok {
		if k <= 0 {
			return nil, bad("conductivity", "%g W/m/K must be positive", k)
		}
		sp.Conductivity = k
	}
	if k, ok := f("core-conductivity"); ok {
		if k <= 0 {
			return nil, bad("core-conductivity", "%g W/m/K must be positive", k)
		}
		sp.CoreConductivity = k
	}
	if sp.Physical {
		x, ok := f("dlnvs-dt")
		if !ok {
			return nil, bad("dlnvs-dt", "physical mode needs --dlnvs-dt (per K, e.g. -2e-5), --conductivity and --thickness")
		}
		if x >= 0 {
			return nil, bad("dlnvs-dt", "%g must be negative: seismic velocity falls as temperature rises", x)
		}
		sp.DlnVsDT = x
		if sp.Conductivity == 0 {
			return nil, bad("conductivity", "physical mode needs --conductivity (W/m/K, e.g. 8.4)")
		}
		h, ok := f("thickness")
		if !ok || h <= 0 {
			return nil, bad("thickness", "physical mode needs a positive --thickness (km, e.g. 200)")
		}
		sp.Thickness = h * 1e3
	} else {
		for _, n := range []string{"dlnvs-dt", "thickness", "conductivity"} {
			if has(n) {
				return nil, bad(n, "only used with --physical")
			}
		}
	}

	if err := resolveMeasure(s, sp); err != nil {
		return nil, err
	}

	// Output.
	if v, ok := s["quantity"]; ok {
		if !slices.Contains(Quantities, v.Raw) {
			return nil, bad("quantity", "%q is not one of %s", v.Raw, strings.Join(Quantities, ", "))
		}
		sp.Quantity = v.Raw
	}
	if !sp.Physical && !sp.HasQStar && sp.Quantity != "dvs" {
		return nil, &Error{Key: "qstar", Err: errors.New("no amplitude: give --qstar X (with --qmean or --heatflow) or --physical with its constants")}
	}
	if !sp.HasQMean && sp.Quantity != "dvs" {
		return nil, &Error{Key: "qmean", Err: errors.New("no mean flux: give --qmean MW_M2 or --heatflow TW")}
	}
	switch sp.Quantity {
	case "superadiabatic":
		if !sp.HasQAd {
			return nil, &Error{Key: "qad", Err: errors.New("--quantity superadiabatic needs the adiabatic flux: give --qad MW_M2 or --adiabatic-heatflow TW")}
		}
	case "dtdr":
		if sp.CoreConductivity == 0 {
			return nil, &Error{Key: "core-conductivity", Err: errors.New("--quantity dtdr needs the conductivity of the outermost core: give --core-conductivity K")}
		}
	}
	if v, ok := s["norm"]; ok {
		sp.Norm = v.Raw
	}
	sp.CondonShortley = b("condon-shortley")
	sp.NoDegree0 = b("no-degree0")
	if v, ok := s["form"]; ok {
		if v.Raw != "real" && v.Raw != "complex" {
			return nil, bad("form", "%q is not real or complex", v.Raw)
		}
		sp.Form = v.Raw
	}
	if v, ok := s["grid"]; ok {
		sp.Grid = strings.TrimSpace(v.Raw)
	}
	sp.Formats = []string{"txt"}
	if v, ok := s["formats"]; ok {
		for _, p := range strings.Split(v.Raw, ",") {
			p = strings.ToLower(strings.TrimSpace(p))
			if p == "" {
				continue
			}
			if !slices.Contains(Formats, p) {
				return nil, bad("formats", "%q is not one of %s", p, strings.Join(Formats, ", "))
			}
			if !slices.Contains(sp.Formats, p) {
				sp.Formats = append(sp.Formats, p)
			}
		}
	}
	if v, ok := s["out"]; ok {
		sp.Out = v.Raw
		if !filepath.IsAbs(v.Raw) && v.Src.Dir != "" {
			sp.Out = filepath.Join(v.Src.Dir, v.Raw)
		}
	}
	return sp, nil
}

func firstSet(s Set, names ...string) string {
	for _, n := range names {
		if _, ok := s[n]; ok {
			return n
		}
	}
	return names[0]
}

// Has reports whether format f is requested.
func (sp *Spec) Has(f string) bool { return slices.Contains(sp.Formats, f) }
