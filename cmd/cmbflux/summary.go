package main

import (
	"bytes"
	"encoding/json"
	"strconv"

	"cmbflux/export"
)

// version is written into every manifest.
const version = "cmbflux 0.1"

// Summary is the content of summary.json: the diagnostics of one boundary
// condition. Heat fluxes are mW/m^2 of the total flux; fields that need the
// mean flux are null when it was not given.
type Summary struct {
	Quantity        string   `json:"quantity"`
	Units           string   `json:"units"`
	Sign            string   `json:"sign"`
	Mode            string   `json:"mode"`
	QStar           float64  `json:"qstar"`
	QStarRequested  *float64 `json:"qstar_requested"`
	QStarDefinition string   `json:"qstar_definition"`
	QStarMeasuredOn string   `json:"qstar_measured_on,omitempty"`
	QStarContinuous float64  `json:"qstar_continuous"`
	// QStarSuperadiabatic is (q_max - q_min) / (q_mean - q_ad).
	QStarSuperadiabatic *float64 `json:"qstar_superadiabatic"`
	// QMean and the extrema are of the total heat flux in mW/m^2.
	QMean               *float64   `json:"q_mean"`
	QMax                *float64   `json:"q_max"`
	QMin                *float64   `json:"q_min"`
	QMaxLonLat          [2]float64 `json:"q_max_lonlat"`
	QMinLonLat          [2]float64 `json:"q_min_lonlat"`
	QAd                 *float64   `json:"q_ad"`
	HeatFlowTW          *float64   `json:"heat_flow_tw"`
	AdiabaticHeatFlowTW *float64   `json:"adiabatic_heat_flow_tw"`
	// RMSRatio is the rms of the flux anomaly over the mean flux.
	RMSRatio             float64    `json:"rms_ratio"`
	AreaNegative         float64    `json:"area_fraction_negative"`
	AreaSubadiabatic     *float64   `json:"area_fraction_subadiabatic"`
	Amplitude            float64    `json:"amplitude"`
	SlowestLonLat        [2]float64 `json:"slowest_dvs_lonlat"`
	MinToSlowestDeg      float64    `json:"q_min_to_slowest_dvs_deg"`
	Degree2PowerFraction float64    `json:"degree2_power_fraction"`
	LMax                 int        `json:"lmax"`
	LMaxResolved         int        `json:"lmax_resolved_by_input"`
	Taper                string     `json:"taper"`
	Rotate               float64    `json:"rotate_deg"`
	Convention           string     `json:"convention"`
	Normalization        string     `json:"normalization"`
	CondonShortley       bool       `json:"condon_shortley"`
	Form                 string     `json:"form"`
	OutputGrid           string     `json:"output_grid"`
	Input                string     `json:"input"`
	InputSHA256          string     `json:"input_sha256"`
	Layer                string     `json:"layer"`
	PhysicalDeltaTMaxK   *float64   `json:"physical_dt_max_k,omitempty"`
	PhysicalDeltaTMinK   *float64   `json:"physical_dt_min_k,omitempty"`
	Warnings             []string   `json:"warnings"`
	Files                []string   `json:"files"`

	// AmplitudeMeasure names the measure that set the amplitude (qstar,
	// qstar-superadiabatic, rms, max-deviation), "" in physical mode.
	AmplitudeMeasure string `json:"amplitude_measure,omitempty"`
	// AmplitudeSetBy states the measure's formula and value, e.g.
	// "rms(q - q_mean)/q_mean = 0.2", or the physical-mode relation.
	AmplitudeSetBy string `json:"amplitude_set_by,omitempty"`
	// Sequence places the folder in a time sequence (cmbflux sequence).
	Sequence *sequenceFrame `json:"sequence,omitempty"`
}

// summaryColumns are the diagnostic columns of a sweep's summary.csv.
var summaryColumns = []string{"qstar", "q_mean", "q_max", "q_min", "q_max_lon", "q_max_lat", "q_min_lon", "q_min_lat",
	"rms_ratio", "area_fraction_negative", "area_fraction_subadiabatic", "lmax", "warnings"}

func fmtF(v float64) string { return strconv.FormatFloat(v, 'g', 10, 64) }

func fmtP(v *float64) string {
	if v == nil {
		return ""
	}
	return fmtF(*v)
}

// row returns the summaryColumns of s.
func (s *Summary) row() []string {
	return []string{fmtF(s.QStar), fmtP(s.QMean), fmtP(s.QMax), fmtP(s.QMin),
		fmtF(s.QMaxLonLat[0]), fmtF(s.QMaxLonLat[1]), fmtF(s.QMinLonLat[0]), fmtF(s.QMinLonLat[1]),
		fmtF(s.RMSRatio), fmtF(s.AreaNegative), fmtP(s.AreaSubadiabatic), strconv.Itoa(s.LMax), strconv.Itoa(len(s.Warnings))}
}

func ptr(v float64) *float64 { return &v }

// marshalJSON writes v as indented JSON with a final newline.
func marshalJSON(v any) ([]byte, error) {
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// buildManifest lists the files of dir with their hashes, the parameters
// and the input, in the format of export.Manifest. It holds no timestamp, so
// a rebuilt folder is byte-for-byte the same.
func buildManifest(dir string, names []string, params map[string]string, in export.ManifestInput, s *Summary, command string) ([]byte, error) {
	m := &export.Manifest{Version: version, Command: command, Inputs: []export.ManifestInput{in}, Params: params,
		Diagnostics: map[string]any{"qstar": s.QStar, "area_fraction_negative": s.AreaNegative, "lmax": s.LMax}}
	if s.AreaSubadiabatic != nil {
		m.Diagnostics["area_fraction_subadiabatic"] = *s.AreaSubadiabatic
	}
	for _, n := range names {
		if err := m.AddFile(dir, n); err != nil {
			return nil, err
		}
	}
	var b bytes.Buffer
	if err := m.Encode(&b); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// verifyFolder checks every file listed in dir/manifest.yaml.
func verifyFolder(dir string) error {
	_, err := export.Verify(dir)
	return err
}
