package export

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"runtime/debug"
	"sort"
	"strings"

	"gopkg.in/yaml.v3"
)

// ManifestName is the file name of a build's manifest inside its folder.
const ManifestName = "manifest.yaml"

const manifestFormat = "cmbflux-manifest/1"

// Manifest records a build: every output file with its size and sha256,
// every parameter with defaults resolved, the tool version, the inputs with
// their hashes and the diagnostics -- enough to rebuild the same outputs
// bit for bit and to check a folder later (Verify). Only the manifest may
// carry a time (Created); the data files never do.
type Manifest struct {
	// Format is "cmbflux-manifest/1"; Encode sets it.
	Format string `yaml:"format"`
	// Version is the cmbflux version that made the build.
	Version string `yaml:"cmbflux_version"`
	// Platform is the Go version and GOOS/GOARCH of the build, filled by
	// Encode when empty: bit-for-bit rebuilds need the same platform, since
	// the Go specification lets compilers fuse multiply-adds, which gc does
	// on some architectures (arm64, ppc64le, s390x), changing last bits.
	Platform string `yaml:"platform"`
	// Revision is the version-control revision of the source the tool
	// was built from, "+modified" appended when the tree had uncommitted
	// changes, filled by Encode when empty from the build information the
	// go command stamps into binaries built in a repository
	// (runtime/debug.ReadBuildInfo: vcs.revision, vcs.modified). It is
	// omitted when unknown (test binaries, builds outside a repository);
	// with Version and Platform it names the program that made the files.
	Revision string `yaml:"revision,omitempty"`
	// Created is an optional time stamp (RFC 3339), for people only: it
	// plays no part in Verify.
	Created string `yaml:"created,omitempty"`
	// Command is the command line or sweep point that made the build.
	Command string `yaml:"command,omitempty"`
	// Inputs lists the input files.
	Inputs []ManifestInput `yaml:"inputs"`
	// Params holds every parameter, defaults resolved (written sorted).
	Params map[string]string `yaml:"parameters"`
	// Diagnostics holds the build's diagnostics (written with sorted keys).
	Diagnostics map[string]any `yaml:"diagnostics,omitempty"`
	// Files lists the output files (names relative to the folder,
	// slash-separated), sorted by name by Encode.
	Files []ManifestFile `yaml:"files"`
}

// ManifestInput is an input file of a build.
type ManifestInput struct {
	Name   string `yaml:"name"`             // path or label as given by the user
	SHA256 string `yaml:"sha256"`           // hex sha256 of the bytes read
	Size   int64  `yaml:"size,omitempty"`   // bytes, when known
	Format string `yaml:"format,omitempty"` // format as detected, e.g. "netcdf-cdf1"
}

// ManifestFile is an output file of a build.
type ManifestFile struct {
	Name   string `yaml:"name"`   // slash-separated, relative to the folder
	Size   int64  `yaml:"size"`   // bytes
	SHA256 string `yaml:"sha256"` // hex sha256 of the content
}

// HashFile returns the size and the hex sha256 of the file at path.
func HashFile(path string) (size int64, sum string, err error) {
	f, err := os.Open(path)
	if err != nil {
		return 0, "", err
	}
	defer f.Close()
	h := sha256.New()
	n, err := io.Copy(h, f)
	if err != nil {
		return 0, "", fmt.Errorf("%s: %w", path, err)
	}
	return n, hex.EncodeToString(h.Sum(nil)), nil
}

// AddFile hashes dir/name and lists it (replacing an earlier entry of the
// same name). name is slash-separated and relative to dir.
func (m *Manifest) AddFile(dir, name string) error {
	if !filepath.IsLocal(filepath.FromSlash(name)) {
		return fmt.Errorf("export: manifest file name %q is not a local relative path", name)
	}
	size, sum, err := HashFile(filepath.Join(dir, filepath.FromSlash(name)))
	if err != nil {
		return err
	}
	for i := range m.Files {
		if m.Files[i].Name == name {
			m.Files[i] = ManifestFile{name, size, sum}
			return nil
		}
	}
	m.Files = append(m.Files, ManifestFile{name, size, sum})
	return nil
}

// Encode writes m as YAML. Files are sorted by name and map keys are sorted,
// so the same build gives the same bytes (apart from Created).
func (m *Manifest) Encode(w io.Writer) error {
	c := *m
	c.Format = manifestFormat
	if c.Platform == "" {
		c.Platform = runtime.Version() + " " + runtime.GOOS + "/" + runtime.GOARCH
	}
	if c.Revision == "" {
		if bi, ok := debug.ReadBuildInfo(); ok {
			c.Revision = revisionOf(bi)
		}
	}
	c.Files = append([]ManifestFile(nil), m.Files...)
	sort.Slice(c.Files, func(i, j int) bool { return c.Files[i].Name < c.Files[j].Name })
	if c.Inputs == nil {
		c.Inputs = []ManifestInput{}
	}
	if c.Params == nil {
		c.Params = map[string]string{}
	}
	var b bytes.Buffer
	b.WriteString("# cmbflux build manifest: check a folder with `sha256sum` against the files below.\n")
	enc := yaml.NewEncoder(&b)
	enc.SetIndent(2)
	if err := enc.Encode(&c); err != nil {
		return fmt.Errorf("export: manifest: %w", err)
	}
	if err := enc.Close(); err != nil {
		return fmt.Errorf("export: manifest: %w", err)
	}
	_, err := w.Write(b.Bytes())
	return err
}

// ReadManifest reads a manifest written by Encode. name is used in errors,
// which are *InputError values naming the line.
func ReadManifest(r io.Reader, name string) (*Manifest, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	var node yaml.Node
	if err := yaml.Unmarshal(data, &node); err != nil {
		return nil, yamlErr(name, err)
	}
	var m Manifest
	if err := node.Decode(&m); err != nil {
		return nil, yamlErr(name, err)
	}
	if m.Format != manifestFormat {
		return nil, &InputError{File: name, Line: keyLine(&node, "format"), Err: fmt.Errorf("format %q, want %q", m.Format, manifestFormat)}
	}
	seen := map[string]bool{}
	for i, f := range m.Files {
		line := itemLine(&node, "files", i)
		switch {
		case !filepath.IsLocal(filepath.FromSlash(f.Name)):
			return nil, &InputError{File: name, Line: line, Err: fmt.Errorf("file name %q is not a path inside the folder", f.Name)}
		case seen[f.Name]:
			return nil, &InputError{File: name, Line: line, Err: fmt.Errorf("file %q listed twice", f.Name)}
		case len(f.SHA256) != 64 || strings.Trim(f.SHA256, "0123456789abcdef") != "":
			return nil, &InputError{File: name, Line: line, Err: fmt.Errorf("sha256 of %q is not 64 lower-case hex digits", f.Name)}
		case f.Size < 0:
			return nil, &InputError{File: name, Line: line, Err: fmt.Errorf("size of %q is negative", f.Name)}
		}
		seen[f.Name] = true
	}
	return &m, nil
}

// yamlErr turns a yaml.v3 error ("yaml: line N: ...") into an InputError.
func yamlErr(name string, err error) error {
	msg := err.Error()
	line := 0
	if i := strings.Index(msg, "line "); i >= 0 {
		fmt.Sscanf(msg[i:], "line %d", &line)
	}
	msg = strings.TrimPrefix(msg, "yaml: ")
	return &InputError{File: name, Line: line, Err: errors.New(msg)}
}

func mappingValue(n *yaml.Node, key string) (*yaml.Node, *yaml.Node) {
	if n.Kind == yaml.DocumentNode && len(n.Content) > 0 {
		n = n.Content[0]
	}
	if n.Kind != yaml.MappingNode {
		return nil, nil
	}
	for i := 0; i+1 < len(n.Content); i += 2 {
		if n.Content[i].Value == key {
			return n.Content[i], n.Content[i+1]
		}
	}
	return nil, nil
}

func keyLine(n *yaml.Node, key string) int {
	if k, _ := mappingValue(n, key); k != nil {
		return k.Line
	}
	return 0
}

func itemLine(n *yaml.Node, key string, i int) int {
	if _, v := mappingValue(n, key); v != nil && v.Kind == yaml.SequenceNode && i < len(v.Content) {
		return v.Content[i].Line
	}
	return 0
}

// ReadManifestFile reads the manifest at path.
func ReadManifestFile(path string) (*Manifest, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return ReadManifest(f, path)
}

// ErrVerify is wrapped by the errors of Verify when a listed file is
// missing or differs from the manifest.
var ErrVerify = errors.New("output differs from its manifest")

// Verify checks the folder dir against dir/manifest.yaml: every listed file
// must exist with the listed size and sha256. It returns the manifest and
// nil when all match; otherwise an error wrapping ErrVerify that names every
// file at fault (or the manifest's own read error).
func Verify(dir string) (*Manifest, error) {
	m, err := ReadManifestFile(filepath.Join(dir, ManifestName))
	if err != nil {
		return nil, err
	}
	if len(m.Files) == 0 {
		return m, fmt.Errorf("%s: lists no files: %w", filepath.Join(dir, ManifestName), ErrVerify)
	}
	var errs []error
	for _, f := range m.Files {
		p := filepath.Join(dir, filepath.FromSlash(f.Name))
		size, sum, err := HashFile(p)
		switch {
		case errors.Is(err, os.ErrNotExist):
			errs = append(errs, fmt.Errorf("%s: missing: %w", p, ErrVerify))
		case err != nil:
			errs = append(errs, fmt.Errorf("%s: %v: %w", p, err, ErrVerify))
		case size != f.Size:
			errs = append(errs, fmt.Errorf("%s: %d bytes, manifest says %d: %w", p, size, f.Size, ErrVerify))
		case sum != f.SHA256:
			errs = append(errs, fmt.Errorf("%s: sha256 %s, manifest says %s: %w", p, sum, f.SHA256, ErrVerify))
		}
	}
	return m, errors.Join(errs...)
}

// revisionOf returns the revision recorded in bi ("" when there is none),
// with "+modified" when the source tree had uncommitted changes.
func revisionOf(bi *debug.BuildInfo) string {
	rev, modified := "", false
	for _, s := range bi.Settings {
		switch s.Key {
		case "vcs.revision":
			rev = s.Value
		case "vcs.modified":
			modified = s.Value == "true"
		}
	}
	if rev != "" && modified {
		rev += "+modified"
	}
	return rev
}
