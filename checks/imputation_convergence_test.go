package checks

import (
	"path/filepath"
	"strings"
	"testing"

	"pcqc/analysis"
	"pcqc/analysis/intake"
)

// TestImputationConvergence: the wine data with 15 % of the cells removed
// (testdata/impute) converge in a few dozen iterations and pass; capped at
// one iteration they fail, and the message says the values are not settled;
// a table without iterative imputation skips.
func TestImputationConvergence(t *testing.T) {
	file := filepath.Join("..", "testdata", "impute", "wine_missing15.csv")
	for _, tc := range []struct {
		name    string
		missing intake.MissingPolicy
		cap     int
		want    Status
		says    string
	}{
		{"converges", intake.MissingIterative, 0, Pass, "converged after"},
		{"cap of one", intake.MissingIterative, 1, Fail, "not settled"},
		{"mean imputation", intake.MissingMean, 0, Skip, "No cell was imputed by iterative PCA"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			tab, err := intake.ReadTable(file, intake.ReadOptions{Missing: tc.missing})
			if err != nil {
				t.Fatal(err)
			}
			res, err := analysis.Analyze(tab, analysis.Options{Scaling: analysis.ScaleUnit,
				Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 2}, ImputeComponents: 2,
				ImputeMaxIterations: tc.cap, NoCrossValidation: true, Seed: 1})
			if err != nil {
				t.Fatal(err)
			}
			got := imputationConvergence.judge(Input{Run: res})
			if got.Status != tc.want || !strings.Contains(got.Message, tc.says) {
				t.Errorf("%s: %s", got.Status, got.Message)
			}
		})
	}
}
