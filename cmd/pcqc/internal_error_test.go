package main

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"pcqc/outdir"
)

// withCommand registers a command for one test.
func withCommand(t *testing.T, c *command) {
	t.Helper()
	saved := commands
	commands = append(append([]*command{}, commands...), c)
	t.Cleanup(func() { commands = saved })
}

// A panic (always a bug) becomes one line on stderr and its own exit
// status, and the folder being written is removed.
func TestPanicBecomesInternalError(t *testing.T) {
	dir := t.TempDir()
	target := filepath.Join(dir, "out")
	withCommand(t, &command{name: "boom", run: func(args []string, stdout, stderr io.Writer) (int, error) {
		out, err := outdir.Begin(target, outdir.Options{})
		if err != nil {
			return 0, err
		}
		setActiveOutput(out)
		os.WriteFile(out.Path("half.csv"), []byte("x"), 0o644)
		var m map[string]int
		m["nil map"]++ // a runtime panic
		return 0, nil
	}})
	status, _, stderr := runPCQC(t, "boom")
	if status != exitInternal {
		t.Errorf("status %d, want %d", status, exitInternal)
	}
	if strings.Count(stderr, "\n") != 1 || !strings.Contains(stderr, "pcqc boom: internal error") || !strings.Contains(stderr, "report") {
		t.Errorf("stderr %q", stderr)
	}
	if strings.Contains(stderr, "goroutine") || strings.Contains(stderr, "panic:") {
		t.Errorf("stderr holds a stack trace: %q", stderr)
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 0 {
		t.Errorf("left behind: %v", entries)
	}
}

// Exit status 3 is for the file system's refusals only; anything else met
// while writing is pcqc's own fault.
func TestWriteFailureStatus(t *testing.T) {
	cases := []struct {
		err  error
		want int
	}{
		{&fs.PathError{Op: "write", Path: "x", Err: syscall.ENOSPC}, exitOutput},
		{fmt.Errorf("figures: %w", &fs.PathError{Op: "open", Path: "x", Err: syscall.EACCES}), exitOutput},
		{&os.LinkError{Op: "rename", Old: "a", New: "b", Err: syscall.EXDEV}, exitOutput},
		{syscall.EIO, exitOutput},
		{errors.New("json: unsupported value: NaN"), exitInternal},
		{errors.New("axis range is not finite"), exitInternal},
		{&outdir.RefusedError{Target: "x", Reason: "changed"}, exitUsage},
	}
	for _, c := range cases {
		if got := statusFor(writeFailure(c.err)); got != c.want {
			t.Errorf("%v: status %d, want %d", c.err, got, c.want)
		}
	}
}

// Text from a user's file reaches stderr with its control characters
// escaped: no terminal escape sequences, no reordering of the line.
func TestOneLineEscapesControls(t *testing.T) {
	cases := map[string]string{
		"a\nb":                      `a b`,
		"bell\a and \x1b[31mred":    `bell\x07 and \x1b[31mred`,
		"osc \x1b]0;title\x07":      `osc \x1b]0;title\x07`,
		"rtl \u202eevil":            `rtl \u202eevil`,
		"c1 \u009b":                 `c1 \u009b`,
		"bad \xff byte":             `bad \xff byte`,
		"tab\tand µ°ä kept":         "tab and µ°ä kept",
		"isolate \u2066x\u2069 end": `isolate \u2066x\u2069 end`,
	}
	for in, want := range cases {
		if got := oneLine(in); got != want {
			t.Errorf("oneLine(%q) = %q, want %q", in, got, want)
		}
	}
}
