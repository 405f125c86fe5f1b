package intake

import (
	"cmp"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// Subset returns the table restricted to the given variables (indices into
// Variables, ascending); rows and provenance are shared.
func (t *Table) Subset(vars []int) *Table {
	n := t.Rows()
	x := mat.NewDense(n, len(vars), nil)
	names := make([]string, len(vars))
	var units []string
	if t.Units != nil {
		units = make([]string, len(vars))
	}
	for c, j := range vars {
		names[c] = t.Variables[j]
		if units != nil {
			units[c] = t.Units[j]
		}
		for i := 0; i < n; i++ {
			x.Set(i, c, t.X.At(i, j))
		}
	}
	out := *t
	out.X, out.Variables, out.Units = x, names, units
	keep := map[int]bool{}
	to := map[int]int{}
	for c, j := range vars {
		keep[j] = true
		to[j] = c
	}
	out.Censored = nil
	for _, cc := range t.Censored {
		if c, ok := to[cc.Var]; ok {
			cc.Var = c
			out.Censored = append(out.Censored, cc)
		}
	}
	out.DroppedVariables = append([]DroppedVariable(nil), t.DroppedVariables...)
	for j, name := range t.Variables {
		if !keep[j] {
			out.DroppedVariables = append(out.DroppedVariables, DroppedVariable{Name: name, Reason: "not in the reviewed loadings"})
		}
	}
	return &out
}

// SelectRows copies the given rows of t into a new table.
func (t *Table) SelectRows(rows []int) *Table {
	_, p := t.X.Dims()
	x := mat.NewDense(max(len(rows), 1), p, nil)
	out := *t
	out.IDs, out.Lines, out.Groups = nil, nil, nil
	for r, i := range rows {
		copy(x.RawRowView(r), t.X.RawRowView(i))
		out.IDs = append(out.IDs, t.IDs[i])
		if i < len(t.Lines) {
			out.Lines = append(out.Lines, t.Lines[i])
		}
		if t.Groups != nil {
			out.Groups = append(out.Groups, t.Groups[i])
		}
	}
	// Censored cells follow their rows (rows may come in any order).
	at := map[int][]int{}
	for r, i := range rows {
		at[i] = append(at[i], r)
	}
	out.Censored = nil
	for _, cc := range t.Censored {
		for _, r := range at[cc.Row] {
			cc.Row = r
			out.Censored = append(out.Censored, cc)
		}
	}
	slices.SortStableFunc(out.Censored, func(a, b CensoredCell) int {
		if a.Row != b.Row {
			return a.Row - b.Row
		}
		return a.Var - b.Var
	})
	if len(rows) == 0 {
		x = &mat.Dense{}
	}
	out.X = x
	out.MissingAt = selectCells(t.MissingAt, rows)
	return &out
}

// selectCells renumbers the rows of cells to their places in rows (the
// rows selected, in order), leaving out the cells of rows not selected.
func selectCells(cells []CellRef, rows []int) []CellRef {
	if len(cells) == 0 {
		return nil
	}
	at := make(map[int]int, len(rows))
	for r, i := range rows {
		at[i] = r
	}
	var out []CellRef
	for _, c := range cells {
		if r, ok := at[c.Row]; ok {
			out = append(out, CellRef{Row: r, Var: c.Var})
		}
	}
	slices.SortFunc(out, func(a, b CellRef) int { return cmp.Or(a.Row-b.Row, a.Var-b.Var) })
	return out
}
