package intake

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"math"
	"regexp"
	"runtime"
	"slices"
	"strings"
	"sync"

	"pcqc/internal/workgroup"
)

// rowParser turns the fields of one record into a row of the table.
type rowParser struct {
	file     string
	names    []string
	varCols  []int
	idCol    int
	groupCol int
	missing  MissingPolicy
	censored CensorPolicy
	tr       Transform
	decimal  byte // '.' or ','
	trailing bool // the header ends with a delimiter (see dropTrailing)

	thousands byte // digit-group separator to strip (0: none; ' ' any space)
	delim     byte // the field separator, for advice
	comment   byte // comment lines are passed over (0: none)
}

// rowSink holds the parsed rows. Row i occupies values[i*p:(i+1)*p]; a row
// whose line is 0 is an empty slot (see the chunked reader).
type rowSink struct {
	p          int
	values     []float64
	ids        []string
	groups     []string
	lines      []int
	rowMissing []bool
	colMissing []int
	nMissing   int
	missingIDs int
	censored   []censoredAt
	grouped    int // cells whose thousands separators were removed
	comments   int // comment lines among the data rows (parallel path)
	chunked    bool
	scratch    []byte
}

// MissingIDPrefix names a sample whose id cell is empty: "line 12".
const MissingIDPrefix = "line "

// newRowSink allocates room for rows rows at once.
func newRowSink(p, rows int, groups bool) *rowSink {
	s := &rowSink{p: p, colMissing: make([]int, p),
		values: make([]float64, rows*p), ids: make([]string, rows),
		lines: make([]int, rows), rowMissing: make([]bool, rows)}
	if groups {
		s.groups = make([]string, rows)
	}
	return s
}

// ensure makes room for row at, growing geometrically when the number of
// rows was not known in advance.
func (s *rowSink) ensure(at int) {
	if at < len(s.lines) {
		return
	}
	rows := max(2*len(s.lines), at+1, 64)
	grown := newRowSink(s.p, rows, s.groups != nil)
	copy(grown.values, s.values)
	copy(grown.ids, s.ids)
	copy(grown.lines, s.lines)
	copy(grown.rowMissing, s.rowMissing)
	copy(grown.groups, s.groups)
	s.values, s.ids, s.lines, s.rowMissing, s.groups = grown.values, grown.ids, grown.lines, grown.rowMissing, grown.groups
}

// truncate keeps the first rows rows.
func (s *rowSink) truncate(rows int) {
	s.values, s.ids, s.lines, s.rowMissing = s.values[:rows*s.p], s.ids[:rows], s.lines[:rows], s.rowMissing[:rows]
	if s.groups != nil {
		s.groups = s.groups[:rows]
	}
}

func (rp *rowParser) fail(line, col int, text, reason string) error {
	name := ""
	if col > 0 {
		name = rp.names[col-1]
	}
	return &InputError{File: rp.file, Line: line, Column: col, Name: name, Text: text, Reason: reason}
}

// cell reads one variable cell, accepting thousands separators and a
// decimal comma when asked to.
func (rp *rowParser) cell(raw []byte, s *rowSink) (float64, cellKind) {
	// Only the first byte is looked at in the common case, to keep the cost
	// off the hot path of large files. A limit's sign comes off before the
	// digit groups and the decimal comma are read, so that "<1,000" under
	// --thousands and "<0,05" under --decimal comma are limits.
	if len(raw) > 0 && (raw[0] == '<' || raw[0] == '>' || raw[0] == ' ' || raw[0] == '\t') {
		if side, rest, ok := limitSign(raw); ok {
			if len(rest) == 0 {
				return 0, cellBadLimit
			}
			v, kind := rp.number(rest, s)
			return limitValue(v, kind, side)
		}
	}
	return rp.number(raw, s)
}

// number reads a cell that is not a limit: digit groups removed under
// --thousands, a decimal comma turned into a point, then the number grammar.
func (rp *rowParser) number(raw []byte, s *rowSink) (float64, cellKind) {
	if rp.thousands != 0 {
		stripped, grouped, ok := stripGroups(raw, rp.thousands, rp.decimal, s.scratch[:0])
		if !ok {
			return 0, cellText
		}
		if grouped {
			s.grouped++
			s.scratch = stripped
			raw = stripped
		}
	}
	if rp.decimal == ',' && bytes.IndexByte(raw, ',') >= 0 {
		s.scratch = append(s.scratch[:0], raw...)
		for i, c := range s.scratch {
			switch c {
			case ',':
				s.scratch[i] = '.'
			case '.':
				return 0, cellText // a point as well: thousands separator or a typo
			}
		}
		raw = s.scratch
	}
	return parseCell(raw)
}

// textHint suggests what may be wrong with a cell that is not a number.
// It depends on the cell alone, so that the same cell gets the same message
// wherever it is in the file.
func (rp *rowParser) textHint(raw []byte) string {
	t := strings.TrimSpace(string(raw))
	unsigned := strings.TrimLeft(t, "+-")
	switch {
	case strings.HasPrefix(t, "<") || strings.HasPrefix(t, ">"):
		return "cannot read as a number (a limit needs its value, as in <0.05; then use --censored half or --censored sqrt2):"
	case slices.Contains(spreadsheetErrors, strings.ToUpper(t)):
		return "cannot read as a number (a spreadsheet error value; correct the formula, or clear the cell to mark it missing):"
	case isoDateText.MatchString(t):
		return "cannot read as a number (a date; a date column can be the --id or the --group, or left out with --drop):"
	case len(unsigned) > 2 && unsigned[0] == '0' && (unsigned[1] == 'x' || unsigned[1] == 'X'):
		return "cannot read as a number (hexadecimal notation; write the number in decimal):"
	case strings.Contains(t, "_"):
		if _, kind := parseCell([]byte(strings.ReplaceAll(t, "_", ""))); kind == cellNumber {
			return "cannot read as a number (digits grouped with _; write numbers without digit grouping):"
		}
	case rp.thousands != 0 && looksGrouped(t):
		return rp.groupingAdvice(t)
	case rp.decimal == '.' && strings.Count(t, ",") == 1 && !strings.Contains(t, "."):
		if _, kind := parseCell([]byte(strings.Replace(t, ",", ".", 1))); kind == cellNumber {
			return rp.commaAdvice(t)
		}
	case strings.Count(t, ",")+strings.Count(t, ".")+strings.Count(t, " ")+strings.Count(t, "'") > 1 || strings.ContainsAny(t, "\u00a0\u202f"):
		if looksGrouped(t) {
			return rp.groupingAdvice(t)
		}
	}
	return "cannot read as a number:"
}

// commaAdvice is the advice for a number with one comma, such as 1,234 or
// 3,14, in a file read with the decimal point. Three digits after the comma
// may be a thousands separator; a decimal comma can be read only where the
// fields are not separated by commas.
func (rp *rowParser) commaAdvice(t string) string {
	after := len(t) - strings.IndexByte(t, ',') - 1
	dec := "use --decimal comma"
	if rp.delim == ',' {
		dec = "--decimal comma needs semicolons or tabs between the fields, so export the file with one of them"
	}
	if after == 3 {
		return fmt.Sprintf("cannot read as a number (a thousands separator? give --thousands , to read 1,234 as 1234; if it is a decimal comma, %s):", dec)
	}
	return fmt.Sprintf("cannot read as a number (a decimal comma? %s):", dec)
}

// spreadsheetErrors are the error values a spreadsheet writes in a cell
// whose formula failed (#N/A is read as a missing cell instead).
var spreadsheetErrors = []string{"#NULL!", "#DIV/0!", "#VALUE!", "#REF!", "#NAME?", "#NUM!", "#GETTING_DATA", "#SPILL!", "#CALC!", "#FIELD!", "#BLOCKED!", "#CONNECT!", "#BUSY!", "#UNKNOWN!"}

// isoDateText matches a date as a spreadsheet's date cell is read
// (2024-03-05, with an optional time of day).
var isoDateText = regexp.MustCompile(`^\d{4}-\d\d-\d\d(T\d\d:\d\d:\d\d)?$`)

// looksGrouped reports whether t reads as digits grouped by thousands
// separators, such as 1,234,567 or 1.234,5 or 1 234.
func looksGrouped(t string) bool {
	digits, seps := 0, 0
	for _, r := range t {
		switch {
		case r >= '0' && r <= '9':
			digits++
		case r == ',' || r == '.' || r == ' ' || r == '\'' || r == '\u00a0' || r == '\u202f':
			seps++
		case r == '-' || r == '+':
		default:
			return false
		}
	}
	return digits >= 4 && seps >= 1
}

// parse fills row `at` of the sink from the record's fields. rowNumber is
// the 1-based data-row number (the id when there is no id column), 0 when
// it is assigned later.
func (rp *rowParser) parse(rec [][]byte, line, rowNumber, at int, s *rowSink) error {
	if len(rec) != len(rp.names) {
		var err error
		if rec, err = dropTrailing(rp.file, line, rec, rp.names, rp.trailing); err != nil {
			return err
		}
		if err := checkWidth(rp.file, line, rec, rp.names); err != nil {
			return err
		}
	}
	row := s.values[at*s.p : (at+1)*s.p]
	for k, j := range rp.varCols {
		raw := rec[j]
		v, kind := rp.cell(raw, s)
		switch kind {
		case cellText:
			return rp.fail(line, j+1, string(raw), rp.textHint(raw))
		case cellInfinite:
			return rp.fail(line, j+1, string(raw), "infinite value; pcqc needs finite numbers:")
		case cellUnderflow:
			return rp.fail(line, j+1, string(raw), "number too small for double precision: it would be read as 0 (underflow; the smallest is about 4.9e-324); write 0 if zero is meant:")
		case cellBelow, cellAbove:
			if rp.censored == CensorFail || rp.censored == "" {
				return rp.fail(line, j+1, string(raw), censorFailReason(kind))
			}
			side := CensoredBelow
			if kind == cellAbove {
				side = CensoredAbove
			}
			// Substituted first, transformed second: log("<0.05") is log(0.025).
			v = rp.censored.substitute(v, side)
			s.censored = append(s.censored, censoredAt{line: line, k: k, text: strings.TrimSpace(string(raw)), value: v, side: side})
			tv, err := rp.transform(v, line, j, raw)
			if err != nil {
				return err
			}
			v = tv
		case cellBadLimit:
			return rp.fail(line, j+1, string(raw), badLimitReason(raw))
		case cellMissing:
			if rp.missing == MissingFail {
				return rp.fail(line, j+1, string(raw), "missing value (use --missing drop or --missing mean to handle missing cells):")
			}
			s.nMissing++
			s.colMissing[k]++
			s.rowMissing[at] = true
			v = math.NaN()
		default:
			tv, err := rp.transform(v, line, j, raw)
			if err != nil {
				return err
			}
			v = tv
		}
		row[k] = v
	}
	switch {
	case rp.idCol >= 0:
		id := strings.TrimSpace(string(rec[rp.idCol]))
		if isMissingToken([]byte(id)) {
			// Named by its line, so that it can still be found.
			id = MissingIDPrefix + itoa(line)
			s.missingIDs++
		}
		s.ids[at] = id
	case rowNumber > 0:
		s.ids[at] = itoa(rowNumber)
	}
	if rp.groupCol >= 0 {
		s.groups[at] = strings.TrimSpace(string(rec[rp.groupCol]))
	}
	s.lines[at] = line
	return nil
}

// transform applies --transform to the value of the cell raw at (line,
// column j+1).
func (rp *rowParser) transform(v float64, line, j int, raw []byte) (float64, error) {
	tv, ok := rp.tr.apply(v)
	if !ok {
		return 0, rp.fail(line, j+1, string(raw), fmt.Sprintf("value outside the domain of --transform %s (%s):", rp.tr, rp.tr.domain()))
	}
	return tv, nil
}

// censorFailReason is the message for a censored cell under CensorFail.
func censorFailReason(kind cellKind) string {
	if kind == cellAbove {
		return "value above a reporting limit (use --censored half or --censored sqrt2 to keep it at the limit and list it):"
	}
	return "value below a detection limit (use --censored half or --censored sqrt2 to read it as the limit/2 or limit/√2 and list it):"
}

// badLimitReason is the message for "<" or ">" without a usable limit.
func badLimitReason(raw []byte) string {
	if len(bytes.TrimSpace(bytes.TrimSpace(raw)[1:])) == 0 {
		return "a limit sign without its value (write the limit, as in <0.05):"
	}
	return "a detection or reporting limit must be a positive finite number:"
}

// chunk is a byte range of the file holding whole lines, starting at line
// firstLine.
type chunk struct {
	offset, end int64
	firstLine   int
}

// parallelThreshold is the file size from which the rows are parsed by
// several workers. It is a variable so that tests can send small files
// down that path.
var parallelThreshold int64 = 8 << 20

// parseChunks parses the data lines of a seekable file with no quotes in
// parallel. Each physical line L (the header is line 1, or later when blank
// lines precede it) fills slot L − headerLine − 1, so workers need no
// coordination; blank lines leave empty slots that compact removes.
func (rp *rowParser) parseChunks(ra io.ReaderAt, chunks []chunk, headerLine int, s *rowSink, delim byte) error {
	errs := make([]error, len(chunks))
	var wg sync.WaitGroup
	var mu sync.Mutex
	next := make(chan int, len(chunks))
	for i := range chunks {
		next <- i
	}
	close(next)
	workers := min(runtime.NumCPU(), len(chunks))
	var failed workgroup.Panic // a bug; raised again below, in the caller
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			defer failed.Catch(func() {})
			local := &rowSink{p: s.p, values: s.values, ids: s.ids, groups: s.groups, lines: s.lines, rowMissing: s.rowMissing, colMissing: make([]int, s.p)}
			var buf []byte
			for i := range next {
				c := chunks[i]
				size := int(c.end - c.offset)
				if cap(buf) < size {
					buf = make([]byte, size)
				}
				buf = buf[:size]
				if _, err := ra.ReadAt(buf, c.offset); err != nil && err != io.EOF {
					errs[i] = &InputError{File: rp.file, Line: c.firstLine, Reason: "read error: " + err.Error()}
					continue
				}
				rr := newRecordReader(bufio.NewReaderSize(bytes.NewReader(buf), 1<<16), delim)
				rr.line, rr.comment = c.firstLine-1, rp.comment
				for {
					rec, err := rr.read()
					if err == io.EOF {
						break
					}
					if err != nil {
						errs[i] = namedReadError(rp.file, rr, err, rp.names)
						break
					}
					if err := rp.parse(rec, rr.recLine, 0, rr.recLine-headerLine-1, local); err != nil {
						errs[i] = err
						break
					}
				}
				local.comments += rr.comments
			}
			mu.Lock()
			s.nMissing += local.nMissing
			s.missingIDs += local.missingIDs
			s.censored = append(s.censored, local.censored...)
			s.grouped += local.grouped
			s.comments += local.comments
			for k, c := range local.colMissing {
				s.colMissing[k] += c
			}
			mu.Unlock()
		}()
	}
	wg.Wait()
	failed.Raise()
	s.chunked = true
	for _, err := range errs {
		if err != nil {
			return err // chunks are in file order: the first error is the first in the file
		}
	}
	return nil
}

// compact removes the empty slots left by blank lines and numbers the rows.
func (s *rowSink) compact(numberRows bool) {
	keep := 0
	for i, line := range s.lines {
		if line == 0 {
			continue
		}
		if keep != i {
			copy(s.values[keep*s.p:(keep+1)*s.p], s.values[i*s.p:(i+1)*s.p])
			s.ids[keep], s.lines[keep], s.rowMissing[keep] = s.ids[i], s.lines[i], s.rowMissing[i]
			if s.groups != nil {
				s.groups[keep] = s.groups[i]
			}
		}
		if numberRows {
			s.ids[keep] = itoa(keep + 1)
		}
		keep++
	}
	s.values, s.ids, s.lines, s.rowMissing = s.values[:keep*s.p], s.ids[:keep], s.lines[:keep], s.rowMissing[:keep]
	if s.groups != nil {
		s.groups = s.groups[:keep]
	}
}

// splitChunks cuts the data part of a file [dataStart, size) into ranges of
// about target bytes that start and end on line boundaries, and numbers
// their first lines. It reads only the bytes around each cut and counts
// line ends in between.
func splitChunks(ra io.ReaderAt, dataStart, size int64, firstLine int, target int64) ([]chunk, error) {
	var out []chunk
	start, line := dataStart, firstLine
	probe := make([]byte, 64<<10)
	count := make([]byte, 4<<20)
	for start < size {
		end := start + target
		if end >= size {
			out = append(out, chunk{start, size, line})
			break
		}
		// Move the cut to just after the next line end.
		for {
			n, err := ra.ReadAt(probe, end)
			if i := bytes.IndexByte(probe[:n], '\n'); i >= 0 {
				end += int64(i) + 1
				break
			}
			end += int64(n)
			if err != nil || end >= size {
				end = size
				break
			}
		}
		out = append(out, chunk{start, end, line})
		// Count the line ends of this chunk for the next one's first line.
		for off := start; off < end; {
			n := min(int64(len(count)), end-off)
			if _, err := ra.ReadAt(count[:n], off); err != nil && err != io.EOF {
				return nil, err
			}
			line += bytes.Count(count[:n], []byte{'\n'})
			off += n
		}
		start = end
	}
	return out, nil
}
