package analysis

import (
	"fmt"

	"gonum.org/v1/gonum/mat"
)

// Options are the analysis choices made after the table is read.
type Options struct {
	Scaling    Scaling
	Components ComponentRule
}

// Result is a complete analysis of one table: what was done to the data, the
// decomposition, the retained components and their scores, and the measured
// properties of the result.
type Result struct {
	Table      *Table
	Prep       Preprocessing
	Z          *mat.Dense // n × p preprocessed matrix
	Decomp     *Decomposition
	Rule       ComponentRule
	Retained   int        // k
	Scores     *mat.Dense // n × k
	Properties Properties
}

// Analyze preprocesses the table and computes its PCA. The table's matrix is
// not modified.
func Analyze(t *Table, opt Options) (*Result, error) {
	if opt.Scaling == "" {
		opt.Scaling = ScaleUnit
	}
	if opt.Components == (ComponentRule{}) {
		opt.Components = DefaultComponentRule
	}
	pp, err := FitPreprocessing(t.X, t.Transform, opt.Scaling)
	if err != nil {
		return nil, err
	}
	z := pp.Apply(nil, t.X)
	d, err := Decompose(z)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", t.File, err)
	}
	k, err := opt.Components.Count(d.Eigenvalues)
	if err != nil {
		return nil, err
	}
	r := &Result{Table: t, Prep: pp, Z: z, Decomp: d, Rule: opt.Components, Retained: k}
	r.Scores = d.Scores(z, k)
	r.Properties = MeasureProperties(z, d.Loadings.Slice(0, d.Vars, 0, k), r.Scores, d.Eigenvalues)
	return r, nil
}

// RetainedLoadings returns the p × k loadings of the retained components.
func (r *Result) RetainedLoadings() mat.Matrix {
	return r.Decomp.Loadings.Slice(0, r.Decomp.Vars, 0, r.Retained)
}
