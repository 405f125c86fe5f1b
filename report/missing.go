package report

import (
	"fmt"
	"slices"
	"strconv"
	"strings"

	"pcqc/analysis"
	"pcqc/analysis/intake"
)

// The evidence of missing cells: shares per variable and per sample (as
// read, before any row was dropped), the samples dropped, and the cells
// imputed with the values used — in summary.json, in CSV files and in the
// report's data section.

// Files holding the full lists; the report shows a capped part of each.
const (
	missingByVariableCSV = "missing-by-variable.csv"
	missingBySampleCSV   = "missing-by-sample.csv"
	imputedCellsCSV      = "imputed-cells.csv"
)

// How many rows of each list the report shows.
const (
	missingVariablesShown = 30
	missingSamplesShown   = 20
	imputedCellsShown     = 20
)

// MissingInfo is summary.json's "missing".
type MissingInfo struct {
	Policy     string                   `json:"policy"`
	Cells      int                      `json:"cells"`
	ByVariable []intake.VariableMissing `json:"by_variable"`
	// BySample lists the samples with any missing cell, worst first.
	BySample []intake.SampleMissing `json:"by_sample"`
	// Dropped lists the samples removed under --missing drop, in file
	// order, with the variables they lacked.
	Dropped []intake.DroppedRow `json:"dropped_samples"`
	// Imputed lists every cell filled in under --missing mean or
	// iterative, in file order, with the value used (transformed scale,
	// 12 significant digits).
	Imputed []intake.FilledCell `json:"imputed_cells"`
}

// imputedCells is the result's list of filled cells, each value rounded to
// 12 significant digits: recovered from the preprocessed matrix it may
// differ from the value used in its last bits, which no reader needs.
func imputedCells(res *analysis.Result) []intake.FilledCell {
	return roundCells(res.ImputedCells())
}

// batchImputedCells lists the cells of a new batch filled with the
// training means; apply never preprocesses the batch's matrix in place.
func batchImputedCells(t *intake.Table) []intake.FilledCell {
	return roundCells(t.FilledCells(func(i, j int) float64 { return t.X.At(i, j) }))
}

func roundCells(cells []intake.FilledCell) []intake.FilledCell {
	for i := range cells {
		cells[i].Value, _ = strconv.ParseFloat(strconv.FormatFloat(cells[i].Value, 'g', 12, 64), 64)
	}
	return cells
}

func missingInfo(t *intake.Table, cells []intake.FilledCell) MissingInfo {
	m := MissingInfo{Policy: string(t.Missing), Cells: t.MissingCells,
		ByVariable: t.MissingByVariable(), BySample: t.MissingBySample(),
		Dropped: t.DroppedRows, Imputed: cells}
	if m.BySample == nil {
		m.BySample = []intake.SampleMissing{}
	}
	if m.Dropped == nil {
		m.Dropped = []intake.DroppedRow{}
	}
	if m.Imputed == nil {
		m.Imputed = []intake.FilledCell{}
	}
	return m
}

// writeMissingTables writes the three lists as CSV when any cell was
// missing; a table without gaps gets none of them.
func writeMissingTables(join func(string) string, t *intake.Table, cells []intake.FilledCell) error {
	if t.MissingCells == 0 {
		return nil
	}
	vars := [][]string{{"variable", "missing_cells", "missing_share"}}
	for _, v := range t.MissingByVariable() {
		vars = append(vars, []string{v.Variable, strconv.Itoa(v.Cells), formatShare(v.Share)})
	}
	samples := [][]string{{"sample", "line", "missing_cells", "missing_share", "missing_variables", "dropped"}}
	for _, s := range t.MissingBySample() {
		samples = append(samples, []string{s.ID, strconv.Itoa(s.Line), strconv.Itoa(s.Cells), formatShare(s.Share),
			strings.Join(s.Variables, ";"), strconv.FormatBool(s.Dropped)})
	}
	files := []struct {
		name string
		rows [][]string
	}{{missingByVariableCSV, vars}, {missingBySampleCSV, samples}}
	if len(cells) > 0 {
		rows := [][]string{{"sample", "variable", "line", "column", "value_used"}}
		for _, c := range cells {
			rows = append(rows, []string{c.ID, c.Variable, strconv.Itoa(c.Line), strconv.Itoa(c.Column), strconv.FormatFloat(c.Value, 'g', -1, 64)})
		}
		files = append(files, struct {
			name string
			rows [][]string
		}{imputedCellsCSV, rows})
	}
	for _, f := range files {
		if err := writeCSV(join(f.name), f.rows); err != nil {
			return err
		}
	}
	return nil
}

// formatShare writes a share in [0, 1] to 6 decimals, so that CSV readers
// get the number rather than a percentage string.
func formatShare(x float64) string { return strconv.FormatFloat(x, 'f', 6, 64) }

// MissingBlock is the report's account of the missing cells; Shown is
// false when there were none.
type MissingBlock struct {
	Shown    bool
	RowsRead int
	// Variables with any missing cell, worst first.
	VarHeader    []string
	VarRows      [][]string
	VarTruncated string
	// Samples with any missing cell, worst first; under --missing drop
	// these are the samples dropped.
	SampleNote      string
	SampleHeader    []string
	SampleRows      [][]string
	SampleTruncated string
	// Imputed cells with the values used, in file order.
	ImputedNote      string
	ImputedHeader    []string
	ImputedRows      [][]string
	ImputedTruncated string
}

func missingBlock(t *intake.Table, cells []intake.FilledCell, training bool) MissingBlock {
	if t.MissingCells == 0 {
		return MissingBlock{}
	}
	b := MissingBlock{Shown: true, RowsRead: t.RowsRead, VarHeader: []string{"Variable", "Missing cells", "Share of rows read"}}
	var vars []intake.VariableMissing
	for _, v := range t.MissingByVariable() {
		if v.Cells > 0 {
			vars = append(vars, v)
		}
	}
	sortWorstFirst(vars)
	for _, v := range vars[:min(len(vars), missingVariablesShown)] {
		b.VarRows = append(b.VarRows, []string{v.Variable, strconv.Itoa(v.Cells), percent(v.Share)})
	}
	b.VarTruncated = truncatedNote(len(vars), missingVariablesShown, "variables with missing cells", missingByVariableCSV)

	samples := t.MissingBySample()
	b.SampleNote = fmt.Sprintf("%s with missing cells, worst first:", countNoun(len(samples), "sample"))
	if t.Missing == intake.MissingDrop {
		b.SampleNote = fmt.Sprintf("%s dropped for missing cells (--missing drop), worst first:", countNoun(len(samples), "sample"))
	}
	b.SampleHeader = []string{"Sample", "Line", "Missing cells", "Share of variables", "Missing variables"}
	for _, s := range samples[:min(len(samples), missingSamplesShown)] {
		b.SampleRows = append(b.SampleRows, []string{s.ID, strconv.Itoa(s.Line), strconv.Itoa(s.Cells), percent(s.Share),
			intake.ListNames(s.Variables, 6)})
	}
	b.SampleTruncated = truncatedNote(len(samples), missingSamplesShown, "samples with missing cells", missingBySampleCSV)

	if len(cells) == 0 {
		return b
	}
	how := "the mean of the variable's observed values"
	switch {
	case training:
		how = "the training mean of the variable"
	case t.Missing == intake.MissingIterative:
		how = "iterative PCA"
	}
	b.ImputedNote = fmt.Sprintf("%s imputed by %s; the values used, on the transformed scale:", countNoun(len(cells), "cell"), how)
	b.ImputedHeader = []string{"Sample", "Variable", "Line", "Column", "Value used"}
	for _, c := range cells[:min(len(cells), imputedCellsShown)] {
		b.ImputedRows = append(b.ImputedRows, []string{c.ID, c.Variable, strconv.Itoa(c.Line), strconv.Itoa(c.Column), strconv.FormatFloat(c.Value, 'g', 6, 64)})
	}
	b.ImputedTruncated = truncatedNote(len(cells), imputedCellsShown, "imputed cells", imputedCellsCSV)
	return b
}

func sortWorstFirst(vars []intake.VariableMissing) {
	slices.SortStableFunc(vars, func(a, b intake.VariableMissing) int { return b.Cells - a.Cells })
}

func percent(x float64) string { return fmt.Sprintf("%.1f %%", 100*x) }

// truncatedNote says where the rest of a capped list is, or "" when the
// whole list is shown.
func truncatedNote(n, shown int, what, file string) string {
	if n <= shown {
		return ""
	}
	return fmt.Sprintf("The first %d of %d %s are shown; all are in %s.", shown, n, what, file)
}
