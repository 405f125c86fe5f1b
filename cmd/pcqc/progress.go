package main

import (
	"fmt"
	"io"
	"os"
	"strings"
	"sync"
	"time"

	"pcqc/analysis"
)

// isTerminal reports whether f is a character device (a terminal), where a
// progress bar makes sense; pipes and files get none.
func isTerminal(f *os.File) bool {
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}

// progressBar draws one line per stage on a terminal, redrawn at most ten
// times a second. It is safe for concurrent use by resampling workers.
type progressBar struct {
	w     io.Writer
	mu    sync.Mutex
	stage string
	last  time.Time
}

func newProgress(w io.Writer, quiet bool) analysis.Progress {
	f, ok := w.(*os.File)
	if quiet || !ok || !isTerminal(f) {
		return nil
	}
	p := &progressBar{w: w}
	return p.update
}

func (p *progressBar) update(stage string, done, total int) {
	p.mu.Lock()
	defer p.mu.Unlock()
	now := time.Now()
	if stage == p.stage && done < total && now.Sub(p.last) < 100*time.Millisecond {
		return
	}
	p.stage, p.last = stage, now
	const width = 30
	filled := width * done / total
	fmt.Fprintf(p.w, "\r%-13s [%s%s] %d/%d", stage, strings.Repeat("#", filled), strings.Repeat(".", width-filled), done, total)
	if done == total {
		fmt.Fprintln(p.w)
	}
}
