package report

import (
	"fmt"
	"strconv"
	"strings"

	"pcqc/analysis/intake"
)

// Cells written as a limit ("<0.05", ">2000") and replaced under
// --censored half or sqrt2 are listed three ways: every cell in
// summary.json and censored.csv, and in the report a count per variable
// plus the first maxCensoredRows cells, so that a table with hundreds of
// non-detects keeps a readable data section while no substitution goes
// unrecorded.

// maxCensoredRows is how many censored cells the report lists one by one.
const maxCensoredRows = 20

// CensoredInfo is summary.json's record of the censored cells.
type CensoredInfo struct {
	Policy string             `json:"policy"`
	Below  int                `json:"below"`
	Above  int                `json:"above"`
	Cells  []CensoredCellInfo `json:"cells"`
}

// CensoredCellInfo is one censored cell, named by sample and variable and
// placed by line and column in the file. ValueUsed is in the file's units,
// before any transform.
type CensoredCellInfo struct {
	Sample    string  `json:"sample"`
	Variable  string  `json:"variable"`
	Line      int     `json:"line"`
	Column    int     `json:"column"`
	AsWritten string  `json:"as_written"`
	ValueUsed float64 `json:"value_used"`
	Side      string  `json:"side"`
}

// censoredCells names every censored cell of t.
func censoredCells(t *intake.Table) []CensoredCellInfo {
	out := make([]CensoredCellInfo, 0, len(t.Censored))
	for _, c := range t.Censored {
		info := CensoredCellInfo{Sample: t.IDs[c.Row], Variable: t.Variables[c.Var], AsWritten: c.Text, ValueUsed: c.Value, Side: c.Side}
		if c.Row < len(t.Lines) {
			info.Line = t.Lines[c.Row]
		}
		if c.Var < len(t.Columns) {
			info.Column = t.Columns[c.Var]
		}
		out = append(out, info)
	}
	return out
}

// censoredSummary is summary.json's "censored" entry: nil when no cell was
// written as a limit.
func censoredSummary(t *intake.Table) *CensoredInfo {
	if len(t.Censored) == 0 {
		return nil
	}
	info := &CensoredInfo{Policy: string(t.Censoring), Cells: censoredCells(t)}
	for _, c := range t.Censored {
		if c.Side == intake.CensoredAbove {
			info.Above++
		} else {
			info.Below++
		}
	}
	return info
}

// CensoredRows builds censored.csv: one row per censored cell; nil when
// there is none.
func CensoredRows(t *intake.Table) [][]string {
	if len(t.Censored) == 0 {
		return nil
	}
	rows := [][]string{{"sample", "variable", "line", "column", "as_written", "value_used", "side"}}
	for _, c := range censoredCells(t) {
		rows = append(rows, []string{c.Sample, c.Variable, strconv.Itoa(c.Line), strconv.Itoa(c.Column), c.AsWritten, num(c.ValueUsed), c.Side})
	}
	return rows
}

// CensoredBlock is the report's account of the censored cells.
type CensoredBlock struct {
	Summary string     // one line for the data list
	Counts  [][]string // variable, below, above, share of its cells
	Cells   [][]string // sample, variable, as written, value used
	Note    string     // where the rest are, when not all are listed
}

// censoredBlock describes the censored cells of t; nil when there are none.
func censoredBlock(t *intake.Table) *CensoredBlock {
	info := censoredSummary(t)
	if info == nil {
		return nil
	}
	var parts []string
	if info.Below > 0 {
		parts = append(parts, fmt.Sprintf("%s below a limit, %s", countNoun(info.Below, "cell"), censorRule(t.Censoring)))
	}
	if info.Above > 0 {
		parts = append(parts, fmt.Sprintf("%s above a limit, kept at the limit", countNoun(info.Above, "cell")))
	}
	b := &CensoredBlock{Summary: fmt.Sprintf("%s (--censored %s), before any transform", strings.Join(parts, "; "), t.Censoring)}
	below, above := t.CensoredCounts()
	n := t.Rows()
	for k, v := range t.Variables {
		if below[k]+above[k] == 0 {
			continue
		}
		share := float64(below[k]+above[k]) / float64(max(n, 1))
		b.Counts = append(b.Counts, []string{v, strconv.Itoa(below[k]), strconv.Itoa(above[k]), fmt.Sprintf("%.1f %%", 100*share)})
	}
	for i, c := range info.Cells {
		if i == maxCensoredRows {
			b.Note = fmt.Sprintf("The first %d of %d cells written as a limit are listed; censored.csv and summary.json hold all of them.", maxCensoredRows, len(info.Cells))
			break
		}
		b.Cells = append(b.Cells, []string{c.Sample, c.Variable, c.AsWritten, strconv.FormatFloat(c.ValueUsed, 'g', -1, 64)})
	}
	return b
}

// censorRule says in words what a below-limit cell became.
func censorRule(p intake.CensorPolicy) string {
	if p == intake.CensorSqrt2 {
		return "replaced by the limit divided by the square root of 2"
	}
	return "replaced by half the limit"
}

// censoringSentence is the methods sentence on censored cells.
func censoringSentence(t *intake.Table) string {
	info := censoredSummary(t)
	if info == nil {
		return ""
	}
	var parts []string
	if info.Below > 0 {
		parts = append(parts, fmt.Sprintf("%d reported below a detection limit %s %s (Hornung & Reed 1990; Croghan & Egeghy 2003)",
			info.Below, wasWere(info.Below), censorRule(t.Censoring)))
	}
	if info.Above > 0 {
		parts = append(parts, fmt.Sprintf("%d reported above a limit %s kept at the limit", info.Above, wasWere(info.Above)))
	}
	return "Of the cells written as a limit, " + strings.Join(parts, ", and ") + ", before any transform."
}
