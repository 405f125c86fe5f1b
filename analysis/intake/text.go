package intake

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"io/fs"
	"os"
	"strings"
	"unicode/utf8"

	"golang.org/x/text/encoding/charmap"
	"golang.org/x/text/transform"
)

// Encoding names the character encoding of an input table.
type Encoding string

const (
	// EncodingUTF8 is the default: the text must be valid UTF-8.
	EncodingUTF8 Encoding = "utf-8"
	// EncodingLatin1 is ISO 8859-1, converted to UTF-8 as it is read.
	EncodingLatin1 Encoding = "latin1"
	// EncodingCP1252 is Windows-1252 (what Excel on Windows in Western
	// European languages writes as "CSV"), converted to UTF-8 as it is read.
	EncodingCP1252 Encoding = "cp1252"
)

// Encodings lists the encodings pcqc reads, in the order of the help text.
var Encodings = []Encoding{EncodingUTF8, EncodingLatin1, EncodingCP1252}

// ParseEncoding reads an encoding name, accepting the usual other spellings
// (utf8, latin-1, iso-8859-1, windows-1252) in any case.
func ParseEncoding(s string) (Encoding, bool) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "utf-8", "utf8":
		return EncodingUTF8, true
	case "latin1", "latin-1", "iso-8859-1", "iso8859-1":
		return EncodingLatin1, true
	case "cp1252", "windows-1252":
		return EncodingCP1252, true
	}
	return "", false
}

// encodingOr returns the first of enc, or UTF-8 when none is given (or it is
// empty).
func encodingOr(enc []Encoding) Encoding {
	if len(enc) > 0 && enc[0] != "" {
		return enc[0]
	}
	return EncodingUTF8
}

// openData opens a file named as an input table. Directories, devices and
// sockets are refused before anything is read: reading /dev/zero or a
// terminal would never end, and opening some devices has side effects.
// Named pipes are allowed, so that process substitution (<(zcat x.gz)) works.
func openData(path string) (*os.File, error) {
	st, err := os.Stat(path)
	if err != nil {
		return nil, &InputError{File: path, Reason: "cannot open: " + unwrapPathError(err)}
	}
	switch m := st.Mode(); {
	case m.IsDir():
		return nil, &InputError{File: path, Reason: "is a directory, not a data table"}
	case m&fs.ModeDevice != 0:
		return nil, &InputError{File: path, Reason: "is a device, not a data table; give a file, or a pipe such as <(zcat data.csv.gz)"}
	case m&fs.ModeSocket != 0:
		return nil, &InputError{File: path, Reason: "is a socket, not a data table"}
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, &InputError{File: path, Reason: "cannot open: " + unwrapPathError(err)}
	}
	return f, nil
}

// textSource is an input table's text, ready to be split into records: the
// checks that need the raw bytes are done, the text is UTF-8, and an Excel
// "sep=" first line is consumed.
type textSource struct {
	br   *bufio.Reader // the text as UTF-8, from the line after any sep= line
	enc  Encoding
	bom  int  // bytes of a UTF-8 byte order mark skipped
	cr   bool // lines end in a lone CR (classic Mac OS)
	sep  byte // delimiter named by a sep= first line, 0 without one
	skip int  // lines consumed before the text in br (sep=, --skip, comments)

	lead     lead // what to pass over before the header
	comments int  // comment lines passed over before the header
}

// openText prepares r, the raw bytes of a table named name, for reading.
// delim is the delimiter the user gave (0 for none), needed only to place
// errors and to check a sep= line against it.
// lead, when given, says which lines before the header are not read (see
// passLead).
func openText(name string, r io.Reader, delim byte, enc Encoding, lead ...lead) (*textSource, error) {
	if enc == "" {
		enc = EncodingUTF8
	}
	br := bufio.NewReaderSize(r, 1<<20)
	s := &textSource{enc: enc}
	if len(lead) > 0 {
		s.lead = lead[0]
	}
	bom, err := sniffText(name, br, delim, enc)
	if err != nil {
		return nil, err
	}
	s.bom = bom
	switch enc {
	case EncodingUTF8:
	case EncodingLatin1, EncodingCP1252:
		if bom > 0 {
			return nil, &InputError{File: name, Line: 1, Reason: fmt.Sprintf("the file starts with a UTF-8 byte order mark, so it is UTF-8 text; leave out --encoding %s", enc)}
		}
		cm := charmap.ISO8859_1
		if enc == EncodingCP1252 {
			cm = charmap.Windows1252
		}
		br = bufio.NewReaderSize(transform.NewReader(br, cm.NewDecoder()), 1<<20)
	default:
		return nil, &InputError{File: name, Reason: fmt.Sprintf("unknown encoding %q", string(enc))}
	}
	s.br = br

	// Classic Mac OS ended lines with a lone CR. A file is read that way
	// when its start has a CR and no LF at all: a CRLF file has LFs, and a
	// stray CR inside an LF file leaves it an LF file.
	peek, _ := br.Peek(br.Size())
	s.cr = bytes.IndexByte(peek, '\n') < 0 && bytes.IndexByte(peek, '\r') >= 0

	// Excel writes "sep=;" as the first line to name the delimiter. Lines
	// skipped with --skip are not read at all, a sep= line among them too.
	first := firstLine(peek)
	if s.lead.skip > 0 {
		return s, s.passLead(name)
	}
	if len(first) == 5 && strings.EqualFold(string(first[:4]), "sep=") {
		d := first[4]
		if d != ',' && d != ';' && d != '\t' {
			return nil, &InputError{File: name, Line: 1, Text: string(first),
				Reason: "the first line names a field separator pcqc does not read (it reads commas, semicolons and tabs):"}
		}
		if delim != 0 && delim != d {
			return nil, &InputError{File: name, Line: 1, Text: string(first),
				Reason: fmt.Sprintf("the first line names %s as the field separator but --delim gives %s; leave out --delim, or remove the line:", delimName(d), delimName(delim))}
		}
		n := len(first) + 1
		if len(peek) > n && peek[n-1] == '\r' && peek[n] == '\n' {
			n++
		}
		br.Discard(min(n, len(peek)))
		s.sep, s.skip = d, 1
	}
	return s, s.passLead(name)
}

// delimiter returns the delimiter to use: the user's, else the sep= line's,
// else the one detected from the header line, else the comma.
func (s *textSource) delimiter(given byte) byte {
	if given != 0 {
		return given
	}
	if s.sep != 0 {
		return s.sep
	}
	peek, _ := s.br.Peek(s.br.Size())
	if d := detectDelimiter(firstLine(peek)); d != 0 {
		return d
	}
	return ','
}

// records returns the reader of the records of the text.
func (s *textSource) records(delim byte) *recordReader {
	rr := newRecordReader(s.br, delim)
	rr.cr, rr.enc, rr.line, rr.comment = s.cr, s.enc, s.skip, s.lead.comment
	return rr
}

// firstLine returns b up to its first line end, LF or CR.
func firstLine(b []byte) []byte {
	if i := bytes.IndexAny(b, "\r\n"); i >= 0 {
		return b[:i]
	}
	return b
}

// sniffText looks at the start of a table's raw bytes: it skips a UTF-8 byte
// order mark (returning its length) and refuses UTF-16 text, input that is
// nothing but zero bytes, and binary files, each with its own reason. A
// stray NUL in text is left to the record reader, which places it exactly.
func sniffText(name string, br *bufio.Reader, delim byte, enc Encoding) (bom int, err error) {
	if head, _ := br.Peek(3); len(head) >= 2 {
		switch {
		case head[0] == 0xFF && head[1] == 0xFE, head[0] == 0xFE && head[1] == 0xFF:
			return 0, &InputError{File: name, Line: 1, Reason: "the file is UTF-16 encoded; save it as UTF-8 (CSV UTF-8) and try again"}
		case len(head) == 3 && head[0] == 0xEF && head[1] == 0xBB && head[2] == 0xBF:
			br.Discard(3)
			bom = 3
		}
	}
	head, _ := br.Peek(4096)
	nul := bytes.IndexByte(head, 0)
	if nul < 0 {
		return bom, nil
	}
	switch {
	case len(bytes.Trim(head, "\x00")) == 0:
		// /dev/zero through a pipe, a disk image, a file that was
		// allocated but never written: not UTF-16, whose every other
		// byte is not zero.
		return bom, &InputError{File: name, Line: 1, Column: 1, Reason: "the file holds nothing but NUL (zero) bytes, not text; is it the right file?"}
	case looksUTF16(head):
		return bom, &InputError{File: name, Line: 1, Reason: "the file looks UTF-16 encoded (every other byte is zero); save it as UTF-8 (CSV UTF-8) and try again"}
	case looksBinary(head, enc):
		line, col := placeByte(head, nul, delim)
		return bom, &InputError{File: name, Line: line, Column: col, Reason: "the file holds NUL bytes: it looks like a binary file (a spreadsheet workbook, an image, a compressed archive), not a text table; export it as CSV"}
	}
	return bom, nil
}

// looksUTF16 reports whether the bytes look like UTF-16 text without a byte
// order mark: zeros in most even or most odd positions, and few in the
// others (an all-zero input is not text of any kind).
func looksUTF16(b []byte) bool {
	var even, odd int
	for i, c := range b {
		if c == 0 {
			if i%2 == 0 {
				even++
			} else {
				odd++
			}
		}
	}
	half := len(b) / 2
	return half > 0 && (even > half*9/10 && odd < half/10 || odd > half*9/10 && even < half/10)
}

// looksBinary reports whether a start of input holding a NUL byte is a
// binary file rather than text with a stray NUL: bytes that are not UTF-8
// (when UTF-8 is expected; a cut character at the end does not count), or
// more than a few control bytes and over 1 % of them.
func looksBinary(head []byte, enc Encoding) bool {
	if enc == EncodingUTF8 {
		valid := head
		for k := 0; k < utf8.UTFMax-1 && len(valid) > 0 && !utf8.Valid(valid); k++ {
			valid = valid[:len(valid)-1]
		}
		if !utf8.Valid(valid) {
			return true
		}
	}
	controls := 0
	for _, c := range head {
		if c < 0x20 && c != '\t' && c != '\n' && c != '\r' {
			controls++
		}
	}
	return controls > 8 && controls*100 > len(head)
}

// placeByte returns the line and field (both 1-based) of byte off of the
// start of a text, for messages about bytes found before records are read.
// delim 0 means: detect it from the first line.
func placeByte(text []byte, off int, delim byte) (line, col int) {
	if delim == 0 {
		if delim = detectDelimiter(firstLine(text)); delim == 0 {
			delim = ','
		}
	}
	line, start := 1, 0
	for i := 0; i < off; i++ {
		if text[i] == '\n' || text[i] == '\r' && (i+1 >= len(text) || text[i+1] != '\n') {
			line++
			start = i + 1
		}
	}
	rest := text[start:]
	if i := bytes.IndexAny(rest, "\r\n"); i >= 0 && i >= off-start {
		rest = rest[:i]
	}
	idx, _, _ := fieldAt(rest, off-start, delim, 0, false)
	return line, idx + 1
}
