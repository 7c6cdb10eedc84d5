package outdir

import (
	"errors"
	"os"
	"path/filepath"
	"testing"
)

func TestStageCommitAndAbort(t *testing.T) {
	dir := t.TempDir()
	final := filepath.Join(dir, "out")
	s, err := New(final, false)
	if err != nil {
		t.Fatal(err)
	}
	if err := s.WriteFile("a.txt", []byte("one\n")); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(final); !os.IsNotExist(err) {
		t.Fatalf("final folder visible before Commit: %v", err)
	}
	if err := s.Commit(); err != nil {
		t.Fatal(err)
	}
	s.Abort() // no-op after Commit
	if b, err := os.ReadFile(filepath.Join(final, "a.txt")); err != nil || string(b) != "one\n" {
		t.Fatalf("after commit: %q, %v", b, err)
	}
	if _, err := New(final, false); !errors.Is(err, ErrNotEmpty) {
		t.Fatalf("non-empty folder accepted without force: %v", err)
	}
	s2, err := New(final, true)
	if err != nil {
		t.Fatal(err)
	}
	s2.WriteFile("b.txt", []byte("two\n"))
	s2.Abort()
	if _, err := os.Stat(filepath.Join(final, "a.txt")); err != nil {
		t.Fatal("abort touched the existing folder")
	}
	s3, _ := New(final, true)
	s3.WriteFile("b.txt", []byte("two\n"))
	if err := s3.Commit(); err != nil {
		t.Fatal(err)
	}
	ents, _ := os.ReadDir(final)
	if len(ents) != 1 || ents[0].Name() != "b.txt" {
		t.Fatalf("forced commit left %v", ents)
	}
	left, _ := os.ReadDir(dir)
	if len(left) != 1 {
		t.Fatalf("leftovers beside the output: %v", left)
	}
}

func TestCleanKeepsLiveProcesses(t *testing.T) {
	dir := t.TempDir()
	s, _ := New(filepath.Join(dir, "run"), false)
	// A leftover of a process that cannot exist (pid beyond any limit).
	dead := filepath.Join(dir, ".x"+tmpTag())
	os.Mkdir(dead, 0o755)
	if err := Clean(dir); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(s.Tmp); err != nil {
		t.Errorf("Clean removed the stage of a running process")
	}
	if _, err := os.Stat(dead); err != nil {
		t.Errorf("Clean removed a folder of this process")
	}
	// Rewrite the pid to one that is not running.
	b := filepath.Base(dead)
	renamed := filepath.Join(dir, b[:len(".x.tmp-")]+hostTag()+"-999999999-00")
	os.Rename(dead, renamed)
	Clean(dir)
	if _, err := os.Stat(renamed); !os.IsNotExist(err) {
		t.Errorf("Clean kept %s of a dead process", renamed)
	}
}
