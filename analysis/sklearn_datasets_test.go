package analysis

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"pcqc/analysis/intake"
)

// sklearnReference is one table of testdata/datasets/sklearn_reference.json:
// the correlation PCA of a scikit-learn dataset computed offline with numpy
// 1.24.2 (numpy.linalg.svd of the centred, n−1-standardised matrix) by
// testdata/datasets/sklearn_export.py.
type sklearnReference struct {
	Rows        int         `json:"rows"`
	Variables   []string    `json:"variables"`
	Eigenvalues []float64   `json:"eigenvalues"`
	Loadings    [][]float64 `json:"loadings_pc1_pc3"` // p × 3, sign arbitrary
}

func TestSklearnDatasetsMatchNumpy(t *testing.T) {
	raw, err := os.ReadFile(filepath.Join("..", "testdata", "datasets", "sklearn_reference.json"))
	if err != nil {
		t.Fatal(err)
	}
	var refs map[string]json.RawMessage
	if err := json.Unmarshal(raw, &refs); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		file string
		read intake.ReadOptions
	}{
		{"wine.csv", intake.ReadOptions{GroupColumn: "cultivar"}},
		{"breast_cancer.csv", intake.ReadOptions{GroupColumn: "diagnosis"}},
		{"diabetes.csv", intake.ReadOptions{}},
	}
	for _, tc := range cases {
		t.Run(tc.file, func(t *testing.T) {
			var ref sklearnReference
			if err := json.Unmarshal(refs[tc.file], &ref); err != nil || ref.Rows == 0 {
				t.Fatalf("no reference for %s (%v)", tc.file, err)
			}
			tab, err := intake.ReadTable(filepath.Join("..", "testdata", "datasets", tc.file), tc.read)
			if err != nil {
				t.Fatal(err)
			}
			if tab.Rows() != ref.Rows || len(tab.Variables) != len(ref.Variables) {
				t.Fatalf("read %d × %d, reference %d × %d", tab.Rows(), len(tab.Variables), ref.Rows, len(ref.Variables))
			}
			for j, name := range ref.Variables {
				if tab.Variables[j] != name {
					t.Errorf("variable %d is %q, reference %q", j+1, tab.Variables[j], name)
				}
			}
			res, err := Analyze(tab, Options{Scaling: ScaleUnit, Components: ComponentRule{Kind: RuleFixed, Fixed: 3}})
			if err != nil {
				t.Fatal(err)
			}
			got := res.Decomp.Eigenvalues
			if len(got) != len(ref.Eigenvalues) {
				t.Fatalf("got %d eigenvalues, want %d", len(got), len(ref.Eigenvalues))
			}
			// Relative to the scale of the spectrum: the total variance is p.
			tol := 1e-10 * float64(len(ref.Variables))
			for a, want := range ref.Eigenvalues {
				if d := math.Abs(got[a] - want); d > tol {
					t.Errorf("eigenvalue %d = %.15g, numpy %.15g (error %.2g > %.2g)", a+1, got[a], want, d, tol)
				}
			}
			// The first three components are well separated on all three
			// tables (consecutive ratios ≥ 1.2), so their loadings are determined to
			// rounding level.
			assertLoadingsMatch(t, res.Decomp.Loadings, ref.Loadings, 1e-10)
		})
	}
}
