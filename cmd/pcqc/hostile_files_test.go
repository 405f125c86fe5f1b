//go:build unix

package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// Audit folders and review files that are not regular files — a FIFO, a
// link to /dev/zero, a folder, a device — are refused at once with exit
// status 2, one line naming the file and what it is, and no output folder.
// Every command runs under a timeout, so a read that blocks fails the test
// instead of hanging CI. A missing scores.csv only loses the training
// background.
func TestHostileAuditFoldersAndReviewFiles(t *testing.T) {
	dir := t.TempDir()
	bad, _ := filepath.Abs(filepath.Join("..", "..", "testdata", "bad"))
	data, _ := filepath.Abs(usarrestsPath)
	model, err := os.ReadFile(filepath.Join(bad, "usarrests-model.json"))
	if err != nil {
		t.Fatal(err)
	}
	loadings := filepath.Join(bad, "usarrests-loadings.csv")
	fifo := func(path string) string {
		if err := syscall.Mkfifo(path, 0o644); err != nil {
			t.Skipf("cannot make a FIFO here: %v", err)
		}
		return path
	}
	link := func(path, target string) string {
		if err := os.Symlink(target, path); err != nil {
			t.Fatal(err)
		}
		return path
	}
	// audit makes an audit folder; place puts model.json or scores.csv in
	// it, or leaves a name to be made by the case.
	audit := func(name string, place func(dir string)) string {
		d := filepath.Join(dir, name)
		os.MkdirAll(d, 0o755)
		place(d)
		return d
	}
	goodModel := func(d string) { os.WriteFile(filepath.Join(d, "model.json"), model, 0o644) }
	cases := []struct {
		name string
		args []string
		want string // "" for success
	}{
		{"model.json links to /dev/zero", []string{"apply", audit("zero", func(d string) { link(filepath.Join(d, "model.json"), "/dev/zero") }), data},
			"model.json: cannot read the model: it is a character device, not a regular file"},
		{"model.json is a FIFO", []string{"apply", audit("fifo", func(d string) { fifo(filepath.Join(d, "model.json")) }), data},
			"model.json: cannot read the model: it is a named pipe (FIFO)"},
		{"model.json is a folder", []string{"apply", audit("folder", func(d string) { os.Mkdir(filepath.Join(d, "model.json"), 0o755) }), data},
			"model.json: cannot read the model: it is a folder"},
		{"scores.csv is a FIFO", []string{"apply", audit("scores-fifo", func(d string) { goodModel(d); fifo(filepath.Join(d, "scores.csv")) }), data},
			"scores.csv: cannot read the training scores: it is a named pipe (FIFO)"},
		{"scores.csv links to /dev/zero", []string{"apply", audit("scores-zero", func(d string) { goodModel(d); link(filepath.Join(d, "scores.csv"), "/dev/zero") }), data},
			"scores.csv: cannot read the training scores: it is a character device"},
		{"scores.csv is missing", []string{"apply", audit("no-scores", goodModel), data}, ""},
		{"loadings are a FIFO", []string{"review", data, "--loadings", fifo(filepath.Join(dir, "l.fifo"))},
			"l.fifo: cannot read the table: it is a named pipe (FIFO)"},
		{"loadings are /dev/null", []string{"review", data, "--loadings", "/dev/null"},
			"/dev/null: cannot read the table: it is a character device"},
		{"scores link to /dev/zero", []string{"review", data, "--loadings", loadings, "--scores", link(filepath.Join(dir, "s.csv"), "/dev/zero")},
			"s.csv: cannot read the table: it is a character device"},
		{"variance is a folder", []string{"review", data, "--loadings", loadings, "--variance", dir},
			"cannot read the table: it is a folder"},
		{"variance is a FIFO", []string{"review", data, "--loadings", loadings, "--variance", fifo(filepath.Join(dir, "v.fifo"))},
			"v.fifo: cannot read the table: it is a named pipe (FIFO)"},
	}
	for i, c := range cases {
		out := filepath.Join(dir, "out", string(rune('a'+i)))
		args := append(c.args, "--out", out, "--format", "none", "--fail-on", "never")
		var stdout, stderr bytes.Buffer
		done := make(chan int, 1)
		go func() { done <- mainWithArgs(args, &stdout, &stderr) }()
		var status int
		select {
		case status = <-done:
		case <-time.After(20 * time.Second):
			t.Fatalf("%s: still running after 20 s", c.name)
		}
		msg := stderr.String()
		if strings.Contains(msg, "panic:") || strings.Contains(msg, "goroutine") {
			t.Fatalf("%s: %s", c.name, msg)
		}
		if c.want == "" {
			if status != exitOK {
				t.Errorf("%s: status %d, %s", c.name, status, msg)
			}
			continue
		}
		if status != exitUsage || strings.Count(msg, "\n") != 1 || !strings.Contains(msg, c.want) {
			t.Errorf("%s: status %d, stderr %q; want status 2 and one line with %q", c.name, status, msg, c.want)
		}
		if _, err := os.Stat(out); !os.IsNotExist(err) {
			t.Errorf("%s: output folder created", c.name)
		}
	}
}
