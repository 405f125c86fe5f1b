package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestMissingIterativeEndToEnd: pcqc run --missing iterative on the wine
// data with 5 % of the cells removed imputes them, records the imputation
// in summary.json, passes imputation-convergence, and says so in the
// methods paragraph; apply refuses the policy with a usage error.
func TestMissingIterativeEndToEnd(t *testing.T) {
	out := filepath.Join(t.TempDir(), "o")
	data := filepath.Join("..", "..", "testdata", "impute", "wine_missing5.csv")
	status, _, stderr := runPCQC(t, "run", data, "--missing", "iterative", "--bootstrap", "20", "--permutations", "100", "--format", shortFormat(), "--out", out)
	if status != exitOK {
		t.Fatalf("status %d: %s", status, stderr)
	}
	raw, err := os.ReadFile(filepath.Join(out, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	var s struct {
		Imputation *struct {
			Method     string `json:"method"`
			Cells      int    `json:"cells"`
			Components int    `json:"components"`
			Converged  bool   `json:"converged"`
			CV         []any  `json:"cv_mean_squared_error"`
		} `json:"imputation"`
		Checks []struct{ ID, Status string } `json:"checks"`
	}
	if err := json.Unmarshal(raw, &s); err != nil {
		t.Fatal(err)
	}
	imp := s.Imputation
	if imp == nil || imp.Cells != 116 || !imp.Converged || imp.Components < 1 || len(imp.CV) != 5 || !strings.Contains(imp.Method, "Josse & Husson") {
		t.Fatalf("imputation %+v", imp)
	}
	found := false
	for _, c := range s.Checks {
		if c.ID == "imputation-convergence" {
			found = c.Status == "pass"
		}
	}
	if !found {
		t.Errorf("imputation-convergence did not pass: %+v", s.Checks)
	}
	if md, _ := os.ReadFile(filepath.Join(out, "report.md")); !testing.Short() && !strings.Contains(string(md), "imputed by regularised iterative PCA (Josse & Husson 2012)") {
		t.Errorf("the methods paragraph does not describe the imputation")
	}
	status, _, stderr = runPCQC(t, "apply", out, data, "--missing", "iterative", "--out", filepath.Join(t.TempDir(), "a"))
	if status != exitUsage || !strings.Contains(stderr, "--missing iterative") || strings.Count(stderr, "\n") != 1 {
		t.Errorf("apply --missing iterative: status %d, %q", status, stderr)
	}
}
