package main

import (
	"bytes"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// TestBadInputs runs every case in testdata/bad. NAME.want holds optional
// directives, then fragments:
//
//	args: FLAGS        extra flags for pcqc run
//	exit: ok           the input is awkward but fine: the run must succeed
//	                   (fragments are then looked for in summary.json,
//	                   report.md and scores.csv); without it the run must fail with status 2,
//	                   a one-line error holding every fragment, and no output
//	                   folder
//	generate: NAME     the data file is built by the test (too large to keep)
//	command: apply     score the file with pcqc apply against an audit of
//	                   testdata/datasets/usarrests.csv instead of running it
func TestBadInputs(t *testing.T) {
	// The audit folder for the apply cases, made once by the first of them.
	var audit string
	auditParent := t.TempDir()
	wants, err := filepath.Glob("../../testdata/bad/*.want")
	if err != nil || len(wants) == 0 {
		t.Fatalf("no cases found: %v", err)
	}
	for _, want := range wants {
		name := strings.TrimSuffix(filepath.Base(want), ".want")
		t.Run(name, func(t *testing.T) {
			spec, err := os.ReadFile(want)
			if err != nil {
				t.Fatal(err)
			}
			var extra, fragments []string
			ok, generate, apply := false, "", ""
			for _, line := range strings.Split(strings.TrimRight(string(spec), "\n"), "\n") {
				switch {
				case strings.HasPrefix(line, "args: "):
					extra = strings.Fields(strings.TrimPrefix(line, "args: "))
				case line == "exit: ok":
					ok = true
				case strings.HasPrefix(line, "generate: "):
					generate = strings.TrimPrefix(line, "generate: ")
				case line == "command: apply":
					if audit == "" {
						audit = applyAudit(t, auditParent)
					}
					apply = audit
				default:
					fragments = append(fragments, line)
				}
			}
			dir := t.TempDir()
			var input string
			if generate != "" {
				input = generateBadInput(t, dir, generate)
			} else {
				data, _ := filepath.Glob(filepath.Join(filepath.Dir(want), name+".*"))
				for _, d := range data {
					if !strings.HasSuffix(d, ".want") {
						input = d
					}
				}
			}
			if input == "" {
				t.Fatalf("no data file for %s", name)
			}
			out := filepath.Join(dir, "out")
			// Run from the data file's folder so that messages name the file
			// as the user typed it.
			abs, _ := filepath.Abs(input)
			wd, _ := os.Getwd()
			os.Chdir(filepath.Dir(abs))
			defer os.Chdir(wd)
			var stdout, stderr bytes.Buffer
			args := append([]string{"run", filepath.Base(abs), "--out", out}, extra...)
			if apply != "" {
				args[0] = "apply"
				args = append([]string{args[0], apply}, args[1:]...)
			}
			if ok {
				args = append(args, "--bootstrap", "20", "--permutations", "20", "--fail-on", "never")
				if !slices.Contains(extra, "--format") {
					args = append(args, "--format", "none")
				}
			}
			status := mainWithArgs(args, &stdout, &stderr)
			msg := stderr.String()
			if ok {
				if status != exitOK {
					t.Fatalf("exit status %d, want success; stderr: %s", status, msg)
				}
				var all strings.Builder
				for _, f := range []string{"summary.json", "report.md", "scores.csv"} {
					b, _ := os.ReadFile(filepath.Join(out, f))
					all.Write(b)
				}
				for _, f := range fragments {
					if !strings.Contains(all.String(), f) {
						t.Errorf("no output (summary.json, report.md, scores.csv) contains %q", f)
					}
				}
				return
			}
			if status != exitUsage {
				t.Errorf("exit status %d, want %d; stderr: %s", status, exitUsage, msg)
			}
			if strings.Count(msg, "\n") != 1 || len(msg) > 2000 {
				t.Errorf("error is not one short line (%d bytes): %.300q", len(msg), msg)
			}
			for _, f := range fragments {
				if !strings.Contains(msg, f) {
					t.Errorf("error %q does not contain %q", msg, f)
				}
			}
			if _, err := os.Stat(out); !os.IsNotExist(err) {
				t.Errorf("output folder exists after a failed run")
			}
			if left, _ := filepath.Glob(filepath.Join(dir, ".out.pcqc-tmp-*")); len(left) > 0 {
				t.Errorf("temporary folders left behind: %v", left)
			}
		})
	}
}

// applyAudit writes an audit of USArrests into parent, for the cases scored
// by apply.
func applyAudit(t *testing.T, parent string) string {
	t.Helper()
	train, err := filepath.Abs(usarrestsPath)
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(parent, "audit")
	var stdout, stderr bytes.Buffer
	if status := mainWithArgs([]string{"run", train, "--out", dir, "--format", "none", "--bootstrap", "0", "--permutations", "20"}, &stdout, &stderr); status != exitOK {
		t.Fatalf("audit for the apply cases: status %d: %s", status, stderr.String())
	}
	return dir
}

// generateBadInput builds the inputs too large to keep in the repository.
func generateBadInput(t *testing.T, dir, kind string) string {
	t.Helper()
	switch kind {
	case "long-line":
		// 100 ordinary rows, then one line of 20 MB in a numeric column.
		var b strings.Builder
		b.WriteString("id,a,b\n")
		for i := 1; i <= 101; i++ {
			b.WriteString("s" + strings.Repeat("1", 1) + ",1.5,2.5\n")
		}
		b.WriteString("big," + strings.Repeat("x", 20_000_000) + ",1\n")
		return writeFile(t, dir, "long-line.csv", b.String())
	}
	t.Fatalf("unknown generated input %q", kind)
	return ""
}
