// Package progress reports how far a sweep has got: a redrawn bar on a
// terminal, or plain lines (deterministic: one per run for small sweeps, one
// per 5 % otherwise) when the output is a file or a pipe.
package progress

import (
	"fmt"
	"io"
	"strings"
	"sync"
	"time"
)

// Reporter counts finished runs. Its methods are safe for concurrent use.
type Reporter struct {
	w        io.Writer
	total    int
	tty      bool
	label    string
	mu       sync.Mutex
	done     int
	skipped  int
	start    time.Time
	lastDraw time.Time
	lastPct  int
}

// New returns a Reporter for total runs writing to w; tty selects the
// redrawn bar. A nil w reports nothing.
func New(w io.Writer, label string, total int, tty bool) *Reporter {
	return &Reporter{w: w, total: total, tty: tty, label: label, start: time.Now(), lastPct: -1}
}

// Done records one finished run; skipped says it was already complete.
func (r *Reporter) Done(skipped bool) {
	if r == nil || r.w == nil {
		return
	}
	r.mu.Lock()
	defer r.mu.Unlock()
	r.done++
	if skipped {
		r.skipped++
	}
	if r.tty {
		if now := time.Now(); now.Sub(r.lastDraw) > 100*time.Millisecond || r.done == r.total {
			r.lastDraw = now
			r.draw()
		}
		return
	}
	if r.total <= 100 {
		fmt.Fprintf(r.w, "%s: %d/%d runs done\n", r.label, r.done, r.total)
		return
	}
	if pct := 100 * r.done / r.total / 5 * 5; pct != r.lastPct {
		r.lastPct = pct
		fmt.Fprintf(r.w, "%s: %d/%d runs done (%d%%)\n", r.label, r.done, r.total, pct)
	}
}

func (r *Reporter) draw() {
	const width = 30
	n := width * r.done / max(r.total, 1)
	el := time.Since(r.start)
	left := ""
	if fresh := r.done - r.skipped; fresh > 0 && r.done < r.total {
		per := el / time.Duration(fresh)
		left = fmt.Sprintf(", about %s left", (per * time.Duration(r.total-r.done)).Round(time.Second))
	}
	fmt.Fprintf(r.w, "\r%s [%s%s] %d/%d runs, %s elapsed%s\x1b[K", r.label, strings.Repeat("#", n), strings.Repeat(".", width-n),
		r.done, r.total, el.Round(time.Second), left)
}

// Finish ends the bar's line on a terminal.
func (r *Reporter) Finish() {
	if r == nil || r.w == nil || !r.tty {
		return
	}
	r.mu.Lock()
	defer r.mu.Unlock()
	r.draw()
	fmt.Fprintln(r.w)
}
