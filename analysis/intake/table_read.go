package intake

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"hash"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"golang.org/x/text/unicode/norm"
	"gonum.org/v1/gonum/mat"
)

// tableReader carries one reading of a table through its steps, in order:
// open the text, read the header, choose the columns, sample the first rows
// to learn which columns are numbers, parse every row, handle missing cells,
// and drop constant variables. Each step either fills in its part or returns
// the positioned InputError that ends the reading.
type tableReader struct {
	name string
	opt  ReadOptions
	scan *scanned // the first pass over a regular file, or nil

	hasher hash.Hash // of the bytes read, when there was no first pass
	src    *textSource
	rr     recordSource
	delim  byte
	// sheet is set instead of src for a spreadsheet: its records come
	// from the sheet's rows, already hashed.
	sheet *sheetSource

	// From the header.
	names      []string
	trailing   bool           // the header ends with a delimiter
	seen       map[string]int // NFC name → column
	headerLine int

	// The units row (--units-row): one cell per column, and its line.
	units     []string
	unitsLine int
	// dataFrom is the line of the last record before the data rows (the
	// header or the units row); leadComments counts the comment lines the
	// record reader passed over up to there.
	dataFrom     int
	leadComments int

	// The columns' roles.
	idCol, groupCol int
	chosen, dropped []bool
	varCols         []int

	// The first rows, kept as text to classify the columns.
	sample      []textRow
	sampleLines []int

	rp   *rowParser
	sink *rowSink
}

// fail builds the InputError every step returns.
func (r *tableReader) fail(line, col int, colName, text, reason string) error {
	return &InputError{File: r.name, Line: line, Column: col, Name: colName, Text: text, Reason: reason}
}

// readTable reads the table. scan, when not nil, is the first pass over a
// regular file: it gives the hash and the line count, and lets a large file
// without quotes be parsed in parallel.
func readTable(name string, r io.Reader, opt ReadOptions, scan *scanned) (*Table, error) {
	tr := &tableReader{name: name, opt: withDefaults(opt), scan: scan, idCol: -1, groupCol: -1}
	return tr.read(func() error { return tr.open(r) })
}

// readSheet reads a table from a spreadsheet's rows through the same steps
// as delimited text, so that every check and message applies to both.
func readSheet(name string, sheet *sheetSource, opt ReadOptions) (*Table, error) {
	tr := &tableReader{name: name, opt: withDefaults(opt), sheet: sheet, rr: sheet, idCol: -1, groupCol: -1}
	sheet.comment = opt.Comment
	return tr.read(func() error { return sheet.skipRows(name, opt.Skip) })
}

// headSteps are the steps that start every reading, after open: the
// header, the units row, the columns' roles, and the first rows that
// classify the columns. ReadTable then parses the rows into a matrix, and a
// Stream hands them on one by one.
func (tr *tableReader) headSteps(open func() error) []func() error {
	return []func() error{
		open,
		tr.readHeaderRow,
		tr.checkSheetHeader,
		tr.readUnitsRow,
		tr.chooseColumns,
		tr.sampleRows,
		tr.classifyColumns,
	}
}

// runSteps runs steps in order and stops at the first error.
func runSteps(steps []func() error) error {
	for _, step := range steps {
		if err := step(); err != nil {
			return err
		}
	}
	return nil
}

// read runs the steps after open, which starts the records.
func (tr *tableReader) read(open func() error) (*Table, error) {
	if err := runSteps(append(tr.headSteps(open), tr.parseRows)); err != nil {
		return nil, err
	}
	t := tr.newTable()
	tr.recordMissing(t)
	if err := tr.handleMissing(t); err != nil {
		return nil, err
	}
	if err := tr.checkRowCount(t); err != nil {
		return nil, err
	}
	if err := tr.keepVariables(t); err != nil {
		return nil, err
	}
	return t, nil
}

// withDefaults fills in the options left empty.
func withDefaults(opt ReadOptions) ReadOptions {
	if opt.Missing == "" {
		opt.Missing = MissingFail
	}
	if opt.Censored == "" {
		opt.Censored = CensorFail
	}
	if opt.Transform == "" {
		opt.Transform = TransformNone
	}
	if opt.Decimal == 0 {
		opt.Decimal = '.'
	}
	if opt.Encoding == "" {
		opt.Encoding = EncodingUTF8
	}
	if opt.MinRows <= 0 {
		opt.MinRows = 3
	}
	return opt
}

// open starts the text: encoding, byte-order mark, delimiter.
func (r *tableReader) open(in io.Reader) error {
	if r.scan == nil {
		r.hasher = sha256.New()
		in = io.TeeReader(in, r.hasher)
	}
	if err := r.checkMarks(); err != nil {
		return err
	}
	src, err := openText(r.name, in, r.opt.Delimiter, r.opt.Encoding, lead{skip: r.opt.Skip, comment: r.opt.Comment})
	if err != nil {
		return err
	}
	r.src = src
	r.delim = src.delimiter(r.opt.Delimiter)
	if r.opt.Decimal == ',' && r.delim == ',' {
		return r.fail(src.skip+1, 0, "", "", "--decimal comma needs another field separator than the comma (semicolons or tabs)")
	}
	if r.opt.Comment != 0 && r.opt.Comment == r.delim {
		return r.fail(src.skip+1, 0, "", "", fmt.Sprintf("--comment %c is the field separator of this file; choose another comment character", r.opt.Comment))
	}
	r.rr = src.records(r.delim)
	return nil
}

// readHeaderRow reads the column names and refuses duplicates. Names are
// compared in Unicode normal form C, so that a name typed on one system and
// the same name saved by another (macOS file systems and some exports write
// é as e plus a combining accent) are one name; the names are kept as
// written.
func (r *tableReader) readHeaderRow() error {
	header, err := r.rr.read()
	if err == io.EOF && r.sheet != nil {
		return r.fail(0, 0, "", "", "empty sheet: a header row and at least 3 data rows are needed")
	}
	if err == io.EOF {
		return r.fail(0, 0, "", "", "empty file: a header row and at least 3 data rows are needed")
	}
	if err != nil {
		return readError(r.name, r.rr, err)
	}
	r.names, r.trailing = headerNames(header)
	r.seen = make(map[string]int, len(r.names))
	for j, n := range r.names {
		key := norm.NFC.String(n)
		if k, dup := r.seen[key]; dup {
			reason := fmt.Sprintf("duplicate column name (also column %d):", k+1)
			if r.names[k] != n {
				reason = fmt.Sprintf("duplicate column name (also column %d, the same name in another Unicode normal form):", k+1)
			}
			return r.fail(r.rr.position(), j+1, "", n, reason)
		}
		r.seen[key] = j
	}
	r.headerLine = r.rr.position()
	if len(r.names) < 2 && r.sheet != nil {
		return r.fail(r.headerLine, 0, "", "", "the header row has a single column; a table needs a header cell above each column")
	}
	r.dataFrom, r.leadComments = r.headerLine, r.rr.commentCount()
	if len(r.names) < 2 {
		return r.fail(r.headerLine, 0, "", "", fmt.Sprintf("the header has a single column; fields are separated by %s here (use --delim if that is wrong)", delimName(r.delim)))
	}
	return nil
}

// lookup finds a column named in a flag.
func (r *tableReader) lookup(flag, col string) (int, error) {
	j, ok := r.seen[norm.NFC.String(col)]
	if !ok {
		return -1, r.fail(r.headerLine, 0, "", col, fmt.Sprintf("unknown column in %s (the columns are %s):", flag, ListNames(r.names, 12)))
	}
	return j, nil
}

// chooseColumns resolves --id, --group, --columns and --drop.
func (r *tableReader) chooseColumns() error {
	var err error
	if r.opt.IDColumn != "" {
		if r.idCol, err = r.lookup("--id", r.opt.IDColumn); err != nil {
			return err
		}
	}
	if r.opt.GroupColumn != "" {
		if r.groupCol, err = r.lookup("--group", r.opt.GroupColumn); err != nil {
			return err
		}
	}
	r.chosen = make([]bool, len(r.names))
	for _, c := range r.opt.Columns {
		j, err := r.lookup("--columns", c)
		if err != nil {
			return err
		}
		r.chosen[j] = true
	}
	r.dropped = make([]bool, len(r.names))
	for _, c := range r.opt.Drop {
		j, err := r.lookup("--drop", c)
		if err != nil {
			return err
		}
		r.dropped[j] = true
	}
	if r.idCol >= 0 && r.idCol == r.groupCol {
		return r.fail(r.headerLine, r.idCol+1, r.names[r.idCol], "", "the same column cannot be both --id and --group")
	}
	for j := range r.names {
		if r.chosen[j] && (j == r.idCol || j == r.groupCol) {
			return r.fail(r.headerLine, j+1, r.names[j], "", "a column in --columns cannot also be --id or --group")
		}
	}
	return nil
}

// sampleRows reads the first classifyRows rows as text, to learn which
// columns are numeric before the rest of the file is parsed.
func (r *tableReader) sampleRows() error {
	for len(r.sample) < classifyRows {
		rec, err := r.nextRecord()
		if err == io.EOF {
			break
		}
		if err != nil {
			return err
		}
		r.sample = append(r.sample, newTextRow(rec))
		r.sampleLines = append(r.sampleLines, r.rr.position())
	}
	if len(r.sample) == 0 {
		return r.fail(r.headerLine, 0, "", "", "the file has a header but no data rows")
	}
	return nil
}

// nextRecord reads the next record under the header, with its positioned
// errors: a bad byte named by its column, a value in an unnamed trailing
// column, a ragged row. It returns io.EOF at the end.
func (r *tableReader) nextRecord() ([][]byte, error) {
	rec, err := r.rr.read()
	if err == io.EOF {
		return nil, err
	}
	if err != nil {
		return nil, namedReadError(r.name, r.rr, err, r.names)
	}
	if rec, err = dropTrailing(r.name, r.rr.position(), rec, r.names, r.trailing); err != nil {
		return nil, err
	}
	if err := checkWidth(r.name, r.rr.position(), rec, r.names); err != nil {
		return nil, err
	}
	return rec, nil
}

// firstText returns the first text cell of column j of the sample (its row,
// or -1) when the column reads as text: it has text cells and no more
// numbers than text. A column of numbers with a stray typo is not text: its
// bad cell is reported by the row parser, with the message the same cell
// would get in row 5, in row 150, or in a large file parsed in parallel.
func (r *tableReader) firstText(probe *rowParser, j int) (int, string) {
	scratch := &rowSink{}
	first, texts, numbers := -1, 0, 0
	for i, row := range r.sample {
		switch _, kind := probe.cell(row.cell(j), scratch); kind {
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
	return first, r.sample[first].text(j)
}

// classifyColumns decides the id column (the first column, when it is text
// and no role was given) and the variables, and refuses text among the
// variables with the advice that fits.
func (r *tableReader) classifyColumns() error {
	probe := &rowParser{decimal: r.opt.Decimal, thousands: r.opt.Thousands, delim: r.delim}
	if r.opt.IDColumn == "" && r.groupCol != 0 && !r.chosen[0] && !r.dropped[0] {
		if i, _ := r.firstText(probe, 0); i >= 0 {
			r.idCol = 0
		}
	}
	explicitVars := len(r.opt.Columns) > 0
	for j := range r.names {
		if j == r.idCol || j == r.groupCol || r.dropped[j] || (explicitVars && !r.chosen[j]) {
			continue
		}
		r.varCols = append(r.varCols, j)
	}
	if err := r.checkUnitsRow(probe); err != nil {
		return err
	}
	var textCols []string
	firstBad, firstBadRow := -1, -1
	firstBadText := ""
	for _, j := range r.varCols {
		if i, txt := r.firstText(probe, j); i >= 0 {
			textCols = append(textCols, r.names[j])
			if firstBad < 0 {
				firstBad, firstBadRow, firstBadText = j, i, txt
			}
		}
	}
	if len(textCols) == 0 {
		return nil
	}
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
	return r.fail(r.sampleLines[firstBadRow], firstBad+1, r.names[firstBad], firstBadText, reason)
}

// newRowParser is the parser of data rows under the header and options read.
func (r *tableReader) newRowParser() *rowParser {
	return &rowParser{file: r.name, names: r.names, varCols: r.varCols, idCol: r.idCol, groupCol: r.groupCol,
		missing: r.opt.Missing, censored: r.opt.Censored, tr: r.opt.Transform, decimal: r.opt.Decimal, trailing: r.trailing,
		thousands: r.opt.Thousands, delim: r.delim, comment: r.opt.Comment}
}

// eachRecord hands every data record to fn with its line, one after
// another: first the rows sampled to classify the columns (which are then
// let go), then the rest of the file.
func (r *tableReader) eachRecord(fn func(rec [][]byte, line int) error) error {
	var rec [][]byte
	for i, row := range r.sample {
		rec = row.record(rec)
		if err := fn(rec, r.sampleLines[i]); err != nil {
			return err
		}
	}
	r.sample, r.sampleLines = nil, nil
	for {
		rec, err := r.rr.read()
		if err == io.EOF {
			return nil
		}
		if err != nil {
			return namedReadError(r.name, r.rr, err, r.names)
		}
		if err := fn(rec, r.rr.position()); err != nil {
			return err
		}
	}
}

// parseRows parses every data row into the sink: line ranges of a large
// file in parallel when that is safe, otherwise one record after another.
func (r *tableReader) parseRows() error {
	r.rp = r.newRowParser()
	scan := r.scan
	if scan != nil && !scan.quotes && scan.size >= parallelThreshold && r.opt.Delimiter != '"' && !r.src.cr && r.src.enc == EncodingUTF8 {
		return r.parseParallel()
	}
	rows := len(r.sample)
	if scan != nil {
		rows = max(scan.lines-r.dataFrom, rows)
	}
	r.sink = newRowSink(len(r.varCols), rows, r.groupCol >= 0)
	n := 0
	err := r.eachRecord(func(rec [][]byte, line int) error {
		r.sink.ensure(n)
		if err := r.rp.parse(rec, line, n+1, n, r.sink); err != nil {
			return err
		}
		n++
		return nil
	})
	if err != nil {
		return err
	}
	r.sink.truncate(n)
	if r.src == nil {
		return nil
	}
	if _, err := io.Copy(io.Discard, r.src.br); err != nil {
		return r.fail(0, 0, "", "", "read error: "+err.Error())
	}
	return nil
}

// parseParallel parses a large UTF-8 file without quotes and with LF line
// ends in line ranges, in parallel, each line into its own slot. Converted
// text and CR line ends are read by the sequential path.
func (r *tableReader) parseParallel() error {
	scan := r.scan
	dataStart, err := lineEnd(scan.file, int64(r.src.bom), r.dataFrom)
	if err != nil {
		return r.fail(0, 0, "", "", "read error: "+err.Error())
	}
	chunks, err := splitChunks(scan.file, dataStart, scan.size, r.dataFrom+1, 4<<20)
	if err != nil {
		return r.fail(0, 0, "", "", "read error: "+err.Error())
	}
	r.sink = newRowSink(len(r.varCols), max(scan.lines-r.dataFrom, 0), r.groupCol >= 0)
	if err := r.rp.parseChunks(scan.file, chunks, r.dataFrom, r.sink, r.delim); err != nil {
		return err
	}
	r.sink.compact(r.idCol < 0)
	return nil
}

// newTable starts the Table from what was read: provenance and counts.
func (r *tableReader) newTable() *Table {
	hash := ""
	switch {
	case r.sheet != nil:
		hash = r.sheet.sha256
	case r.scan != nil:
		hash = r.scan.sha256
	default:
		hash = hex.EncodeToString(r.hasher.Sum(nil))
	}
	t := &Table{
		File:         r.name,
		SHA256:       hash,
		Delimiter:    r.delim,
		Encoding:     r.opt.Encoding,
		MissingCells: r.sink.nMissing,
		MissingIDs:   r.sink.missingIDs,
		RowsRead:     len(r.sink.ids),
		Transform:    r.opt.Transform,
		Missing:      r.opt.Missing,
		Censoring:    r.opt.Censored,
		SkippedLines: r.opt.Skip,
		// The sequential reader saw every comment after the preamble; the
		// parallel one re-read the data rows, counted in the sink.
		CommentLines:   r.rr.commentCount(),
		GroupedNumbers: r.sink.grouped,
	}
	switch {
	case r.sheet != nil:
		t.Sheet = r.sheet.name
	case r.sink.chunked:
		t.CommentLines = r.src.comments + r.leadComments + r.sink.comments
	default:
		t.CommentLines += r.src.comments
	}
	if r.idCol >= 0 {
		t.IDColumn = r.names[r.idCol]
	}
	if r.groupCol >= 0 {
		t.GroupColumn = r.names[r.groupCol] // as written in the file
	}
	return t
}

// handleMissing drops the rows with a missing cell or imputes column means,
// as the policy says; under MissingFail the row parser has already stopped
// at the first missing cell.
func (r *tableReader) handleMissing(t *Table) error {
	if r.sink.nMissing == 0 {
		return nil
	}
	switch r.opt.Missing {
	case MissingDrop:
		r.dropMissingRows(t)
	case MissingMean, MissingIterative:
		return r.imputeMeans(t)
	}
	return nil
}

// dropMissingRows removes every row with a missing cell, in place.
func (r *tableReader) dropMissingRows(t *Table) {
	s, p := r.sink, len(r.varCols)
	keep := 0
	for i := 0; i < t.RowsRead; i++ {
		if i < len(s.rowMissing) && s.rowMissing[i] {
			row := DroppedRow{ID: s.ids[i], Line: s.lines[i]}
			for k := 0; k < p; k++ {
				if math.IsNaN(s.values[i*p+k]) {
					row.Missing = append(row.Missing, r.names[r.varCols[k]])
				}
			}
			t.DroppedRows = append(t.DroppedRows, row)
			continue
		}
		copy(s.values[keep*p:(keep+1)*p], s.values[i*p:(i+1)*p])
		s.ids[keep] = s.ids[i]
		if s.groups != nil {
			s.groups[keep] = s.groups[i]
		}
		s.lines[keep] = s.lines[i]
		keep++
	}
	t.RowsDropped = t.RowsRead - keep
	s.values, s.ids, s.lines = s.values[:keep*p], s.ids[:keep], s.lines[:keep]
	if s.groups != nil {
		s.groups = s.groups[:keep]
	}
}

// imputeMeans replaces each missing cell by its column's mean (or by
// opt.ImputeWith, the training means, when scoring new samples).
func (r *tableReader) imputeMeans(t *Table) error {
	s, p, n := r.sink, len(r.varCols), t.RowsRead
	for k := 0; k < p; k++ {
		if s.colMissing[k] == 0 {
			continue
		}
		sum, cnt := 0.0, 0
		for i := 0; i < n; i++ {
			if v := s.values[i*p+k]; !math.IsNaN(v) {
				sum += v
				cnt++
			}
		}
		var mean float64
		switch {
		case r.opt.ImputeWith != nil:
			mean = r.opt.ImputeWith[k]
		case cnt == 0:
			j := r.varCols[k]
			return r.fail(0, j+1, r.names[j], "", "every value of this column is missing; drop it with --drop:")
		default:
			mean = sum / float64(cnt)
		}
		for i := 0; i < n; i++ {
			if math.IsNaN(s.values[i*p+k]) {
				s.values[i*p+k] = mean
				t.ImputedCells++
				t.MissingAt = append(t.MissingAt, CellRef{Row: i, Var: k})
			}
		}
	}
	slices.SortFunc(t.MissingAt, func(a, b CellRef) int {
		if a.Row != b.Row {
			return a.Row - b.Row
		}
		return a.Var - b.Var
	})
	return nil
}

// checkRowCount refuses a table with fewer usable rows than opt.MinRows.
func (r *tableReader) checkRowCount(t *Table) error {
	n, minRows := len(r.sink.ids), r.opt.MinRows
	if n >= minRows {
		return nil
	}
	reason := fmt.Sprintf("fewer than %d usable rows (%d read", minRows, t.RowsRead)
	if t.RowsDropped > 0 {
		reason += fmt.Sprintf(", %d dropped for missing values", t.RowsDropped)
	}
	if minRows == 3 {
		return r.fail(0, 0, "", "", reason+"); a PCA needs at least 3 samples")
	}
	return r.fail(0, 0, "", "", reason+")")
}

// keepVariables drops constant columns (they carry no component and cannot
// be unit-scaled), records every variable left out and why, and builds the
// matrix.
func (r *tableReader) keepVariables(t *Table) error {
	s, p, n := r.sink, len(r.varCols), len(r.sink.ids)
	values := s.values
	keepCols := make([]int, 0, p)
	for k := 0; k < p; k++ {
		if lo, hi, ok := columnRange(values, n, p, k); ok && isConstant(lo, hi) && !r.opt.KeepConstant {
			t.DroppedVariables = append(t.DroppedVariables, DroppedVariable{
				Name:   r.names[r.varCols[k]],
				Reason: fmt.Sprintf("constant: every value is %s", strconv.FormatFloat(lo, 'g', -1, 64)),
			})
			continue
		}
		keepCols = append(keepCols, k)
	}
	for j := range r.names {
		if r.dropped[j] {
			t.DroppedVariables = append(t.DroppedVariables, DroppedVariable{Name: r.names[j], Reason: "left out with --drop"})
		}
	}
	if len(keepCols) < 2 && !r.opt.KeepConstant {
		reason := fmt.Sprintf("fewer than 2 variables to analyse (%d candidate", p)
		if p != 1 {
			reason += "s"
		}
		if c := p - len(keepCols); c > 0 {
			reason += fmt.Sprintf(", %d of them constant", c)
		}
		return r.fail(r.headerLine, 0, "", "", reason+")")
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
	t.MissingAt = remapVars(t.MissingAt, keepCols, p)
	t.Censored = placeCensored(s.censored, s.lines, keepCols, p)
	r.keepMissingCounts(t, keepCols)
	t.Variables = make([]string, len(keepCols))
	t.Columns = make([]int, len(keepCols))
	if r.units != nil {
		t.Units = make([]string, len(keepCols))
	}
	for c, k := range keepCols {
		t.Variables[c] = r.names[r.varCols[k]]
		t.Columns[c] = r.varCols[k] + 1
		if r.units != nil {
			t.Units[c] = r.units[r.varCols[k]]
		}
	}
	t.X = mat.NewDense(n, len(keepCols), slices.Clip(values))
	t.IDs, t.Groups, t.Lines = s.ids, s.groups, s.lines
	return nil
}

// remapVars renumbers the variables of cells after the columns not in keep
// (ascending indices into p candidates) were dropped, leaving out the cells
// of dropped columns.
func remapVars(cells []CellRef, keep []int, p int) []CellRef {
	if len(keep) == p {
		return cells
	}
	to := make([]int, p)
	for k := range to {
		to[k] = -1
	}
	for c, k := range keep {
		to[k] = c
	}
	out := cells[:0]
	for _, c := range cells {
		if v := to[c.Var]; v >= 0 {
			out = append(out, CellRef{Row: c.Row, Var: v})
		}
	}
	return out
}
