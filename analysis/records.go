package analysis

import (
	"bufio"
	"bytes"
	"errors"
	"io"
)

// recordReader splits delimited text into records of fields.
//
// It accepts RFC 4180 quoting (a quote inside a quoted field is doubled, and
// a quoted field may span lines), LF and CRLF line ends, and blank lines
// (skipped). It is lenient where spreadsheet exports need it: a quote in the
// middle of an unquoted field is kept as a literal character, and text after
// a closing quote is appended to the field.
//
// Unlike encoding/csv it does not allocate per record: the fields returned by
// read alias internal buffers and are valid only until the next call. That
// matters for tables of millions of rows.
type recordReader struct {
	br    *bufio.Reader
	delim byte

	line    int // physical lines consumed so far
	recLine int // line on which the record last returned starts

	long   []byte   // a physical line longer than the bufio buffer
	raw    []byte   // a record with quotes, possibly spanning lines
	store  []byte   // unescaped field bytes for records with quotes
	ends   []int    // field end offsets into store
	fields [][]byte // the fields returned by read
}

// errUnterminatedQuote is returned (wrapped by the caller with a position)
// when the input ends inside a quoted field.
var errUnterminatedQuote = errors.New("quoted field is not closed before the end of the file")

func newRecordReader(br *bufio.Reader, delim byte) *recordReader {
	return &recordReader{br: br, delim: delim}
}

// readLine returns the next physical line without its line end. The slice is
// valid until the next call. At the end of input it returns io.EOF.
func (r *recordReader) readLine() ([]byte, error) {
	chunk, err := r.br.ReadSlice('\n')
	if err == bufio.ErrBufferFull {
		r.long = append(r.long[:0], chunk...)
		for err == bufio.ErrBufferFull {
			chunk, err = r.br.ReadSlice('\n')
			r.long = append(r.long, chunk...)
		}
		chunk = r.long
	}
	if err != nil && err != io.EOF {
		return nil, err
	}
	if len(chunk) == 0 && err == io.EOF {
		return nil, io.EOF
	}
	r.line++
	if n := len(chunk); n > 0 && chunk[n-1] == '\n' {
		chunk = chunk[:n-1]
	}
	if n := len(chunk); n > 0 && chunk[n-1] == '\r' {
		chunk = chunk[:n-1]
	}
	return chunk, nil
}

// read returns the fields of the next record, skipping blank lines. It
// returns io.EOF when no records are left. r.recLine holds the line on which
// the record starts.
func (r *recordReader) read() ([][]byte, error) {
	var line []byte
	for {
		l, err := r.readLine()
		if err != nil {
			return nil, err
		}
		if len(l) > 0 {
			line = l
			break
		}
	}
	r.recLine = r.line
	if bytes.IndexByte(line, '"') < 0 {
		return r.split(line), nil
	}
	return r.readQuoted(line)
}

// split is the fast path for a line without quotes.
func (r *recordReader) split(line []byte) [][]byte {
	f := r.fields[:0]
	for {
		i := bytes.IndexByte(line, r.delim)
		if i < 0 {
			f = append(f, line)
			break
		}
		f = append(f, line[:i])
		line = line[i+1:]
	}
	r.fields = f
	return f
}

// readQuoted parses a record that contains at least one quote, reading
// further lines while a quoted field is open.
func (r *recordReader) readQuoted(line []byte) ([][]byte, error) {
	r.raw = append(r.raw[:0], line...)
	r.store = r.store[:0]
	r.ends = r.ends[:0]
	pos := 0
	for {
		// Start of a field. Spaces before an opening quote are ignored so
		// that `a, "b"` reads as two fields a and b.
		q := pos
		for q < len(r.raw) && r.raw[q] == ' ' {
			q++
		}
		if q < len(r.raw) && r.raw[q] == '"' {
			pos = q + 1
			for {
				i := bytes.IndexByte(r.raw[pos:], '"')
				if i < 0 {
					// The quoted field continues on the next line.
					r.store = append(r.store, r.raw[pos:]...)
					r.store = append(r.store, '\n')
					next, err := r.readLine()
					if err == io.EOF {
						return nil, errUnterminatedQuote
					}
					if err != nil {
						return nil, err
					}
					pos = len(r.raw)
					r.raw = append(r.raw, next...)
					continue
				}
				r.store = append(r.store, r.raw[pos:pos+i]...)
				pos += i + 1
				if pos < len(r.raw) && r.raw[pos] == '"' {
					r.store = append(r.store, '"')
					pos++
					continue
				}
				break
			}
			// After the closing quote: anything up to the delimiter is kept,
			// except trailing spaces.
			j := bytes.IndexByte(r.raw[pos:], r.delim)
			var rest []byte
			if j < 0 {
				rest = r.raw[pos:]
				pos = len(r.raw)
			} else {
				rest = r.raw[pos : pos+j]
				pos += j
			}
			r.store = append(r.store, bytes.TrimRight(rest, " ")...)
		} else {
			j := bytes.IndexByte(r.raw[pos:], r.delim)
			if j < 0 {
				r.store = append(r.store, r.raw[pos:]...)
				pos = len(r.raw)
			} else {
				r.store = append(r.store, r.raw[pos:pos+j]...)
				pos += j
			}
		}
		r.ends = append(r.ends, len(r.store))
		if pos >= len(r.raw) {
			break
		}
		pos++ // the delimiter
		if pos == len(r.raw) {
			// A delimiter at the very end: one more, empty field.
			r.ends = append(r.ends, len(r.store))
			break
		}
	}
	f := r.fields[:0]
	start := 0
	for _, e := range r.ends {
		f = append(f, r.store[start:e:e])
		start = e
	}
	r.fields = f
	return f, nil
}

// detectDelimiter picks the delimiter of a header line: whichever of tab,
// semicolon and comma occurs most often outside quotes (ties go to tab, then
// semicolon, because commas are the likeliest to appear inside names). It
// returns 0 when none occurs.
func detectDelimiter(header []byte) byte {
	var counts [3]int
	candidates := [3]byte{'\t', ';', ','}
	inQuote := false
	for _, c := range header {
		if c == '"' {
			inQuote = !inQuote
			continue
		}
		if inQuote {
			continue
		}
		for k, d := range candidates {
			if c == d {
				counts[k]++
			}
		}
	}
	best := -1
	for k := range candidates {
		if counts[k] > 0 && (best < 0 || counts[k] > counts[best]) {
			best = k
		}
	}
	if best < 0 {
		return 0
	}
	return candidates[best]
}
