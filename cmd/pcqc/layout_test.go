package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"
)

// A file as a lab exports it — a title and a note above the header, a
// units row, comment lines among the rows, digit groups in quoted numbers —
// read with --skip, --comment, --units-row and --thousands gives the same
// tables, byte for byte, as the clean CSV of the same numbers.
func TestLayoutFlagsGiveTheCleanTables(t *testing.T) {
	raw, err := os.ReadFile("../../testdata/datasets/usarrests.csv")
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(raw)), "\n")
	// Assault × 10 puts numbers of four digits in the table, so that
	// the messy file can write them with a thousands separator.
	var clean, messy strings.Builder
	clean.WriteString(lines[0] + "\n")
	messy.WriteString("US arrests per 100,000 residents; \"R datasets\", 1973\nexported by hand\n# source: McNeil (1977)\n")
	messy.WriteString(lines[0] + "\n,per 100000,per 100000,%,per 100000\n")
	for i, l := range lines[1:] {
		f := strings.Split(l, ",")
		v, err := strconv.ParseFloat(f[2], 64)
		if err != nil {
			t.Fatal(err)
		}
		a := int(v * 10)
		grouped := strconv.Itoa(a)
		if a >= 1000 {
			grouped = fmt.Sprintf("\"%d,%03d\"", a/1000, a%1000)
		}
		fmt.Fprintf(&clean, "%s,%s,%d,%s,%s\n", f[0], f[1], a, f[3], f[4])
		if i%10 == 3 {
			messy.WriteString("# checked by the second reader\n")
		}
		fmt.Fprintf(&messy, "%s,%s,%s,%s,%s\n", f[0], f[1], grouped, f[3], f[4])
	}
	dir := t.TempDir()
	cleanPath, messyPath := filepath.Join(dir, "clean.csv"), filepath.Join(dir, "messy.csv")
	os.WriteFile(cleanPath, []byte(clean.String()), 0o600)
	os.WriteFile(messyPath, []byte(messy.String()), 0o600)
	flags := []string{"--bootstrap", "20", "--permutations", "0", "--components", "2", "--format", shortFormat(), "--fail-on", "never"}
	outClean, outMessy := filepath.Join(dir, "c"), filepath.Join(dir, "m")
	if status, _, stderr := runPCQC(t, append([]string{"run", cleanPath, "--out", outClean}, flags...)...); status != 0 {
		t.Fatalf("clean: %d %s", status, stderr)
	}
	messyArgs := append([]string{"run", messyPath, "--out", outMessy, "--skip", "2", "--comment", "#", "--units-row", "--thousands", ","}, flags...)
	if status, _, stderr := runPCQC(t, messyArgs...); status != 0 {
		t.Fatalf("messy: %d %s", status, stderr)
	}
	tables, _ := filepath.Glob(filepath.Join(outClean, "*.csv"))
	if len(tables) < 4 {
		t.Fatalf("only %d tables", len(tables))
	}
	for _, c := range tables {
		a, _ := os.ReadFile(c)
		b, err := os.ReadFile(filepath.Join(outMessy, filepath.Base(c)))
		if err != nil || !bytes.Equal(a, b) {
			t.Errorf("%s differs (%v)", filepath.Base(c), err)
		}
	}
	var summary struct {
		Input struct {
			Variables      []string `json:"variables"`
			Units          []string `json:"units"`
			SkippedLines   int      `json:"skipped_lines"`
			CommentLines   int      `json:"comment_lines"`
			GroupedNumbers int      `json:"grouped_numbers"`
		} `json:"input"`
	}
	js, _ := os.ReadFile(filepath.Join(outMessy, "summary.json"))
	if err := json.Unmarshal(js, &summary); err != nil {
		t.Fatal(err)
	}
	// 50 rows: comments before rows 4, 14, 24, 34, 44, plus the one after
	// the skipped lines; Assault ≥ 100 in 40 of the 50 states (R 4.2:
	// sum(USArrests$Assault >= 100)).
	in := summary.Input
	if !reflect.DeepEqual(in.Units, []string{"per 100000", "per 100000", "%", "per 100000"}) ||
		in.SkippedLines != 2 || in.CommentLines != 6 || in.GroupedNumbers != 40 {
		t.Errorf("summary.json input: %+v", in)
	}
	if testing.Short() {
		return
	}
	md, _ := os.ReadFile(filepath.Join(outMessy, "report.md"))
	for _, want := range []string{`Murder \[per 100000\]`, `UrbanPop \[%\]`, "| UrbanPop | % |",
		"In reading the file, the first 2 lines of the file were skipped, 6 comment lines were ignored, units were read from the row under the header and thousands separators were removed from 40 values."} {
		if !bytes.Contains(md, []byte(want)) {
			t.Errorf("report.md lacks %q", want)
		}
	}
}

// apply reads new batches of the same layout with the same flags, scores
// them as it scores the clean file, and its Reproduce command names the
// flags (--units-row without a value, as an on/off flag must be written).
func TestApplyReadsTheLayout(t *testing.T) {
	dir := t.TempDir()
	clean := "id,a,b,c\n"
	messy := "Batch 7, \"night\" shift\nid,a,b,c\n,mg/L,,[°C]\n"
	for i := 0; i < 12; i++ {
		a, b, c := 1000+137*i, 2*i%7+1, 3+i*i%5
		clean += fmt.Sprintf("s%d,%d,%d,%d\n", i, a, b, c)
		messy += fmt.Sprintf("s%d,\"%d,%03d\",%d,%d\n! row %d\n", i, a/1000, a%1000, b, c, i)
	}
	cleanPath, messyPath := filepath.Join(dir, "clean.csv"), filepath.Join(dir, "messy.csv")
	os.WriteFile(cleanPath, []byte(clean), 0o600)
	os.WriteFile(messyPath, []byte(messy), 0o600)
	audit := filepath.Join(dir, "audit")
	if status, _, stderr := runPCQC(t, append([]string{"run", cleanPath, "--out", audit}, quick...)...); status != 0 {
		t.Fatalf("run: %d %s", status, stderr)
	}
	outClean, outMessy := filepath.Join(dir, "ac"), filepath.Join(dir, "am")
	if status, _, stderr := runPCQC(t, "apply", audit, cleanPath, "--out", outClean, "--format", "md", "--fail-on", "never"); status != 0 {
		t.Fatalf("apply clean: %d %s", status, stderr)
	}
	if status, _, stderr := runPCQC(t, "apply", audit, messyPath, "--out", outMessy, "--format", "md", "--fail-on", "never",
		"--skip", "1", "--comment", "!", "--units-row", "--thousands", ","); status != 0 {
		t.Fatalf("apply messy: %d %s", status, stderr)
	}
	a, _ := os.ReadFile(filepath.Join(outClean, "scores.csv"))
	b, err := os.ReadFile(filepath.Join(outMessy, "scores.csv"))
	if err != nil || len(a) == 0 || !bytes.Equal(a, b) {
		t.Errorf("apply's scores differ (%v)", err)
	}
	md, _ := os.ReadFile(filepath.Join(outMessy, "report.md"))
	if !bytes.Contains(md, []byte("--skip 1 --comment '!' --units-row --thousands ,")) {
		t.Errorf("the Reproduce command lacks the layout flags")
	}
}

// The demo reads the table it writes: the layout flags are refused.
func TestDemoRefusesLayoutFlags(t *testing.T) {
	out := filepath.Join(t.TempDir(), "d")
	refused(t, out, []string{"--skip does not apply to the demo"}, "demo", "--out", out, "--skip", "1")
}
