package main

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"pcqc/demo"
)

type applySummary struct {
	summaryChecks
	Batch struct {
		MissingVariables []string `json:"missing_variables"`
		Flagged          []string `json:"flagged"`
		Shift            []struct {
			Variable string  `json:"variable"`
			ShiftSD  float64 `json:"shift_sd"`
		} `json:"shift"`
	} `json:"batch"`
}

// The demo applies the survey's model to its later batch: the planted
// conductivity drift is found and blamed on conductivity.
func TestDemoAppliesToTheLaterBatch(t *testing.T) {
	out := filepath.Join(t.TempDir(), "demo")
	if status, stdout, stderr := runPCQC(t, "demo", "--out", out, "--bootstrap", "20", "--permutations", "50", "--format", "none"); status != exitOK || !strings.Contains(stdout, "later batch") {
		t.Fatalf("%d %s %s", status, stdout, stderr)
	}
	sub := filepath.Join(out, "later-batch")
	for _, name := range []string{"demo-later-batch.csv", "scores.csv", "samples.csv", "contributions.csv", "summary.json"} {
		if _, err := os.Stat(filepath.Join(sub, name)); err != nil {
			t.Errorf("%s: %v", name, err)
		}
	}
	s := readSummaryFile[applySummary](t, sub)
	if s.status("apply-shift") != "warn" || !strings.Contains(s.message("apply-shift"), demo.DriftVariable) {
		t.Errorf("apply-shift %s: %s", s.status("apply-shift"), s.message("apply-shift"))
	}
	if s.status("apply-outliers-q") != "warn" || len(s.Batch.Flagged) < 30 {
		t.Errorf("outliers-q %s, %d flagged", s.status("apply-outliers-q"), len(s.Batch.Flagged))
	}
	// Every drifted sample flagged is blamed on conductivity by its Q
	// contributions.
	rows := readCSV(t, filepath.Join(sub, "contributions.csv"))
	best := map[string]string{}
	bestQ := map[string]float64{}
	for _, r := range rows[1:] {
		var q float64
		json.Unmarshal([]byte(r[3]), &q)
		if q > bestQ[r[0]] {
			bestQ[r[0]], best[r[0]] = q, r[1]
		}
	}
	blamed := 0
	for sample, variable := range best {
		month := sample[len(sample)-7:]
		if month < demo.DriftFrom {
			continue
		}
		if variable == demo.DriftVariable {
			blamed++
		} else {
			t.Errorf("%s (drifted) blamed on %s", sample, variable)
		}
	}
	if blamed < 30 {
		t.Errorf("only %d drifted samples blamed on %s", blamed, demo.DriftVariable)
	}
}

func TestApplyCommand(t *testing.T) {
	dir := t.TempDir()
	audit := filepath.Join(dir, "audit")
	if status, _, stderr := runPCQC(t, "run", usarrestsPath, "--out", audit, "--bootstrap", "0", "--format", "none", "--components", "2"); status != exitOK {
		t.Fatal(stderr)
	}
	if _, err := os.Stat(filepath.Join(audit, "model.json")); err != nil {
		t.Fatalf("run wrote no model.json: %v", err)
	}
	// Its own training data: nothing drifts; scores equal the run's.
	out := filepath.Join(dir, "self")
	if status, _, stderr := runPCQC(t, "apply", audit, usarrestsPath, "--out", out, "--format", "md"); status != exitOK {
		t.Fatalf("%d %s", status, stderr)
	}
	s := readSummaryFile[applySummary](t, out)
	if s.status("apply-variables") != "pass" || s.status("apply-shift") != "pass" {
		t.Errorf("self: %+v", s.Checks)
	}
	a, b := readCSV(t, filepath.Join(audit, "scores.csv")), readCSV(t, filepath.Join(out, "scores.csv"))
	for i := 1; i < len(a); i++ {
		for c := 1; c < len(a[i]); c++ {
			var x, y float64
			json.Unmarshal([]byte(a[i][c]), &x)
			json.Unmarshal([]byte(b[i][c]), &y)
			if d := x - y; d > 1e-10 || d < -1e-10 {
				t.Fatalf("score %s %s: %v vs %v", a[i][0], a[0][c], x, y)
			}
		}
	}
	md, _ := os.ReadFile(filepath.Join(out, "report.md"))
	if !strings.Contains(string(md), "## New samples") || !strings.Contains(string(md), "Westerhuis") {
		t.Error("apply report lacks its sections")
	}

	// A missing model variable fails apply-variables, clearly, and nothing
	// is scored; an extra column is ignored with a note.
	src, _ := os.ReadFile(usarrestsPath)
	text := strings.Replace(string(src), "UrbanPop", "Urban", 1)
	text = strings.Replace(text, "state,", "state,notes,", 1)
	lines := strings.Split(strings.TrimSpace(text), "\n")
	for i := 1; i < len(lines); i++ {
		c := strings.Index(lines[i], ",")
		lines[i] = lines[i][:c] + ",ok" + lines[i][c:]
	}
	renamed := writeFile(t, dir, "renamed.csv", strings.Join(lines, "\n")+"\n")
	out = filepath.Join(dir, "renamed")
	status, stdout, stderr := runPCQC(t, "apply", audit, renamed, "--out", out, "--format", "md")
	if status != exitChecks || !strings.Contains(stdout, "lack model variables") {
		t.Fatalf("missing variable: %d %s %s", status, stdout, stderr)
	}
	s = readSummaryFile[applySummary](t, out)
	if s.status("apply-variables") != "fail" || !strings.Contains(s.message("apply-variables"), "UrbanPop") || len(s.Batch.MissingVariables) != 1 {
		t.Errorf("missing variable: %s %s", s.status("apply-variables"), s.message("apply-variables"))
	}
	if s.status("apply-outliers-t2") != "skip" {
		t.Errorf("outliers checked without the variables: %s", s.status("apply-outliers-t2"))
	}

	// Refusals: flags the model fixes, a folder without a model, a model
	// of a newer format.
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"apply", audit, usarrestsPath, "--scale", "none"}, "--scale is fixed by the saved model"},
		{[]string{"apply", dir, usarrestsPath}, "cannot read the model"},
		{[]string{"apply", audit}, "expects an audit folder and a data file"},
	} {
		status, _, stderr := runPCQC(t, append(c.args, "--out", filepath.Join(dir, "x"))...)
		if status != exitUsage || !strings.Contains(stderr, c.want) {
			t.Errorf("%v: %d %q", c.args, status, stderr)
		}
	}
	model, _ := os.ReadFile(filepath.Join(audit, "model.json"))
	os.WriteFile(filepath.Join(audit, "model.json"), []byte(strings.Replace(string(model), `"format": 1`, `"format": 7`, 1)), 0o644)
	status, _, stderr = runPCQC(t, "apply", audit, usarrestsPath, "--out", filepath.Join(dir, "y"))
	if status != exitUsage || !strings.Contains(stderr, "format 7, newer than") {
		t.Errorf("newer model: %d %q", status, stderr)
	}
}

// A new batch whose header spells a name in another Unicode normal form
// (NFD "a" + combining diaeresis) meets the model's NFC variable.
func TestApplyMatchesNamesInNFC(t *testing.T) {
	dir := t.TempDir()
	const nfc, nfd = "K\u00e4lte", "Ka\u0308lte"
	rows := "id,%s,b,c\ns1,1,2,3.5\ns2,2,1,4\ns3,3,5,1\ns4,4,3,2\ns5,5,4,6\ns6,6,7,5\ns7,7,5,8\n"
	train := filepath.Join(dir, "train.csv")
	batch := filepath.Join(dir, "batch.csv")
	os.WriteFile(train, []byte(fmt.Sprintf(rows, nfc)), 0o644)
	os.WriteFile(batch, []byte(fmt.Sprintf(rows, nfd)), 0o644)
	audit := filepath.Join(dir, "audit")
	if status, _, stderr := runPCQC(t, "run", train, "--out", audit, "--format", "none", "--bootstrap", "0", "--components", "2", "--fail-on", "never"); status != exitOK {
		t.Fatalf("run: %d %s", status, stderr)
	}
	out := filepath.Join(dir, "applied")
	status, stdout, stderr := runPCQC(t, "apply", audit, batch, "--out", out, "--format", "none", "--fail-on", "never")
	if status != exitOK || !strings.Contains(stdout, "7 new samples scored") {
		t.Fatalf("apply: %d %s %s", status, stdout, stderr)
	}
	var summary struct {
		Checks []struct{ ID, Status string }
	}
	b, _ := os.ReadFile(filepath.Join(out, "summary.json"))
	if err := json.Unmarshal(b, &summary); err != nil {
		t.Fatal(err)
	}
	for _, c := range summary.Checks {
		if c.ID == "apply-variables" && c.Status != "pass" {
			t.Errorf("apply-variables is %s: a variable was not matched", c.Status)
		}
	}
}
