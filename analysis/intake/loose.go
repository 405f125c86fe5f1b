package intake

import (
	"fmt"
	"io"
	"math"
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

// ReadLooseTable reads the named file, which must be a regular file of at
// most TheirTable.Max bytes (see OpenRegular); enc, when given, is its
// encoding (default UTF-8).
func ReadLooseTable(path string, enc ...Encoding) (*LooseTable, error) {
	r, err := OpenRegular(path, TheirTable)
	if err != nil {
		return nil, err
	}
	defer r.Close()
	return ReadLooseTableFrom(path, r, enc...)
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
// decimal comma is accepted too. Only finite numbers are numbers; see
// NumberLike for what counts when telling number columns from text.
func (t *LooseTable) Number(cell string) (float64, bool) {
	v, kind := t.parse(cell)
	return v, kind == cellNumber
}

func (t *LooseTable) parse(cell string) (float64, cellKind) {
	v, kind := parseCell([]byte(cell))
	if kind == cellText && t.Delimiter != ',' && strings.Count(cell, ",") == 1 && !strings.Contains(cell, ".") {
		v, kind = parseCell([]byte(strings.Replace(cell, ",", ".", 1)))
	}
	return v, kind
}

// NumberLike reports whether a cell is written as a number, finite or not:
// a column of numbers with one "Inf" or "1e999" among them is a column of
// numbers with a bad cell, to be refused where it is used rather than
// ignored as text.
func (t *LooseTable) NumberLike(cell string) bool {
	_, kind := t.parse(cell)
	return kind == cellNumber || kind == cellInfinite
}

// NumericColumn reports whether every cell of column j is written as a
// number (see NumberLike).
func (t *LooseTable) NumericColumn(j int) bool {
	for _, r := range t.Rows {
		if !t.NumberLike(r[j]) {
			return false
		}
	}
	return true
}

// MaxMagnitude is the largest |value| accepted in another person's loadings,
// scores or variances. As for unscaled data (see checkMagnitude), the review
// squares and multiplies these numbers, and beyond 1e100 the sums of their
// squares leave double precision.
const MaxMagnitude = 1e100

// Value reads the cell of row i, column j for the computation: a number no
// larger than MaxMagnitude in magnitude. Anything else is an InputError
// with the file, line, column, name and cell, saying what the table should
// hold there (what, e.g. "loading").
func (t *LooseTable) Value(i, j int, what string) (float64, error) {
	cell := t.Rows[i][j]
	v, kind := t.parse(cell)
	fail := func(reason string) error {
		return &InputError{File: t.Name, Line: t.Lines[i], Column: j + 1, Name: t.Header[j], Text: cell, Reason: reason}
	}
	switch {
	case kind == cellInfinite:
		return 0, fail(fmt.Sprintf("the %s is infinite or beyond double precision:", what))
	case kind != cellNumber:
		return 0, fail(fmt.Sprintf("cannot read the %s as a number:", what))
	case math.Abs(v) > MaxMagnitude:
		return 0, fail(fmt.Sprintf("the %s is beyond ±1e100, where its square leaves double precision:", what))
	}
	return v, nil
}

// decimals returns the most digits printed after the decimal point among
// the cells (see PrintedDecimals).
func Decimals(cells []string) int {
	best := 0
	for _, c := range cells {
		best = max(best, PrintedDecimals(c))
	}
	return best
}

// MaxDecimals bounds PrintedDecimals: half a unit of the 400th decimal is
// zero in double precision already.
const MaxDecimals = 400

// PrintedDecimals returns the decimal places a number is printed to: the
// digits after the decimal point (or comma) of its mantissa, shifted by its
// exponent, so that "1.234e-05" has 8 (a unit of 1e-8) and "1.5e+03" none.
// Hexadecimal numbers give 0 (their precision is not decimal).
func PrintedDecimals(cell string) int {
	c := strings.TrimLeft(strings.ToLower(strings.TrimSpace(cell)), "+-")
	if strings.HasPrefix(c, "0x") {
		return 0
	}
	mantissa, exp := c, 0
	if i := strings.IndexByte(c, 'e'); i >= 0 {
		mantissa = c[:i]
		e, err := strconv.Atoi(c[i+1:])
		switch {
		case err == nil:
			exp = e
		case strings.HasPrefix(c[i+1:], "-"):
			exp = -MaxDecimals // an exponent beyond int: far below any unit
		default:
			exp = MaxDecimals
		}
	}
	d := 0
	if i := strings.IndexAny(mantissa, ".,"); i >= 0 {
		d = len(mantissa) - i - 1
	}
	return min(max(d-max(exp, -MaxDecimals), 0), MaxDecimals)
}

// IgnoredNote says in one note what was ignored, naming at most three of the
// items, so that a table of 200,000 rows that match nothing gives one line
// rather than 200,000. one and many are the noun ("row", "rows") and why the
// sentence for one and for many ("names no data variable", "name no data
// variable").
func IgnoredNote(items []string, one, many, whyOne, whyMany string) string {
	const shown = 3
	if len(items) == 1 {
		return fmt.Sprintf("%s %s %s and was ignored", one, items[0], whyOne)
	}
	list := strings.Join(items[:min(len(items), shown)], ", ")
	if len(items) > shown {
		return fmt.Sprintf("%d %s %s and were ignored, e.g. %s", len(items), many, whyMany, list)
	}
	return fmt.Sprintf("%d %s %s and were ignored: %s", len(items), many, whyMany, list)
}

// NameKey folds a name for loose matching: lower case, letters and digits
// only, so "Urban Pop", "urban.pop" and "UrbanPop" meet.
func NameKey(s string) string {
	var b strings.Builder
	for _, r := range strings.ToLower(s) {
		if unicode.IsLetter(r) || unicode.IsDigit(r) {
			b.WriteRune(r)
		}
	}
	return b.String()
}

// NameMatcher finds data variables (or sample ids) by exact name first,
// then by folded name when that is unambiguous.
type NameMatcher struct {
	exact  map[string]int
	folded map[string]int // -1 when two names fold alike
}

// NewNameMatcher indexes names for Find and Exact.
func NewNameMatcher(names []string) NameMatcher {
	m := NameMatcher{exact: map[string]int{}, folded: map[string]int{}}
	for i, n := range names {
		m.exact[n] = i
		k := NameKey(n)
		if _, dup := m.folded[k]; dup {
			m.folded[k] = -1
		} else {
			m.folded[k] = i
		}
	}
	return m
}

// Find looks a name up exactly, then folded; ok is false when absent or ambiguous.
func (m NameMatcher) Find(s string) (int, bool) {
	if i, ok := m.exact[strings.TrimSpace(s)]; ok {
		return i, true
	}
	if i, ok := m.folded[NameKey(s)]; ok && i >= 0 && NameKey(s) != "" {
		return i, true
	}
	return -1, false
}

func itoa(i int) string { return strconv.Itoa(i) }

// Exact finds a name as written, without trimming or folding.
func (m NameMatcher) Exact(s string) (int, bool) {
	i, ok := m.exact[s]
	return i, ok
}
