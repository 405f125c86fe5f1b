package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

var irisPath = filepath.Join("..", "..", "testdata", "datasets", "iris.csv")

// reproduceLine returns the command of a report's Reproduce section, split
// into arguments as a POSIX shell would (bare words and '…' quotes, which
// is all shellQuote writes for plain text).
func reproduceLine(t *testing.T, report string) []string {
	t.Helper()
	b, err := os.ReadFile(report)
	if err != nil {
		t.Fatal(err)
	}
	_, after, ok := strings.Cut(string(b), "## Reproduce")
	if !ok {
		t.Fatalf("%s has no Reproduce section", report)
	}
	var line string
	for _, l := range strings.Split(after, "\n") {
		if strings.HasPrefix(l, "pcqc ") {
			line = l
			break
		}
	}
	var args []string
	var cur strings.Builder
	inWord, quoted := false, false
	for _, r := range line {
		switch {
		case r == '\'':
			quoted, inWord = !quoted, true
		case r == ' ' && !quoted:
			if inWord {
				args = append(args, cur.String())
				cur.Reset()
			}
			inWord = false
		default:
			cur.WriteRune(r)
			inWord = true
		}
	}
	if inWord {
		args = append(args, cur.String())
	}
	return args
}

// optionsOf returns summary.json's options object, as written.
func optionsOf(t *testing.T, dir string) string {
	t.Helper()
	var s struct{ Options json.RawMessage }
	b, err := os.ReadFile(filepath.Join(dir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &s); err != nil {
		t.Fatal(err)
	}
	return string(s.Options)
}

// rerun runs a Reproduce line (without its leading "pcqc") into out, and
// returns the folder written.
func rerun(t *testing.T, line []string, out string) {
	t.Helper()
	args := append(line[1:len(line):len(line)], "--out", out)
	if status, _, stderr := runPCQC(t, args...); status > exitChecks {
		t.Fatalf("re-running %q: %d %s", line, status, stderr)
	}
}

// apply takes the model file's path as well as the audit folder, and the
// two give the same results; a model file that is not there is an input
// error naming it.
func TestApplyTakesTheModelFile(t *testing.T) {
	dir := t.TempDir()
	audit := filepath.Join(dir, "audit")
	if status, _, stderr := runPCQC(t, "run", usarrestsPath, "--out", audit, "--bootstrap", "0", "--format", "none", "--components", "2"); status != exitOK {
		t.Fatal(stderr)
	}
	byDir, byFile := filepath.Join(dir, "by-dir"), filepath.Join(dir, "by-file")
	for _, c := range []struct{ model, out string }{{audit, byDir}, {filepath.Join(audit, "model.json"), byFile}} {
		if status, stdout, stderr := runPCQC(t, "apply", c.model, usarrestsPath, "--out", c.out, "--format", "none"); status != exitOK || !strings.Contains(stdout, "50 new samples scored") {
			t.Fatalf("apply %s: %d %s %s", c.model, status, stdout, stderr)
		}
	}
	for _, name := range []string{"scores.csv", "samples.csv", "summary.json"} {
		a, _ := os.ReadFile(filepath.Join(byDir, name))
		b, _ := os.ReadFile(filepath.Join(byFile, name))
		if len(a) == 0 || !bytes.Equal(a, b) {
			t.Errorf("%s differs between the folder and the model file", name)
		}
	}
	// A copy of the model under another name, away from scores.csv, is
	// read too: the training scores are then simply not drawn.
	moved := filepath.Join(dir, "elsewhere", "survey-model.json")
	os.MkdirAll(filepath.Dir(moved), 0o755)
	b, _ := os.ReadFile(filepath.Join(audit, "model.json"))
	os.WriteFile(moved, b, 0o644)
	if status, _, stderr := runPCQC(t, "apply", moved, usarrestsPath, "--out", filepath.Join(dir, "moved"), "--format", "none"); status != exitOK {
		t.Errorf("renamed model: %d %s", status, stderr)
	}
	missing := filepath.Join(audit, "nosuch.json")
	args := []string{"apply", missing, usarrestsPath, "--out", filepath.Join(dir, "x")}
	status, _, stderr := runPCQC(t, args...)
	checkOneLine(t, args, status, stderr, "nosuch.json")
	if _, err := os.Stat(filepath.Join(dir, "x")); err == nil {
		t.Error("output written for a missing model")
	}
}

// The Reproduce line of an apply report records every option in force,
// --group among them, and running it gives the same options again; options
// that change nothing (--quiet, --threads, --force) are not recorded.
func TestApplyReproduceLineRecordsEveryOption(t *testing.T) {
	dir := t.TempDir()
	audit := filepath.Join(dir, "audit")
	if status, _, stderr := runPCQC(t, "run", irisPath, "--group", "species", "--out", audit, "--bootstrap", "0", "--format", "none", "--components", "2"); status != exitOK {
		t.Fatal(stderr)
	}
	cases := []struct {
		name  string
		args  []string
		want  []string
		never []string
	}{
		{"group and policies", []string{"--group", "species", "--missing", "drop", "--fail-on", "never", "--quiet", "--threads", "1", "--title", "Iris, again"},
			[]string{"--group species", "--missing drop", "--fail-on never", "--title 'Iris, again'", "--format md"}, []string{"--quiet", "--threads", "--force"}},
		{"model file, defaults", []string{"--format", "md"}, []string{"--format md"}, []string{"--group", "--missing", "--fail-on"}},
	}
	for i, c := range cases {
		out := filepath.Join(dir, c.name)
		model := audit
		if i == 1 {
			model = filepath.Join(audit, "model.json")
		}
		args := append([]string{"apply", model, irisPath, "--out", out, "--format", "md"}, c.args...)
		if status, _, stderr := runPCQC(t, args...); status != exitOK {
			t.Fatalf("%s: %d %s", c.name, status, stderr)
		}
		line := reproduceLine(t, filepath.Join(out, "report.md"))
		text := strings.Join(line, " ")
		for _, w := range c.want {
			if !strings.Contains(shellText(line), w) {
				t.Errorf("%s: Reproduce line %q lacks %q", c.name, text, w)
			}
		}
		for _, w := range c.never {
			if strings.Contains(text, w) {
				t.Errorf("%s: Reproduce line %q records %q", c.name, text, w)
			}
		}
		if line[2] != model || line[3] != irisPath {
			t.Errorf("%s: Reproduce line %q does not name the model and data given", c.name, text)
		}
		again := filepath.Join(dir, c.name+"-again")
		rerun(t, line, again)
		if a, b := optionsOf(t, out), optionsOf(t, again); a != b {
			t.Errorf("%s: re-running the Reproduce line changed the options:\n%s\n%s", c.name, a, b)
		}
	}
}

// shellText joins arguments quoting those with spaces, as the report does,
// so that tests can look for "--title 'Iris, again'".
func shellText(args []string) string {
	out := make([]string, len(args))
	for i, a := range args {
		out[i] = a
		if strings.ContainsAny(a, " ,") {
			out[i] = "'" + a + "'"
		}
	}
	return strings.Join(out, " ")
}

// The demo's later batch is applied with the demo's id and group columns
// and its own title; its Reproduce line says so, and run from the demo's
// folder it gives the same options.
func TestDemoLaterBatchReproduceLine(t *testing.T) {
	skipRenderingWhenShort(t)
	out := filepath.Join(t.TempDir(), "demo")
	if status, _, stderr := runPCQC(t, "demo", "--out", out, "--bootstrap", "0", "--permutations", "50", "--format", "md"); status != exitOK {
		t.Fatalf("%d %s", status, stderr)
	}
	sub := filepath.Join(out, "later-batch")
	line := reproduceLine(t, filepath.Join(sub, "report.md"))
	text := shellText(line)
	for _, w := range []string{"pcqc apply . later-batch/demo-later-batch.csv", "--id sample_id", "--group station", "--format md", "--title 'Later batch"} {
		if !strings.Contains(text, w) {
			t.Errorf("Reproduce line %q lacks %q", text, w)
		}
	}
	// Run it as from the demo's folder.
	line[2], line[3] = out, filepath.Join(out, line[3])
	again := filepath.Join(t.TempDir(), "again")
	rerun(t, line, again)
	if a, b := optionsOf(t, sub), optionsOf(t, again); a != b {
		t.Errorf("re-running the later batch's Reproduce line changed the options:\n%s\n%s", a, b)
	}
}
