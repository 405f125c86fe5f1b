package intake

import (
	"cmp"
	"math"
	"slices"
)

// recordMissing notes, before any row is dropped or cell filled, how many
// cells each candidate variable lacks and which rows lack which variables,
// so that the evidence of missing cells is the same under every policy.
func (r *tableReader) recordMissing(t *Table) {
	s, p := r.sink, len(r.varCols)
	t.MissingPerVariable = slices.Clone(s.colMissing)
	if s.nMissing == 0 {
		return
	}
	for i := range s.ids {
		if i >= len(s.rowMissing) || !s.rowMissing[i] {
			continue
		}
		row := DroppedRow{ID: s.ids[i], Line: s.lines[i]}
		for k := 0; k < p; k++ {
			if math.IsNaN(s.values[i*p+k]) {
				row.Missing = append(row.Missing, r.names[r.varCols[k]])
			}
		}
		t.MissingRows = append(t.MissingRows, row)
	}
}

// keepMissingCounts aligns MissingPerVariable with the variables kept
// (keep: ascending indices into the candidates) and leaves the variables
// that were left out (constant ones) out of MissingRows too, so that the
// per-sample and per-variable counts describe the same cells.
func (r *tableReader) keepMissingCounts(t *Table, keep []int) {
	counts := make([]int, len(keep))
	kept := make(map[string]bool, len(keep))
	for c, k := range keep {
		if k < len(t.MissingPerVariable) {
			counts[c] = t.MissingPerVariable[k]
		}
		kept[r.names[r.varCols[k]]] = true
	}
	t.MissingPerVariable = counts
	rows := t.MissingRows[:0]
	for _, row := range t.MissingRows {
		row.Missing = slices.DeleteFunc(slices.Clone(row.Missing), func(v string) bool { return !kept[v] })
		if len(row.Missing) > 0 {
			rows = append(rows, row)
		}
	}
	t.MissingRows = slices.Clip(rows)
}

// VariableMissing is one variable's missing cells among the rows as read.
type VariableMissing struct {
	Variable string  `json:"variable"`
	Cells    int     `json:"missing_cells"`
	Share    float64 `json:"missing_share"` // Cells / RowsRead
}

// MissingByVariable returns every variable's missing cells and share, in
// the order of Variables.
func (t *Table) MissingByVariable() []VariableMissing {
	out := make([]VariableMissing, len(t.Variables))
	for j, v := range t.Variables {
		out[j].Variable = v
		if j < len(t.MissingPerVariable) {
			out[j].Cells = t.MissingPerVariable[j]
		}
		if t.RowsRead > 0 {
			out[j].Share = float64(out[j].Cells) / float64(t.RowsRead)
		}
	}
	return out
}

// SampleMissing is one sample (a row as read) with missing cells.
type SampleMissing struct {
	ID        string   `json:"id"`
	Line      int      `json:"line"`
	Cells     int      `json:"missing_cells"`
	Share     float64  `json:"missing_share"` // Cells / number of variables
	Variables []string `json:"variables"`     // the missing ones, in file order
	Dropped   bool     `json:"dropped"`       // left out under MissingDrop
}

// MissingBySample returns the samples with any missing cell, worst first
// (most missing cells, then file order).
func (t *Table) MissingBySample() []SampleMissing {
	out := make([]SampleMissing, len(t.MissingRows))
	for i, row := range t.MissingRows {
		out[i] = SampleMissing{ID: row.ID, Line: row.Line, Cells: len(row.Missing),
			Variables: row.Missing, Dropped: t.Missing == MissingDrop}
		if p := len(t.Variables); p > 0 {
			out[i].Share = float64(out[i].Cells) / float64(p)
		}
	}
	slices.SortStableFunc(out, func(a, b SampleMissing) int {
		return cmp.Or(b.Cells-a.Cells, a.Line-b.Line)
	})
	return out
}

// FilledCell is one cell whose value was supplied rather than read: where
// it is in the file and the value used (on the transformed scale).
type FilledCell struct {
	ID       string  `json:"id"`
	Variable string  `json:"variable"`
	Line     int     `json:"line"`
	Column   int     `json:"column"` // 1-based column in the file; 0 for tables built in memory
	Value    float64 `json:"value"`
}

// FilledCells lists the cells of MissingAt with the value value(row, var)
// gives for each, in MissingAt's order (row-major).
func (t *Table) FilledCells(value func(row, v int) float64) []FilledCell {
	out := make([]FilledCell, 0, len(t.MissingAt))
	for _, c := range t.MissingAt {
		f := FilledCell{ID: t.IDs[c.Row], Variable: t.Variables[c.Var], Value: value(c.Row, c.Var)}
		if c.Row < len(t.Lines) {
			f.Line = t.Lines[c.Row]
		}
		if c.Var < len(t.Columns) {
			f.Column = t.Columns[c.Var]
		}
		out = append(out, f)
	}
	return out
}
