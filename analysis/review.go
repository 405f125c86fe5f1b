package analysis

import (
	"fmt"
	"slices"
	"strings"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
)

// Their loadings, scores and variance: the tables another person reports,
// read tolerantly and matched to the raw data.

// LoadingsLayout says how a loadings table is laid out.
type LoadingsLayout string

const (
	LayoutVariableRows    LoadingsLayout = "variables as rows, components as columns"
	LayoutVariableColumns LoadingsLayout = "variables as columns, components as rows (transposed)"
)

// TheirLoadings are another person's loadings, rows in the order of the data
// variables they cover.
type TheirLoadings struct {
	File       string
	Layout     LoadingsLayout
	Components []string   // their component names, in their order
	Variables  []int      // data-variable index of each row of V, ascending
	V          *mat.Dense // len(Variables) × k
	Decimals   int        // most digits printed after the decimal point
	Notes      []string
}

// nonComponentNames are numeric columns of a loadings table that are not
// components (summaries some programs print beside the loadings).
var nonComponentNames = []string{"mean", "sd", "std", "stdev", "scale", "communality", "communalities", "uniqueness", "h2", "u2", "com", "complexity", "weight"}

// ParseLoadings reads a loadings table against the data's variables. The
// layout is found by where the variable names are: in a column (variables as
// rows) or in the header (variables as columns).
func ParseLoadings(t *intake.LooseTable, variables []string) (*TheirLoadings, error) {
	m := intake.NewNameMatcher(variables)
	countMatches := func(cells []string) int {
		n := 0
		for _, c := range cells {
			if _, ok := m.Find(c); ok {
				n++
			}
		}
		return n
	}
	// Variables as rows: the text column with the most variable names.
	bestCol, bestRows := -1, 0
	for j := range t.Header {
		if t.NumericColumn(j) {
			continue
		}
		col := make([]string, len(t.Rows))
		for i, r := range t.Rows {
			col[i] = r[j]
		}
		if c := countMatches(col); c > bestRows {
			bestCol, bestRows = j, c
		}
	}
	inHeader := countMatches(t.Header)
	if bestRows == 0 && inHeader == 0 {
		return nil, &intake.InputError{File: t.Name, Line: 1, Reason: fmt.Sprintf("no variable name in common with the data (the data's variables are %s); check that these are loadings of this data set", intake.ListNames(variables, 8))}
	}
	l := &TheirLoadings{File: t.Name}
	type entry struct {
		variable int
		values   []float64
	}
	var entries []entry
	var cells []string
	if bestRows >= inHeader {
		l.Layout = LayoutVariableRows
		var compCols []int
		var text, summaries, unmatched []string
		for j, h := range t.Header {
			switch {
			case j == bestCol:
			case !t.NumericColumn(j):
				text = append(text, intake.QuoteText(h))
			case slices.Contains(nonComponentNames, strings.ToLower(h)):
				summaries = append(summaries, intake.QuoteText(h))
			default:
				compCols = append(compCols, j)
				l.Components = append(l.Components, h)
			}
		}
		if len(text) > 0 {
			l.Notes = append(l.Notes, intake.IgnoredNote(text, "column", "columns", "is not numeric", "are not numeric"))
		}
		if len(summaries) > 0 {
			l.Notes = append(l.Notes, intake.IgnoredNote(summaries, "column", "columns", "is a summary, not a component,", "are summaries, not components,"))
		}
		if len(compCols) == 0 {
			return nil, &intake.InputError{File: t.Name, Line: 1, Reason: "no numeric component column beside the variable names"}
		}
		seen := map[int]bool{}
		for i, r := range t.Rows {
			v, ok := m.Find(r[bestCol])
			if !ok {
				unmatched = append(unmatched, fmt.Sprintf("%s (line %d)", intake.QuoteText(r[bestCol]), t.Lines[i]))
				continue
			}
			if seen[v] {
				return nil, &intake.InputError{File: t.Name, Line: t.Lines[i], Column: bestCol + 1, Text: r[bestCol], Reason: "variable listed twice:"}
			}
			seen[v] = true
			e := entry{variable: v}
			for _, j := range compCols {
				x, err := t.Value(i, j, "loading")
				if err != nil {
					return nil, err
				}
				e.values = append(e.values, x)
				cells = append(cells, r[j])
			}
			entries = append(entries, e)
		}
		if len(unmatched) > 0 {
			l.Notes = append(l.Notes, intake.IgnoredNote(unmatched, "row", "rows", "names no data variable", "name no data variable"))
		}
	} else {
		l.Layout = LayoutVariableColumns
		var varCols []int
		var unmatched, summaries []string
		seen := map[int]bool{}
		nameCol := -1
		for j, h := range t.Header {
			if v, ok := m.Find(h); ok && !seen[v] {
				seen[v] = true
				varCols = append(varCols, j)
				continue
			}
			if nameCol < 0 && !t.NumericColumn(j) {
				nameCol = j
				continue
			}
			unmatched = append(unmatched, intake.QuoteText(h))
		}
		if len(unmatched) > 0 {
			l.Notes = append(l.Notes, intake.IgnoredNote(unmatched, "column", "columns", "names no data variable", "name no data variable"))
		}
		var compRows []int
		for i, r := range t.Rows {
			name := fmt.Sprintf("row %d", i+1)
			if nameCol >= 0 {
				name = r[nameCol]
			}
			if slices.Contains(nonComponentNames, strings.ToLower(name)) {
				summaries = append(summaries, fmt.Sprintf("%s (line %d)", intake.QuoteText(name), t.Lines[i]))
				continue
			}
			compRows = append(compRows, i)
			l.Components = append(l.Components, name)
		}
		if len(summaries) > 0 {
			l.Notes = append(l.Notes, intake.IgnoredNote(summaries, "row", "rows", "is a summary, not a component,", "are summaries, not components,"))
		}
		values := make([][]float64, len(varCols))
		for _, i := range compRows {
			for c, j := range varCols {
				x, err := t.Value(i, j, "loading")
				if err != nil {
					return nil, err
				}
				values[c] = append(values[c], x)
				cells = append(cells, t.Rows[i][j])
			}
		}
		for c, j := range varCols {
			v, _ := m.Find(t.Header[j])
			entries = append(entries, entry{variable: v, values: values[c]})
		}
	}
	if len(entries) < 2 {
		return nil, &intake.InputError{File: t.Name, Reason: fmt.Sprintf("the loadings cover %d data variable; at least 2 are needed", len(entries))}
	}
	k := len(l.Components)
	if k == 0 || k >= len(entries) {
		return nil, &intake.InputError{File: t.Name, Reason: fmt.Sprintf("%d components for %d variables: a loadings table has fewer components than variables", k, len(entries))}
	}
	slices.SortFunc(entries, func(a, b entry) int { return a.variable - b.variable })
	l.V = mat.NewDense(len(entries), k, nil)
	for r, e := range entries {
		l.Variables = append(l.Variables, e.variable)
		l.V.SetRow(r, e.values)
	}
	if missing := len(variables) - len(entries); missing > 0 {
		l.Notes = append(l.Notes, fmt.Sprintf("the loadings cover %d of the data's %d variables; the review uses those %d", len(entries), len(variables), len(entries)))
	}
	l.Decimals = intake.Decimals(cells)
	return l, nil
}

// TheirScores are another person's scores, one row per data sample.
type TheirScores struct {
	File      string
	T         *mat.Dense // n × k_s, rows in data order
	Columns   []string
	MatchedBy string // how rows were matched to samples, for the report
	Decimals  int
	Notes     []string
}

// ParseScores reads a scores table and matches its rows to the data's
// samples: by id when a column holds the sample ids, otherwise by row order.
func ParseScores(t *intake.LooseTable, ids []string, k int) (*TheirScores, error) {
	n := len(ids)
	m := intake.NewNameMatcher(ids)
	idCol, best := -1, 0
	for j := range t.Header {
		hits := 0
		for _, r := range t.Rows {
			if _, ok := m.Exact(r[j]); ok {
				hits++
			}
		}
		if hits > best && (hits*2 >= len(t.Rows) || !t.NumericColumn(j)) {
			idCol, best = j, hits
		}
	}
	// A numeric column of 1..n is as likely a component as a row number; only
	// treat it as ids when the data's ids are not row numbers themselves.
	if idCol >= 0 && t.NumericColumn(idCol) && best*2 < len(t.Rows) {
		idCol = -1
	}
	s := &TheirScores{File: t.Name}
	// A first column counting the rows, 0, 1, 2 … (pandas' index) or
	// 1, 2, 3 … (R's row names of a data frame without them), is an
	// index, not a component: scores have mean zero. Counted from 0 it
	// would match row-number ids one row off, so the rows are taken in
	// order instead.
	indexCol := -1
	if len(t.Header) > 1 && t.NumericColumn(0) && isRowIndex(t, 0) {
		first, _ := t.Number(t.Rows[0][0])
		_, idZero := m.Exact("0")
		switch {
		case idCol == 0 && first == 0 && !idZero:
			idCol, indexCol = -1, 0
		case idCol != 0:
			indexCol = 0
		}
	}
	if indexCol == 0 {
		name := t.Header[0]
		if name == "" {
			name = "(unnamed)"
		}
		s.Notes = append(s.Notes, fmt.Sprintf("column %s counts the rows and was read as an index", intake.QuoteText(name)))
	}
	var scoreCols []int
	var text []string
	for j, h := range t.Header {
		switch {
		case j == idCol, j == indexCol:
		case !t.NumericColumn(j):
			text = append(text, intake.QuoteText(h))
		default:
			scoreCols = append(scoreCols, j)
		}
	}
	if len(text) > 0 {
		s.Notes = append(s.Notes, intake.IgnoredNote(text, "column", "columns", "is not numeric", "are not numeric"))
	}
	if len(scoreCols) == 0 {
		return nil, &intake.InputError{File: t.Name, Line: 1, Reason: "no numeric score column"}
	}
	if len(scoreCols) > k {
		s.Notes = append(s.Notes, fmt.Sprintf("%d score columns for %d loadings components; the first %d are used", len(scoreCols), k, k))
		scoreCols = scoreCols[:k]
	}
	for _, j := range scoreCols {
		s.Columns = append(s.Columns, t.Header[j])
	}
	s.T = mat.NewDense(n, len(scoreCols), nil)
	var cells []string
	if idCol >= 0 {
		s.MatchedBy = fmt.Sprintf("by sample id (column %q)", t.Header[idCol])
		if t.Header[idCol] == "" {
			s.MatchedBy = "by sample id (the row names, in a column without a header)"
		}
		filled := make([]bool, n)
		var unknown []string
		for i, r := range t.Rows {
			row, ok := m.Exact(r[idCol])
			if !ok {
				unknown = append(unknown, fmt.Sprintf("%s (line %d)", intake.QuoteText(r[idCol]), t.Lines[i]))
				continue
			}
			if filled[row] {
				return nil, &intake.InputError{File: t.Name, Line: t.Lines[i], Column: idCol + 1, Text: r[idCol], Reason: "sample listed twice:"}
			}
			filled[row] = true
			for c, j := range scoreCols {
				v, err := t.Value(i, j, "score")
				if err != nil {
					return nil, err
				}
				s.T.Set(row, c, v)
				cells = append(cells, r[j])
			}
		}
		if len(unknown) > 0 {
			s.Notes = append(s.Notes, intake.IgnoredNote(unknown, "sample", "samples", "is not in the data", "are not in the data"))
		}
		if missing := slices.Index(filled, false); missing >= 0 {
			count := 0
			for _, f := range filled {
				if !f {
					count++
				}
			}
			return nil, &intake.InputError{File: t.Name, Reason: fmt.Sprintf("scores are missing for %d of the %d samples (the first is %q)", count, n, ids[missing])}
		}
	} else {
		if len(t.Rows) != n {
			return nil, &intake.InputError{File: t.Name, Reason: fmt.Sprintf("%d score rows for %d samples in the data, and no column of sample ids to match them by", len(t.Rows), n)}
		}
		s.MatchedBy = "by row order (no column holds the sample ids)"
		for i, r := range t.Rows {
			for c, j := range scoreCols {
				v, err := t.Value(i, j, "score")
				if err != nil {
					return nil, err
				}
				s.T.Set(i, c, v)
				cells = append(cells, r[j])
			}
		}
	}
	s.Decimals = intake.Decimals(cells)
	return s, nil
}
