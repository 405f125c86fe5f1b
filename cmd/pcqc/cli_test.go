package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func runPCQC(t *testing.T, args ...string) (status int, stdout, stderr string) {
	t.Helper()
	var o, e bytes.Buffer
	status = mainWithArgs(args, &o, &e)
	return status, o.String(), e.String()
}

func readCSV(t *testing.T, path string) [][]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return rows
}

func TestDemoWritesAllOutputs(t *testing.T) {
	skipRenderingWhenShort(t)
	out := filepath.Join(t.TempDir(), "demo")
	status, stdout, stderr := runPCQC(t, "demo", "--out", out)
	if status != exitOK {
		t.Fatalf("status %d: %s", status, stderr)
	}
	if !strings.Contains(stdout, "invented") {
		t.Errorf("demo does not say its data are invented: %q", stdout)
	}
	for _, name := range []string{"demo-data.csv", "variance.csv", "loadings.csv", "scores.csv", "samples.csv", "summary.json"} {
		if st, err := os.Stat(filepath.Join(out, name)); err != nil || st.Size() == 0 {
			t.Errorf("%s missing or empty: %v", name, err)
		}
	}
	variance := readCSV(t, filepath.Join(out, "variance.csv"))
	if !strings.HasPrefix(strings.Join(variance[0], ","), "component,eigenvalue,percent,cumulative_percent,") || len(variance) != 14 {
		t.Errorf("variance.csv: header %v, %d rows (want 13 components)", variance[0], len(variance)-1)
	}
	scores := readCSV(t, filepath.Join(out, "scores.csv"))
	if scores[0][0] != "sample_id" || len(scores) != 241 || scores[1][0] != "ST01-2024-01" {
		t.Errorf("scores.csv: header %v, %d rows, first id %q", scores[0], len(scores)-1, scores[1][0])
	}
	loadings := readCSV(t, filepath.Join(out, "loadings.csv"))
	if loadings[0][0] != "variable" || len(loadings) != 14 || len(loadings[0]) != len(scores[0]) {
		t.Errorf("loadings.csv: header %v, %d rows", loadings[0], len(loadings)-1)
	}
	samples := readCSV(t, filepath.Join(out, "samples.csv"))
	if strings.Join(samples[0], ",") != "sample_id,t2,q,leverage,beyond,influence_deg,eigenvalue_change" || len(samples) != 241 {
		t.Errorf("samples.csv: header %v, %d rows", samples[0], len(samples)-1)
	}
	var summary map[string]any
	b, _ := os.ReadFile(filepath.Join(out, "summary.json"))
	if err := json.Unmarshal(b, &summary); err != nil {
		t.Fatal(err)
	}
	for _, key := range []string{"tool", "input", "options", "components", "limits", "checks", "verdict"} {
		if _, ok := summary[key]; !ok {
			t.Errorf("summary.json lacks %q", key)
		}
	}
	input := summary["input"].(map[string]any)
	if input["group_column"] != "station" || input["id_column"] != "sample_id" || len(input["sha256"].(string)) != 64 {
		t.Errorf("summary input: %v", input)
	}
	for _, c := range summary["checks"].([]any) {
		m := c.(map[string]any)
		for _, key := range []string{"id", "title", "status", "value", "limit", "message", "source"} {
			if _, ok := m[key]; !ok {
				t.Errorf("check %v lacks %q", m["id"], key)
			}
		}
	}
}

func TestOutputFolderRules(t *testing.T) {
	dir := t.TempDir()
	data := filepath.Join("..", "..", "testdata", "datasets", "usarrests.csv")
	out := filepath.Join(dir, "result")
	if status, _, stderr := runPCQC(t, "run", data, "--out", out, "--format", "none"); status != exitOK {
		t.Fatalf("first run: %d %s", status, stderr)
	}
	// A second run into the same, now non-empty folder is refused.
	status, _, stderr := runPCQC(t, "run", data, "--out", out, "--scale", "none")
	if status != exitUsage || !strings.Contains(stderr, "--force") {
		t.Errorf("occupied folder: status %d, %q", status, stderr)
	}
	// With --force it is replaced; the new options show in summary.json.
	if status, _, stderr := runPCQC(t, "run", "--force", data, "--out", out, "--scale", "none", "--format", "none"); status != exitOK {
		t.Fatalf("--force: %d %s", status, stderr)
	}
	b, _ := os.ReadFile(filepath.Join(out, "summary.json"))
	if !strings.Contains(string(b), `"scale": "none"`) {
		t.Errorf("folder not replaced: %s", b)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("stray files beside the output: %v", entries)
	}
}

func TestDefaultOutputFolderIsBesideTheWorkingDirectory(t *testing.T) {
	data, _ := filepath.Abs(filepath.Join("..", "..", "testdata", "datasets", "iris.csv"))
	dir := t.TempDir()
	wd, _ := os.Getwd()
	os.Chdir(dir)
	defer os.Chdir(wd)
	if status, _, stderr := runPCQC(t, "run", data, "--group", "species", "--format", "none"); status != exitOK {
		t.Fatalf("%d %s", status, stderr)
	}
	if _, err := os.Stat(filepath.Join(dir, "iris-pcqc", "scores.csv")); err != nil {
		t.Errorf("default output folder: %v", err)
	}
	scores := readCSV(t, filepath.Join(dir, "iris-pcqc", "scores.csv"))
	if scores[0][0] != "row" || scores[1][0] != "1" {
		t.Errorf("iris has no id column, so ids are row numbers: %v %v", scores[0], scores[1])
	}
}

func TestUsageErrors(t *testing.T) {
	data := filepath.Join("..", "..", "testdata", "datasets", "usarrests.csv")
	out := filepath.Join(t.TempDir(), "o")
	cases := []struct {
		args []string
		want string
	}{
		{[]string{}, "Usage"},
		{[]string{"frobnicate"}, "unknown command"},
		{[]string{"run"}, "expects one data file"},
		{[]string{"run", data, data}, "expects one data file"},
		{[]string{"run", data, "--scale", "auto", "--out", out}, "invalid --scale"},
		{[]string{"run", data, "--components", "zero", "--out", out}, "invalid --components"},
		{[]string{"run", data, "--components", "9", "--out", out}, "more components than the data have"},
		{[]string{"run", data, "--nonsense", "--out", out}, "unknown flag --nonsense"},
		{[]string{"run", "no-such-file.csv", "--out", out}, "no-such-file.csv: cannot open"},
		{[]string{"help", "nothing"}, "unknown command"},
	}
	for _, c := range cases {
		status, _, stderr := runPCQC(t, c.args...)
		if status != exitUsage || !strings.Contains(stderr, c.want) {
			t.Errorf("%v: status %d, stderr %q (want %q)", c.args, status, stderr, c.want)
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%v: output folder created", c.args)
		}
	}
}

func TestHelpAndVersion(t *testing.T) {
	status, stdout, _ := runPCQC(t, "version")
	if status != exitOK || stdout != "pcqc "+Version+"\n" {
		t.Errorf("version: %d %q", status, stdout)
	}
	for _, c := range commands {
		status, stdout, _ := runPCQC(t, "help", c.name)
		if status != exitOK || !strings.Contains(stdout, "usage: pcqc "+c.name) {
			t.Errorf("help %s: %d %q", c.name, status, stdout)
		}
	}
	status, stdout, _ = runPCQC(t, "run", "-h")
	if status != exitOK || !strings.Contains(stdout, "--scale") {
		t.Errorf("run -h: %d %q", status, stdout)
	}
}

func TestFailOnSetsExitStatus(t *testing.T) {
	// The demo's verdict is warn (planted outliers), with no failing check.
	cases := []struct {
		failOn string
		want   int
	}{{"fail", exitOK}, {"warn", exitChecks}, {"never", exitOK}}
	for _, c := range cases {
		out := filepath.Join(t.TempDir(), "demo")
		status, _, stderr := runPCQC(t, "demo", "--out", out, "--fail-on", c.failOn, "--permutations", "50", "--format", "none")
		if status != c.want {
			t.Errorf("--fail-on %s: status %d, want %d (%s)", c.failOn, status, c.want, stderr)
		}
		if _, err := os.Stat(filepath.Join(out, "summary.json")); err != nil {
			t.Errorf("--fail-on %s: outputs not written: %v", c.failOn, err)
		}
	}
	// Pure noise fails sampling adequacy: exit 1 by default, 0 with never.
	dir := t.TempDir()
	data := filepath.Join(dir, "noise.csv")
	var b strings.Builder
	b.WriteString("a,b,c,d,e\n")
	x := uint64(12345)
	for i := 0; i < 300; i++ {
		for j := 0; j < 5; j++ {
			x = x*6364136223846793005 + 1442695040888963407 // a linear congruential generator (Knuth's MMIX constants)
			if j > 0 {
				b.WriteString(",")
			}
			fmt.Fprintf(&b, "%.6f", float64(x>>11)/float64(1<<53))
		}
		b.WriteString("\n")
	}
	os.WriteFile(data, []byte(b.String()), 0o644)
	if status, _, stderr := runPCQC(t, "run", data, "--out", filepath.Join(dir, "o1"), "--format", "none"); status != exitChecks {
		t.Errorf("noise with default --fail-on: status %d (%s)", status, stderr)
	}
	if status, _, stderr := runPCQC(t, "run", data, "--out", filepath.Join(dir, "o2"), "--fail-on", "never", "--format", "none"); status != exitOK {
		t.Errorf("noise with --fail-on never: status %d (%s)", status, stderr)
	}
	if status, _, _ := runPCQC(t, "run", data, "--out", filepath.Join(dir, "o3"), "--fail-on", "sometimes"); status != exitUsage {
		t.Errorf("invalid --fail-on accepted")
	}
}

// Acceptance (bootstrap issue): stability.csv and summary.json are
// byte-identical for --threads 1 and --threads 2 with the same seed.
func TestThreadsDoNotChangeOutputs(t *testing.T) {
	dir := t.TempDir()
	for _, threads := range []string{"1", "2"} {
		if status, _, stderr := runPCQC(t, "demo", "--out", filepath.Join(dir, threads), "--threads", threads, "--bootstrap", "100", "--seed", "7", "--format", "none"); status != exitOK {
			t.Fatalf("threads %s: %d %s", threads, status, stderr)
		}
	}
	for _, name := range []string{"stability.csv", "summary.json", "variance.csv", "samples.csv"} {
		a, err1 := os.ReadFile(filepath.Join(dir, "1", name))
		b, err2 := os.ReadFile(filepath.Join(dir, "2", name))
		if err1 != nil || err2 != nil || !bytes.Equal(a, b) {
			t.Errorf("%s differs between --threads 1 and 2 (%v %v)", name, err1, err2)
		}
	}
	rows := readCSV(t, filepath.Join(dir, "1", "stability.csv"))
	if strings.Join(rows[0], ",") != "variable,component,loading,boot_mean,ci_low,ci_high,excludes_zero" || len(rows) != 1+13*3 {
		t.Errorf("stability.csv: %v, %d rows", rows[0], len(rows))
	}
}

func TestBootstrapOffSkipsStability(t *testing.T) {
	out := filepath.Join(t.TempDir(), "o")
	if status, _, stderr := runPCQC(t, "demo", "--out", out, "--bootstrap", "0", "--format", "none"); status != exitOK {
		t.Fatalf("%d %s", status, stderr)
	}
	if _, err := os.Stat(filepath.Join(out, "stability.csv")); !os.IsNotExist(err) {
		t.Errorf("stability.csv written without a bootstrap")
	}
	b, _ := os.ReadFile(filepath.Join(out, "summary.json"))
	if !strings.Contains(string(b), `"stability": null`) || !strings.Contains(string(b), `"id": "loading-stability",
      "title": "The retained subspace is stable under resampling",
      "status": "skip"`) {
		t.Errorf("summary.json does not mark stability as skipped")
	}
}

func TestReportFormatsAndDate(t *testing.T) {
	skipRenderingWhenShort(t)
	dir := t.TempDir()
	out := filepath.Join(dir, "all")
	if status, _, stderr := runPCQC(t, "demo", "--out", out, "--date", "2026-03-04", "--bootstrap", "50", "--permutations", "50", "--title", "River check", "--author", "Q. Analyst"); status != exitOK {
		t.Fatalf("%d %s", status, stderr)
	}
	for _, name := range []string{"report.md", "report.pdf", "report.html", "references.bib", "figures/scree.png", "figures/scree.svg"} {
		if _, err := os.Stat(filepath.Join(out, name)); err != nil {
			t.Errorf("%s missing: %v", name, err)
		}
	}
	md, _ := os.ReadFile(filepath.Join(out, "report.md"))
	for _, want := range []string{"# River check", "Q. Analyst", "2026-03-04", "invented"} {
		if !strings.Contains(string(md), want) {
			t.Errorf("report.md lacks %q", want)
		}
	}
	none := filepath.Join(dir, "none")
	if status, _, stderr := runPCQC(t, "demo", "--out", none, "--format", "none", "--bootstrap", "0", "--permutations", "20"); status != exitOK {
		t.Fatalf("%d %s", status, stderr)
	}
	if _, err := os.Stat(filepath.Join(none, "report.md")); !os.IsNotExist(err) {
		t.Error("--format none wrote a report")
	}
	if _, err := os.Stat(filepath.Join(none, "figures")); !os.IsNotExist(err) {
		t.Error("--format none drew figures")
	}
	only := filepath.Join(dir, "md")
	t.Setenv("SOURCE_DATE_EPOCH", "1700000000") // 2023-11-14
	if status, _, stderr := runPCQC(t, "demo", "--out", only, "--format", "md", "--bootstrap", "0", "--permutations", "20"); status != exitOK {
		t.Fatalf("%d %s", status, stderr)
	}
	md, _ = os.ReadFile(filepath.Join(only, "report.md"))
	if !strings.Contains(string(md), "2023-11-14") {
		t.Error("SOURCE_DATE_EPOCH not used for the date")
	}
	if _, err := os.Stat(filepath.Join(only, "report.pdf")); !os.IsNotExist(err) {
		t.Error("--format md wrote a PDF")
	}
	for _, bad := range [][]string{{"--date", "03/04/2026"}, {"--format", "docx"}} {
		status, _, stderr := runPCQC(t, append([]string{"demo", "--out", filepath.Join(dir, "bad")}, bad...)...)
		if status != exitUsage || !strings.Contains(stderr, "invalid") {
			t.Errorf("%v: %d %s", bad, status, stderr)
		}
	}
}

// skipRenderingWhenShort skips a test that renders whole reports when
// -short is given: CI runs the race detector with -short, since these
// tests exercise no concurrency of their own and take minutes under it;
// the full run (go test ./...) always includes them.
func skipRenderingWhenShort(t *testing.T) {
	t.Helper()
	if testing.Short() {
		t.Skip("renders whole reports; run without -short")
	}
}

// shortFormat is the --format of the tests that read the tables and also
// check report.md: md, or none under -short. The race run (go test -race
// -short in .ci/run) then skips drawing the figures, which takes half a
// minute a report under the race detector; the report's text is checked
// by the run without -short.
func shortFormat() string {
	if testing.Short() {
		return "none"
	}
	return "md"
}
