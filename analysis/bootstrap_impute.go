package analysis

import (
	"math"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
)

// bootImpute is what a bootstrap resample needs to redo the iterative
// imputation (intake.MissingIterative): the completed table and where its
// missing cells are. Redoing it in every resample lets the stability
// intervals carry the imputation's uncertainty, which a bootstrap of the
// completed table would treat as measured (Josse & Husson 2012, section 3,
// on the variability the imputation adds).
type bootImpute struct {
	x       *mat.Dense // n × p completed table, transformed scale
	missing [][]int    // per row, the variables imputed there
	s       int
	scaling Scaling
}

// newBootImpute returns nil unless r's table was imputed iteratively. The
// completed table is rebuilt from the preprocessed matrix (x = z·c + m),
// since with Options.InPlace the table's own matrix holds z.
func newBootImpute(r *Result) *bootImpute {
	imp := r.Imputation
	if imp == nil || len(imp.Cells) == 0 || len(r.Options.Exclude) > 0 {
		// With Options.Exclude the fitted rows are renumbered and the
		// cells no longer line up; those resamples keep the imputed values.
		return nil
	}
	n, p := r.Z.Dims()
	x := mat.NewDense(n, p, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < p; j++ {
			x.Set(i, j, r.Z.At(i, j)*r.Prep.Scales[j]+r.Prep.Means[j])
		}
	}
	bi := &bootImpute{x: x, missing: make([][]int, n), s: imp.Components, scaling: r.Prep.Scaling}
	for _, c := range imp.Cells {
		bi.missing[c.Row] = append(bi.missing[c.Row], c.Var)
	}
	return bi
}

// imputedResample draws the rows counts says, redoes the imputation of
// their missing cells (starting from the full table's imputed values), the
// preprocessing and the decomposition, and aligns the loadings as the tall
// path does. It copies the rows: the cross-product shortcut of the tall
// path cannot follow cells that change with every resample.
func (b *bootstrapper) imputedResample(counts []int32) resampleResult {
	bi := b.imp
	n, p := b.n, b.p
	xb := mat.NewDense(n, p, nil)
	var cells []intake.CellRef
	r := 0
	for i, c := range counts {
		for ; c > 0; c-- {
			copy(xb.RawRowView(r), bi.x.RawRowView(i))
			for _, j := range bi.missing[i] {
				cells = append(cells, intake.CellRef{Row: r, Var: j})
			}
			r++
		}
	}
	if len(cells) > 0 {
		if _, err := ImputeRegularised(xb, cells, bi.s, bi.scaling, ImputeTolerance, ImputeMaxIterations); err != nil {
			return resampleResult{}
		}
	}
	pp, err := FitPreprocessing(xb, intake.TransformNone, bi.scaling)
	if err != nil {
		return resampleResult{}
	}
	for _, c := range pp.Scales {
		if !(c > 0) || math.IsInf(c, 0) {
			return resampleResult{}
		}
	}
	d, err := Decompose(pp.Apply(nil, xb))
	if err != nil || d.Components() < b.k {
		return resampleResult{}
	}
	res := resampleResult{ok: true, eigen: make([]float64, b.m), total: d.TotalVariance()}
	copy(res.eigen, d.Eigenvalues)
	for a := 0; a < b.k; a++ {
		if d.Eigenvalues[a] <= 0 {
			return resampleResult{}
		}
	}
	v := mat.DenseCopyOf(d.Loadings.Slice(0, p, 0, b.k))
	b.align(&res, v, nil)
	res.loadings = v.RawMatrix().Data
	return res
}
