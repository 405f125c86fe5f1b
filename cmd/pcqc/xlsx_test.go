package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"
)

// The audit of a workbook equals the audit of the same data as CSV: every
// table byte for byte, and summary.json but for the input's provenance.
// testdata/xlsx/wine.xlsx was written by openpyxl 3.0.9 from
// testdata/datasets/wine.csv, cell for cell (testdata/xlsx/make.py).
func TestWorkbookAuditEqualsCSV(t *testing.T) {
	dir := t.TempDir()
	audit := func(data, out string, extra ...string) {
		args := append([]string{"run", data, "--out", out, "--group", "cultivar", "--format", "md", "--quiet",
			"--bootstrap", "20", "--permutations", "20"}, extra...)
		if status, _, stderr := runPCQC(t, args...); status != exitOK {
			t.Fatalf("%s: exit status %d (%s)", data, status, stderr)
		}
	}
	fromCSV, fromBook := filepath.Join(dir, "csv"), filepath.Join(dir, "xlsx")
	audit(filepath.Join("..", "..", "testdata", "datasets", "wine.csv"), fromCSV)
	audit(filepath.Join("..", "..", "testdata", "xlsx", "wine.xlsx"), fromBook, "--sheet", "1")
	compareTables(t, fromCSV, fromBook)

	a, b := summaryMap(t, fromCSV), summaryMap(t, fromBook)
	if in := b["input"].(map[string]any); in["sheet"] != "wine" {
		t.Errorf("summary.json input.sheet = %v, want wine", in["sheet"])
	}
	for _, s := range []map[string]any{a, b} {
		in := s["input"].(map[string]any)
		delete(in, "file")
		delete(in, "sha256")
		delete(in, "sheet")
		opts := s["options"].(map[string]any)
		delete(opts, "delim_used")
		delete(opts, "sheet")
	}
	if !reflect.DeepEqual(a, b) {
		ja, _ := json.Marshal(a)
		jb, _ := json.Marshal(b)
		t.Errorf("summary.json differs beyond the input's provenance:\n%s\n%s", ja, jb)
	}
	report, _ := os.ReadFile(filepath.Join(fromBook, "report.md"))
	for _, want := range []string{"- **Sheet:** wine", `wine.xlsx (sheet "wine", SHA-256`} {
		if !bytes.Contains(report, []byte(want)) {
			t.Errorf("report.md does not say %q", want)
		}
	}

	// apply scores the workbook as it scores the CSV.
	for _, data := range []string{"datasets/wine.csv", "xlsx/wine.xlsx"} {
		out := filepath.Join(dir, "apply-"+filepath.Ext(data)[1:])
		if status, _, stderr := runPCQC(t, "apply", fromCSV, filepath.Join("..", "..", "testdata", data), "--out", out, "--format", "none", "--quiet"); status > exitChecks {
			t.Fatalf("apply %s: exit status %d (%s)", data, status, stderr)
		}
	}
	compareTables(t, filepath.Join(dir, "apply-csv"), filepath.Join(dir, "apply-xlsx"))
}

// compareTables fails unless folders a and b hold the same .csv files with
// the same bytes.
func compareTables(t *testing.T, a, b string) {
	t.Helper()
	list := func(d string) []string {
		names, _ := filepath.Glob(filepath.Join(d, "*.csv"))
		for i, n := range names {
			names[i] = filepath.Base(n)
		}
		return names
	}
	na, nb := list(a), list(b)
	if len(na) == 0 || !slices.Equal(na, nb) {
		t.Fatalf("tables %v and %v", na, nb)
	}
	for _, n := range na {
		x, _ := os.ReadFile(filepath.Join(a, n))
		y, _ := os.ReadFile(filepath.Join(b, n))
		if !bytes.Equal(x, y) {
			t.Errorf("%s differs between %s and %s", n, filepath.Base(a), filepath.Base(b))
		}
	}
}

func summaryMap(t *testing.T, dir string) map[string]any {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	if _, ok := m["input"].(map[string]any); !ok || !strings.Contains(string(b), `"options"`) {
		t.Fatalf("summary.json of %s has no input or options", dir)
	}
	return m
}
