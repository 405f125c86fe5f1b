package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestBadInputs runs every case in testdata/bad: NAME.want holds an optional
// "args:" line with extra flags, then fragments that the one-line error must
// contain. Every case must exit with status 2 and leave no output folder.
func TestBadInputs(t *testing.T) {
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
			data, err := filepath.Glob(filepath.Join(filepath.Dir(want), name+".*"))
			if err != nil {
				t.Fatal(err)
			}
			var input string
			for _, d := range data {
				if !strings.HasSuffix(d, ".want") {
					input = d
				}
			}
			if input == "" {
				t.Fatalf("no data file for %s", name)
			}
			var extra []string
			var fragments []string
			for _, line := range strings.Split(strings.TrimRight(string(spec), "\n"), "\n") {
				if a, ok := strings.CutPrefix(line, "args: "); ok {
					extra = strings.Fields(a)
					continue
				}
				fragments = append(fragments, line)
			}
			out := filepath.Join(t.TempDir(), "out")
			// Run from the data file's folder so that messages name the file
			// as the user typed it.
			abs, _ := filepath.Abs(input)
			wd, _ := os.Getwd()
			os.Chdir(filepath.Dir(abs))
			defer os.Chdir(wd)
			var stdout, stderr bytes.Buffer
			args := append([]string{"run", filepath.Base(abs), "--out", out}, extra...)
			status := mainWithArgs(args, &stdout, &stderr)
			msg := stderr.String()
			if status != exitUsage {
				t.Errorf("exit status %d, want %d; stderr: %s", status, exitUsage, msg)
			}
			if strings.Count(msg, "\n") != 1 {
				t.Errorf("error is not exactly one line: %q", msg)
			}
			for _, f := range fragments {
				if !strings.Contains(msg, f) {
					t.Errorf("error %q does not contain %q", msg, f)
				}
			}
			if _, err := os.Stat(out); !os.IsNotExist(err) {
				t.Errorf("output folder exists after a failed run")
			}
			if left, _ := filepath.Glob(filepath.Join(filepath.Dir(out), ".out.pcqc-tmp-*")); len(left) > 0 {
				t.Errorf("temporary folders left behind: %v", left)
			}
		})
	}
}
