package export

import (
	"bufio"
	"crypto/rand"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"syscall"
)

// File is an output file written atomically: the bytes go to a temporary
// file in the destination folder, and Commit flushes, fsyncs, closes and
// renames it into place, then fsyncs the folder. Until Commit returns nil the
// destination path is untouched; Abort (or a failed Commit) removes the
// temporary file. File is not safe for concurrent use.
type File struct {
	path string
	tmp  *os.File
	buf  *bufio.Writer
	err  error // first write error
	done bool
	// onCommit is called after a successful Commit (used by Stage).
	onCommit func()
}

// Create starts writing the file at path atomically. The folder holding path
// must exist. The caller must call Commit or Abort.
func Create(path string) (*File, error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	tmp, err := os.CreateTemp(dir, "."+base+".tmp-*")
	if err != nil {
		return nil, fmt.Errorf("export: creating %s: %w", path, err)
	}
	// CreateTemp makes the file private (0600); outputs are for sharing.
	if err := tmp.Chmod(0o644); err != nil {
		tmp.Close()
		os.Remove(tmp.Name())
		return nil, fmt.Errorf("export: creating %s: %w", path, err)
	}
	return &File{path: path, tmp: tmp, buf: bufio.NewWriterSize(tmp, 1<<16)}, nil
}

// Write implements io.Writer. After the first error every later Write fails
// with the same error and Commit reports it.
func (f *File) Write(p []byte) (int, error) {
	if f.done {
		return 0, fmt.Errorf("export: write to %s after Commit or Abort", f.path)
	}
	if f.err != nil {
		return 0, f.err
	}
	n, err := f.buf.Write(p)
	if err != nil {
		f.err = fmt.Errorf("export: writing %s: %w", f.path, err)
	}
	return n, f.err
}

// Path returns the destination path.
func (f *File) Path() string { return f.path }

// Commit makes the written bytes the content of the destination path. It is
// an error to call Commit twice or after Abort.
func (f *File) Commit() error {
	if f.done {
		return fmt.Errorf("export: %s already committed or aborted", f.path)
	}
	f.done = true
	err := f.err
	if err == nil {
		if e := f.buf.Flush(); e != nil {
			err = fmt.Errorf("export: writing %s: %w", f.path, e)
		}
	}
	if err == nil {
		if e := f.tmp.Sync(); e != nil {
			err = fmt.Errorf("export: syncing %s: %w", f.path, e)
		}
	}
	if e := f.tmp.Close(); e != nil && err == nil {
		err = fmt.Errorf("export: closing %s: %w", f.path, e)
	}
	if err == nil {
		if e := os.Rename(f.tmp.Name(), f.path); e != nil {
			err = fmt.Errorf("export: %w", e)
		}
	}
	if err != nil {
		os.Remove(f.tmp.Name())
		return err
	}
	if err := syncDir(filepath.Dir(f.path)); err != nil {
		return err
	}
	if f.onCommit != nil {
		f.onCommit()
	}
	return nil
}

// Abort discards the written bytes and leaves the destination untouched. It
// is safe to call after Commit (it then does nothing), so callers may defer it.
func (f *File) Abort() error {
	if f.done {
		return nil
	}
	f.done = true
	f.tmp.Close()
	if err := os.Remove(f.tmp.Name()); err != nil && !errors.Is(err, os.ErrNotExist) {
		return fmt.Errorf("export: %w", err)
	}
	return nil
}

// WriteFile writes path atomically with the bytes that write produces. If
// write returns an error, nothing is left behind and the error is returned.
func WriteFile(path string, write func(w io.Writer) error) error {
	f, err := Create(path)
	if err != nil {
		return err
	}
	defer f.Abort()
	if err := write(f); err != nil {
		return err
	}
	return f.Commit()
}

// syncDir fsyncs a folder so that a rename inside it is durable. File
// systems that cannot sync folders are tolerated.
func syncDir(dir string) error {
	d, err := os.Open(dir)
	if err != nil {
		return fmt.Errorf("export: %w", err)
	}
	defer d.Close()
	if err := d.Sync(); err != nil && !errors.Is(err, syscall.EINVAL) && !errors.Is(err, errors.ErrUnsupported) {
		// EINVAL is returned by some file systems for folders; nothing
		// more can be done there.
		return fmt.Errorf("export: syncing %s: %w", dir, err)
	}
	return nil
}

// Stage builds a whole output folder so that a failed build leaves nothing:
// files are written into a temporary sibling folder, and Commit renames that
// folder to the destination (replacing an existing destination folder).
// Abort removes the temporary folder. Stage is not safe for concurrent use.
type Stage struct {
	dest, dir string
	done      bool
	files     map[string]bool // names committed through Create
}

// NewStage prepares to build the folder dest. Its parent folder must exist;
// dest itself need not.
func NewStage(dest string) (*Stage, error) {
	dest = filepath.Clean(dest)
	parent, base := filepath.Split(dest)
	if parent == "" {
		parent = "."
	}
	if base == "" || base == "." || base == ".." {
		return nil, fmt.Errorf("export: cannot stage output folder %q", dest)
	}
	dir, err := os.MkdirTemp(parent, "."+base+".stage-*")
	if err != nil {
		return nil, fmt.Errorf("export: staging %s: %w", dest, err)
	}
	// MkdirTemp makes the folder private (0700); the output folder is not.
	if err := os.Chmod(dir, 0o755); err != nil {
		os.RemoveAll(dir)
		return nil, fmt.Errorf("export: staging %s: %w", dest, err)
	}
	return &Stage{dest: dest, dir: dir, files: map[string]bool{}}, nil
}

// Dir returns the temporary folder being filled (for tools that need a path).
func (s *Stage) Dir() string { return s.dir }

// Dest returns the final folder.
func (s *Stage) Dest() string { return s.dest }

// Path returns the temporary path of name inside the stage. It panics if name
// is not a local, slash-separated relative path.
func (s *Stage) Path(name string) string {
	if !filepath.IsLocal(filepath.FromSlash(name)) {
		panic(fmt.Sprintf("export: stage file name %q is not a local relative path", name))
	}
	return filepath.Join(s.dir, filepath.FromSlash(name))
}

// Create starts the atomic file name (slash-separated, relative to the
// output folder; sub-folders are made as needed) inside the stage.
func (s *Stage) Create(name string) (*File, error) {
	if s.done {
		return nil, fmt.Errorf("export: stage for %s already committed or aborted", s.dest)
	}
	if !filepath.IsLocal(filepath.FromSlash(name)) {
		return nil, fmt.Errorf("export: output file name %q is not a local relative path", name)
	}
	p := s.Path(name)
	if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
		return nil, fmt.Errorf("export: %w", err)
	}
	f, err := Create(p)
	if err != nil {
		return nil, err
	}
	f.onCommit = func() { s.files[name] = true }
	return f, nil
}

// Files returns the names of the files committed inside the stage so far,
// sorted.
func (s *Stage) Files() []string { return sortedKeys(s.files) }

// WriteManifest lists every file committed inside the stage (except the
// manifest itself) in m with its size and sha256, and writes m as
// ManifestName inside the stage. Call it last, just before Commit.
func (s *Stage) WriteManifest(m *Manifest) error {
	for _, name := range s.Files() {
		if name == ManifestName {
			continue
		}
		if err := m.AddFile(s.dir, name); err != nil {
			return err
		}
	}
	return s.WriteFile(ManifestName, m.Encode)
}

// WriteFile writes name inside the stage with the bytes that write produces.
func (s *Stage) WriteFile(name string, write func(w io.Writer) error) error {
	f, err := s.Create(name)
	if err != nil {
		return err
	}
	defer f.Abort()
	if err := write(f); err != nil {
		return err
	}
	return f.Commit()
}

// Commit renames the staged folder to the destination. An existing
// destination is first moved aside and removed only after the new folder is
// in place; if the final rename fails, the old folder is put back.
func (s *Stage) Commit() error {
	if s.done {
		return fmt.Errorf("export: stage for %s already committed or aborted", s.dest)
	}
	s.done = true
	parent := filepath.Dir(s.dest)
	var old string
	if _, err := os.Lstat(s.dest); err == nil {
		old = filepath.Join(parent, "."+filepath.Base(s.dest)+".old-"+randomSuffix())
		if err := os.Rename(s.dest, old); err != nil {
			os.RemoveAll(s.dir)
			return fmt.Errorf("export: moving the previous %s aside: %w", s.dest, err)
		}
	}
	if err := os.Rename(s.dir, s.dest); err != nil {
		if old != "" {
			os.Rename(old, s.dest)
		}
		os.RemoveAll(s.dir)
		return fmt.Errorf("export: %w", err)
	}
	if err := syncDir(parent); err != nil {
		return err
	}
	if old != "" {
		if err := os.RemoveAll(old); err != nil {
			return fmt.Errorf("export: removing the previous output %s: %w", old, err)
		}
	}
	return nil
}

// Abort removes the staged folder and everything in it. It is safe to call
// after Commit (it then does nothing), so callers may defer it.
func (s *Stage) Abort() error {
	if s.done {
		return nil
	}
	s.done = true
	if err := os.RemoveAll(s.dir); err != nil {
		return fmt.Errorf("export: %w", err)
	}
	return nil
}

func randomSuffix() string {
	var b [6]byte
	rand.Read(b[:])
	return hex.EncodeToString(b[:])
}
