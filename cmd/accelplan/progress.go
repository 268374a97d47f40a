package main

import (
	"fmt"
	"io"
	"os"
	"strings"
	"sync"
	"time"

	"accelplan/out"
)

// progress draws a bar with points done and time left on stderr. On a
// terminal it redraws one line; otherwise it prints a line every tenth.
type progress struct {
	w     io.Writer
	quiet bool
	tty   bool
	start time.Time
	mu    sync.Mutex
	last  time.Time
	step  int
}

func newProgress(w io.Writer, quiet bool) *progress {
	p := &progress{w: w, quiet: quiet, start: time.Now()}
	if f, ok := w.(*os.File); ok {
		if fi, err := f.Stat(); err == nil && fi.Mode()&os.ModeCharDevice != 0 {
			p.tty = true
		}
	}
	return p
}

func (p *progress) update(done, total int) {
	if p.quiet || total == 0 {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	now := time.Now()
	el := now.Sub(p.start).Seconds()
	left := "?"
	if done > 0 {
		left = out.FormatMinSec(el / float64(done) * float64(total-done))
	}
	if p.tty {
		if done < total && now.Sub(p.last) < 100*time.Millisecond {
			return
		}
		p.last = now
		const width = 30
		n := width * done / total
		fmt.Fprintf(p.w, "\r[%s%s] %d/%d jobs  %s elapsed  %s left ", strings.Repeat("#", n), strings.Repeat(".", width-n),
			done, total, out.FormatMinSec(el), left)
		return
	}
	if s := 10 * done / total; s > p.step || done == total {
		p.step = s
		fmt.Fprintf(p.w, "accelplan: %d/%d jobs, %s elapsed, %s left\n", done, total, out.FormatMinSec(el), left)
	}
}

func (p *progress) finish() {
	if p.tty && !p.quiet {
		fmt.Fprintln(p.w)
	}
}
