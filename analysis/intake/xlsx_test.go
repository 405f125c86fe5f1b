package intake

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// The workbooks were written by openpyxl 3.0.9 (Debian python3-openpyxl)
// from testdata/xlsx/make.py; the values below are the ones that script
// puts in the cells.
func xlsxPath(name string) string { return filepath.Join("..", "..", "testdata", "xlsx", name) }

func TestReadWorkbook(t *testing.T) {
	cases := []struct {
		name, file string
		opt        ReadOptions
		sheet      string
		ids        []string
		lines      []int
		vars       []string
		row        int       // a row of X to compare
		want       []float64 // its values
		missingAt  []CellRef
	}{
		// Column a is shown as 0.12 (number format 0.00): the raw value is read.
		{"first sheet by default", "values.xlsx", ReadOptions{}, "Lab",
			[]string{"s1", "s2", "s3", "s4", "s5"}, []int{2, 3, 4, 5, 6}, []string{"a", "b", "c"},
			0, []float64{0.1234567, 10, 3.5}, nil},
		{"sheet by number", "values.xlsx", ReadOptions{Sheet: "2"}, "Field data",
			[]string{"f1", "f2", "f3", "f4"}, []int{2, 3, 4, 5}, []string{"x", "y", "z"},
			2, []float64{3, 5, 1}, nil},
		{"sheet by name", "values.xlsx", ReadOptions{Sheet: "Field data"}, "Field data",
			[]string{"f1", "f2", "f3", "f4"}, []int{2, 3, 4, 5}, []string{"x", "y", "z"},
			3, []float64{4, 3, 2}, nil},
		// C3 holds =B3*2 with the cached result 24 written into the XML.
		{"formula gives its cached result", "formula-cached.xlsx", ReadOptions{}, "Sheet1",
			[]string{"s1", "s2", "s3", "s4", "s5"}, []int{2, 3, 4, 5, 6}, []string{"a", "b", "c"},
			1, []float64{0.2345678, 24, 2.5}, nil},
		{"dates in the id column", "dates.xlsx", ReadOptions{}, "Sheet1",
			[]string{"2024-03-05", "2024-03-06", "2024-03-07T14:30:00", "2024-03-08"}, []int{2, 3, 4, 5}, []string{"a", "b"},
			2, []float64{3, 4}, nil},
		// C4 holds #N/A, a missing cell as in CSV; mean of 10, 12, 15, 11.
		{"#N/A is missing", "na.xlsx", ReadOptions{Missing: MissingMean}, "Sheet1",
			[]string{"s1", "s2", "s3", "s4", "s5"}, []int{2, 3, 4, 5, 6}, []string{"a", "b", "c"},
			2, []float64{0.3456789, 12, 4.0}, []CellRef{{Row: 2, Var: 1}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tab, err := ReadTable(xlsxPath(c.file), c.opt)
			if err != nil {
				t.Fatal(err)
			}
			if tab.Sheet != c.sheet || !slices.Equal(tab.IDs, c.ids) || !slices.Equal(tab.Lines, c.lines) || !slices.Equal(tab.Variables, c.vars) {
				t.Errorf("sheet %q ids %v lines %v vars %v; want %q %v %v %v", tab.Sheet, tab.IDs, tab.Lines, tab.Variables, c.sheet, c.ids, c.lines, c.vars)
			}
			for k, w := range c.want {
				if got := tab.X.At(c.row, k); math.Abs(got-w) > 1e-12*math.Abs(w) {
					t.Errorf("X[%d,%d] = %v, want %v", c.row, k, got, w)
				}
			}
			if !slices.Equal(tab.MissingAt, c.missingAt) {
				t.Errorf("MissingAt %v, want %v", tab.MissingAt, c.missingAt)
			}
			if len(tab.SHA256) != 64 {
				t.Errorf("SHA256 %q", tab.SHA256)
			}
		})
	}
}

// Errors name the cell as the spreadsheet does.
func TestWorkbookErrors(t *testing.T) {
	bad := func(name string) string { return filepath.Join("..", "..", "testdata", "bad", name) }
	cases := []struct {
		path string
		opt  ReadOptions
		want string
	}{
		{bad("xlsx-text-cell.xlsx"), ReadOptions{}, `Sheet1!D5 (c): cannot read as a number: "n.d."`},
		{bad("xlsx-formula-nocache.xlsx"), ReadOptions{}, `Sheet1!C3 (b): formula without a saved result`},
		{bad("xlsx-merged-header.xlsx"), ReadOptions{}, `Sheet1!B1: merged cells B1:C1 in the header row`},
		{xlsxPath("na.xlsx"), ReadOptions{}, `Sheet1!C4 (b): missing value`},
		{xlsxPath("values.xlsx"), ReadOptions{Sheet: "3"}, `no such sheet in --sheet`},
		{xlsxPath("values.xlsx"), ReadOptions{Sheet: "2", Columns: []string{"x", "q"}}, `'Field data' row 1: unknown column in --columns`},
	}
	for _, c := range cases {
		_, err := ReadTable(c.path, c.opt)
		var ie *InputError
		if !errors.As(err, &ie) {
			t.Fatalf("%s: want an InputError, got %v", c.path, err)
		}
		if got := ie.Error(); !strings.Contains(got, c.want) {
			t.Errorf("%s: %q does not contain %q", c.path, got, c.want)
		}
	}
}

func TestCellName(t *testing.T) {
	cases := []struct {
		sheet    string
		row, col int
		want     string
	}{
		// Column letters as spreadsheets write them (from memory: Z is 26,
		// AA 27, AZ 52, ZZ 702, AAA 703).
		{"Sheet1", 17, 3, "Sheet1!C17"},
		{"Sheet1", 1, 26, "Sheet1!Z1"},
		{"Sheet1", 1, 27, "Sheet1!AA1"},
		{"Sheet1", 1, 52, "Sheet1!AZ1"},
		{"Sheet1", 1, 702, "Sheet1!ZZ1"},
		{"Sheet1", 1, 703, "Sheet1!AAA1"},
		{"Lab data", 2, 1, "'Lab data'!A2"},
		{"O'Neil", 2, 1, "'O''Neil'!A2"},
		{"Sheet1", 5, 0, "Sheet1 row 5"},
		{"Sheet1", 0, 4, "Sheet1 column D"},
	}
	for _, c := range cases {
		if got := CellName(c.sheet, c.row, c.col); got != c.want {
			t.Errorf("CellName(%q, %d, %d) = %q, want %q", c.sheet, c.row, c.col, got, c.want)
		}
	}
}

func TestDateCode(t *testing.T) {
	cases := []struct {
		code string
		date bool
	}{
		{"yyyy-mm-dd", true},
		{"d/m/yy h:mm", true},
		{"[h]:mm:ss", true},
		{"[$-409]mmmm d, yyyy", true},
		{"0.00", false},
		{"#,##0.00_);[Red](#,##0.00)", false},
		{`0.0" days"`, false},
		{`[Red]0.00`, false},
		{`0.00\d`, false},
		{"General", false}, // the e and l are not date letters; no y, d, h, s or m
	}
	for _, c := range cases {
		if got := dateCode(c.code); got != c.date {
			t.Errorf("dateCode(%q) = %v, want %v", c.code, got, c.date)
		}
	}
}

func TestSpreadsheetKind(t *testing.T) {
	ole := append([]byte{}, oleMagic...)
	cases := []struct {
		path  string
		head  []byte
		kind  string
		wants string // part of the refusal, "" for none
	}{
		{"a.csv", []byte("id,a\n"), "", ""},
		{"a.xlsx", nil, "xlsx", ""},
		{"a.XLSM", nil, "xlsx", ""},
		{"a.csv", []byte("PK\x03\x04rest"), "xlsx", ""},
		{"a.xls", nil, "", "a .xls file"},
		{"a.numbers", nil, "", "a .numbers file"},
		{"a.ods", nil, "", "a .ods file"},
		{"a.csv", append(ole, 0, 0), "", "legacy Excel"},
		{"a.xlsx", append(ole, utf16("EncryptionInfo")...), "", "encrypted"},
		{"a.csv", []byte("PK\x03\x04\x00\x00mimetypeapplication/vnd.oasis.opendocument.spreadsheet"), "", "OpenDocument"},
	}
	for _, c := range cases {
		kind, why := spreadsheetKind(c.path, c.head)
		if kind != c.kind || (c.wants == "") != (why == "") || !strings.Contains(why, c.wants) {
			t.Errorf("%s: kind %q refusal %q; want %q and %q", c.path, kind, why, c.kind, c.wants)
		}
	}
}

// A workbook that unpacks to more than the limit is refused before it is
// unpacked (a zip bomb); the limit is lowered here to the size of a small
// workbook rather than building gigabytes.
func TestWorkbookUnzipLimit(t *testing.T) {
	defer func(a, b int64) { unzipLimit, unzipXMLLimit = a, b }(unzipLimit, unzipXMLLimit)
	unzipLimit, unzipXMLLimit = 2000, 1000
	_, err := ReadTable(xlsxPath("wine.xlsx"), ReadOptions{})
	var ie *InputError
	if !errors.As(err, &ie) || !strings.Contains(ie.Error(), "the workbook unpacks to more than 1.95 KiB (a zip bomb") {
		t.Fatalf("got %v, want a refusal", err)
	}
	t.Log(ie.Error())
}

// A workbook is known by its content under any name; a zip that holds no
// workbook is left to the text reader, which refuses it as binary.
func TestWorkbookByContent(t *testing.T) {
	b, err := os.ReadFile(xlsxPath("values.xlsx"))
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "export.dat")
	if err := os.WriteFile(path, b, 0o644); err != nil {
		t.Fatal(err)
	}
	tab, err := ReadTable(path, ReadOptions{})
	if err != nil || tab.Sheet != "Lab" {
		t.Fatalf("read %v, err %v; want the sheet Lab", tab, err)
	}
	_, err = ReadTable(filepath.Join("..", "..", "testdata", "bad", "binary.bin"), ReadOptions{})
	if err == nil || !strings.Contains(err.Error(), "not a text table") {
		t.Errorf("binary zip: %v", err)
	}
}

// A workbook with a title row, comment rows and a units row reads under
// --skip, --comment and --units-row as the plain sheet does, with the
// sheet's own row numbers, the units and the comment rows counted.
func TestWorkbookLayoutOptions(t *testing.T) {
	plain, err := ReadTable(filepath.Join("..", "..", "testdata", "xlsx", "values.xlsx"), ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	tab, err := ReadTable(filepath.Join("..", "..", "testdata", "xlsx", "layout.xlsx"), ReadOptions{Skip: 1, Comment: '#', UnitsRow: true})
	if err != nil {
		t.Fatal(err)
	}
	if !mat.Equal(plain.X, tab.X) || !slices.Equal(plain.IDs, tab.IDs) {
		t.Errorf("values %v ids %v, want %v %v", tab.X.RawMatrix().Data, tab.IDs, plain.X.RawMatrix().Data, plain.IDs)
	}
	if want := []string{"mg/L", "µS/cm", "°C"}; !slices.Equal(tab.Units, want) {
		t.Errorf("units %q, want %q", tab.Units, want)
	}
	// Row 1 title (skipped), 2 comment, 3 header, 4 units, 5–6 data,
	// 7 comment, 8–10 data.
	if want := []int{5, 6, 8, 9, 10}; !slices.Equal(tab.Lines, want) {
		t.Errorf("rows %v, want %v", tab.Lines, want)
	}
	if tab.CommentLines != 2 || tab.SkippedLines != 1 {
		t.Errorf("comment rows %d, skipped %d; want 2 and 1", tab.CommentLines, tab.SkippedLines)
	}
	// The header alone (apply reads it to match the model's variables)
	// leaves out the same rows.
	names, err := ReadHeader(filepath.Join("..", "..", "testdata", "xlsx", "layout.xlsx"), ReadOptions{Skip: 1, Comment: '#'})
	if want := append([]string{tab.IDColumn}, tab.Variables...); err != nil || !slices.Equal(names, want) {
		t.Errorf("ReadHeader: %q (%v), want %q", names, err, want)
	}
	_, err = ReadTable(filepath.Join("..", "..", "testdata", "xlsx", "layout.xlsx"), ReadOptions{Skip: 40})
	var ie *InputError
	if !errors.As(err, &ie) || ie.Sheet != "Sheet1" || !strings.Contains(ie.Reason, "--skip 40 passes the end of the sheet") {
		t.Errorf("skip past the end: %v", err)
	}
}
