package main

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"sync"

	"gopkg.in/yaml.v3"
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
	QStar           float64  `json:"qstar"`
	QStarRequested  *float64 `json:"qstar_requested"`
	QStarDefinition string   `json:"qstar_definition"`
	// QMean and the extrema are of the total heat flux in mW/m^2.
	QMean      *float64   `json:"q_mean"`
	QMax       *float64   `json:"q_max"`
	QMin       *float64   `json:"q_min"`
	QMaxLonLat [2]float64 `json:"q_max_lonlat"`
	QMinLonLat [2]float64 `json:"q_min_lonlat"`
	QAd        *float64   `json:"q_ad"`
	HeatFlowTW *float64   `json:"heat_flow_tw"`
	// RMSRatio is the rms of the flux anomaly over the mean flux.
	RMSRatio             float64  `json:"rms_ratio"`
	AreaNegative         float64  `json:"area_fraction_negative"`
	AreaSubadiabatic     *float64 `json:"area_fraction_subadiabatic"`
	LMax                 int      `json:"lmax"`
	LMaxResolved         int      `json:"lmax_resolved_by_input"`
	Taper                string   `json:"taper"`
	Rotate               float64  `json:"rotate_deg"`
	Convention           string   `json:"convention"`
	Normalization        string   `json:"normalization"`
	CondonShortley       bool     `json:"condon_shortley"`
	Form                 string   `json:"form"`
	DiagnosticGrid       string   `json:"diagnostic_grid"`
	Input                string   `json:"input"`
	InputSHA256          string   `json:"input_sha256"`
	Layer                string   `json:"layer"`
	Mode                 string   `json:"mode"`
	PhysicalDeltaTMaxK   *float64 `json:"physical_delta_t_max_k,omitempty"`
	Warnings             []string `json:"warnings"`
	Files                []string `json:"files"`
	PatternCorrelationL1 *float64 `json:"-"`
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

// manifest is the content of manifest.yaml: what made the folder and the
// sha256 of every file in it. It holds no timestamp, so a rebuilt folder is
// byte-for-byte the same.
type manifest struct {
	Manifest   int               `yaml:"cmbflux_manifest"`
	Tool       string            `yaml:"tool"`
	Parameters map[string]string `yaml:"parameters"`
	Input      manifestInput     `yaml:"input"`
	Files      []manifestFile    `yaml:"files"`
}

type manifestInput struct {
	Name   string `yaml:"name"`
	SHA256 string `yaml:"sha256"`
	Format string `yaml:"format"`
}

type manifestFile struct {
	Name   string `yaml:"name"`
	Bytes  int64  `yaml:"bytes"`
	SHA256 string `yaml:"sha256"`
}

// hashFile returns the size and hex sha256 of a file.
func hashFile(path string) (int64, string, error) {
	f, err := os.Open(path)
	if err != nil {
		return 0, "", err
	}
	defer f.Close()
	h := sha256.New()
	n, err := io.Copy(h, f)
	if err != nil {
		return 0, "", err
	}
	return n, hex.EncodeToString(h.Sum(nil)), nil
}

// buildManifest lists the files of dir (names sorted) with their hashes.
func buildManifest(dir string, names []string, params map[string]string, in manifestInput) ([]byte, error) {
	m := manifest{Manifest: 1, Tool: version, Parameters: params, Input: in}
	sorted := append([]string(nil), names...)
	sort.Strings(sorted)
	for _, n := range sorted {
		size, sum, err := hashFile(filepath.Join(dir, n))
		if err != nil {
			return nil, err
		}
		m.Files = append(m.Files, manifestFile{Name: n, Bytes: size, SHA256: sum})
	}
	var b bytes.Buffer
	b.WriteString("# Written by " + version + ". Verify with: sha256sum of each file below.\n")
	enc := yaml.NewEncoder(&b)
	enc.SetIndent(2)
	if err := enc.Encode(m); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// verifyFolder checks every file listed in dir/manifest.yaml.
func verifyFolder(dir string) error {
	data, err := os.ReadFile(filepath.Join(dir, "manifest.yaml"))
	if err != nil {
		return err
	}
	var m manifest
	if err := yaml.Unmarshal(data, &m); err != nil {
		return fmt.Errorf("%s: %v", filepath.Join(dir, "manifest.yaml"), err)
	}
	if m.Manifest != 1 || len(m.Files) == 0 {
		return fmt.Errorf("%s: not a cmbflux manifest", filepath.Join(dir, "manifest.yaml"))
	}
	var wg sync.WaitGroup
	errs := make([]error, len(m.Files))
	for i, f := range m.Files {
		if !filepathLocal(f.Name) {
			return fmt.Errorf("%s: file name %q leaves the folder", filepath.Join(dir, "manifest.yaml"), f.Name)
		}
		wg.Add(1)
		go func() {
			defer wg.Done()
			size, sum, err := hashFile(filepath.Join(dir, f.Name))
			switch {
			case err != nil:
				errs[i] = err
			case size != f.Bytes || sum != f.SHA256:
				errs[i] = fmt.Errorf("%s: differs from its manifest", filepath.Join(dir, f.Name))
			}
		}()
	}
	wg.Wait()
	for _, e := range errs {
		if e != nil {
			return e
		}
	}
	return nil
}

func filepathLocal(name string) bool { return filepath.IsLocal(name) }
