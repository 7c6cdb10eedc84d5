package export

import (
	"bytes"
	"errors"
	"io"
	"os"
	"path/filepath"
	"runtime/debug"
	"strings"
	"testing"

	"cmbflux/flux/sh"
)

func TestAtomicFile(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "a.txt")
	os.WriteFile(p, []byte("old"), 0o644)
	// A failed write leaves the old content and no temporary file.
	err := WriteFile(p, func(w io.Writer) error {
		io.WriteString(w, "half")
		return errors.New("boom")
	})
	if err == nil || err.Error() != "boom" {
		t.Fatalf("err = %v", err)
	}
	if b, _ := os.ReadFile(p); string(b) != "old" {
		t.Errorf("content %q after a failed write", b)
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 1 {
		t.Errorf("%d entries left in the folder, want 1", len(ents))
	}
	if err := WriteFile(p, func(w io.Writer) error { _, err := io.WriteString(w, "new"); return err }); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(p); string(b) != "new" {
		t.Errorf("content %q", b)
	}
	if _, err := Create(filepath.Join(dir, "no-such-folder", "x")); err == nil {
		t.Error("Create in a missing folder succeeded")
	}
}

func TestStageCommitAbort(t *testing.T) {
	parent := t.TempDir()
	dest := filepath.Join(parent, "run")
	s, err := NewStage(dest)
	if err != nil {
		t.Fatal(err)
	}
	if err := s.WriteFile("coefficients.txt", func(w io.Writer) error { _, err := io.WriteString(w, "0 0 1 0\n"); return err }); err != nil {
		t.Fatal(err)
	}
	if err := s.WriteFile("maps/flux.csv", func(w io.Writer) error { _, err := io.WriteString(w, "lon,lat,q\n"); return err }); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(dest); !errors.Is(err, os.ErrNotExist) {
		t.Fatal("destination exists before Commit")
	}
	if _, err := s.Create("../escape"); err == nil {
		t.Error("a name leaving the folder was accepted")
	}
	m := &Manifest{Version: "0.0.0-test", Params: map[string]string{"qstar": "0.8"}, Diagnostics: map[string]any{"q_min": 12.5, "negative_fraction": 0.0}}
	if err := s.WriteManifest(m); err != nil {
		t.Fatal(err)
	}
	if err := s.Commit(); err != nil {
		t.Fatal(err)
	}
	got, err := Verify(dest)
	if err != nil {
		t.Fatalf("Verify of a fresh build: %v", err)
	}
	if st, _ := os.Stat(dest); st.Mode().Perm() != 0o755 {
		t.Errorf("output folder mode %v, want rwxr-xr-x", st.Mode().Perm())
	}
	if st, _ := os.Stat(filepath.Join(dest, "coefficients.txt")); st.Mode().Perm() != 0o644 {
		t.Errorf("output file mode %v, want rw-r--r--", st.Mode().Perm())
	}
	if len(got.Files) != 2 || got.Files[0].Name != "coefficients.txt" || got.Files[1].Name != "maps/flux.csv" || got.Files[0].Size != 8 {
		t.Errorf("files %+v", got.Files)
	}
	if got.Params["qstar"] != "0.8" || got.Diagnostics["q_min"] != 12.5 || !strings.HasPrefix(got.Platform, "go") {
		t.Errorf("manifest read back as %+v", got)
	}
	// A second build replaces the first; an aborted one leaves it alone.
	s2, _ := NewStage(dest)
	s2.WriteFile("other.txt", func(w io.Writer) error { return nil })
	s2.Abort()
	if _, err := Verify(dest); err != nil {
		t.Errorf("aborted stage touched the folder: %v", err)
	}
	s3, _ := NewStage(dest)
	s3.WriteFile("only.txt", func(w io.Writer) error { _, err := io.WriteString(w, "x"); return err })
	s3.WriteManifest(&Manifest{})
	if err := s3.Commit(); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(dest, "coefficients.txt")); !errors.Is(err, os.ErrNotExist) {
		t.Error("the replaced folder's files survived")
	}
	if ents, _ := os.ReadDir(parent); len(ents) != 1 {
		t.Errorf("%d entries in the parent, want only the output folder", len(ents))
	}
	// Tampering is found, and every bad file is named.
	os.WriteFile(filepath.Join(dest, "only.txt"), []byte("y"), 0o644)
	if _, err := Verify(dest); !errors.Is(err, ErrVerify) || !strings.Contains(err.Error(), "only.txt: sha256") {
		t.Errorf("Verify after tampering: %v", err)
	}
	os.Remove(filepath.Join(dest, "only.txt"))
	if _, err := Verify(dest); !errors.Is(err, ErrVerify) || !strings.Contains(err.Error(), "only.txt: missing") {
		t.Errorf("Verify after removal: %v", err)
	}
}

// The manifest is deterministic apart from Created: same build, same bytes.
func TestManifestDeterministic(t *testing.T) {
	mk := func() []byte {
		m := &Manifest{Version: "v", Params: map[string]string{}, Diagnostics: map[string]any{}}
		for _, k := range []string{"z", "a", "m", "q", "b", "y", "c"} {
			m.Params[k] = k + "!"
			m.Diagnostics[k] = len(k)
		}
		m.Files = []ManifestFile{{"b", 1, strings.Repeat("0", 64)}, {"a", 2, strings.Repeat("1", 64)}}
		var b bytes.Buffer
		if err := m.Encode(&b); err != nil {
			t.Fatal(err)
		}
		return b.Bytes()
	}
	a, b := mk(), mk()
	if !bytes.Equal(a, b) {
		t.Error("two encodings differ")
	}
	if i, j := bytes.Index(a, []byte("name: a")), bytes.Index(a, []byte("name: b")); i < 0 || i > j {
		t.Error("files are not sorted by name")
	}
}

func TestReadManifestErrors(t *testing.T) {
	good := "format: cmbflux-manifest/1\ncmbflux_version: v\nfiles:\n  - name: a.txt\n    size: 1\n    sha256: " + strings.Repeat("a", 64) + "\n"
	if _, err := ReadManifest(strings.NewReader(good), "m.yaml"); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct{ in, want string }{
		{strings.Replace(good, "a.txt", "../a.txt", 1), `m.yaml:4: file name "../a.txt" is not a path inside the folder`},
		{strings.Replace(good, "cmbflux-manifest/1", "other", 1), `m.yaml:1: format "other"`},
		{strings.Replace(good, strings.Repeat("a", 64), "xyz", 1), `m.yaml:4: sha256 of "a.txt" is not 64`},
		{good + "  - name: a.txt\n    size: 1\n    sha256: " + strings.Repeat("a", 64) + "\n", `m.yaml:7: file "a.txt" listed twice`},
		{"format: [\n", "m.yaml:"},
		{strings.Replace(good, "size: 1", "size: many", 1), "m.yaml:5:"},
	} {
		_, err := ReadManifest(strings.NewReader(tc.in), "m.yaml")
		if err == nil || !strings.Contains(err.Error(), tc.want) || !errors.Is(err, ErrBadInput) {
			t.Errorf("error %v, want %q", err, tc.want)
		}
	}
}

// The *File writers pick the format from the extension and write
// atomically; an unknown extension is refused before anything is written.
func TestWriteFilesByExtension(t *testing.T) {
	dir := t.TempDir()
	c := randomCoeffs(3, sh.Canonical, 4)
	for _, name := range []string{"c.txt", "c.csv", "c.json"} {
		p := filepath.Join(dir, name)
		if err := WriteCoeffsFile(p, c, testMeta(), nil); err != nil {
			t.Fatal(err)
		}
		tab, err := ReadCoeffsFile(p, nil)
		if err != nil || !sameBits(tab.Coeffs.C, noNegZero(c.C)) {
			t.Errorf("%s: %v", name, err)
		}
	}
	if err := WriteCoeffsFile(filepath.Join(dir, "c.nc"), c, nil, nil); err == nil {
		t.Error("coefficients written as netCDF")
	}
	if err := WriteGridFile(filepath.Join(dir, "g.xyz"), testGrid(), nil); err == nil || !strings.Contains(err.Error(), "want .txt") {
		t.Errorf("unknown extension: %v", err)
	}
	if err := WriteOutlinesFile(filepath.Join(dir, "o.geojson"), []Outline{{Rings: [][][2]float64{smallCircle(0, 0, 5, 50, true)}}}, nil); err != nil {
		t.Fatal(err)
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 4 {
		t.Errorf("%d files in the folder, want 4 (no temporary files left)", len(ents))
	}
	for _, name := range []string{"g.csv", "g.txt", "g.nc"} {
		p := filepath.Join(dir, name)
		if err := WriteGridFile(p, testGrid(), testMeta()); err != nil {
			t.Fatal(err)
		}
		if tab, err := ReadGridFile(p); err != nil || !sameBits(tab.Grid.Values, testGrid().Values) {
			t.Errorf("%s: %v", name, err)
		}
	}
}

// TestManifestRevision checks the revision taken from the build
// information (keys vcs.revision and vcs.modified, documented in the
// runtime/debug package) and that a given Revision is written and read
// back.
func TestManifestRevision(t *testing.T) {
	for _, tc := range []struct {
		settings []debug.BuildSetting
		want     string
	}{
		{nil, ""},
		{[]debug.BuildSetting{{Key: "vcs.revision", Value: "0123abc"}, {Key: "vcs.modified", Value: "false"}}, "0123abc"},
		{[]debug.BuildSetting{{Key: "vcs.modified", Value: "true"}, {Key: "vcs.revision", Value: "0123abc"}}, "0123abc+modified"},
		{[]debug.BuildSetting{{Key: "vcs.modified", Value: "true"}}, ""},
	} {
		if got := revisionOf(&debug.BuildInfo{Settings: tc.settings}); got != tc.want {
			t.Errorf("revisionOf(%v) = %q, want %q", tc.settings, got, tc.want)
		}
	}
	m := &Manifest{Version: "v", Revision: "feedbeef+modified"}
	var b bytes.Buffer
	if err := m.Encode(&b); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "\nrevision: feedbeef+modified\n") {
		t.Errorf("revision not written:\n%s", b.String())
	}
	back, err := ReadManifest(&b, "m.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if back.Revision != m.Revision {
		t.Errorf("read back revision %q", back.Revision)
	}
}
