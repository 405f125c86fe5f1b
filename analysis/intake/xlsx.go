package intake

import (
	"archive/zip"
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/xuri/excelize/v2"
)

// Workbook is an .xlsx file. It is read whole (the zip directory is at its
// end), so it is capped: 256 MiB of compressed workbook holds far more
// cells than pcqc audits in memory.
var Workbook = FileKind{What: "the workbook", Max: 256 << 20}

// Unzipped size limits handed to excelize, so that a small file that
// inflates to gigabytes (a zip bomb) is refused rather than unpacked: all
// parts together at most 2 GiB, and a worksheet above 64 MiB of XML is
// spilled to a temporary file instead of memory. Variables so that a test
// can lower them.
var (
	unzipLimit    int64 = 2 << 30
	unzipXMLLimit int64 = 64 << 20
)

// sheetSource gives the rows of one worksheet as records, so that a
// spreadsheet goes through the same reading steps as delimited text. Each
// cell is its raw value (not the number as the cell's format displays it);
// a formula gives its cached result; a date or time becomes ISO 8601 text,
// which reads as a label in an id or group column and is refused as a
// number in a variable; an empty cell holding a formula never calculated is
// an error naming the cell; a logical cell reads TRUE or FALSE.
type sheetSource struct {
	book     *excelize.File
	name     string // the sheet
	sha256   string // of the file's bytes
	rows     [][]string
	width    int // the widest row, so that every record has the same fields
	next     int // index into rows of the next record
	row      int // 1-based sheet row of the record last returned
	date1904 bool
	dates    map[int]bool // style index → formats a date or time
	fields   [][]byte
	// comment marks rows to pass over (--comment: the row's first cell
	// starts with it); comments counts them.
	comment  byte
	comments int
}

func (s *sheetSource) position() int     { return s.row }
func (s *sheetSource) commentCount() int { return s.comments }

// skipRows leaves out the first n rows of the sheet (--skip), whatever
// they hold; row numbers stay the sheet's own.
func (s *sheetSource) skipRows(file string, n int) error {
	if n > len(s.rows) {
		return &InputError{File: file, Sheet: s.name, Reason: fmt.Sprintf("--skip %d passes the end of the sheet, which has %d rows", n, len(s.rows))}
	}
	s.next = n
	return nil
}

// read returns the next row that holds any cell, padded to the sheet's
// width; rows without cells are skipped, as blank lines are in text.
func (s *sheetSource) read() ([][]byte, error) {
	for ; s.next < len(s.rows); s.next++ {
		row := s.rows[s.next]
		if len(row) > 0 && s.comment != 0 && strings.HasPrefix(row[0], string(s.comment)) {
			s.comments++
			continue
		}
		if len(row) > 0 {
			break
		}
	}
	if s.next >= len(s.rows) {
		return nil, io.EOF
	}
	cells := s.rows[s.next]
	s.row = s.next + 1
	s.next++
	s.fields = s.fields[:0]
	for j := range s.width {
		v := ""
		if j < len(cells) {
			v = cells[j]
		}
		v, err := s.cell(j+1, v)
		if err != nil {
			return nil, err
		}
		s.fields = append(s.fields, []byte(v))
	}
	return s.fields, nil
}

// cell turns the raw value at column col of the current row into the text
// the row parser reads.
func (s *sheetSource) cell(col int, v string) (string, error) {
	ref, _ := excelize.CoordinatesToCellName(col, s.row)
	if v == "" {
		formula, _ := s.book.GetCellFormula(s.name, ref)
		if formula != "" {
			return "", &textError{line: s.row, col: col, text: "=" + formula,
				reason: "formula without a saved result (the workbook was saved without calculating it); open and save it in a spreadsheet program, or export CSV:"}
		}
		return "", nil
	}
	if _, kind := parseCell([]byte(v)); kind != cellNumber {
		return v, nil
	}
	if v == "0" || v == "1" {
		// A logical cell's raw value is 0 or 1; it is TRUE or FALSE, as a
		// CSV export writes it, not a number.
		if typ, err := s.book.GetCellType(s.name, ref); err == nil && typ == excelize.CellTypeBool {
			return map[string]string{"0": "FALSE", "1": "TRUE"}[v], nil
		}
	}
	style, err := s.book.GetCellStyle(s.name, ref)
	if err != nil || !s.isDate(style) {
		return v, nil
	}
	f, _ := strconv.ParseFloat(v, 64)
	t, err := excelize.ExcelDateToTime(f, s.date1904)
	if err != nil {
		return v, nil
	}
	return isoDate(t), nil
}

// isoDate writes a date as 2024-03-05, with the time of day when it has
// one (to the second: spreadsheets store times as fractions of a day, and
// finer digits are rounding).
func isoDate(t time.Time) string {
	t = t.Round(time.Second)
	if t.Hour() == 0 && t.Minute() == 0 && t.Second() == 0 {
		return t.Format("2006-01-02")
	}
	return t.Format("2006-01-02T15:04:05")
}

// isDate reports whether the cell style idx shows numbers as dates or
// times: the built-in date formats (14–22, 45–47, and 27–36 and 50–58 of
// East Asian locales) or a custom format with date or time letters outside
// quotes, brackets and escapes.
func (s *sheetSource) isDate(idx int) bool {
	if d, ok := s.dates[idx]; ok {
		return d
	}
	d := false
	if st, err := s.book.GetStyle(idx); err == nil {
		switch n := st.NumFmt; {
		case n >= 14 && n <= 22, n >= 45 && n <= 47, n >= 27 && n <= 36, n >= 50 && n <= 58:
			d = true
		case st.CustomNumFmt != nil:
			d = dateCode(*st.CustomNumFmt)
		}
	}
	s.dates[idx] = d
	return d
}

// dateCode reports whether a number format code writes a date or time.
func dateCode(code string) bool {
	code = strings.SplitN(code, ";", 2)[0] // the positive-number section
	inQuote, inBracket := false, false
	for i := 0; i < len(code); i++ {
		c := code[i]
		switch {
		case inQuote:
			inQuote = c != '"'
		case inBracket:
			inBracket = c != ']'
		case c == '"':
			inQuote = true
		case c == '[':
			// [h] and [mm] are elapsed times; [Red] and [$-409] are not.
			if i+1 < len(code) && strings.ContainsRune("hHmMsS", rune(code[i+1])) {
				return true
			}
			inBracket = true
		case c == '\\' || c == '_' || c == '*':
			i++ // the next character is literal, or padding
		case strings.ContainsRune("yYdDhHsS", rune(c)), c == 'm' || c == 'M':
			return true
		}
	}
	return false
}

// checkSheetHeader refuses merged cells in the header row: only the first
// cell of a merged range holds the name, so the columns under the rest
// would be named column_N, or the header would be misread.
func (r *tableReader) checkSheetHeader() error {
	if r.sheet == nil {
		return nil
	}
	merged, err := r.sheet.book.GetMergeCells(r.sheet.name, true)
	if err != nil {
		return r.fail(r.headerLine, 0, "", "", "cannot read the merged cells: "+err.Error())
	}
	for _, m := range merged {
		c1, r1, err1 := excelize.CellNameToCoordinates(m.GetStartAxis())
		_, r2, err2 := excelize.CellNameToCoordinates(m.GetEndAxis())
		if err1 != nil || err2 != nil || r.headerLine < r1 || r.headerLine > r2 {
			continue
		}
		return r.fail(r.headerLine, c1, "", "", fmt.Sprintf("merged cells %s:%s in the header row; unmerge them so that every column has its own name", m.GetStartAxis(), m.GetEndAxis()))
	}
	return nil
}

// Magic numbers of the formats a table might arrive in that pcqc does not
// read: OLE2 compound files (legacy .xls, and OOXML workbooks encrypted with
// a password, which are wrapped in one) and zip archives (.xlsx, .ods,
// .numbers, and any zip).
var (
	oleMagic = []byte{0xD0, 0xCF, 0x11, 0xE0, 0xA1, 0xB1, 0x1A, 0xE1}
	zipMagic = []byte("PK\x03\x04")
)

// saveAs is the advice for every workbook format pcqc does not read.
const saveAs = "save it as .xlsx or as CSV (File > Save As) and give that file"

// spreadsheetKind says how to read a file from its name and first bytes:
// "xlsx", "" for text, or a refusal for another spreadsheet format.
func spreadsheetKind(path string, head []byte) (kind, refusal string) {
	ext := strings.ToLower(strings.TrimPrefix(filepath.Ext(path), "."))
	switch {
	case bytes.HasPrefix(head, oleMagic) && bytes.Contains(head, utf16("EncryptionInfo")):
		return "", "an encrypted (password-protected) workbook: pcqc does not read encrypted files; remove the password, then " + saveAs
	case bytes.HasPrefix(head, oleMagic):
		return "", "a legacy Excel (.xls) or other OLE2 compound file, which pcqc does not read; " + saveAs
	case bytes.HasPrefix(head, zipMagic) && bytes.Contains(head, []byte("application/vnd.oasis.opendocument")):
		return "", "an OpenDocument (.ods) file, which pcqc does not read; " + saveAs
	case ext == "xls" || ext == "xlsb" || ext == "ods" || ext == "fods" || ext == "numbers":
		return "", fmt.Sprintf("a .%s file, which pcqc does not read; %s", ext, saveAs)
	case ext == "xlsx" || ext == "xlsm" || bytes.HasPrefix(head, zipMagic):
		return "xlsx", ""
	}
	return "", ""
}

// utf16 encodes ASCII text as UTF-16LE, as OLE2 directory entries name
// their streams.
func utf16(s string) []byte {
	b := make([]byte, 0, 2*len(s))
	for i := 0; i < len(s); i++ {
		b = append(b, s[i], 0)
	}
	return b
}

// readWorkbook reads the table on one sheet of the .xlsx file at path.
func readWorkbook(path string, opt ReadOptions) (*Table, error) {
	src, err := openSheet(path, opt.Sheet)
	if err != nil {
		return nil, err
	}
	defer src.book.Close()
	t, err := readSheet(path, src, opt)
	if ie, ok := err.(*InputError); ok {
		ie.Sheet = src.name
	}
	return t, err
}

// openSheet opens the workbook, chooses the sheet and reads its cells.
func openSheet(path, sheet string) (*sheetSource, error) {
	data, err := ReadRegular(path, Workbook)
	if err != nil {
		return nil, err
	}
	refuse := func(reason string) error { return &InputError{File: path, Reason: reason} }
	if !bytes.HasPrefix(data, zipMagic) {
		if _, why := spreadsheetKind("", data[:min(len(data), 1<<20)]); why != "" {
			return nil, refuse(why)
		}
		return nil, refuse("not an .xlsx workbook (an .xlsx file is a zip archive); " + saveAs)
	}
	if !hasWorkbookPart(data) {
		return nil, refuse("a zip archive without xl/workbook.xml, so not an .xlsx workbook; " + saveAs)
	}
	book, err := excelize.OpenReader(bytes.NewReader(data), excelize.Options{UnzipSizeLimit: unzipLimit, UnzipXMLSizeLimit: unzipXMLLimit})
	switch {
	case err != nil && strings.HasPrefix(err.Error(), "unzip size exceeds"):
		// excelize has no sentinel for this error, only its text.
		return nil, refuse(fmt.Sprintf("the workbook unpacks to more than %s (a zip bomb, or more than pcqc reads in memory); export the sheet as CSV", byteSize(unzipLimit)))
	case err != nil:
		return nil, refuse("cannot read as an .xlsx workbook (" + err.Error() + "); " + saveAs)
	}
	if book.WorkBook == nil || len(book.GetSheetList()) == 0 {
		book.Close()
		return nil, refuse("a zip archive without worksheets, not an .xlsx workbook; " + saveAs)
	}
	name, err := chooseSheet(path, book.GetSheetList(), sheet)
	if err != nil {
		book.Close()
		return nil, err
	}
	rows, err := book.GetRows(name, excelize.Options{RawCellValue: true})
	if err != nil {
		book.Close()
		return nil, &InputError{File: path, Sheet: name, Reason: "cannot read the sheet: " + err.Error()}
	}
	if len(rows) == 0 && len(book.GetSheetList()) > 1 {
		book.Close()
		return nil, &InputError{File: path, Sheet: name, Reason: fmt.Sprintf("empty sheet; choose the sheet that holds the table with --sheet (the workbook's sheets are %s)", quotedList(book.GetSheetList()))}
	}
	sum := sha256.Sum256(data)
	src := &sheetSource{book: book, name: name, sha256: hex.EncodeToString(sum[:]), rows: rows, dates: map[int]bool{}}
	for _, r := range rows {
		src.width = max(src.width, len(r))
	}
	if props, err := book.GetWorkbookProps(); err == nil && props.Date1904 != nil {
		src.date1904 = *props.Date1904
	}
	return src, nil
}

// hasWorkbookPart reports whether the zip archive data holds the part every
// .xlsx workbook has, so that any other zip is refused by name rather than
// by whatever excelize makes of it.
func hasWorkbookPart(data []byte) bool {
	zr, err := zip.NewReader(bytes.NewReader(data), int64(len(data)))
	if err != nil {
		return false
	}
	for _, f := range zr.File {
		if strings.EqualFold(f.Name, "xl/workbook.xml") {
			return true
		}
	}
	return false
}

// chooseSheet picks the sheet named by --sheet, by name or by its 1-based
// number; the first sheet when none is named.
func chooseSheet(path string, sheets []string, want string) (string, error) {
	if want == "" {
		return sheets[0], nil
	}
	for _, s := range sheets {
		if s == want {
			return s, nil
		}
	}
	if n, err := strconv.Atoi(want); err == nil && n >= 1 && n <= len(sheets) {
		return sheets[n-1], nil
	}
	return "", &InputError{File: path, Text: want,
		Reason: fmt.Sprintf("no such sheet in --sheet (the workbook's sheets are %s, or give their number 1 to %d):", quotedList(sheets), len(sheets))}
}

// quotedList names the sheets for a message.
func quotedList(sheets []string) string {
	quoted := make([]string, len(sheets))
	for i, s := range sheets {
		quoted[i] = strconv.Quote(s)
	}
	return ListNames(quoted, 12)
}

// isWorkbook reports whether path is to be read as an .xlsx workbook, by
// its extension or its first bytes, and refuses the spreadsheet formats
// pcqc does not read. --sheet on a text table is refused too, rather than
// ignored.
func isWorkbook(path string, opt ReadOptions) (bool, error) {
	var head []byte
	if st, err := os.Stat(path); err == nil && st.Mode().IsRegular() {
		if f, err := os.Open(path); err == nil {
			head = make([]byte, 1<<16)
			n, _ := io.ReadFull(f, head)
			head = head[:n]
			f.Close()
		}
	}
	kind, refusal := spreadsheetKind(path, head)
	switch {
	case refusal != "":
		return false, &InputError{File: path, Reason: refusal}
	case kind == "" && opt.Sheet != "":
		return false, &InputError{File: path, Text: opt.Sheet, Reason: "--sheet is for .xlsx workbooks, and this is a text table:"}
	case kind == "xlsx" && !namedWorkbook(path):
		// A zip by its content alone is read as a workbook only when it
		// holds one; any other zip is left to the text reader, which
		// refuses binary input.
		zr, err := zip.OpenReader(path)
		if err != nil {
			return false, nil
		}
		defer zr.Close()
		return slices.ContainsFunc(zr.File, func(f *zip.File) bool { return strings.EqualFold(f.Name, "xl/workbook.xml") }), nil
	}
	return kind == "xlsx", nil
}

// namedWorkbook reports whether path has an .xlsx or .xlsm extension.
func namedWorkbook(path string) bool {
	ext := strings.ToLower(filepath.Ext(path))
	return ext == ".xlsx" || ext == ".xlsm"
}

// workbookHeader returns the column names on the chosen sheet, as
// ReadTable would name them.
func workbookHeader(path string, opt ReadOptions) ([]string, error) {
	src, err := openSheet(path, opt.Sheet)
	if err != nil {
		return nil, err
	}
	defer src.book.Close()
	// The same leading rows are left out as when the table is read.
	src.comment = opt.Comment
	if err := src.skipRows(path, opt.Skip); err != nil {
		return nil, err
	}
	header, err := src.read()
	if err == io.EOF {
		return nil, &InputError{File: path, Sheet: src.name, Reason: "empty sheet: a header row and at least 3 data rows are needed"}
	}
	if err != nil {
		e := readError(path, src, err)
		e.(*InputError).Sheet = src.name
		return nil, e
	}
	names, _ := headerNames(header)
	return names, nil
}
