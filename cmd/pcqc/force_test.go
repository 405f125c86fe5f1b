package main

import (
	"crypto/sha256"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// treeHashes returns the SHA-256 of every file below dir, and every folder.
func treeHashes(t *testing.T, dir string) map[string][32]byte {
	t.Helper()
	got := map[string][32]byte{}
	err := filepath.WalkDir(dir, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(dir, path)
		if d.IsDir() {
			got[rel+"/"] = [32]byte{}
			return nil
		}
		b, err := os.ReadFile(path)
		if err != nil {
			return err
		}
		got[rel] = sha256.Sum256(b)
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return got
}

func sameTree(a, b map[string][32]byte) bool {
	if len(a) != len(b) {
		return false
	}
	for k, v := range a {
		if w, ok := b[k]; !ok || w != v {
			return false
		}
	}
	return true
}

// --force never replaces or deletes a folder pcqc did not write, nor one
// that holds what the run reads, the current folder, the home folder or the
// root; each is refused with exit status 2 before the input is even read
// (the data file here is not a valid table, so an error about the output
// folder proves the order), and the user's files stay byte-identical.
func TestForceNeverDestroysTheUsersFiles(t *testing.T) {
	base := t.TempDir()
	home := filepath.Join(base, "home")
	proj := filepath.Join(home, "proj")
	files := map[string]string{
		"data.csv":          "this is not a table\n",
		"thesis.tex":        "chapter one",
		"sub/notes.txt":     "notes",
		".git/HEAD":         "ref: refs/heads/main\n",
		"old-audit/foo.txt": "not pcqc's",
	}
	for name, content := range files {
		path := filepath.Join(proj, filepath.FromSlash(name))
		os.MkdirAll(filepath.Dir(path), 0o755)
		os.WriteFile(path, []byte(content), 0o644)
	}
	inputs := filepath.Join(base, "inputs")
	os.MkdirAll(inputs, 0o755)
	os.WriteFile(filepath.Join(inputs, "table.csv"), []byte("not a table either\n"), 0o644)
	t.Setenv("HOME", home)
	wd, _ := os.Getwd()
	if err := os.Chdir(filepath.Join(proj, "sub")); err != nil {
		t.Fatal(err)
	}
	defer os.Chdir(wd)
	data := filepath.Join(proj, "data.csv")
	before := treeHashes(t, base)

	cases := []struct {
		name string
		args []string
		want string
	}{
		{"folder holding the input", []string{"run", filepath.Join(inputs, "table.csv"), "--out", inputs, "--force"}, "which this run reads"},
		{"folder holding input and current folder", []string{"run", data, "--out", proj, "--force"}, "current folder"},
		{"input's folder, relative", []string{"run", "../data.csv", "--out", "..", "--force"}, "current folder"},
		{"current folder", []string{"run", data, "--out", ".", "--force"}, "current folder"},
		{"current folder by its path", []string{"run", data, "--out", filepath.Join(proj, "sub"), "--force"}, "current folder"},
		{"home", []string{"run", data, "--out", home, "--force"}, "home folder"},
		{"home by tilde", []string{"run", data, "--out", home + "/", "--force"}, "home folder"},
		{"root", []string{"run", data, "--out", "/", "--force"}, "root of the file system"},
		{"a folder pcqc did not write", []string{"run", data, "--out", filepath.Join(proj, "old-audit"), "--force"}, "pcqc did not write"},
		{"the data file itself", []string{"run", data, "--out", data, "--force"}, "which this run reads"},
		{"demo into home", []string{"demo", "--out", home, "--force"}, "home folder"},
		{"review over their loadings", []string{"review", data, "--loadings", filepath.Join(proj, "sub", "notes.txt"), "--out", filepath.Join(proj, "sub"), "--force"}, "current folder"},
		{"apply into the audit folder", []string{"apply", filepath.Join(proj, "old-audit"), data, "--out", filepath.Join(proj, "old-audit"), "--force"}, "which this run reads"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			status, stdout, stderr := runPCQC(t, c.args...)
			if status != exitUsage || !strings.Contains(stderr, c.want) || strings.Count(stderr, "\n") != 1 {
				t.Errorf("status %d, stderr %q; want status 2 and one line saying %q", status, stderr, c.want)
			}
			if strings.Contains(stdout, "wrote") {
				t.Errorf("stdout says it wrote: %q", stdout)
			}
			if !sameTree(before, treeHashes(t, base)) {
				t.Fatal("the user's files changed")
			}
		})
	}
}

// --force onto a folder pcqc wrote still replaces it, stamp and all.
func TestForceReplacesStampedFolder(t *testing.T) {
	out := filepath.Join(t.TempDir(), "audit")
	for i := 0; i < 2; i++ {
		if status, _, stderr := runPCQC(t, "run", usarrestsPath, "--out", out, "--force", "--bootstrap", "0", "--format", "none"); status != exitOK {
			t.Fatalf("run %d: %d %s", i, status, stderr)
		}
	}
	stamp, err := os.ReadFile(filepath.Join(out, ".pcqc-output.json"))
	if err != nil || !strings.Contains(string(stamp), `"summary.json"`) || !strings.Contains(string(stamp), `"written_by": "pcqc"`) {
		t.Errorf("stamp: %s %v", stamp, err)
	}
}
