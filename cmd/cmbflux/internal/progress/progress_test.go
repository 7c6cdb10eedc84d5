package progress

import (
	"bytes"
	"strings"
	"sync"
	"testing"
)

func TestPlainLinesAreDeterministic(t *testing.T) {
	var b bytes.Buffer
	r := New(&b, "sweep", 3, false)
	var wg sync.WaitGroup
	for i := 0; i < 3; i++ {
		wg.Add(1)
		go func() { defer wg.Done(); r.Done(i == 1) }()
	}
	wg.Wait()
	r.Finish()
	want := "sweep: 1/3 runs done\nsweep: 2/3 runs done\nsweep: 3/3 runs done\n"
	if b.String() != want {
		t.Errorf("got %q, want %q", b.String(), want)
	}
}

func TestLargeSweepsReportEveryFivePercent(t *testing.T) {
	var b bytes.Buffer
	r := New(&b, "sweep", 1000, false)
	for i := 0; i < 1000; i++ {
		r.Done(false)
	}
	lines := strings.Split(strings.TrimSpace(b.String()), "\n")
	if len(lines) != 21 || lines[20] != "sweep: 1000/1000 runs done (100%)" {
		t.Errorf("%d lines, last %q", len(lines), lines[len(lines)-1])
	}
}

func TestTerminalBar(t *testing.T) {
	var b bytes.Buffer
	r := New(&b, "sweep", 4, true)
	for i := 0; i < 4; i++ {
		r.Done(false)
	}
	r.Finish()
	s := b.String()
	if !strings.HasPrefix(s, "\r") || !strings.HasSuffix(s, "\n") || !strings.Contains(s, "4/4 runs") || !strings.Contains(s, strings.Repeat("#", 30)) {
		t.Errorf("bar output %q", s)
	}
	New(nil, "x", 1, true).Done(false) // a nil writer reports nothing and does not panic
}
