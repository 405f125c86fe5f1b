package intake

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"unsafe"

	"gonum.org/v1/gonum/mat"
)

// MissingPolicy says what to do with missing cells in the variables.
type MissingPolicy string

const (
	// MissingFail stops at the first missing cell and names it.
	MissingFail MissingPolicy = "fail"
	// MissingDrop removes every row that has a missing cell.
	MissingDrop MissingPolicy = "drop"
	// MissingMean replaces a missing cell by the mean of its column's
	// transformed values, so that after centring it sits exactly at zero and
	// pulls no component towards itself.
	MissingMean MissingPolicy = "mean"
	// MissingIterative starts each missing cell at its column's mean, as
	// MissingMean does, and records where the cells were (Table.MissingAt)
	// so that package analysis can impute them by iterative PCA.
	MissingIterative MissingPolicy = "iterative"
)

// ReadOptions selects and validates the part of a table that is analysed.
type ReadOptions struct {
	// Delimiter is the field separator; 0 detects it from the header line
	// (tab, semicolon or comma).
	Delimiter byte
	// IDColumn names the sample-id column. Empty means: the first column if
	// it is not numeric, otherwise the 1-based data-row numbers.
	IDColumn string
	// GroupColumn names a label column (used to colour plots; never a variable).
	GroupColumn string
	// Columns, when not empty, lists the variables to analyse.
	Columns []string
	// Drop lists columns to leave out.
	Drop []string
	// Missing is the policy for missing cells; empty means MissingFail.
	Missing MissingPolicy
	// Transform is applied to every variable cell as it is read, so that a
	// value outside the transform's domain is reported with its position.
	Transform Transform
	// Decimal is the decimal mark of the numbers: '.' (the default) or ','
	// (for semicolon- or tab-separated exports of spreadsheets set to a
	// language that writes 3,14).
	Decimal byte
	// Encoding is the text encoding of the file; empty means UTF-8.
	Encoding Encoding
	// Censored is the policy for cells written as a limit ("<0.05",
	// ">2000"); empty means CensorFail. The substitution comes before
	// Transform, so that --transform log reads "<0.05" as log(0.025).
	Censored CensorPolicy
	// Skip is the number of lines before the header that are not read at
	// all (a title, an instrument's preamble); they may hold anything.
	Skip int
	// Comment, when not 0, marks lines to ignore: any line whose first
	// byte it is, before the header or among the data rows.
	Comment byte
	// UnitsRow says that the row right under the header holds units.
	UnitsRow bool
	// Thousands, when not 0, is the digit-group separator stripped from
	// numbers written in well-formed groups of three ("1,234,567"); ' '
	// stands for a space, a no-break space or a narrow no-break space.
	Thousands byte
	// Sheet names the worksheet of an .xlsx workbook to read, by name or
	// 1-based number; empty means the first.
	Sheet string

	// For new samples scored against a saved model (apply): MinRows is the
	// fewest rows accepted (default 3, which a PCA needs); KeepConstant
	// keeps constant columns (a stuck sensor is what monitoring must see);
	// ImputeWith, one value per column of Columns, replaces missing cells
	// under MissingMean instead of the batch's own means.
	MinRows      int
	KeepConstant bool
	ImputeWith   []float64
}

// DroppedVariable is a column that was a candidate variable but is not used.
type DroppedVariable struct {
	Name   string `json:"name"`
	Reason string `json:"reason"`
}

// CellRef is one cell of a Table: Row indexes X's rows (and IDs, Lines),
// Var indexes Variables (and Columns).
type CellRef struct {
	Row int `json:"row"`
	Var int `json:"var"`
}

// DroppedRow is a data row left out because it had a missing cell.
type DroppedRow struct {
	ID      string   `json:"id"`
	Line    int      `json:"line"`
	Missing []string `json:"missing"` // the variables whose cells were missing
}

// Table is a validated data table: n samples (rows) by p variables, with the
// transform already applied, plus everything needed to say where each number
// came from.
type Table struct {
	File      string // file name as given by the user
	Sheet     string // the sheet read, for a spreadsheet; "" for text
	SHA256    string // of the bytes read
	Delimiter byte
	Encoding  Encoding // the text encoding the file was read in

	IDColumn    string   // "" when ids are row numbers
	IDs         []string // one per row used
	GroupColumn string   // "" when there is none
	Groups      []string // one per row used, nil without a group column

	Variables []string // names of the variables used, in file order
	// Units, when the file has a units row, holds each variable's unit
	// ("" where none), aligned with Variables; nil otherwise.
	Units []string
	X     *mat.Dense // n × p, transformed values
	Lines []int      // 1-based line in the file of each row used
	// Columns is the 1-based column in the file of each variable, so that
	// a value found wrong after reading can still be named by its
	// position; nil for tables built in memory.
	Columns []int

	RowsRead     int // data rows in the file
	RowsDropped  int // removed for missing values
	MissingCells int // missing cells among the candidate variables
	MissingIDs   int // samples with an empty id cell, named "line N" instead
	ImputedCells int // missing cells replaced (by column means, or imputed later)

	// MissingAt lists the missing cells that were filled in, under
	// MissingMean and MissingIterative, by row of X and index into
	// Variables, in row-major order. DroppedRows lists the rows removed
	// under MissingDrop.
	MissingAt   []CellRef
	DroppedRows []DroppedRow
	// Censored lists the cells written as a limit and the number used for
	// each, in row-major order; Censoring is the policy that chose them.
	Censored  []CensoredCell
	Censoring CensorPolicy

	// SkippedLines (--skip) and CommentLines (--comment) count the lines
	// not read as rows; GroupedNumbers counts the cells whose thousands
	// separators were removed (--thousands).
	SkippedLines   int
	CommentLines   int
	GroupedNumbers int
	// MissingPerVariable counts, per variable (aligned with Variables),
	// its missing cells among the rows as read, before any row was
	// dropped. MissingRows lists, in file order, every row as read that
	// had a missing cell among the analysed variables, naming them; under
	// MissingDrop these are the rows DroppedRows lists. Both describe the
	// file, so they survive SelectRows unchanged.
	MissingPerVariable []int
	MissingRows        []DroppedRow

	DroppedVariables []DroppedVariable
	Transform        Transform
	Missing          MissingPolicy
}

// Rows returns the number of samples used.
func (t *Table) Rows() int { r, _ := t.X.Dims(); return r }

// missingTokens are the spellings read as a missing cell, compared without
// regard to case. "NaN" in any case is also missing (strconv reads it as NaN).
var missingTokens = []string{"", "na", "n/a", "#n/a", "nan", "null"}

func isMissingToken(b []byte) bool {
	if len(b) > 4 {
		return false
	}
	for _, t := range missingTokens {
		if len(t) == len(b) && strings.EqualFold(t, unsafeString(b)) {
			return true
		}
	}
	return false
}

// unsafeString views b as a string without copying. The result must not be
// kept beyond the life of b's contents.
func unsafeString(b []byte) string {
	if len(b) == 0 {
		return ""
	}
	return unsafe.String(&b[0], len(b))
}

type cellKind int

const (
	cellNumber cellKind = iota
	cellMissing
	cellInfinite
	cellUnderflow // a nonzero number that rounds to 0
	cellText
	cellBelow    // "<L": below a limit L > 0 (see censor.go)
	cellAbove    // ">L": above a limit L > 0
	cellBadLimit // "<" or ">" without a positive number after it
)

// parseCell reads one variable cell. A number follows a strict grammar (see
// scanNumber): strconv.ParseFloat alone would also read Go's 0x1p3 and
// 1_000, which no spreadsheet writes and which are far likelier typos or
// foreign notations than numbers. The words inf and infinity (any case,
// either sign) are infinite; the missing spellings are missing.
func parseCell(b []byte) (float64, cellKind) {
	b = bytes.TrimSpace(b)
	if isMissingToken(b) {
		return 0, cellMissing
	}
	ok, nonzero := scanNumber(b)
	if !ok {
		if isInfinityWord(b) {
			if b[0] == '-' {
				return math.Inf(-1), cellInfinite
			}
			return math.Inf(1), cellInfinite
		}
		return 0, cellText
	}
	v, err := strconv.ParseFloat(unsafeString(b), 64)
	switch {
	case math.IsInf(v, 0):
		return v, cellInfinite // beyond about 1.8e308
	case err != nil:
		return 0, cellText
	case v == 0 && nonzero:
		return 0, cellUnderflow // below about 2.5e-324
	}
	return v, cellNumber
}

// scanNumber reports whether b is a number of the grammar
//
//	[+-] (digits [. [digits]] | . digits) [(e|E) [+-] digits]
//
// and whether its digits before the exponent hold one that is not zero.
func scanNumber(b []byte) (ok, nonzero bool) {
	i := 0
	if i < len(b) && (b[i] == '+' || b[i] == '-') {
		i++
	}
	digits := 0
	for ; i < len(b) && b[i] >= '0' && b[i] <= '9'; i++ {
		digits++
		nonzero = nonzero || b[i] != '0'
	}
	if i < len(b) && b[i] == '.' {
		for i++; i < len(b) && b[i] >= '0' && b[i] <= '9'; i++ {
			digits++
			nonzero = nonzero || b[i] != '0'
		}
	}
	if digits == 0 {
		return false, false
	}
	if i < len(b) && (b[i] == 'e' || b[i] == 'E') {
		i++
		if i < len(b) && (b[i] == '+' || b[i] == '-') {
			i++
		}
		exp := 0
		for ; i < len(b) && b[i] >= '0' && b[i] <= '9'; i++ {
			exp++
		}
		if exp == 0 {
			return false, false
		}
	}
	return i == len(b), nonzero
}

// isInfinityWord reports whether b is inf or infinity, in any case, with an
// optional sign.
func isInfinityWord(b []byte) bool {
	if len(b) > 0 && (b[0] == '+' || b[0] == '-') {
		b = b[1:]
	}
	return strings.EqualFold(unsafeString(b), "inf") || strings.EqualFold(unsafeString(b), "infinity")
}

// ReadTable reads and validates the table in the named file.
func ReadTable(path string, opt ReadOptions) (*Table, error) {
	if book, err := isWorkbook(path, opt); err != nil || book {
		if err != nil {
			return nil, err
		}
		return readWorkbook(path, opt)
	}
	f, err := openData(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	st, err := f.Stat()
	if err == nil && st.Mode().IsRegular() {
		// A first, fast pass hashes the bytes and counts the lines, so that
		// the matrix is allocated once at its final size instead of growing
		// (and being copied) as rows arrive.
		scan, err := prescan(f)
		if err != nil {
			return nil, &InputError{File: path, Reason: "read error: " + err.Error()}
		}
		if _, err := f.Seek(0, io.SeekStart); err != nil {
			return nil, &InputError{File: path, Reason: "read error: " + err.Error()}
		}
		scan.file = f
		return readTable(path, f, opt, &scan)
	}
	return ReadTableFrom(path, f, opt)
}

// lineEnd returns the offset just after the line-th line end at or after
// offset start.
func lineEnd(ra io.ReaderAt, start int64, line int) (int64, error) {
	buf := make([]byte, 1<<20)
	off := start
	for seen := 0; ; {
		n, err := ra.ReadAt(buf, off)
		for i := 0; i < n; i++ {
			if buf[i] == '\n' {
				seen++
				if seen == line {
					return off + int64(i) + 1, nil
				}
			}
		}
		off += int64(n)
		if err != nil {
			return off, nil // the header is the last line
		}
	}
}

// scanned is what the first pass over a regular file learnt.
type scanned struct {
	sha256 string
	lines  int   // line ends + 1
	size   int64 // bytes
	quotes bool  // a '"' occurs somewhere
	file   io.ReaderAt
}

// prescan hashes everything r holds, counts its lines and notes whether
// any quote occurs (quoted fields may hold line ends, which rules out
// splitting the file at line ends).
func prescan(r io.Reader) (scanned, error) {
	h := sha256.New()
	buf := make([]byte, 4<<20)
	s := scanned{lines: 1}
	for {
		n, err := r.Read(buf)
		if n > 0 {
			h.Write(buf[:n])
			s.lines += bytes.Count(buf[:n], []byte{'\n'})
			s.size += int64(n)
			if !s.quotes && bytes.IndexByte(buf[:n], '"') >= 0 {
				s.quotes = true
			}
		}
		if err == io.EOF {
			s.sha256 = hex.EncodeToString(h.Sum(nil))
			return s, nil
		}
		if err != nil {
			return s, err
		}
	}
}

func unwrapPathError(err error) string {
	if pe, ok := err.(*os.PathError); ok {
		return pe.Err.Error()
	}
	return err.Error()
}

// classifyRows is how many leading data rows are inspected to decide which
// columns are numeric before the rest of the file is streamed.
const classifyRows = 100

// ReadTableFrom reads and validates a table from r; name is used in messages.
func ReadTableFrom(name string, r io.Reader, opt ReadOptions) (*Table, error) {
	return readTable(name, r, opt, nil)
}

// columnRange returns the smallest and largest value of column k of the
// row-major n×p values.
func columnRange(values []float64, n, p, k int) (lo, hi float64, ok bool) {
	if n == 0 {
		return 0, 0, false
	}
	lo, hi = values[k], values[k]
	for i := p + k; i < n*p; i += p {
		if v := values[i]; v < lo {
			lo = v
		} else if v > hi {
			hi = v
		}
	}
	return lo, hi, true
}

// isConstant reports whether a column whose values span [lo, hi] has no
// variation beyond rounding: the spread is within a few ulps of the values'
// magnitude, which covers values that differ only in their last digit after a
// transform.
func isConstant(lo, hi float64) bool {
	scale := math.Max(math.Abs(lo), math.Abs(hi))
	return hi-lo <= 4*epsilon*scale
}

// epsilon is the float64 machine epsilon (2⁻⁵²).
const epsilon = 0x1p-52

// headerNames names the columns of a header record: trimmed, and
// column_N for an empty name. When the header ends with a delimiter (an
// empty last name after at least one other), that empty column is left out
// and trailing is true: spreadsheets and some exporters end every line with
// the delimiter.
func headerNames(header [][]byte) (names []string, trailing bool) {
	if n := len(header); n >= 2 && len(bytes.TrimSpace(header[n-1])) == 0 {
		header, trailing = header[:n-1], true
	}
	names = make([]string, len(header))
	for j, h := range header {
		if names[j] = strings.TrimSpace(string(h)); names[j] == "" {
			names[j] = fmt.Sprintf("column_%d", j+1)
		}
	}
	return names, trailing
}

// dropTrailing removes the empty last field of a record whose header ended
// with a delimiter, and refuses a value there: it has no column name, and
// leaving it out silently would lose it.
func dropTrailing(name string, line int, rec [][]byte, names []string, trailing bool) ([][]byte, error) {
	if !trailing || len(rec) != len(names)+1 {
		return rec, nil
	}
	if v := rec[len(names)]; len(bytes.TrimSpace(v)) > 0 {
		return nil, &InputError{File: name, Line: line, Column: len(names) + 1, Text: string(v),
			Reason: "value in the last column, which has no name (the header line ends with a delimiter); name the column in the header, or remove the value:"}
	}
	return rec[:len(names)], nil
}

func checkWidth(name string, line int, rec [][]byte, names []string) error {
	if len(rec) == len(names) {
		return nil
	}
	if len(rec) == len(names)+1 && len(bytes.TrimSpace(rec[len(names)])) == 0 {
		return &InputError{File: name, Line: line, Column: len(names) + 1,
			Reason: fmt.Sprintf("ragged row: %d fields but the header has %d (the line ends with a delimiter, the header line does not)", len(rec), len(names))}
	}
	if len(rec) > len(names) {
		return &InputError{File: name, Line: line, Column: len(names) + 1, Text: string(rec[len(names)]),
			Reason: fmt.Sprintf("ragged row: %d fields but the header has %d; first extra field:", len(rec), len(names))}
	}
	return &InputError{File: name, Line: line, Column: len(rec) + 1, Name: names[len(rec)],
		Reason: fmt.Sprintf("ragged row: %d fields but the header has %d", len(rec), len(names))}
}

func readError(name string, src recordSource, err error) error {
	if te, ok := err.(*textError); ok {
		return &InputError{File: name, Line: te.line, Column: te.col, Text: te.text, Reason: te.reason}
	}
	rr, ok := src.(*recordReader)
	if !ok {
		return &InputError{File: name, Line: src.position(), Reason: "read error: " + err.Error()}
	}
	switch err {
	case errUnterminatedQuote:
		return &InputError{File: name, Line: rr.recLine, Reason: err.Error()}
	case errLineTooLong:
		return &InputError{File: name, Line: rr.line, Reason: err.Error()}
	}
	return &InputError{File: name, Line: rr.line, Reason: "read error: " + err.Error()}
}

// namedReadError is readError for a record under a known header: a bad byte
// in a data row is named by its column, as a bad number would be.
func namedReadError(name string, rr recordSource, err error, names []string) error {
	e := readError(name, rr, err)
	if ie, ok := e.(*InputError); ok && ie.Column > 0 && ie.Column <= len(names) {
		ie.Name = names[ie.Column-1]
	}
	return e
}

// ListNames joins names for a message, naming at most max of them.
func ListNames(names []string, max int) string {
	if len(names) <= max {
		return strings.Join(names, ", ")
	}
	return fmt.Sprintf("%s and %d more", strings.Join(names[:max], ", "), len(names)-max)
}

func delimName(d byte) string {
	switch d {
	case '\t':
		return "tabs"
	case ';':
		return "semicolons"
	case ',':
		return "commas"
	}
	return strconv.QuoteRune(rune(d))
}

// StemName returns the file name without directory and extension, used for
// default output folders and titles.
func StemName(path string) string {
	base := filepath.Base(path)
	return strings.TrimSuffix(base, filepath.Ext(base))
}

// TableFromMatrix wraps an in-memory matrix as a table (no file behind it):
// variables are named v1…vp and ids are row numbers unless given. It is for
// data generated in memory; files go through ReadTable.
func TableFromMatrix(name string, x *mat.Dense, variables, ids []string) *Table {
	n, p := x.Dims()
	if variables == nil {
		variables = make([]string, p)
		for j := range variables {
			variables[j] = "v" + strconv.Itoa(j+1)
		}
	}
	if ids == nil {
		ids = make([]string, n)
		for i := range ids {
			ids[i] = strconv.Itoa(i + 1)
		}
	}
	lines := make([]int, n)
	for i := range lines {
		lines[i] = i + 2
	}
	return &Table{File: name, X: x, Variables: variables, IDs: ids, Lines: lines,
		RowsRead: n, Transform: TransformNone, Missing: MissingFail}
}

// ReadHeader returns the column names of a table file, as ReadTable would
// name them, so that callers can choose columns before reading. It uses the
// Delimiter, Encoding, Skip and Comment of opt.
func ReadHeader(path string, opt ReadOptions) ([]string, error) {
	if book, err := isWorkbook(path, opt); err != nil || book {
		if err != nil {
			return nil, err
		}
		return workbookHeader(path, opt)
	}
	f, err := openData(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	src, err := openText(path, f, opt.Delimiter, opt.Encoding, lead{skip: opt.Skip, comment: opt.Comment})
	if err != nil {
		return nil, err
	}
	rr := src.records(src.delimiter(opt.Delimiter))
	header, err := rr.read()
	if err == io.EOF {
		return nil, &InputError{File: path, Reason: "empty file: a header row and at least 3 data rows are needed"}
	}
	if err != nil {
		return nil, readError(path, rr, err)
	}
	names, _ := headerNames(header)
	return names, nil
}
