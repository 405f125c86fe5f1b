package main

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"pcqc/analysis"
)

// quick are the flags that make a run on a small table fast.
var quick = []string{"--bootstrap", "0", "--permutations", "0", "--components", "1", "--format", "none", "--fail-on", "never"}

// refused runs pcqc with args, which must fail as an input error: status 2,
// one line on stderr holding every fragment and no control character, no
// panic, and no output folder at out.
func refused(t *testing.T, out string, fragments []string, args ...string) string {
	t.Helper()
	status, _, stderr := runPCQC(t, args...)
	if status != exitUsage {
		t.Errorf("%v: status %d, want %d; stderr %q", args, status, exitUsage, stderr)
	}
	if strings.Count(stderr, "\n") != 1 || !strings.HasSuffix(stderr, "\n") {
		t.Errorf("%v: stderr is not one line: %q", args, stderr)
	}
	for _, r := range strings.TrimSuffix(stderr, "\n") {
		if r < 0x20 || r == 0x7f || r >= 0x80 && r <= 0x9f || r >= 0x202a && r <= 0x202e || r >= 0x2066 && r <= 0x2069 {
			t.Errorf("%v: stderr holds %U: %q", args, r, stderr)
		}
	}
	for _, f := range append(fragments, "") {
		if !strings.Contains(stderr, f) {
			t.Errorf("%v: stderr %q lacks %q", args, stderr, f)
		}
	}
	if strings.Contains(stderr, "panic:") || strings.Contains(stderr, "goroutine") {
		t.Errorf("%v: %s", args, stderr)
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("%v: output folder %s exists after a refused run", args, out)
	}
	return stderr
}

// feed writes text to the named pipe path once a reader opens it; the
// channel closes when the writer has closed the pipe (the reader may stop
// early).
func feed(path string, text []byte) chan struct{} {
	done := make(chan struct{})
	go func() {
		defer close(done)
		f, err := os.OpenFile(path, os.O_WRONLY, 0)
		if err != nil {
			return
		}
		f.Write(text)
		f.Close()
	}()
	return done
}

// Devices are refused before they are read, through a link too; a named
// pipe of zeros is refused for its NUL bytes, not called UTF-16; a named
// pipe of data (process substitution) is read.
func TestSpecialInputFiles(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	if _, err := os.Stat("/dev/zero"); err == nil {
		link := filepath.Join(dir, "zero.csv")
		if err := os.Symlink("/dev/zero", link); err != nil {
			t.Fatal(err)
		}
		for _, path := range []string{"/dev/zero", link} {
			refused(t, out, []string{path + ": is a device, not a data table"}, "run", path, "--out", out)
		}
	}
	fifo := filepath.Join(dir, "pipe.csv")
	if err := syscall.Mkfifo(fifo, 0o600); err != nil {
		t.Skipf("no named pipes here: %v", err)
	}
	written := feed(fifo, make([]byte, 1<<20))
	if msg := refused(t, out, []string{"pipe.csv:1:1", "NUL"}, "run", fifo, "--out", out); strings.Contains(msg, "UTF-16") {
		t.Errorf("zeros called UTF-16: %s", msg)
	}
	select {
	case <-written:
	case <-time.After(20 * time.Second):
		t.Error("the writer of the pipe is still blocked: pcqc did not open it")
		if f, err := os.OpenFile(fifo, os.O_RDONLY|syscall.O_NONBLOCK, 0); err == nil {
			f.Close() // lets the writer's open return
		}
	}
	data, err := os.ReadFile(usarrestsPath)
	if err != nil {
		t.Fatal(err)
	}
	feed(fifo, data)
	if status, _, stderr := runPCQC(t, append([]string{"run", fifo, "--out", out}, quick...)...); status != exitOK {
		t.Fatalf("named pipe of data: status %d %s", status, stderr)
	}
	var s struct {
		Input struct {
			Rows int `json:"rows"`
		} `json:"input"`
	}
	b, _ := os.ReadFile(filepath.Join(out, "summary.json"))
	if json.Unmarshal(b, &s); s.Input.Rows != 50 {
		t.Errorf("named pipe of data: %d rows", s.Input.Rows)
	}
}

// latin1 turns UTF-8 text into Latin-1 bytes (every character of the tests'
// text is in Latin-1).
func latin1(s string) string {
	var b strings.Builder
	for _, r := range s {
		b.WriteByte(byte(r))
	}
	return b.String()
}

// The case: a Latin-1 export. Without --encoding it is refused with
// what to do; with it, run converts it and records the encoding, and apply
// scores the same file against the model (reading it in the training
// encoding unless told otherwise).
func TestLatin1RunThenApply(t *testing.T) {
	dir := t.TempDir()
	data, err := os.ReadFile(usarrestsPath)
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Replace(string(data), "UrbanPop", "Städtisch µ°", 1)
	text = strings.Replace(text, "Alabama", "Alabamä", 1)
	path := writeFile(t, dir, "arrests.csv", latin1(text))
	audit := filepath.Join(dir, "audit")

	refused(t, audit, []string{"arrests.csv:1:4", "not UTF-8", `\xe4 (ä in Latin-1 and Windows-1252)`, "--encoding latin1"}, "run", path, "--out", audit)
	refused(t, audit, []string{`invalid --encoding "latin9"`}, "run", path, "--out", audit, "--encoding", "latin9")

	if status, _, stderr := runPCQC(t, append([]string{"run", path, "--out", audit, "--encoding", "latin1"}, quick...)...); status != exitOK {
		t.Fatalf("run --encoding latin1: status %d %s", status, stderr)
	}
	var summary struct {
		Input struct {
			SHA256    string   `json:"sha256"`
			Variables []string `json:"variables"`
		} `json:"input"`
		Options map[string]any `json:"options"`
	}
	b, _ := os.ReadFile(filepath.Join(audit, "summary.json"))
	if err := json.Unmarshal(b, &summary); err != nil {
		t.Fatal(err)
	}
	if summary.Options["encoding"] != "latin1" || !strings.Contains(fmt.Sprint(summary.Input.Variables), "Städtisch µ°") {
		t.Errorf("summary.json: encoding %v, variables %q", summary.Options["encoding"], summary.Input.Variables)
	}
	model, err := analysis.LoadModel(filepath.Join(audit, "model.json"))
	if err != nil {
		t.Fatal(err)
	}
	if model.Input.Encoding != "latin1" || model.Input.SHA256 != summary.Input.SHA256 || !strings.Contains(fmt.Sprint(model.Variables), "Städtisch µ°") {
		t.Errorf("model.json input %+v, variables %q", model.Input, model.Variables)
	}
	scores := readCSV(t, filepath.Join(audit, "scores.csv"))
	if scores[1][0] != "Alabamä" {
		t.Errorf("scores.csv: first id %q", scores[1][0])
	}

	applied := filepath.Join(dir, "applied")
	if status, _, stderr := runPCQC(t, "apply", audit, path, "--out", applied, "--format", "none", "--fail-on", "never"); status != exitOK {
		t.Fatalf("apply of the training file: status %d %s", status, stderr)
	}
	b, _ = os.ReadFile(filepath.Join(applied, "summary.json"))
	if !strings.Contains(string(b), `"encoding": "latin1"`) {
		t.Errorf("apply's summary.json does not record latin1")
	}
	refused(t, filepath.Join(dir, "applied-utf8"), []string{"not UTF-8"}, "apply", audit, path, "--out", filepath.Join(dir, "applied-utf8"), "--encoding", "utf-8")
}

// Review reads their tables in the encoding given: a Latin-1 loadings file
// names a Latin-1 variable.
func TestReviewReadsTheirTablesInTheEncoding(t *testing.T) {
	dir := t.TempDir()
	o := usarrestsOther(t, true, analysis.ScaleUnit, 2)
	data, err := os.ReadFile(usarrestsPath)
	if err != nil {
		t.Fatal(err)
	}
	rename := func(s string) string { return latin1(strings.ReplaceAll(s, "UrbanPop", "Städtisch")) }
	path := writeFile(t, dir, "arrests.csv", rename(string(data)))
	loadings := writeFile(t, dir, "loadings.csv", rename(o.LoadingsCSV(";", func(a int) string { return fmt.Sprintf("Achse %d", a+1) })))
	out := filepath.Join(dir, "out")
	status, _, stderr := runPCQC(t, "review", path, "--loadings", loadings, "--encoding", "latin1", "--out", out,
		"--bootstrap", "0", "--permutations", "20", "--format", "none", "--fail-on", "never")
	if status != exitOK {
		t.Fatalf("review --encoding latin1: status %d %s", status, stderr)
	}
	s := readSummaryFile[reviewSummary](t, out)
	if st := s.status("review-subspace"); st != "pass" {
		t.Errorf("review-subspace %s: %s", st, s.message("review-subspace"))
	}
	// The data in UTF-8 and their loadings still in Latin-1: refused at
	// the loadings' bad byte.
	utf8Data := writeFile(t, dir, "arrests-utf8.csv", strings.ReplaceAll(string(data), "UrbanPop", "Städtisch"))
	refused(t, filepath.Join(dir, "out2"), []string{"loadings.csv:", "not UTF-8"}, "review", utf8Data, "--loadings", loadings, "--out", filepath.Join(dir, "out2"))
}

// Hostile text in a column name, a cell or a flag value reaches stderr
// escaped.
func TestControlCharactersEscapedOnStderr(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	osc := "\x1b]0;owned\x07"
	path := writeFile(t, dir, "t.csv", "id,a"+osc+",b\u202e\ns1,1,2\ns2,3,x\x1b[2J\ns3,4,5\ns4,2,2\n")
	refused(t, out, []string{`t.csv:3:3 (b\u202e)`, `"x\x1b[2J"`}, "run", path, "--out", out)
	refused(t, out, []string{`"c\x1b[31m"`, `a\x1b]0;owned\x07`}, "run", path, "--out", out, "--id", "c\x1b[31m")
}
