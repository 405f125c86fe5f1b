package analysis

import (
	"fmt"
	"io"
	"strconv"
	"strings"
	"unicode"
)

// LooseTable is a table read as text, for the tables other people send
// with their analysis (loadings, scores, variance): any of the three
// delimiters, quoted headers, decimal commas in semicolon files, and a
// header row whose first cell may be empty (row names written by R or a
// spreadsheet).
type LooseTable struct {
	Name      string
	Delimiter byte
	Header    []string
	Rows      [][]string
	Lines     []int // line of each row
}

// ReadLooseTable reads the named file; enc, when given, is its encoding
// (default UTF-8).
func ReadLooseTable(path string, enc ...Encoding) (*LooseTable, error) {
	f, err := openData(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return ReadLooseTableFrom(path, f, enc...)
}

// ReadLooseTableFrom reads a loose table from r; name is used in messages;
// enc, when given, is its encoding (default UTF-8).
func ReadLooseTableFrom(name string, r io.Reader, enc ...Encoding) (*LooseTable, error) {
	src, err := openText(name, r, 0, encodingOr(enc))
	if err != nil {
		return nil, err
	}
	delim := src.delimiter(0)
	rr := src.records(delim)
	t := &LooseTable{Name: name, Delimiter: delim}
	header, err := rr.read()
	if err == io.EOF {
		return nil, &InputError{File: name, Reason: "empty file"}
	}
	if err != nil {
		return nil, readError(name, rr, err)
	}
	for _, h := range header {
		t.Header = append(t.Header, strings.TrimSpace(string(h)))
	}
	for {
		rec, err := rr.read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, readError(name, rr, err)
		}
		row := make([]string, len(rec))
		for j, c := range rec {
			row[j] = strings.TrimSpace(string(c))
		}
		// A row one field longer than the header: the header lacks the
		// row-name column (R's write.table default).
		if len(row) == len(t.Header)+1 && len(t.Rows) == 0 {
			t.Header = append([]string{""}, t.Header...)
		}
		if len(row) != len(t.Header) {
			return nil, &InputError{File: name, Line: rr.recLine, Column: min(len(row), len(t.Header)) + 1,
				Reason: fmt.Sprintf("ragged row: %d fields but the header has %d", len(row), len(t.Header))}
		}
		t.Rows = append(t.Rows, row)
		t.Lines = append(t.Lines, rr.recLine)
	}
	if len(t.Rows) == 0 {
		return nil, &InputError{File: name, Line: 1, Reason: "the file has a header but no rows"}
	}
	return t, nil
}

// Number reads a cell of a loose table; with semicolons as delimiter a
// decimal comma is accepted too.
func (t *LooseTable) Number(cell string) (float64, bool) {
	v, kind := parseCell([]byte(cell))
	if kind == cellNumber {
		return v, true
	}
	if t.Delimiter != ',' && strings.Count(cell, ",") == 1 && !strings.Contains(cell, ".") {
		v, kind = parseCell([]byte(strings.Replace(cell, ",", ".", 1)))
		return v, kind == cellNumber
	}
	return 0, false
}

// NumericColumn reports whether every cell of column j is a number.
func (t *LooseTable) NumericColumn(j int) bool {
	for _, r := range t.Rows {
		if _, ok := t.Number(r[j]); !ok {
			return false
		}
	}
	return true
}

// decimals returns the most digits after the decimal point among the cells.
func decimals(cells []string) int {
	best := 0
	for _, c := range cells {
		c = strings.ToLower(c)
		if i := strings.IndexAny(c, "e"); i >= 0 {
			c = c[:i]
		}
		if i := strings.IndexAny(c, ".,"); i >= 0 {
			best = max(best, len(c)-i-1)
		}
	}
	return best
}

// nameKey folds a name for loose matching: lower case, letters and digits
// only, so "Urban Pop", "urban.pop" and "UrbanPop" meet.
func nameKey(s string) string {
	var b strings.Builder
	for _, r := range strings.ToLower(s) {
		if unicode.IsLetter(r) || unicode.IsDigit(r) {
			b.WriteRune(r)
		}
	}
	return b.String()
}

// nameMatcher finds data variables (or sample ids) by exact name first,
// then by folded name when that is unambiguous.
type nameMatcher struct {
	exact  map[string]int
	folded map[string]int // -1 when two names fold alike
}

func newNameMatcher(names []string) nameMatcher {
	m := nameMatcher{exact: map[string]int{}, folded: map[string]int{}}
	for i, n := range names {
		m.exact[n] = i
		k := nameKey(n)
		if _, dup := m.folded[k]; dup {
			m.folded[k] = -1
		} else {
			m.folded[k] = i
		}
	}
	return m
}

func (m nameMatcher) find(s string) (int, bool) {
	if i, ok := m.exact[strings.TrimSpace(s)]; ok {
		return i, true
	}
	if i, ok := m.folded[nameKey(s)]; ok && i >= 0 && nameKey(s) != "" {
		return i, true
	}
	return -1, false
}

func itoa(i int) string { return strconv.Itoa(i) }
