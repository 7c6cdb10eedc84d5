// Package outdir writes output folders so that an interrupted program never
// leaves a folder or file that looks complete but is not: everything goes to
// a hidden temporary name first and is renamed into place when complete.
package outdir

import (
	"crypto/rand"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
)

// ErrNotEmpty is returned when the output folder exists and holds files and
// overwriting was not allowed.
var ErrNotEmpty = errors.New("output folder is not empty")

// Stage is an output folder being written. Files go into a hidden sibling
// folder, which Commit renames to the final name.
type Stage struct {
	Final string // the folder that Commit creates
	Tmp   string // the hidden folder holding the files meanwhile
	// NoSync skips fsync: files are written straight into the hidden
	// folder, which Commit still renames into place only when complete, so
	// an interrupted process never leaves a folder that looks complete. A
	// power failure can leave a renamed folder whose files were not yet on
	// disk; callers that set NoSync must check folders against their
	// manifest before trusting them (the sweep's resume does).
	NoSync bool
	done   bool
}

// tmpTag returns ".tmp-HOST-PID-RANDOM", which lets Clean recognise the
// leftovers of dead processes on this host.
func tmpTag() string {
	var b [4]byte
	_, _ = rand.Read(b[:])
	return fmt.Sprintf(".tmp-%s-%d-%s", hostTag(), os.Getpid(), hex.EncodeToString(b[:]))
}

// hostTag is the host name with the characters that the temporary names use
// as separators replaced.
func hostTag() string {
	host, _ := os.Hostname()
	if host == "" {
		host = "host"
	}
	return strings.NewReplacer("-", "_", "/", "_", ".", "_").Replace(host)
}

// New starts writing the folder final. It fails with ErrNotEmpty when final
// exists and is not empty, unless force is set, in which case Commit replaces
// it.
func New(final string, force bool) (*Stage, error) {
	final = filepath.Clean(final)
	if fi, err := os.Stat(final); err == nil {
		if !fi.IsDir() {
			return nil, fmt.Errorf("%s exists and is not a folder; choose another --out", final)
		}
		ents, err := os.ReadDir(final)
		if err != nil {
			return nil, err
		}
		if len(ents) > 0 && !force {
			return nil, fmt.Errorf("%s: %w; choose another --out or give --force to replace it", final, ErrNotEmpty)
		}
	}
	parent := filepath.Dir(final)
	if err := os.MkdirAll(parent, 0o755); err != nil {
		return nil, err
	}
	tmp := filepath.Join(parent, "."+filepath.Base(final)+tmpTag())
	if err := os.Mkdir(tmp, 0o755); err != nil {
		return nil, err
	}
	return &Stage{Final: final, Tmp: tmp}, nil
}

// Path returns where the file name is written while staging.
func (s *Stage) Path(name string) string { return filepath.Join(s.Tmp, name) }

// WriteFile writes a complete file into the stage.
func (s *Stage) WriteFile(name string, data []byte) error {
	if s.NoSync {
		return os.WriteFile(s.Path(name), data, 0o644)
	}
	return WriteFile(s.Path(name), data)
}

// Write writes a file into the stage through fn.
func (s *Stage) Write(name string, fn func(w io.Writer) error) error {
	return Write(s.Path(name), fn)
}

// Commit renames the stage into place, replacing an existing folder (New
// checked that it was empty or that replacing was allowed).
func (s *Stage) Commit() error {
	if s.done {
		panic("outdir: Commit after Commit or Abort")
	}
	if !s.NoSync {
		if err := syncDir(s.Tmp); err != nil {
			return err
		}
	}
	var old string
	if _, err := os.Stat(s.Final); err == nil {
		old = filepath.Join(filepath.Dir(s.Final), "."+filepath.Base(s.Final)+".old"+tmpTag())
		if err := os.Rename(s.Final, old); err != nil {
			return err
		}
	}
	if err := os.Rename(s.Tmp, s.Final); err != nil {
		if old != "" {
			_ = os.Rename(old, s.Final)
		}
		return err
	}
	s.done = true
	if old != "" {
		_ = os.RemoveAll(old)
	}
	if s.NoSync {
		return nil
	}
	return syncDir(filepath.Dir(s.Final))
}

// Abort removes the stage; it is safe to call after Commit (then it does
// nothing), so callers can defer it.
func (s *Stage) Abort() {
	if !s.done {
		s.done = true
		_ = os.RemoveAll(s.Tmp)
	}
}

// WriteFile writes data to path through a temporary file in the same folder,
// synced to disk and renamed over path.
func WriteFile(path string, data []byte) error {
	return Write(path, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}

// Write writes path through fn, atomically as WriteFile does.
func Write(path string, fn func(w io.Writer) error) (err error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	f, err := os.CreateTemp(dir, "."+base+tmpTag()+"-*")
	if err != nil {
		return err
	}
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(f.Name())
		}
	}()
	if err = fn(f); err != nil {
		return err
	}
	if err = f.Sync(); err != nil {
		return err
	}
	if err = f.Close(); err != nil {
		return err
	}
	if err = os.Chmod(f.Name(), 0o644); err != nil {
		return err
	}
	return os.Rename(f.Name(), path)
}

func syncDir(dir string) error {
	d, err := os.Open(dir)
	if err != nil {
		return err
	}
	defer d.Close()
	_ = d.Sync() // not every file system can sync a folder; the renames still order the writes
	return nil
}

// IsTemp reports whether name is a temporary name made by this package.
func IsTemp(name string) bool {
	return strings.HasPrefix(name, ".") && strings.Contains(name, ".tmp-")
}

// Clean removes from dir the temporary files and folders left by processes
// of this host that are no longer running (e.g. killed with SIGKILL). Those
// of running processes, or of other hosts sharing the folder, are kept.
func Clean(dir string) error {
	ents, err := os.ReadDir(dir)
	if err != nil {
		return err
	}
	host := hostTag()
	for _, e := range ents {
		name := e.Name()
		i := strings.Index(name, ".tmp-")
		if !strings.HasPrefix(name, ".") || i < 0 {
			continue
		}
		parts := strings.SplitN(name[i+len(".tmp-"):], "-", 3)
		if len(parts) < 3 || parts[0] != host {
			continue
		}
		pid, err := strconv.Atoi(parts[1])
		if err != nil || pid == os.Getpid() || alive(pid) {
			continue
		}
		if err := os.RemoveAll(filepath.Join(dir, name)); err != nil {
			return err
		}
	}
	return nil
}
