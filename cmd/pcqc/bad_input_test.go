package main

import (
	"bytes"
	"fmt"
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
//	apply: model       the file is an audit folder's model.json, applied to
//	                   usarrests.csv (instead of a data file for run)
//	apply: scores      the file is an audit folder's scores.csv, beside
//	                   usarrests-model.json as its model.json
//	apply: data        the file is new data, scored against
//	                   usarrests-model.json
//	review: ROLE       the file is review's --loadings, --scores or
//	                   --variance (ROLE) for usarrests.csv; --loadings is
//	                   usarrests-loadings.csv when ROLE is another
func TestBadInputs(t *testing.T) {
	wants, err := filepath.Glob("../../testdata/bad/*.want")
	if err != nil || len(wants) == 0 {
		t.Fatalf("no cases found: %v", err)
	}
	testdata, err := filepath.Abs(filepath.Join("..", "..", "testdata"))
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range wants {
		name := strings.TrimSuffix(filepath.Base(want), ".want")
		t.Run(name, func(t *testing.T) {
			spec, err := os.ReadFile(want)
			if err != nil {
				t.Fatal(err)
			}
			var extra, fragments []string
			ok, generate, mode, role := false, "", "run", ""
			for _, line := range strings.Split(strings.TrimRight(string(spec), "\n"), "\n") {
				switch {
				case strings.HasPrefix(line, "args: "):
					extra = strings.Fields(strings.TrimPrefix(line, "args: "))
				case line == "exit: ok":
					ok = true
				case strings.HasPrefix(line, "generate: "):
					generate = strings.TrimPrefix(line, "generate: ")
				case strings.HasPrefix(line, "apply: "), strings.HasPrefix(line, "review: "):
					mode, role, _ = strings.Cut(line, ": ")
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
			args := append(caseArgs(t, testdata, mode, role, filepath.Base(abs), dir, out), extra...)
			if ok {
				if mode != "apply" {
					args = append(args, "--bootstrap", "20", "--permutations", "20")
				}
				args = append(args, "--fail-on", "never")
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

// caseArgs returns the command line of a case run from the folder of its
// file: run on the file, apply of an audit folder (built in dir) holding it,
// or review with it in one of the roles. testdata is the absolute path of
// the repository's testdata folder.
func caseArgs(t *testing.T, testdata, mode, role, file, dir, out string) []string {
	t.Helper()
	bad := filepath.Join(testdata, "bad")
	data := filepath.Join(testdata, "datasets", "usarrests.csv")
	switch mode {
	case "run":
		return []string{"run", file, "--out", out}
	case "apply":
		audit := filepath.Join(dir, "audit")
		os.MkdirAll(audit, 0o755)
		copyTo := func(from, to string) {
			b, err := os.ReadFile(from)
			if err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(filepath.Join(audit, to), b, 0o644); err != nil {
				t.Fatal(err)
			}
		}
		switch role {
		case "model":
			copyTo(file, "model.json")
		case "scores":
			copyTo(filepath.Join(bad, "usarrests-model.json"), "model.json")
			copyTo(file, "scores.csv")
		case "data":
			copyTo(filepath.Join(bad, "usarrests-model.json"), "model.json")
			return []string{"apply", audit, file, "--out", out}
		default:
			t.Fatalf("unknown apply role %q", role)
		}
		return []string{"apply", audit, data, "--out", out}
	case "review":
		args := []string{"review", data, "--out", out}
		if role != "loadings" {
			args = append(args, "--loadings", filepath.Join(bad, "usarrests-loadings.csv"))
		}
		if !slices.Contains([]string{"loadings", "scores", "variance"}, role) {
			t.Fatalf("unknown review role %q", role)
		}
		return append(args, "--"+role, file)
	}
	t.Fatalf("unknown mode %q", mode)
	return nil
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
	case "unmatched-loadings":
		// The loadings of usarrests, then 200,000 rows naming no variable.
		b, err := os.ReadFile(filepath.Join("..", "..", "testdata", "bad", "usarrests-loadings.csv"))
		if err != nil {
			t.Fatal(err)
		}
		var s strings.Builder
		s.Write(b)
		for i := 0; i < 200_000; i++ {
			fmt.Fprintf(&s, "other%d,0.1,0.2\n", i)
		}
		return writeFile(t, dir, "unmatched-loadings.csv", s.String())
	}
	t.Fatalf("unknown generated input %q", kind)
	return ""
}
