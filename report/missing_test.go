package report

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/checks"
)

// gappyCSV is a small table whose missing cells and their column means are
// worked out by hand below; ids and the variable b carry the names given.
func gappyCSV(ids [8]string, b string) string {
	q := func(s string) string { return `"` + strings.ReplaceAll(s, `"`, `""`) + `"` }
	rows := [8]string{"1,20,3", ",50,4", "3,,6", "4,70,1", "8,,", "6,10,9", "2,30,8", "5,25,2"}
	var out strings.Builder
	fmt.Fprintf(&out, "id,a,%s,c\n", q(b))
	for i, r := range rows {
		fmt.Fprintf(&out, "%s,%s\n", q(ids[i]), r)
	}
	return out.String()
}

var plainIDs = [8]string{"s1", "s2", "s3", "s4", "s5", "s6", "s7", "s8"}

// gappyAudit reads and analyses the table as pcqc run does (in place).
func gappyAudit(t *testing.T, text string, policy intake.MissingPolicy) Audit {
	t.Helper()
	tab, err := intake.ReadTableFrom("gappy.csv", strings.NewReader(text), intake.ReadOptions{Missing: policy})
	if err != nil {
		t.Fatal(err)
	}
	res, err := analysis.Analyze(tab, analysis.Options{Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 1},
		NoCrossValidation: true, InPlace: true, Threads: 1, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	return Audit{Result: res, Checks: checks.RunAll(checks.Input{Run: res})}
}

// summary.json and the CSV files list, for each policy, the missing shares
// counted by hand, the samples dropped and the cells imputed with the
// column means of the values read.
func TestMissingListsInSummaryAndCSV(t *testing.T) {
	// By hand: a misses s2; b misses s3 and s5; c misses s5. Column means
	// of the observed values: a = 29/7, b = 205/6, c = 33/7.
	wantVars := []intake.VariableMissing{{Variable: "a", Cells: 1, Share: 0.125}, {Variable: "b", Cells: 2, Share: 0.25}, {Variable: "c", Cells: 1, Share: 0.125}}
	varCSV := [][]string{{"variable", "missing_cells", "missing_share"}, {"a", "1", "0.125000"}, {"b", "2", "0.250000"}, {"c", "1", "0.125000"}}
	for _, tc := range []struct {
		policy  intake.MissingPolicy
		dropped []string
		imputed [][]string // sample, variable, line, column, value
	}{
		{intake.MissingDrop, []string{"s2", "s3", "s5"}, nil},
		{intake.MissingMean, nil, [][]string{{"s2", "a", "3", "2", "29/7"}, {"s3", "b", "4", "3", "205/6"}, {"s5", "b", "6", "3", "205/6"}, {"s5", "c", "6", "4", "33/7"}}},
	} {
		t.Run(string(tc.policy), func(t *testing.T) {
			audit := gappyAudit(t, gappyCSV(plainIDs, "b"), tc.policy)
			dir := t.TempDir()
			if err := WriteTables(dir, audit, testMeta); err != nil {
				t.Fatal(err)
			}
			raw, err := os.ReadFile(filepath.Join(dir, "summary.json"))
			if err != nil {
				t.Fatal(err)
			}
			var s struct{ Missing MissingInfo }
			if err := json.Unmarshal(raw, &s); err != nil {
				t.Fatal(err)
			}
			m := s.Missing
			if m.Policy != string(tc.policy) || m.Cells != 4 || !reflect.DeepEqual(m.ByVariable, wantVars) {
				t.Errorf("missing: policy %q, %d cells, by variable %+v", m.Policy, m.Cells, m.ByVariable)
			}
			var sampleIDs []string
			for _, x := range m.BySample {
				sampleIDs = append(sampleIDs, x.ID)
			}
			if want := []string{"s5", "s2", "s3"}; !reflect.DeepEqual(sampleIDs, want) { // s5 lacks two cells
				t.Errorf("by sample %v, want %v", sampleIDs, want)
			}
			var dropped []string
			for _, d := range m.Dropped {
				dropped = append(dropped, d.ID)
			}
			if !reflect.DeepEqual(dropped, tc.dropped) {
				t.Errorf("dropped %v, want %v", dropped, tc.dropped)
			}
			if got := readCSVFile(t, filepath.Join(dir, missingByVariableCSV)); !reflect.DeepEqual(got, varCSV) {
				t.Errorf("%s: %v", missingByVariableCSV, got)
			}
			samples := readCSVFile(t, filepath.Join(dir, missingBySampleCSV))
			if want := []string{"s5", "6", "2", "0.666667", "b;c", fmt.Sprint(tc.policy == intake.MissingDrop)}; len(samples) != 4 || !reflect.DeepEqual(samples[1], want) {
				t.Errorf("%s: %v, want second row %v", missingBySampleCSV, samples, want)
			}
			_, err = os.Stat(filepath.Join(dir, imputedCellsCSV))
			if len(tc.imputed) == 0 {
				if err == nil || len(m.Imputed) != 0 {
					t.Errorf("%s written or cells listed under --missing drop", imputedCellsCSV)
				}
				return
			}
			rows := readCSVFile(t, filepath.Join(dir, imputedCellsCSV))
			if len(m.Imputed) != len(tc.imputed) || len(rows) != len(tc.imputed)+1 {
				t.Fatalf("%d cells in summary.json, %d CSV rows; want %d", len(m.Imputed), len(rows)-1, len(tc.imputed))
			}
			for i, w := range tc.imputed {
				var num, den float64
				fmt.Sscanf(w[4], "%g/%g", &num, &den)
				want := num / den
				c := m.Imputed[i]
				if got := []string{c.ID, c.Variable, fmt.Sprint(c.Line), fmt.Sprint(c.Column)}; !reflect.DeepEqual(got, w[:4]) || math.Abs(c.Value-want) > 1e-11*want {
					t.Errorf("imputed cell %d: %+v, want %v = %g", i, c, w, want)
				}
				if !reflect.DeepEqual(rows[i+1][:4], w[:4]) || rows[i+1][4] != fmt.Sprint(c.Value) {
					t.Errorf("%s row %d: %v", imputedCellsCSV, i+1, rows[i+1])
				}
			}
		})
	}
}

// Without a missing cell, summary.json says so with empty lists and no
// missing-*.csv is written.
func TestNoMissingNoLists(t *testing.T) {
	tab, err := intake.ReadTableFrom("clean.csv", strings.NewReader("id,a,b,c\ns1,1,2,4\ns2,2,1,3\ns3,4,4,1\ns4,3,5,2\n"), intake.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	res, err := analysis.Analyze(tab, analysis.Options{Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 1}, NoCrossValidation: true, InPlace: true})
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	if err := WriteTables(dir, Audit{Result: res, Checks: checks.RunAll(checks.Input{Run: res})}, testMeta); err != nil {
		t.Fatal(err)
	}
	for _, f := range []string{missingByVariableCSV, missingBySampleCSV, imputedCellsCSV} {
		if _, err := os.Stat(filepath.Join(dir, f)); err == nil {
			t.Errorf("%s written for a table without missing cells", f)
		}
	}
	raw, _ := os.ReadFile(filepath.Join(dir, "summary.json"))
	if !strings.Contains(string(raw), `"by_sample": [],`) || !strings.Contains(string(raw), `"dropped_samples": [],`) || !strings.Contains(string(raw), `"imputed_cells": []`) {
		t.Errorf("summary.json lacks empty missing lists:\n%s", raw)
	}
}

// The lists render in all three formats, and hostile ids and variable
// names in them stay literal text: they add no heading, link or markup.
func TestMissingListsRender(t *testing.T) {
	skipRenderingWhenShort(t)
	ids := plainIDs
	ids[1] = "s2\n## Verdict"            // a missing a
	ids[4] = "<b>s5</b> | [x](y) `tick`" // missing b and c
	hostileB := "b\n# fake"
	audit := gappyAudit(t, gappyCSV(ids, hostileB), intake.MissingMean)
	dir := t.TempDir()
	opt := ReportOptions{Title: "Gappy audit", Date: "2026-01-02"}
	if err := WriteReport(dir, audit, testMeta, opt, allFormats); err != nil {
		t.Fatal(err)
	}
	md, _ := os.ReadFile(filepath.Join(dir, "report.md"))
	var sub []string
	for _, h := range headings(t, md) {
		if strings.HasPrefix(h, "1 ") || strings.HasPrefix(h, "3 ") {
			sub = append(sub, h)
		}
	}
	if want := []string{"1 Gappy audit", "3 What the checks that did not pass found", "3 Missing cells", "3 References", "3 What each check found"}; !reflect.DeepEqual(sub, want) {
		t.Errorf("headings of levels 1 and 3: %q, want %q", sub, want)
	}
	elements, _, text := htmlReport(t, filepath.Join(dir, "report.html"))
	for _, tag := range []string{"b", "a", "h4"} {
		if elements[tag] > 0 {
			t.Errorf("report.html has %d <%s> elements", elements[tag], tag)
		}
	}
	text = normal(text)
	for _, s := range []string{literal(ids[1]), literal(ids[4]), literal(hostileB), "3 samples with missing cells, worst first:",
		"4 cells imputed by the mean of the variable's observed values", "34.1667", "4.71429"} {
		if !strings.Contains(text, s) {
			t.Errorf("report.html lacks %q", s)
		}
	}
	pdf := normal(pdftotext(t, filepath.Join(dir, "report.pdf")))
	for _, s := range []string{"Missing cells", literal(ids[4]), "s2 ## Verdict", "34.1667", "imputed-cells.csv"} {
		if !strings.Contains(pdf, s) {
			t.Errorf("report.pdf lacks %q", s)
		}
	}
}

// A new batch scored by apply lists its cells filled with the training
// means, and its missing shares, in summary.json and the CSV files.
func TestApplyListsBatchImputedCells(t *testing.T) {
	audit := gappyAudit(t, gappyCSV(plainIDs, "b"), intake.MissingMean)
	m := analysis.NewModel(audit.Result, "test")
	batch, err := intake.ReadTableFrom("new.csv", strings.NewReader("id,a,b,c\nn1,2,,5\nn2,3,40,4\nn3,,35,\nn4,5,60,3\n"),
		intake.ReadOptions{Missing: intake.MissingMean, Columns: m.Variables, MinRows: 1, KeepConstant: true, ImputeWith: m.Means})
	if err != nil {
		t.Fatal(err)
	}
	app := analysis.Apply(m, batch)
	run := ApplyRun{App: app, Checks: checks.RunAll(checks.Input{Apply: app})}
	dir := t.TempDir()
	if err := WriteApplyTables(dir, run, testMeta); err != nil {
		t.Fatal(err)
	}
	got := buildApplySummary(run, testMeta).Input.Missing
	// The training means are the means of the observed training values
	// (mean imputation keeps them): a = 29/7, b = 205/6, c = 33/7.
	want := []struct {
		id, v string
		line  int
		value float64
	}{{"n1", "b", 2, 205.0 / 6}, {"n3", "a", 4, 29.0 / 7}, {"n3", "c", 4, 33.0 / 7}}
	if len(got.Imputed) != len(want) {
		t.Fatalf("imputed %+v", got.Imputed)
	}
	for i, w := range want {
		c := got.Imputed[i]
		if c.ID != w.id || c.Variable != w.v || c.Line != w.line || math.Abs(c.Value-w.value) > 1e-11*w.value {
			t.Errorf("cell %d: %+v, want %+v", i, c, w)
		}
	}
	if len(got.BySample) != 2 || got.BySample[0].ID != "n3" || got.BySample[0].Cells != 2 {
		t.Errorf("by sample %+v", got.BySample)
	}
	if rows := readCSVFile(t, filepath.Join(dir, imputedCellsCSV)); len(rows) != 4 || rows[1][0] != "n1" {
		t.Errorf("%s: %v", imputedCellsCSV, rows)
	}
}
