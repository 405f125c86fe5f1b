package analysis

import (
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
)

// read reads a table given as text, failing the test on an error.
func read(t *testing.T, text string, opt intake.ReadOptions) *intake.Table {
	t.Helper()
	tab, err := intake.ReadTableFrom("t.csv", strings.NewReader(text), opt)
	if err != nil {
		t.Fatalf("read: %v", err)
	}
	return tab
}

// fitAndDecompose preprocesses x with scaling and decomposes the result,
// failing the test on an error.
func fitAndDecompose(t *testing.T, x *mat.Dense, scaling Scaling) (Preprocessing, *mat.Dense, *Decomposition) {
	t.Helper()
	pp, err := FitPreprocessing(x, intake.TransformNone, scaling)
	if err != nil {
		t.Fatal(err)
	}
	z := pp.Apply(nil, x)
	d, err := Decompose(z)
	if err != nil {
		t.Fatal(err)
	}
	return pp, z, d
}
