package intake

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"io"
	"net"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"unicode/utf8"
)

// Latin-1 and Windows-1252 exports are converted; the names and ids come
// out as UTF-8, the table records its encoding, and the hash stays that of
// the bytes in the file. The byte values are those of ISO 8859-1 and of
// Microsoft's Windows-1252 code page (from memory: B0 °, B5 µ, E4 ä, 80 €,
// 93/94 curly double quotes).
func TestEncodingsConverted(t *testing.T) {
	cases := []struct {
		name  string
		text  string
		enc   Encoding
		names []string
		id    string
	}{
		{"latin1", "id,Temp \xb0C,Pb \xb5g/l\nM\xe4rz,1,2\ns2,3,5\ns3,4,4\n", EncodingLatin1, []string{"Temp °C", "Pb µg/l"}, "März"},
		{"cp1252", "id;Preis \x80;\x93b\x94\nM\xe4rz;1;2\ns2;3;5\ns3;4;4\n", EncodingCP1252, []string{"Preis €", "“b”"}, "März"},
		{"cp1252 reads latin1 letters alike", "id,Temp \xb0C,b\nM\xe4rz,1,2\ns2,3,5\ns3,4,4\n", EncodingCP1252, []string{"Temp °C", "b"}, "März"},
		{"utf-8", "id,Temp °C,b\nMärz,1,2\ns2,3,5\ns3,4,4\n", EncodingUTF8, []string{"Temp °C", "b"}, "März"},
		{"cr line ends and latin1", "id,Temp \xb0C,b\rM\xe4rz,1,2\rs2,3,5\rs3,4,4\r", EncodingLatin1, []string{"Temp °C", "b"}, "März"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tab := read(t, c.text, ReadOptions{Encoding: c.enc})
			if strings.Join(tab.Variables, "|") != strings.Join(c.names, "|") || tab.IDs[0] != c.id {
				t.Errorf("variables %q, first id %q", tab.Variables, tab.IDs[0])
			}
			if tab.Encoding != c.enc {
				t.Errorf("encoding %q, want %q", tab.Encoding, c.enc)
			}
			sum := sha256.Sum256([]byte(c.text))
			if tab.SHA256 != hex.EncodeToString(sum[:]) {
				t.Errorf("sha256 is not of the raw bytes")
			}
		})
	}
	if tab := read(t, "id,a,b\nx,1,2\ny,3,5\nz,4,4\n", ReadOptions{}); tab.Encoding != EncodingUTF8 {
		t.Errorf("default encoding %q", tab.Encoding)
	}
}

// Text in the wrong encoding, and NUL bytes, are refused at the line and
// field of the first bad byte, with the bytes shown escaped.
func TestBadBytesRefused(t *testing.T) {
	cases := []struct {
		name       string
		text       string
		enc        Encoding
		line, col  int
		colName    string
		fragments  []string
		notInError string
	}{
		{"latin1 in header", "id,Temp \xb0C,b\nx,1,2\ny,3,5\nz,4,4\n", "", 1, 2, "",
			[]string{"not UTF-8", `byte 9 of the line is \xb0 (° in Latin-1 and Windows-1252)`, "--encoding latin1", `"Temp \xb0C"`}, ""},
		{"cp1252 quote in id", "id,a,b\nx,1,2\n\x93y\x94,3,5\nz,4,4\n", "", 3, 1, "id",
			[]string{`\x93 (“ in Windows-1252)`, "--encoding cp1252"}, ""},
		{"bad byte in a later row", "id,a,b\nx,1,2\ny,3,5\nz,4,4\nw,5\xff,1\n", "", 5, 2, "a",
			[]string{`\xff`, "byte 4 of the line"}, ""},
		{"bad byte in a quoted field's second line", "id,a,b\n\"x\nsecond \xe9\",1,2\ny,3,5\nz,4,4\n", "", 3, 1, "id",
			[]string{`\xe9`}, ""},
		{"bad byte after a quoted field with a delimiter", "id,a,b\n\"x,y\",1,2\xe9\ny,3,5\nz,4,4\n", "", 2, 3, "b",
			[]string{`\xe9`}, ""},
		{"NUL in header", "id,a\x00,b\nx,1,2\ny,3,5\nz,4,4\n", "", 1, 2, "", []string{"NUL", "byte 5 of the line", `"a\x00"`}, "UTF-16"},
		{"NUL in id", "id,a,b\nx,1,2\ny\x00,3,5\nz,4,4\n", "", 3, 1, "id", []string{"NUL"}, ""},
		{"NUL in number", "id,a,b\nx,1,2\ny,3,5\nz,4,4\x00\n", "", 4, 3, "b", []string{"NUL"}, ""},
		{"NUL in latin1 text", "id,a,b\nx,1,2\ny\xe4\x00,3,5\nz,4,4\n", EncodingLatin1, 3, 1, "id", []string{"NUL", "byte 3 of the line"}, ""},
		{"cp1252 read as latin1", "id,Preis \x80,b\nx,1,2\ny,3,5\nz,4,4\n", EncodingLatin1, 1, 2, "",
			[]string{"byte 0x80 at byte 10 of the line", "control character in Latin-1", "--encoding cp1252"}, ""},
		{"byte cp1252 leaves undefined", "id,a,b\nx,1,2\ny,\xe43\x81,5\nz,4,4\n", EncodingCP1252, 3, 2, "a",
			[]string{"byte 5 of the line", "Windows-1252 leaves undefined"}, ""},
		{"UTF-8 mark with latin1", "\xef\xbb\xbfid,a,b\nx,1,2\ny,3,5\nz,4,4\n", EncodingLatin1, 1, 0, "",
			[]string{"byte order mark", "leave out --encoding latin1"}, ""},
		{"all zeros", strings.Repeat("\x00", 5000), "", 1, 1, "", []string{"nothing but NUL"}, "UTF-16"},
		{"a few zeros", "\x00\x00\x00", "", 1, 1, "", []string{"nothing but NUL"}, "UTF-16"},
		{"utf-16 without mark", "i\x00d\x00,\x00a\x00,\x00b\x00\n\x00x\x00,\x001\x00,\x002\x00\n\x00", "", 1, 0, "", []string{"UTF-16"}, ""},
		{"binary", "PK\x03\x04\x14\x00\x06\x00\x08\x00\x00\x00!\x00\xb5U0#\xf4\x00\x00\x00L\x02\x00\x00", "", 1, 1, "", []string{"NUL bytes", "binary file"}, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			e := readErr(t, c.text, ReadOptions{Encoding: c.enc})
			if e.Line != c.line || e.Column != c.col || e.Name != c.colName {
				t.Errorf("at %d:%d (%s), want %d:%d (%s): %v", e.Line, e.Column, e.Name, c.line, c.col, c.colName, e)
			}
			for _, f := range c.fragments {
				if !strings.Contains(e.Error(), f) {
					t.Errorf("%q lacks %q", e.Error(), f)
				}
			}
			if c.notInError != "" && strings.Contains(e.Error(), c.notInError) {
				t.Errorf("%q says %q", e.Error(), c.notInError)
			}
		})
	}
}

// zeros is /dev/zero behind a pipe: a valid start, then zeros (up to a
// limit, so that a reader that does not stop fails the test rather than
// exhaust memory).
type zeros struct {
	start []byte
	left  int // zero bytes still to give
}

func (r *zeros) Read(p []byte) (int, error) {
	n := copy(p, r.start)
	r.start = r.start[n:]
	z := min(len(p)-n, r.left)
	clear(p[n : n+z])
	r.left -= z
	if n+z == 0 {
		return 0, io.EOF
	}
	return n + z, nil
}

// A flood of zeros after a valid start ends at its first NUL instead of
// being read into memory as one endless line.
func TestZeroFloodStops(t *testing.T) {
	const limit = 256 << 20
	start := "id,a,b\n" + strings.Repeat("x,1,2\n", 1000)
	r := &zeros{start: []byte(start), left: limit}
	_, err := ReadTableFrom("pipe", r, ReadOptions{})
	var ie *InputError
	if !errors.As(err, &ie) || ie.Line != 1002 || !strings.Contains(ie.Reason, "NUL") {
		t.Errorf("got %v, want a NUL on line 1002", err)
	}
	if read := limit - r.left; read > 8<<20 {
		t.Errorf("read %d MB of zeros before stopping", read>>20)
	}
}

// Devices are refused before reading; named pipes are read (process
// substitution); a link is followed to what it names.
func TestSpecialFiles(t *testing.T) {
	dir := t.TempDir()
	if _, err := os.Stat("/dev/zero"); err == nil {
		link := filepath.Join(dir, "zero.csv")
		if err := os.Symlink("/dev/zero", link); err != nil {
			t.Fatal(err)
		}
		for _, path := range []string{"/dev/zero", link} {
			_, err := ReadTable(path, ReadOptions{})
			var ie *InputError
			if !errors.As(err, &ie) || !strings.Contains(ie.Reason, "is a device, not a data table") {
				t.Errorf("%s: got %v, want a refusal of a device", path, err)
			}
			if _, err := ReadHeader(path, ReadOptions{}); err == nil || !strings.Contains(err.Error(), "is a device") {
				t.Errorf("ReadHeader %s: got %v", path, err)
			}
			if _, err := ReadLooseTable(path); err == nil || !strings.Contains(err.Error(), "device, not a regular file") {
				t.Errorf("ReadLooseTable %s: got %v", path, err)
			}
		}
	}
	sock := filepath.Join(dir, "s.csv")
	if l, err := net.Listen("unix", sock); err == nil {
		defer l.Close()
		if _, err := ReadTable(sock, ReadOptions{}); err == nil || !strings.Contains(err.Error(), "is a socket, not a data table") {
			t.Errorf("socket: got %v", err)
		}
	}
	fifo := filepath.Join(dir, "data.csv")
	if err := syscall.Mkfifo(fifo, 0o600); err != nil {
		t.Skipf("no named pipes here: %v", err)
	}
	text := "id,a,b\nx,1,2\ny,3,5\nz,4,4\n"
	go func() {
		f, err := os.OpenFile(fifo, os.O_WRONLY, 0)
		if err != nil {
			return
		}
		io.WriteString(f, text)
		f.Close()
	}()
	tab, err := ReadTable(fifo, ReadOptions{})
	if err != nil {
		t.Fatalf("named pipe: %v", err)
	}
	sum := sha256.Sum256([]byte(text))
	if tab.Rows() != 3 || tab.SHA256 != hex.EncodeToString(sum[:]) {
		t.Errorf("named pipe: %d rows, sha256 %s", tab.Rows(), tab.SHA256)
	}
}

// Lone CR line ends (classic Mac OS) are line ends, in quoted fields too,
// and messages give the real line numbers.
func TestCRLineEnds(t *testing.T) {
	tab := read(t, "id,a,b\r\"first\rsample\",1,2\r\rsecond,3,5\rthird,4,4\r", ReadOptions{})
	if tab.Rows() != 3 || tab.IDs[0] != "first\nsample" || tab.Lines[1] != 5 || tab.X.At(2, 1) != 4 {
		t.Errorf("rows %d, ids %q, lines %v", tab.Rows(), tab.IDs, tab.Lines)
	}
	e := readErr(t, "id,a,b\rx,1,2\r\"y\rz\",3,5\rw,4,oops\r", ReadOptions{})
	if e.Line != 5 || e.Column != 3 || e.Text != "oops" {
		t.Errorf("error at %d:%d %q, want 5:3 \"oops\"", e.Line, e.Column, e.Text)
	}
	// A lone CR inside an LF file stays part of its field.
	tab = read(t, "id,a,b\nx\ry,1,2\nz,3,5\nw,4,4\n", ReadOptions{})
	if tab.IDs[0] != "x\ry" {
		t.Errorf("CR inside an LF file: ids %q", tab.IDs)
	}
	// The header of a CR file is one line, not a single long one.
	names, err := ReadHeader(writeTemp(t, "h.csv", "id,a,b\rx,1,2\r"), ReadOptions{})
	if err != nil || strings.Join(names, ",") != "id,a,b" {
		t.Errorf("ReadHeader of a CR file: %q, %v", names, err)
	}
}

// Excel's sep= first line names the delimiter and is skipped; line numbers
// stay the file's own.
func TestSepLine(t *testing.T) {
	tab := read(t, "sep=;\nid;a;b\nx;1;2\ny;3;5\nz;4;4\n", ReadOptions{})
	if tab.Delimiter != ';' || strings.Join(tab.Variables, ",") != "a,b" || tab.Lines[0] != 3 {
		t.Errorf("delimiter %q, variables %v, lines %v", tab.Delimiter, tab.Variables, tab.Lines)
	}
	tab = read(t, "SEP=\t\r\nid\ta,1\tb\r\nx\t1\t2\r\ny\t3\t5\r\nz\t4\t4\r\n", ReadOptions{})
	if tab.Delimiter != '\t' || tab.Variables[0] != "a,1" {
		t.Errorf("tab sep line: delimiter %q, variables %v", tab.Delimiter, tab.Variables)
	}
	e := readErr(t, "sep=,\nid,a,b\nx,1,2\ny,3,x\nz,4,4\n", ReadOptions{})
	if e.Line != 4 || e.Column != 3 {
		t.Errorf("error at %d:%d, want 4:3", e.Line, e.Column)
	}
	for _, c := range []struct {
		text   string
		opt    ReadOptions
		reason string
	}{
		{"sep=|\nid|a|b\nx|1|2\n", ReadOptions{}, "does not read"},
		{"sep=;\nid;a;b\nx;1;2\n", ReadOptions{Delimiter: ','}, "--delim gives commas"},
	} {
		if e := readErr(t, c.text, c.opt); e.Line != 1 || !strings.Contains(e.Reason, c.reason) {
			t.Errorf("%q: %v, want line 1 and %q", c.text, e, c.reason)
		}
	}
	names, err := ReadHeader(writeTemp(t, "s.csv", "sep=;\nid;a;b\n"), ReadOptions{})
	if err != nil || strings.Join(names, ",") != "id,a,b" {
		t.Errorf("ReadHeader after sep=: %q, %v", names, err)
	}
}

// A delimiter at the end of every line adds no column; a value where the
// header has none is refused.
func TestTrailingDelimiter(t *testing.T) {
	for _, text := range []string{
		"id,a,b,\nx,1,2,\ny,3,5,\nz,4,4,\n",
		"id,a,b,\nx,1,2\ny,3,5,\nz,4,4\n",            // some rows without it
		"id;a;b;\nx;1;2; \ny;3;5;\nz;\"4\";4;\"\"\n", // blank and quoted empty
	} {
		tab := read(t, text, ReadOptions{})
		if strings.Join(tab.Variables, ",") != "a,b" || tab.Rows() != 3 {
			t.Errorf("%q: variables %v, rows %d", text, tab.Variables, tab.Rows())
		}
	}
	e := readErr(t, "id,a,b,\nx,1,2,\ny,3,5,9\nz,4,4,\n", ReadOptions{})
	if e.Line != 3 || e.Column != 4 || e.Text != "9" || !strings.Contains(e.Reason, "no name") {
		t.Errorf("value in the unnamed column: %v", e)
	}
	e = readErr(t, "id,a,b\nx,1,2\ny,3,5,\nz,4,4\n", ReadOptions{})
	if e.Line != 3 || !strings.Contains(e.Reason, "ends with a delimiter") {
		t.Errorf("row ending with a delimiter the header lacks: %v", e)
	}
	names, err := ReadHeader(writeTemp(t, "t.csv", "id,a,b,\nx,1,2,\n"), ReadOptions{})
	if err != nil || strings.Join(names, ",") != "id,a,b" {
		t.Errorf("ReadHeader: %q, %v", names, err)
	}
}

// Names that differ only in Unicode normalisation are one name (NFC and NFD
// of é: U+00E9 and U+0065 U+0301, from the Unicode standard, UAX #15).
func TestNamesComparedInNFC(t *testing.T) {
	const nfc, nfd = "\u00e9t\u00e9", "e\u0301te\u0301"
	e := readErr(t, "id,"+nfc+","+nfd+"\nx,1,2\ny,3,5\nz,4,4\n", ReadOptions{})
	if e.Line != 1 || e.Column != 3 || !strings.Contains(e.Reason, "duplicate column name") || !strings.Contains(e.Reason, "normal form") {
		t.Errorf("NFC/NFD duplicate: %v", e)
	}
	text := "id," + nfd + ",b,g\nx,1,2,u\ny,3,5,v\nz,4,4,u\n"
	tab := read(t, text, ReadOptions{Columns: []string{nfc, "b"}, GroupColumn: "g"})
	if tab.Variables[0] != nfd {
		t.Errorf("--columns in NFC: variables %q, want the name as written", tab.Variables)
	}
	tab = read(t, "k"+nfd+",a,b,"+nfc+"\nx,1,2,0\ny,3,5,1\nz,4,4,2\n", ReadOptions{IDColumn: "k" + nfc, Drop: []string{nfd}})
	if tab.IDColumn != "k"+nfd || strings.Join(tab.Variables, ",") != "a,b" {
		t.Errorf("--id and --drop in NFC: id %q, variables %v", tab.IDColumn, tab.Variables)
	}
	tab = read(t, "id,a,b,"+nfd+"\nx,1,2,u\ny,3,5,v\nz,4,4,u\n", ReadOptions{GroupColumn: nfc})
	if tab.GroupColumn != nfd {
		t.Errorf("--group in NFC: group column %q, want the name as written", tab.GroupColumn)
	}
}

// Every part of an input error that may come from the input is escaped, so
// that no terminal control sequence or bidirectional override reaches
// stderr raw.
func TestInputErrorEscapesControls(t *testing.T) {
	hostile := []struct{ raw, shown string }{
		{"\x1b]0;owned\x07", `\x1b]0;owned\x07`}, // OSC: set the window title
		{"\x1b[2J", `\x1b[2J`},                   // CSI: clear the screen
		{"a\u202eb", `a\u202eb`},                 // right-to-left override
		{"a\u2066b\u2069", `a\u2066b\u2069`},     // left-to-right isolate
		{"a\u0085b\u009bc", `a\u0085b\u009bc`},   // C1: next line, CSI
		{"a\x7fb", `a\x7fb`},
		{"a\tb\nc\rd", `a\tb\nc\rd`},
		{"caf\xe9", `caf\xe9`}, // not UTF-8
		{"Temp °C", "Temp °C"}, // kept
	}
	for _, h := range hostile {
		for _, field := range []string{"File", "Name", "Reason", "Text"} {
			e := &InputError{File: "f.csv", Line: 2, Column: 3, Name: "n", Reason: "r", Text: "t"}
			switch field {
			case "File":
				e.File = h.raw
			case "Name":
				e.Name = h.raw
			case "Reason":
				e.Reason = h.raw
			case "Text":
				e.Text = h.raw
			}
			msg := e.Error()
			if !utf8.ValidString(msg) {
				t.Errorf("%s %q: message is not UTF-8: %q", field, h.raw, msg)
			}
			for _, r := range msg {
				if r < 0x20 || r == 0x7f || r >= 0x80 && r <= 0x9f || r >= 0x202a && r <= 0x202e || r >= 0x2066 && r <= 0x2069 {
					t.Errorf("%s %q: message holds %U: %q", field, h.raw, r, msg)
				}
			}
			if field != "Text" && !strings.Contains(msg, h.shown) {
				t.Errorf("%s %q: message %q does not show %q", field, h.raw, msg, h.shown)
			}
		}
	}
	// Long text is cut by characters, keeping the bytes it shows exact.
	e := &InputError{File: "f", Reason: "r", Text: strings.Repeat("\xe9", 100)}
	if want := `"` + strings.Repeat(`\xe9`, 60) + `"… (100 characters)`; !strings.HasSuffix(e.Error(), want) {
		t.Errorf("long text: %q", e.Error())
	}
}

// Review tables get the same text checks and encodings as the data.
func TestLooseTableText(t *testing.T) {
	lt, err := ReadLooseTableFrom("l.csv", strings.NewReader("variable;PC1\nTemp \xb0C;0,5\n"), EncodingLatin1)
	if err != nil || lt.Rows[0][0] != "Temp °C" {
		t.Fatalf("latin1 loadings: %v %v", lt, err)
	}
	_, err = ReadLooseTableFrom("l.csv", strings.NewReader("variable;PC1\nTemp \xb0C;0,5\n"))
	var ie *InputError
	if !errors.As(err, &ie) || ie.Line != 2 || ie.Column != 1 || !strings.Contains(ie.Reason, "not UTF-8") {
		t.Errorf("latin1 loadings read as UTF-8: %v", err)
	}
	lt, err = ReadLooseTableFrom("l.csv", strings.NewReader("sep=,\rvariable,PC1\rx,0.5\ry,0.25\r"))
	if err != nil || len(lt.Rows) != 2 || lt.Lines[0] != 3 || lt.Header[1] != "PC1" {
		t.Errorf("CR loadings with a sep= line: %+v %v", lt, err)
	}
}

func writeTemp(t *testing.T, name, text string) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(path, []byte(text), 0o600); err != nil {
		t.Fatal(err)
	}
	return path
}

// endless yields "y" forever, with no line end (like `yes | tr -d '\n'`),
// counting what was read.
type endless struct{ read int64 }

func (e *endless) Read(p []byte) (int, error) {
	for i := range p {
		p[i] = 'y'
	}
	e.read += int64(len(p))
	return len(p), nil
}

// A stream without line ends is refused once a line passes MaxLineBytes,
// instead of being read into memory without end.
func TestEndlessLineStops(t *testing.T) {
	r := &endless{}
	_, err := ReadTableFrom("pipe", io.MultiReader(strings.NewReader("id,a,b\nx,1,2\n"), r), ReadOptions{})
	var ie *InputError
	if !errors.As(err, &ie) || ie.Line != 3 || !strings.Contains(ie.Reason, "without a line end") {
		t.Errorf("got %v, want a refusal of line 3 as too long", err)
	}
	if r.read > MaxLineBytes+8<<20 {
		t.Errorf("read %d MB before stopping", r.read>>20)
	}
	lr := &endless{}
	if _, err := ReadLooseTableFrom("loadings", io.MultiReader(strings.NewReader("variable,PC1\n"), lr)); err == nil || !strings.Contains(err.Error(), "without a line end") {
		t.Errorf("loose table: got %v", err)
	}
}
