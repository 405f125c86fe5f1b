package outdir

import (
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// writeTree creates files (slash paths → content) below dir.
func writeTree(t *testing.T, dir string, files map[string]string) {
	t.Helper()
	for name, content := range files {
		path := filepath.Join(dir, filepath.FromSlash(name))
		if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, []byte(content), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// snapshot returns every file below dir with its content.
func snapshot(t *testing.T, dir string) map[string]string {
	t.Helper()
	got := map[string]string{}
	filepath.WalkDir(dir, func(path string, d os.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		b, err := os.ReadFile(path)
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(dir, path)
		got[filepath.ToSlash(rel)] = string(b)
		return nil
	})
	return got
}

// writeOutput writes a folder through Begin and Commit.
func writeOutput(t *testing.T, target string, opt Options, files map[string]string) *Output {
	t.Helper()
	o, err := Begin(target, opt)
	if err != nil {
		t.Fatal(err)
	}
	writeTree(t, o.Dir(), files)
	if err := o.Commit(); err != nil {
		t.Fatal(err)
	}
	return o
}

func TestCommitWritesStampListingEveryFile(t *testing.T) {
	target := filepath.Join(t.TempDir(), "out")
	writeOutput(t, target, Options{Version: "9.9"}, map[string]string{"summary.json": "{}", "figures/a.png": "png"})
	b, err := os.ReadFile(filepath.Join(target, StampName))
	if err != nil {
		t.Fatal(err)
	}
	var s stamp
	if err := json.Unmarshal(b, &s); err != nil {
		t.Fatal(err)
	}
	if s.WrittenBy != "pcqc" || s.Version != "9.9" || !s.Complete || !slices.Equal(s.Files, []string{"figures/a.png", "summary.json"}) {
		t.Errorf("stamp %+v", s)
	}
}

func TestCheckRefusals(t *testing.T) {
	base := t.TempDir()
	home := filepath.Join(base, "home", "user")
	work := filepath.Join(home, "proj")
	writeTree(t, work, map[string]string{"data.csv": "a,b\n", "thesis.txt": "mine", "sub/notes.txt": "n", ".git/HEAD": "ref"})
	writeTree(t, base, map[string]string{"plain-file": "x", "foreign/keep.txt": "keep", "empty/.keep-me-not": ""})
	os.Remove(filepath.Join(base, "empty", ".keep-me-not"))
	writeTree(t, base, map[string]string{
		"legacy/summary.json": `{"tool":{"name":"pcqc","version":"0.1.0"}}`, "legacy/scores.csv": "x", "legacy/figures/scree.png": "p",
		"legacy-plus/summary.json": `{"tool":{"name":"pcqc"}}`, "legacy-plus/notes.txt": "mine",
		"other-json/summary.json": `{"tool":{"name":"something-else"}}`,
		"fake-stamp/" + StampName: `{"written_by":"pcqc","complete":false,"files":[]}`, "fake-stamp/x": "x",
	})
	os.Symlink(work, filepath.Join(base, "link-to-proj"))
	stamped := filepath.Join(base, "stamped")
	writeOutput(t, stamped, Options{}, map[string]string{"summary.json": "{}"})
	stampedPlus := filepath.Join(base, "stamped-plus")
	writeOutput(t, stampedPlus, Options{}, map[string]string{"summary.json": "{}"})
	writeTree(t, stampedPlus, map[string]string{"my-notes.txt": "mine"})

	t.Setenv("HOME", home)
	wd, _ := os.Getwd()
	if err := os.Chdir(filepath.Join(work, "sub")); err != nil {
		t.Fatal(err)
	}
	defer os.Chdir(wd)
	data := filepath.Join(work, "data.csv")

	cases := []struct {
		target string
		force  bool
		reads  []string
		want   string // "" when allowed
	}{
		{"/", true, nil, "root of the file system"},
		{home, true, nil, "home folder"},
		{filepath.Dir(home), true, nil, "home folder"},
		{".", true, nil, "current folder"},
		{work, true, nil, "current folder"},
		{"..", true, nil, "current folder"},
		{"../..", true, nil, "home folder"},
		{filepath.Join(base, "link-to-proj"), true, nil, "symbolic link"},
		{filepath.Join(base, "link-to-proj", "sub"), true, nil, "current folder"},
		{filepath.Join(base, "plain-file"), true, nil, "not a folder"},
		{filepath.Join(base, "foreign"), false, nil, "use --force"},
		{filepath.Join(base, "foreign"), true, nil, "pcqc did not write"},
		{filepath.Join(base, "other-json"), true, nil, "not written by pcqc"},
		{filepath.Join(base, "fake-stamp"), true, nil, "not a complete stamp"},
		{filepath.Join(base, "legacy-plus"), true, nil, "notes.txt, which pcqc did not write"},
		{stampedPlus, true, nil, "my-notes.txt, which pcqc did not write"},
		{stamped, false, nil, "use --force"},
		{stamped, true, []string{filepath.Join(stamped, "summary.json")}, "which this run reads"},
		{filepath.Join(base, "x"), true, []string{filepath.Join(base, "x", "y", "model.json")}, "which this run reads"},
		// Allowed:
		{stamped, true, []string{data}, ""},
		{filepath.Join(base, "legacy"), true, nil, ""},
		{filepath.Join(base, "empty"), false, nil, ""},
		{filepath.Join(base, "new", "deeper"), false, []string{data}, ""},
	}
	for _, c := range cases {
		err := Check(c.target, Options{Force: c.force, Reads: c.reads})
		if c.want == "" {
			if err != nil {
				t.Errorf("%s: refused: %v", c.target, err)
			}
			continue
		}
		var refused *RefusedError
		if !errors.As(err, &refused) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s (force %v): got %v, want a refusal saying %q", c.target, c.force, err, c.want)
		}
	}
	// The data file is read: a folder holding it is refused even when it
	// is not the current folder.
	os.Chdir(base)
	if err := Check(work, Options{Force: true, Reads: []string{data}}); err == nil || !strings.Contains(err.Error(), "data.csv") {
		t.Errorf("folder holding the input: %v", err)
	}
	if got := snapshot(t, work); got["thesis.txt"] != "mine" || got[".git/HEAD"] != "ref" || len(got) != 4 {
		t.Errorf("the user's folder changed: %v", got)
	}
}

func TestForceReplacesOnlyWhatPcqcWrote(t *testing.T) {
	dir := t.TempDir()
	target := filepath.Join(dir, "out")
	writeOutput(t, target, Options{}, map[string]string{"summary.json": "old", "figures/a.png": "a", "figures/b.png": "b"})
	writeOutput(t, target, Options{Force: true}, map[string]string{"summary.json": "new"})
	got := snapshot(t, target)
	if got["summary.json"] != "new" || len(got) != 2 { // summary.json and the stamp
		t.Errorf("after --force: %v", got)
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 1 {
		t.Errorf("stray entries beside the output: %v", entries)
	}
	// A legacy folder (no stamp) is replaced too.
	legacy := filepath.Join(dir, "legacy")
	writeTree(t, legacy, map[string]string{"summary.json": `{"tool":{"name":"pcqc"}}`, "figures/x.svg": "s", "later-batch/report.md": "r"})
	writeOutput(t, legacy, Options{Force: true}, map[string]string{"summary.json": "new"})
	if got := snapshot(t, legacy); got["summary.json"] != "new" || len(got) != 2 {
		t.Errorf("legacy after --force: %v", got)
	}
}

// A file added to the old folder while pcqc runs is neither replaced nor
// deleted: Commit checks again and refuses.
func TestCommitChecksAgain(t *testing.T) {
	target := filepath.Join(t.TempDir(), "out")
	writeOutput(t, target, Options{}, map[string]string{"summary.json": "old"})
	o, err := Begin(target, Options{Force: true})
	if err != nil {
		t.Fatal(err)
	}
	writeTree(t, o.Dir(), map[string]string{"summary.json": "new"})
	writeTree(t, target, map[string]string{"added-meanwhile.txt": "mine"})
	if err := o.Commit(); err == nil {
		t.Fatal("commit replaced a folder that gained a foreign file")
	}
	if got := snapshot(t, target); got["added-meanwhile.txt"] != "mine" || got["summary.json"] != "old" {
		t.Errorf("old folder changed: %v", got)
	}
	if _, err := os.Stat(o.Dir()); !os.IsNotExist(err) {
		t.Error("temporary folder left after a refused commit")
	}
}

// removeOld keeps files it does not know and says where.
func TestRemoveOldKeepsUnlistedFiles(t *testing.T) {
	dir := t.TempDir()
	target := filepath.Join(dir, "out")
	old := filepath.Join(dir, "old")
	writeTree(t, old, map[string]string{"summary.json": `{"tool":{"name":"pcqc"}}`, "thesis.txt": "mine"})
	o := &Output{target: target}
	if err := o.removeOld(old); err != nil {
		t.Fatal(err)
	}
	if o.Leftover() == "" {
		t.Fatal("no leftover folder named")
	}
	if got := snapshot(t, o.Leftover()); got["thesis.txt"] != "mine" {
		t.Errorf("kept files: %v", got)
	}
}

func TestRemoveStaleTouchesOnlyStampedFolders(t *testing.T) {
	dir := t.TempDir()
	const deadPID = "2147483646" // beyond any pid_max, so no such process runs
	ours := filepath.Join(dir, ".out.pcqc-tmp-"+deadPID+"-1")
	theirs := filepath.Join(dir, ".out.pcqc-tmp-"+deadPID+"-2")
	writeTree(t, ours, map[string]string{StampName: `{"written_by":"pcqc","files":[]}`, "scores.csv": "x"})
	writeTree(t, theirs, map[string]string{"precious.txt": "mine"})
	removeStale(dir, "out")
	if _, err := os.Stat(ours); !os.IsNotExist(err) {
		t.Error("a dead run's temporary folder survives")
	}
	if got := snapshot(t, theirs); got["precious.txt"] != "mine" {
		t.Error("a folder without pcqc's stamp was touched")
	}
}

func TestAbortRemovesTemporaryFolder(t *testing.T) {
	dir := t.TempDir()
	o, err := Begin(filepath.Join(dir, "out"), Options{})
	if err != nil {
		t.Fatal(err)
	}
	writeTree(t, o.Dir(), map[string]string{"a/b.csv": "x"})
	o.Abort()
	if entries, _ := os.ReadDir(dir); len(entries) != 0 {
		t.Errorf("left: %v", entries)
	}
	if err := o.Commit(); !errors.Is(err, ErrAborted) {
		t.Errorf("commit after abort: %v", err)
	}
}
