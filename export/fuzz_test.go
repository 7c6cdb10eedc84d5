package export

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"cmbflux/flux/sh"
)

// seedCoeffFiles returns files written by this package, for the corpora.
func seedCoeffFiles(f Format) [][]byte {
	var out [][]byte
	c := randomCoeffs(2, sh.Canonical, 9) // small seeds keep minimization quick
	for _, opt := range []CoeffOptions{{}, {Complex: true, NegativeOrders: true}, {Order: MMajor, OmitDegree0: true}} {
		var b bytes.Buffer
		WriteCoeffs(&b, f, c, testMeta(), &opt)
		out = append(out, b.Bytes())
	}
	return out
}

// fuzzCoeffs checks that a reader never panics and that whatever it accepts
// survives a write and a second read unchanged.
func fuzzCoeffs(t *testing.T, data []byte, f Format, declared bool) {
	maxReadLMax = 300 // keep every input fast; the limit itself is tested elsewhere
	opt := &CoeffReadOptions{Format: f}
	if declared {
		opt.Conv = &sh.Convention{Norm: sh.Schmidt}
	}
	tab, err := ReadCoeffs(bytes.NewReader(data), "fuzz", opt)
	if err != nil {
		if !strings.HasPrefix(err.Error(), "fuzz") {
			t.Fatalf("error does not name the file: %v", err)
		}
		return
	}
	var b bytes.Buffer
	if err := WriteCoeffs(&b, f, tab.Coeffs, &Meta{}, &CoeffOptions{Conv: tab.Coeffs.Conv}); err != nil {
		t.Fatalf("accepted coefficients cannot be written: %v", err)
	}
	back, err := ReadCoeffs(&b, "again", &CoeffReadOptions{Format: f})
	if err != nil {
		t.Fatalf("written file not read back: %v\n%s", err, b.String())
	}
	for i := range tab.Coeffs.C {
		a, z := tab.Coeffs.C[i]+0, back.Coeffs.C[i] // -0 is written as 0
		if math.Float64bits(a) != math.Float64bits(z) || math.Float64bits(tab.Coeffs.S[i]+0) != math.Float64bits(back.Coeffs.S[i]) {
			t.Fatalf("index %d: %v, %v read back as %v, %v", i, a, tab.Coeffs.S[i], z, back.Coeffs.S[i])
		}
	}
}

func FuzzReadCoeffsText(f *testing.F) {
	for _, s := range seedCoeffFiles(FormatText) {
		f.Add(s, false)
	}
	f.Add([]byte("l m g h\n0 0 1 0\n1 1 2 3\n"), true)
	f.Add([]byte("0 0 1.0D+02 0\n3 2 -1 1e-300\n"), true)
	f.Fuzz(func(t *testing.T, data []byte, declared bool) { fuzzCoeffs(t, data, FormatText, declared) })
}

func FuzzReadCoeffsCSV(f *testing.F) {
	for _, s := range seedCoeffFiles(FormatCSV) {
		f.Add(s, false)
	}
	f.Add([]byte("l,m,cos,sin\n0,0,1,0\n1,1,\"2\",3\n"), true)
	f.Fuzz(func(t *testing.T, data []byte, declared bool) { fuzzCoeffs(t, data, FormatCSV, declared) })
}

func FuzzReadCoeffsJSON(f *testing.F) {
	for _, s := range seedCoeffFiles(FormatJSON) {
		f.Add(s, false)
	}
	f.Add([]byte(`{"data": [[0, 0, 1, 0]]}`), true)
	f.Fuzz(func(t *testing.T, data []byte, declared bool) { fuzzCoeffs(t, data, FormatJSON, declared) })
}

func FuzzReadManifest(f *testing.F) {
	var b bytes.Buffer
	(&Manifest{Version: "v", Params: map[string]string{"a": "1"}, Diagnostics: map[string]any{"x": 1.5},
		Files: []ManifestFile{{"a.txt", 1, strings.Repeat("a", 64)}}}).Encode(&b)
	f.Add(b.Bytes())
	f.Add([]byte("format: cmbflux-manifest/1\nfiles: 3\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		m, err := ReadManifest(bytes.NewReader(data), "fuzz.yaml")
		if err != nil {
			if !strings.HasPrefix(err.Error(), "fuzz.yaml") {
				t.Fatalf("error does not name the file: %v", err)
			}
			return
		}
		var out bytes.Buffer
		if err := m.Encode(&out); err != nil {
			return // diagnostics of exotic YAML types may not re-encode
		}
		m2, err := ReadManifest(&out, "again")
		if err != nil {
			t.Fatalf("encoded manifest not read back: %v\n%s", err, out.String())
		}
		if len(m2.Files) != len(m.Files) {
			t.Fatalf("files %d != %d", len(m2.Files), len(m.Files))
		}
	})
}
