package main

import (
	"bytes"
	"os"
	"strings"
	"testing"

	"cmbflux/export"
)

// TestManifestRebuilds: the manifest of a build given only the amplitude
// records every parameter with its default resolved, and a build from the
// manifest's parameters alone writes the same coefficient table, byte for
// byte (issue 5 item 5).
func TestManifestRebuilds(t *testing.T) {
	t.Chdir(t.TempDir())
	mustCLI(t, "build", "--demo", "--qstar", "1.5", "--heatflow", "11", "--out", "bc")
	m, err := export.ReadManifestFile("bc/manifest.yaml")
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]string{"demo": "true", "lmax": "12", "taper": "none", "grid": "lonlat:1", "norm": "orthonormal",
		"condon-shortley": "false", "form": "real", "no-degree0": "false", "quantity": "flux", "mode": "ratio",
		"qstar": "1.5", "qstar-on": "continuous", "heatflow": "11", "units": "percent", "formats": "txt"}
	for k, v := range want {
		if m.Params[k] != v {
			t.Errorf("manifest parameter %s = %q, want %q", k, m.Params[k], v)
		}
	}
	if _, ok := m.Params["qmean"]; ok {
		t.Errorf("manifest has qmean %q beside heatflow: a rebuild would refuse both", m.Params["qmean"])
	}
	if !strings.Contains(m.Params["layer"], "2891") {
		t.Errorf("layer %q does not name the deepest level, 2891 km", m.Params["layer"])
	}
	args := []string{"build", "--out", "bc2"}
	for k, v := range m.Params {
		if k == "mode" || k == "layer" {
			continue
		}
		args = append(args, "--"+k+"="+v)
	}
	mustCLI(t, args...)
	a, _ := os.ReadFile("bc/coefficients.txt")
	b, _ := os.ReadFile("bc2/coefficients.txt")
	if len(a) == 0 || !bytes.Equal(a, b) {
		t.Errorf("the rebuild from the manifest (%v) wrote another coefficient table", args)
	}
}

// TestManifestInputPath: an input named in a build file is relative to the
// file's folder; the manifest records the path as resolved, so that a
// rebuild from the manifest reads the same file.
func TestManifestInputPath(t *testing.T) {
	t.Chdir(t.TempDir())
	data, err := os.ReadFile(demoFile("brindle.txt"))
	if err != nil {
		t.Fatal(err)
	}
	if err := os.Mkdir("sub", 0o755); err != nil {
		t.Fatal(err)
	}
	writeFile(t, "sub/brindle.txt", string(data))
	writeFile(t, "sub/build.yaml", "input: brindle.txt\nqstar: 1\nqmean: 80\nlmax: 6\n")
	mustCLI(t, "build", "--config", "sub/build.yaml", "--out", "bc")
	m, err := export.ReadManifestFile("bc/manifest.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if got := m.Params["input"]; got != "sub/brindle.txt" {
		t.Errorf("manifest input %q, want sub/brindle.txt", got)
	}
}
