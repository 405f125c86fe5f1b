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
	"slices"
	"strconv"
	"strings"
	"unsafe"

	"golang.org/x/text/unicode/norm"
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

// Table is a validated data table: n samples (rows) by p variables, with the
// transform already applied, plus everything needed to say where each number
// came from.
type Table struct {
	File      string // file name as given by the user
	SHA256    string // of the bytes read
	Delimiter byte
	Encoding  Encoding // the text encoding the file was read in

	IDColumn    string   // "" when ids are row numbers
	IDs         []string // one per row used
	GroupColumn string   // "" when there is none
	Groups      []string // one per row used, nil without a group column

	Variables []string   // names of the variables used, in file order
	X         *mat.Dense // n × p, transformed values
	Lines     []int      // 1-based line in the file of each row used
	// Columns is the 1-based column in the file of each variable, so that
	// a value found wrong after reading can still be named by its
	// position; nil for tables built in memory.
	Columns []int

	RowsRead     int // data rows in the file
	RowsDropped  int // removed for missing values
	MissingCells int // missing cells among the candidate variables
	MissingIDs   int // samples with an empty id cell, named "line N" instead
	ImputedCells int // missing cells replaced by column means

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

// readTable reads the table. scan, when not nil, is the first pass over a
// regular file: it gives the hash and the line count, and lets a large file
// without quotes be parsed in parallel.
func readTable(name string, r io.Reader, opt ReadOptions, scan *scanned) (*Table, error) {
	if opt.Missing == "" {
		opt.Missing = MissingFail
	}
	if opt.Transform == "" {
		opt.Transform = TransformNone
	}
	fail := func(line, col int, colName, text, reason string) error {
		return &InputError{File: name, Line: line, Column: col, Name: colName, Text: text, Reason: reason}
	}

	if opt.Decimal == 0 {
		opt.Decimal = '.'
	}
	if opt.Encoding == "" {
		opt.Encoding = EncodingUTF8
	}
	hasher := sha256.New()
	if scan == nil {
		r = io.TeeReader(r, hasher)
	}
	src, err := openText(name, r, opt.Delimiter, opt.Encoding)
	if err != nil {
		return nil, err
	}
	br := src.br
	delim := src.delimiter(opt.Delimiter)
	if opt.Decimal == ',' && delim == ',' {
		return nil, fail(1, 0, "", "", "--decimal comma needs another field separator than the comma (semicolons or tabs)")
	}

	rr := src.records(delim)
	header, err := rr.read()
	if err == io.EOF {
		return nil, fail(0, 0, "", "", "empty file: a header row and at least 3 data rows are needed")
	}
	if err != nil {
		return nil, readError(name, rr, err)
	}
	names, trailing := headerNames(header)
	// Names are compared in Unicode normal form C, so that a name typed on
	// one system and the same name saved by another (macOS file systems and
	// some exports write é as e plus a combining accent) are one name; the
	// names are kept as written.
	seen := make(map[string]int, len(names))
	for j, n := range names {
		key := norm.NFC.String(n)
		if k, dup := seen[key]; dup {
			reason := fmt.Sprintf("duplicate column name (also column %d):", k+1)
			if names[k] != n {
				reason = fmt.Sprintf("duplicate column name (also column %d, the same name in another Unicode normal form):", k+1)
			}
			return nil, fail(rr.recLine, j+1, "", n, reason)
		}
		seen[key] = j
	}
	headerLine := rr.recLine
	if len(names) < 2 {
		return nil, fail(headerLine, 0, "", "", fmt.Sprintf("the header has a single column; fields are separated by %s here (use --delim if that is wrong)", delimName(delim)))
	}

	lookup := func(flag, col string) (int, error) {
		j, ok := seen[norm.NFC.String(col)]
		if !ok {
			return -1, fail(headerLine, 0, "", col, fmt.Sprintf("unknown column in %s (the columns are %s):", flag, ListNames(names, 12)))
		}
		return j, nil
	}
	idCol, groupCol := -1, -1
	if opt.IDColumn != "" {
		if idCol, err = lookup("--id", opt.IDColumn); err != nil {
			return nil, err
		}
	}
	if opt.GroupColumn != "" {
		if groupCol, err = lookup("--group", opt.GroupColumn); err != nil {
			return nil, err
		}
	}
	chosen := make([]bool, len(names))
	for _, c := range opt.Columns {
		j, err := lookup("--columns", c)
		if err != nil {
			return nil, err
		}
		chosen[j] = true
	}
	dropped := make([]bool, len(names))
	for _, c := range opt.Drop {
		j, err := lookup("--drop", c)
		if err != nil {
			return nil, err
		}
		dropped[j] = true
	}
	if idCol >= 0 && idCol == groupCol {
		return nil, fail(headerLine, idCol+1, names[idCol], "", "the same column cannot be both --id and --group")
	}
	for j := range names {
		if chosen[j] && (j == idCol || j == groupCol) {
			return nil, fail(headerLine, j+1, names[j], "", "a column in --columns cannot also be --id or --group")
		}
	}

	// Read the first rows to learn which columns are numeric.
	var sample [][]string
	var sampleLines []int
	for len(sample) < classifyRows {
		rec, err := rr.read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, namedReadError(name, rr, err, names)
		}
		if rec, err = dropTrailing(name, rr.recLine, rec, names, trailing); err != nil {
			return nil, err
		}
		if err := checkWidth(name, rr.recLine, rec, names); err != nil {
			return nil, err
		}
		row := make([]string, len(rec))
		for j, c := range rec {
			row[j] = string(c)
		}
		sample = append(sample, row)
		sampleLines = append(sampleLines, rr.recLine)
	}
	if len(sample) == 0 {
		return nil, fail(headerLine, 0, "", "", "the file has a header but no data rows")
	}
	probe := &rowParser{decimal: opt.Decimal}
	scratch := &rowSink{}
	// firstText returns the first text cell of column j of the sample (its
	// row, or -1) when the column reads as text: it has text cells and no
	// more numbers than text. A column of numbers with a stray typo is not
	// text: its bad cell is reported by the row parser, with the message
	// the same cell would get in row 5, in row 150, or in a large file
	// parsed in parallel.
	firstText := func(j int) (int, string) {
		first, texts, numbers := -1, 0, 0
		for i, row := range sample {
			switch _, kind := probe.cell([]byte(row[j]), scratch); kind {
			case cellText:
				texts++
				if first < 0 {
					first = i
				}
			case cellMissing:
			default:
				numbers++
			}
		}
		if texts == 0 || numbers > texts {
			return -1, ""
		}
		return first, sample[first][j]
	}
	explicitVars := len(opt.Columns) > 0
	if opt.IDColumn == "" && groupCol != 0 && !chosen[0] && !dropped[0] {
		if i, _ := firstText(0); i >= 0 {
			idCol = 0
		}
	}

	var varCols []int
	for j := range names {
		if j == idCol || j == groupCol || dropped[j] {
			continue
		}
		if explicitVars && !chosen[j] {
			continue
		}
		varCols = append(varCols, j)
	}
	var textCols []string
	firstBad, firstBadRow := -1, -1
	firstBadText := ""
	for _, j := range varCols {
		if i, txt := firstText(j); i >= 0 {
			textCols = append(textCols, names[j])
			if firstBad < 0 {
				firstBad, firstBadRow, firstBadText = j, i, txt
			}
		}
	}
	if len(textCols) > 0 {
		reason := "column is not numeric; leave it out"
		if len(textCols) > 1 {
			reason = fmt.Sprintf("columns %s are not numeric; leave them out", ListNames(textCols, 12))
		}
		dropHint := strings.Join(textCols, ",")
		if len(textCols) > 12 {
			dropHint = "<those columns>"
		}
		reason += fmt.Sprintf(" with --drop %s, or name a label column with --id or --group; first such cell:", dropHint)
		if hint := probe.textHint([]byte(firstBadText)); hint != "cannot read as a number:" {
			reason = strings.TrimSuffix(hint, ":") + "; first such cell:"
		}
		return nil, fail(sampleLines[firstBadRow], firstBad+1, names[firstBad], firstBadText, reason)
	}

	p := len(varCols)
	rp := &rowParser{file: name, names: names, varCols: varCols, idCol: idCol, groupCol: groupCol,
		missing: opt.Missing, tr: opt.Transform, decimal: opt.Decimal, trailing: trailing}
	var sink *rowSink
	if scan != nil && !scan.quotes && scan.size >= parallelThreshold && opt.Delimiter != '"' && !src.cr && src.enc == EncodingUTF8 {
		// Large UTF-8 file without quotes and with LF line ends: parse line
		// ranges of the file in parallel, each line into its own slot.
		// Converted text and CR line ends are read by the sequential path.
		dataStart, err := lineEnd(scan.file, int64(src.bom), headerLine)
		if err != nil {
			return nil, fail(0, 0, "", "", "read error: "+err.Error())
		}
		chunks, err := splitChunks(scan.file, dataStart, scan.size, headerLine+1, 4<<20)
		if err != nil {
			return nil, fail(0, 0, "", "", "read error: "+err.Error())
		}
		sink = newRowSink(p, max(scan.lines-headerLine, 0), groupCol >= 0)
		if err := rp.parseChunks(scan.file, chunks, headerLine, sink, delim); err != nil {
			return nil, err
		}
		sink.compact(idCol < 0)
	} else {
		rows := len(sample)
		if scan != nil {
			rows = max(scan.lines-headerLine, rows)
		}
		sink = newRowSink(p, rows, groupCol >= 0)
		n := 0
		for i, row := range sample {
			rec := make([][]byte, len(row))
			for j, c := range row {
				rec[j] = []byte(c)
			}
			if err := rp.parse(rec, sampleLines[i], n+1, n, sink); err != nil {
				return nil, err
			}
			n++
		}
		for {
			rec, err := rr.read()
			if err == io.EOF {
				break
			}
			if err != nil {
				return nil, namedReadError(name, rr, err, names)
			}
			sink.ensure(n)
			if err := rp.parse(rec, rr.recLine, n+1, n, sink); err != nil {
				return nil, err
			}
			n++
		}
		sink.truncate(n)
		if _, err := io.Copy(io.Discard, br); err != nil {
			return nil, fail(0, 0, "", "", "read error: "+err.Error())
		}
	}
	values, ids, groups, lines, rowMissing := sink.values, sink.ids, sink.groups, sink.lines, sink.rowMissing
	colMissing, nMissing := sink.colMissing, sink.nMissing
	missingIDs := sink.missingIDs
	rowNumber := len(ids)
	rowsRead := rowNumber

	hash := ""
	if scan != nil {
		hash = scan.sha256
	} else {
		hash = hex.EncodeToString(hasher.Sum(nil))
	}
	t := &Table{
		File:         name,
		SHA256:       hash,
		Delimiter:    delim,
		Encoding:     opt.Encoding,
		MissingCells: nMissing,
		MissingIDs:   missingIDs,
		RowsRead:     rowsRead,
		Transform:    opt.Transform,
		Missing:      opt.Missing,
	}
	if idCol >= 0 {
		t.IDColumn = names[idCol]
	}
	if groupCol >= 0 {
		t.GroupColumn = names[groupCol] // as written in the file
	}

	// Missing values: drop rows or impute column means.
	if nMissing > 0 {
		switch opt.Missing {
		case MissingDrop:
			keep := 0
			for i := 0; i < rowsRead; i++ {
				if i < len(rowMissing) && rowMissing[i] {
					continue
				}
				copy(values[keep*p:(keep+1)*p], values[i*p:(i+1)*p])
				ids[keep] = ids[i]
				if groups != nil {
					groups[keep] = groups[i]
				}
				lines[keep] = lines[i]
				keep++
			}
			t.RowsDropped = rowsRead - keep
			values, ids, lines = values[:keep*p], ids[:keep], lines[:keep]
			if groups != nil {
				groups = groups[:keep]
			}
		case MissingMean:
			n := rowsRead
			for k := 0; k < p; k++ {
				if colMissing[k] == 0 {
					continue
				}
				sum, cnt := 0.0, 0
				for i := 0; i < n; i++ {
					if v := values[i*p+k]; !math.IsNaN(v) {
						sum += v
						cnt++
					}
				}
				var mean float64
				switch {
				case opt.ImputeWith != nil:
					mean = opt.ImputeWith[k]
				case cnt == 0:
					return nil, fail(0, varCols[k]+1, names[varCols[k]], "", "every value of this column is missing; drop it with --drop:")
				default:
					mean = sum / float64(cnt)
				}
				for i := 0; i < n; i++ {
					if math.IsNaN(values[i*p+k]) {
						values[i*p+k] = mean
						t.ImputedCells++
					}
				}
			}
		}
	}
	n := len(ids)
	minRows := opt.MinRows
	if minRows <= 0 {
		minRows = 3
	}
	if n < minRows {
		reason := fmt.Sprintf("fewer than %d usable rows (%d read", minRows, rowsRead)
		if t.RowsDropped > 0 {
			reason += fmt.Sprintf(", %d dropped for missing values", t.RowsDropped)
		}
		if minRows == 3 {
			return nil, fail(0, 0, "", "", reason+"); a PCA needs at least 3 samples")
		}
		return nil, fail(0, 0, "", "", reason+")")
	}

	// Constant columns carry no component and cannot be unit-scaled.
	keepCols := make([]int, 0, p)
	for k := 0; k < p; k++ {
		if lo, hi, ok := columnRange(values, n, p, k); ok && isConstant(lo, hi) && !opt.KeepConstant {
			t.DroppedVariables = append(t.DroppedVariables, DroppedVariable{
				Name:   names[varCols[k]],
				Reason: fmt.Sprintf("constant: every value is %s", strconv.FormatFloat(lo, 'g', -1, 64)),
			})
			continue
		}
		keepCols = append(keepCols, k)
	}
	for j := range names {
		if dropped[j] {
			t.DroppedVariables = append(t.DroppedVariables, DroppedVariable{Name: names[j], Reason: "left out with --drop"})
		}
	}
	if len(keepCols) < 2 && !opt.KeepConstant {
		reason := fmt.Sprintf("fewer than 2 variables to analyse (%d candidate", p)
		if p != 1 {
			reason += "s"
		}
		if c := p - len(keepCols); c > 0 {
			reason += fmt.Sprintf(", %d of them constant", c)
		}
		return nil, fail(headerLine, 0, "", "", reason+")")
	}
	if len(keepCols) < p {
		q := len(keepCols)
		for i := 0; i < n; i++ {
			for c, k := range keepCols {
				values[i*q+c] = values[i*p+k]
			}
		}
		values = values[:n*q]
	}
	t.Variables = make([]string, len(keepCols))
	t.Columns = make([]int, len(keepCols))
	for c, k := range keepCols {
		t.Variables[c] = names[varCols[k]]
		t.Columns[c] = varCols[k] + 1
	}
	t.X = mat.NewDense(n, len(keepCols), slices.Clip(values))
	t.IDs, t.Groups, t.Lines = ids, groups, lines
	return t, nil
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

func readError(name string, rr *recordReader, err error) error {
	if te, ok := err.(*textError); ok {
		return &InputError{File: name, Line: te.line, Column: te.col, Text: te.text, Reason: te.reason}
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
func namedReadError(name string, rr *recordReader, err error, names []string) error {
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
// Delimiter and Encoding of opt.
func ReadHeader(path string, opt ReadOptions) ([]string, error) {
	f, err := openData(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	src, err := openText(path, f, opt.Delimiter, opt.Encoding)
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
