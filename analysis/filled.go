package analysis

import (
	"cmp"
	"slices"

	"pcqc/analysis/intake"
)

// ImputedCells lists every cell that was filled in rather than read (under
// --missing mean or iterative), with the value the analysis used, on the
// transformed scale of the table, in file order. The cells of rows left
// out of the fit (Options.Exclude) are listed too.
//
// Under Options.InPlace the table's matrix holds the preprocessed values
// afterwards, so a value is then recovered by undoing the preprocessing,
// x = z·scale + mean; the result equals the value used to rounding (a few
// units in the last place).
func (r *Result) ImputedCells() []intake.FilledCell {
	t := r.Table
	value := func(i, j int) float64 { return t.X.At(i, j) }
	if t.X == r.Z {
		value = func(i, j int) float64 { return r.Z.At(i, j)*r.Prep.Scales[j] + r.Prep.Means[j] }
	}
	cells := t.FilledCells(value)
	if r.Excluded != nil && r.Excluded.Application != nil {
		ex := r.Excluded.Application.Table
		cells = append(cells, ex.FilledCells(func(i, j int) float64 { return ex.X.At(i, j) })...)
		slices.SortStableFunc(cells, func(a, b intake.FilledCell) int { return cmp.Or(a.Line-b.Line, a.Column-b.Column) })
	}
	return cells
}
