package intake

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"unicode"
	"unicode/utf8"

	"golang.org/x/text/encoding/charmap"
)

// recordReader splits delimited text into records of fields.
//
// It accepts RFC 4180 quoting (a quote inside a quoted field is doubled, and
// a quoted field may span lines), LF and CRLF line ends, lone CR line ends
// when told (cr), and blank lines (skipped). It is lenient where spreadsheet
// exports need it: a quote in the middle of an unquoted field is kept as a
// literal character, and text after a closing quote is appended to the
// field. It is strict about bytes: a NUL, a byte that is not UTF-8, or a
// character that betrays a wrong --encoding stops it with the line and field.
//
// Unlike encoding/csv it does not allocate per record: the fields returned by
// read alias internal buffers and are valid only until the next call. That
// matters for tables of millions of rows.
type recordReader struct {
	br    *bufio.Reader
	delim byte
	cr    bool     // lines end in a lone CR
	enc   Encoding // what the text was converted from ("" for UTF-8)

	comment  byte // lines starting with it are passed over (0: none)
	comments int  // lines passed over as comments

	line    int // physical lines consumed so far
	recLine int // line on which the record last returned starts

	long   []byte   // a physical line longer than the bufio buffer
	raw    []byte   // a record with quotes, possibly spanning lines
	store  []byte   // unescaped field bytes for records with quotes
	ends   []int    // field end offsets into store
	fields [][]byte // the fields returned by read

	badOff int // where readLine found a bad byte in the line it returned
}

// MaxLineBytes bounds one physical line. A table line of 100,000 numeric
// fields is a few MB; a "line" far longer has no line end at all (a
// stream of text without newlines), and reading on would hold all of it in
// memory.
const MaxLineBytes = 64 << 20

// errLineTooLong is returned when a line passes MaxLineBytes.
var errLineTooLong = fmt.Errorf("the line is longer than %d MiB without a line end: this does not look like a text table", MaxLineBytes>>20)

// errUnterminatedQuote is returned (wrapped by the caller with a position)
// when the input ends inside a quoted field.
var errUnterminatedQuote = errors.New("quoted field is not closed before the end of the file")

// recordSource gives a table's records one at a time: the lines of
// delimited text, or the rows of a spreadsheet's sheet. The fields of a
// record are valid until the next read; position is the line (or sheet row)
// on which the record last returned starts.
type recordSource interface {
	read() ([][]byte, error)
	position() int
	// commentCount is the number of comment lines passed over so far.
	commentCount() int
}

func (r *recordReader) position() int     { return r.recLine }
func (r *recordReader) commentCount() int { return r.comments }

func newRecordReader(br *bufio.Reader, delim byte) *recordReader {
	return &recordReader{br: br, delim: delim}
}

// errBadText is returned by readLine with a line holding a byte that no
// table may hold, at r.badOff; the caller, which knows where fields start,
// turns it into a textError.
var errBadText = errors.New("bad text")

// textError is a bad byte placed in the input: line and field (1-based),
// the field's text and the reason.
type textError struct {
	line, col int
	text      string
	reason    string
}

func (e *textError) Error() string { return e.reason }

// readLine returns the next physical line without its line end. The slice is
// valid until the next call. At the end of input it returns io.EOF; with a
// line that holds a bad byte (see badByte) it returns the line and
// errBadText.
func (r *recordReader) readLine() ([]byte, error) {
	eol := byte('\n')
	if r.cr {
		eol = '\r'
	}
	chunk, err := r.br.ReadSlice(eol)
	if err == bufio.ErrBufferFull {
		r.long = append(r.long[:0], chunk...)
		for err == bufio.ErrBufferFull {
			if bytes.IndexByte(chunk, 0) >= 0 {
				// A flood of zeros (a pipe from /dev/zero) never ends its
				// line: stop at the first NUL rather than read it all.
				err = nil
				break
			}
			if len(r.long) > MaxLineBytes {
				r.line++
				return nil, errLineTooLong
			}
			chunk, err = r.br.ReadSlice(eol)
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
	if n := len(chunk); n > 0 && chunk[n-1] == eol {
		chunk = chunk[:n-1]
	}
	if r.cr {
		// The LF of a CRLF in a file that began with lone CRs.
		if len(chunk) > 0 && chunk[0] == '\n' {
			chunk = chunk[1:]
		}
	} else if n := len(chunk); n > 0 && chunk[n-1] == '\r' {
		chunk = chunk[:n-1]
	}
	if r.badOff = r.badByte(chunk); r.badOff >= 0 {
		return chunk, errBadText
	}
	return chunk, nil
}

// badByte returns the offset of the first byte of line that no table may
// hold, or -1: a NUL; a byte that is not UTF-8; after conversion from
// Windows-1252, U+FFFD, which stands for the five bytes that encoding leaves
// undefined; after conversion from Latin-1, a C1 control character (U+0080
// to U+009F), which real Latin-1 text never holds but Windows-1252 text
// (curly quotes, the euro sign) read as Latin-1 does.
func (r *recordReader) badByte(line []byte) int {
	if bytes.IndexByte(line, 0) < 0 && utf8.Valid(line) {
		switch r.enc {
		case EncodingCP1252:
			if !bytes.Contains(line, []byte("\uFFFD")) {
				return -1
			}
		case EncodingLatin1:
			if bytes.IndexByte(line, 0xC2) < 0 {
				return -1
			}
		default:
			return -1
		}
	}
	for i := 0; i < len(line); {
		c := line[i]
		if c == 0 {
			return i
		}
		if c < utf8.RuneSelf {
			i++
			continue
		}
		ru, size := utf8.DecodeRune(line[i:])
		switch {
		case ru == utf8.RuneError && size == 1:
			return i
		case r.enc == EncodingCP1252 && ru == utf8.RuneError:
			return i
		case r.enc == EncodingLatin1 && ru >= 0x80 && ru <= 0x9F:
			return i
		}
		i += size
	}
	return -1
}

// textErr describes the bad byte readLine found in line. base is the number
// of fields of the record before the line, and inQuote says that the line
// continues a quoted field.
func (r *recordReader) textErr(line []byte, base int, inQuote bool) error {
	off := r.badOff
	idx, from, to := fieldAt(line, off, r.delim, base, inQuote)
	e := &textError{line: r.line, col: idx + 1, text: string(line[from:to])}
	// Each byte of Latin-1 or Windows-1252 is one character of the
	// converted line, so counting characters gives the byte in the file.
	at := off + 1
	if r.enc == EncodingLatin1 || r.enc == EncodingCP1252 {
		at = utf8.RuneCount(line[:off]) + 1
	}
	switch ru, _ := utf8.DecodeRune(line[off:]); {
	case line[off] == 0:
		e.reason = fmt.Sprintf("NUL (zero) byte at byte %d of the line; a text table cannot hold one: remove it, or export the data as CSV again:", at)
	case r.enc == EncodingCP1252:
		e.reason = fmt.Sprintf("byte %d of the line is one of the five bytes Windows-1252 leaves undefined (0x81, 0x8d, 0x8f, 0x90, 0x9d), so the file is not Windows-1252; save it as UTF-8 (CSV UTF-8) and try again without --encoding:", at)
	case r.enc == EncodingLatin1:
		e.reason = fmt.Sprintf("byte 0x%02x at byte %d of the line is a control character in Latin-1, which suggests Windows-1252 text (curly quotes, dashes, the euro sign); give --encoding cp1252:", ru, at)
	default:
		// Name the character the byte is in the likely encodings, so that
		// the user can tell which one the file is in.
		b := line[off]
		seen := ""
		switch c := charmap.Windows1252.DecodeByte(b); {
		case c == utf8.RuneError || !unicode.IsPrint(c):
		case b >= 0xA0:
			seen = fmt.Sprintf(" (%c in Latin-1 and Windows-1252)", c)
		default:
			seen = fmt.Sprintf(" (%c in Windows-1252)", c)
		}
		e.reason = fmt.Sprintf("not UTF-8: byte %d of the line is \\x%02x%s; save the file as UTF-8 (CSV UTF-8), or give --encoding latin1 or --encoding cp1252 for what it is:", at, b, seen)
	}
	return e
}

// fieldAt returns the index, counted from base, of the field of line that
// holds byte off, and that field's extent in line. It follows readQuoted's
// rules; inQuote says that the line continues an open quoted field.
func fieldAt(line []byte, off int, delim byte, base int, inQuote bool) (idx, start, end int) {
	const (
		fieldStart = iota
		unquoted
		quoted
		afterQuote
	)
	state := fieldStart
	if inQuote {
		state = quoted
	}
	idx, end = base, len(line)
	for i := 0; i < len(line); i++ {
		c := line[i]
		if state != quoted && c == delim {
			if i >= off {
				end = i
				break
			}
			idx++
			start = i + 1
			state = fieldStart
			continue
		}
		switch state {
		case fieldStart:
			if c == '"' {
				state = quoted
			} else if c != ' ' {
				state = unquoted
			}
		case quoted:
			if c == '"' {
				if i+1 < len(line) && line[i+1] == '"' {
					i++
				} else {
					state = afterQuote
				}
			}
		}
	}
	return idx, start, end
}

// read returns the fields of the next record, skipping blank lines and
// comment lines. It returns io.EOF when no records are left. r.recLine holds
// the line on which the record starts.
func (r *recordReader) read() ([][]byte, error) {
	var line []byte
	for {
		l, err := r.readLine()
		if r.comment != 0 && len(l) > 0 && l[0] == r.comment && (err == nil || err == errBadText) {
			// A comment may hold anything, bytes a table may not hold too.
			r.comments++
			continue
		}
		if err == errBadText {
			r.recLine = r.line
			return nil, r.textErr(l, 0, false)
		}
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
					if err == errBadText {
						return nil, r.textErr(next, len(r.ends), true)
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

// SplitHeader splits the first line of a delimited text, honouring quotes as
// the table reader does; it serves files whose header pcqc checks before
// reading them as a table (a saved audit's scores.csv).
func SplitHeader(line []byte, delim byte) ([][]byte, error) {
	return newRecordReader(bufio.NewReader(bytes.NewReader(line)), delim).read()
}

// textRow is one record kept as text: its cells' bytes in one buffer and
// the end of each cell. The reader keeps the first rows this way to
// classify the columns; a string per cell cost about three times the text
// on a table of 20,000 columns (a header and an allocation per cell).
type textRow struct {
	buf  []byte
	ends []int32
}

// newTextRow copies rec into a textRow.
func newTextRow(rec [][]byte) textRow {
	size := 0
	for _, c := range rec {
		size += len(c)
	}
	row := textRow{buf: make([]byte, 0, size), ends: make([]int32, len(rec))}
	for j, c := range rec {
		row.buf = append(row.buf, c...)
		row.ends[j] = int32(len(row.buf))
	}
	return row
}

// cell returns the bytes of cell j, which alias the row's buffer.
func (t textRow) cell(j int) []byte {
	start := int32(0)
	if j > 0 {
		start = t.ends[j-1]
	}
	return t.buf[start:t.ends[j]:t.ends[j]]
}

// text returns cell j as a string.
func (t textRow) text(j int) string { return string(t.cell(j)) }

// record returns the row's cells in dst's storage, aliasing the buffer.
func (t textRow) record(dst [][]byte) [][]byte {
	dst = dst[:0]
	for j := range t.ends {
		dst = append(dst, t.cell(j))
	}
	return dst
}
