package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"testing"
)

// scikit-learn's wine, breast-cancer and diabetes tables (testdata/datasets,
// provenance in its README) are ordinary, well-studied data: the default
// audit must not end in FAIL (exit status 1) on any of them. Each is run
// with every default (bootstrap, permutations, cross-validation); the class
// columns only colour the plots.
func TestOpenDatasetsDoNotFailByDefault(t *testing.T) {
	cases := []struct{ file, group string }{
		{"wine.csv", "cultivar"},
		{"breast_cancer.csv", "diagnosis"},
		{"diabetes.csv", ""},
	}
	for _, c := range cases {
		t.Run(c.file, func(t *testing.T) {
			out := filepath.Join(t.TempDir(), "audit")
			args := []string{"run", filepath.Join("..", "..", "testdata", "datasets", c.file), "--out", out, "--format", "none", "--quiet"}
			if c.group != "" {
				args = append(args, "--group", c.group)
			}
			status, _, stderr := runPCQC(t, args...)
			if status != exitOK {
				t.Fatalf("exit status %d (%s)", status, stderr)
			}
			var summary struct {
				Verdict string
				Checks  []struct{ ID, Status, Message string }
			}
			b, err := os.ReadFile(filepath.Join(out, "summary.json"))
			if err != nil {
				t.Fatal(err)
			}
			if err := json.Unmarshal(b, &summary); err != nil {
				t.Fatal(err)
			}
			for _, ch := range summary.Checks {
				if ch.Status == "fail" {
					t.Errorf("%s fails: %s", ch.ID, ch.Message)
				}
			}
		})
	}
}
