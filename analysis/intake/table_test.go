package intake

import (
	"errors"
	"fmt"
	"slices"
	"strconv"
	"strings"
	"testing"
)

func read(t *testing.T, text string, opt ReadOptions) *Table {
	t.Helper()
	tab, err := ReadTableFrom("t.csv", strings.NewReader(text), opt)
	if err != nil {
		t.Fatalf("read: %v", err)
	}
	return tab
}

func readErr(t *testing.T, text string, opt ReadOptions) *InputError {
	t.Helper()
	_, err := ReadTableFrom("t.csv", strings.NewReader(text), opt)
	var ie *InputError
	if !errors.As(err, &ie) {
		t.Fatalf("want an InputError, got %v", err)
	}
	return ie
}

func TestDelimiterDetectionAndEncodings(t *testing.T) {
	cases := []struct {
		name, text string
		delim      byte
	}{
		{"comma", "id,a,b\nx,1,2\ny,3,5\nz,4,4\n", ','},
		{"tab", "id\ta\tb\nx\t1\t2\ny\t3\t5\nz\t4\t4\n", '\t'},
		{"semicolon", "id;a;b\nx;1;2\ny;3;5\nz;4;4\n", ';'},
		{"bom and crlf", "\xEF\xBB\xBFid,a,b\r\nx,1,2\r\ny,3,5\r\nz,4,4\r\n", ','},
		{"quoted header and cells", "\"id\",\"a\",\"b\"\n\"x\",\"1\",2\n\"y, the second\",3,\"5\"\nz,4,4\n", ','},
		{"no final newline, blank lines", "id,a,b\n\nx,1,2\ny,3,5\n\nz,4,4", ','},
		{"semicolon header with comma in quoted name", "id;\"a,1\";b\nx;1;2\ny;3;5\nz;4;4\n", ';'},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tab := read(t, c.text, ReadOptions{})
			if tab.Delimiter != c.delim {
				t.Errorf("delimiter %q, want %q", tab.Delimiter, c.delim)
			}
			if tab.IDColumn != "id" || len(tab.Variables) != 2 || tab.Rows() != 3 {
				t.Fatalf("got id %q, variables %v, rows %d", tab.IDColumn, tab.Variables, tab.Rows())
			}
			if tab.X.At(1, 1) != 5 || tab.X.At(2, 0) != 4 {
				t.Errorf("values: %v", tab.X.RawMatrix().Data)
			}
		})
	}
}

func TestQuotedFieldSpanningLines(t *testing.T) {
	tab := read(t, "id,a,b\n\"first\nsample\",1,2\nsecond,3,\"5\"\nthird,4,4\n", ReadOptions{})
	if tab.IDs[0] != "first\nsample" {
		t.Errorf("id %q", tab.IDs[0])
	}
	if tab.Lines[1] != 4 {
		t.Errorf("second record should start on line 4, got %d", tab.Lines[1])
	}
	tab = read(t, "id,a,b\n\"say \"\"hi\"\"\",1,2\ny,3,5\nz,4,4\n", ReadOptions{})
	if tab.IDs[0] != `say "hi"` {
		t.Errorf("escaped quotes: %q", tab.IDs[0])
	}
}

func TestIDColumnDefaults(t *testing.T) {
	// First column numeric: ids are data-row numbers and the column is a variable.
	tab := read(t, "a,b,c\n1,2,3\n4,5,7\n7,8,8\n", ReadOptions{})
	if tab.IDColumn != "" || strings.Join(tab.IDs, ",") != "1,2,3" || len(tab.Variables) != 3 {
		t.Errorf("numeric first column: id %q ids %v vars %v", tab.IDColumn, tab.IDs, tab.Variables)
	}
	// Explicit --id on a numeric column.
	tab = read(t, "a,b,c\n1,2,3\n4,5,7\n7,8,8\n", ReadOptions{IDColumn: "a"})
	if tab.IDColumn != "a" || strings.Join(tab.IDs, ",") != "1,4,7" || len(tab.Variables) != 2 {
		t.Errorf("--id a: id %q ids %v vars %v", tab.IDColumn, tab.IDs, tab.Variables)
	}
	// Group column is never a variable, even when it comes first.
	tab = read(t, "g,b,c\nu,2,3\nv,5,7\nu,8,8\n", ReadOptions{GroupColumn: "g"})
	if tab.IDColumn != "" || strings.Join(tab.Groups, ",") != "u,v,u" || strings.Join(tab.Variables, ",") != "b,c" {
		t.Errorf("group first: id %q groups %v vars %v", tab.IDColumn, tab.Groups, tab.Variables)
	}
}

func TestColumnSelection(t *testing.T) {
	text := "id,site,a,b,c\nx,north,1,2,3\ny,south,4,5,7\nz,north,7,8,8\n"
	tab := read(t, text, ReadOptions{Columns: []string{"c", "a"}})
	if strings.Join(tab.Variables, ",") != "a,c" {
		t.Errorf("--columns: %v", tab.Variables)
	}
	tab = read(t, text, ReadOptions{Drop: []string{"site", "b"}})
	if strings.Join(tab.Variables, ",") != "a,c" || len(tab.DroppedVariables) != 2 {
		t.Errorf("--drop: %v %v", tab.Variables, tab.DroppedVariables)
	}
	e := readErr(t, text, ReadOptions{})
	if e.Name != "site" || e.Line != 2 || e.Column != 2 {
		t.Errorf("non-numeric column error: %v", e)
	}
}

func TestMissingPolicies(t *testing.T) {
	text := "id,a,b\nw,1,2\nx,,4\ny,3,NA\nz,5,6\nv,7,null\nu,2,1\n"
	e := readErr(t, text, ReadOptions{})
	if e.Line != 3 || e.Column != 2 || e.Name != "a" {
		t.Errorf("fail: %v", e)
	}
	tab := read(t, text, ReadOptions{Missing: MissingDrop})
	if tab.Rows() != 3 || tab.RowsDropped != 3 || tab.MissingCells != 3 || strings.Join(tab.IDs, ",") != "w,z,u" {
		t.Errorf("drop: rows %d dropped %d ids %v", tab.Rows(), tab.RowsDropped, tab.IDs)
	}
	tab = read(t, text, ReadOptions{Missing: MissingMean})
	// Column a: mean of 1, 3, 5, 7, 2 = 3.6; column b: mean of 2, 4, 6, 1 = 3.25.
	if tab.Rows() != 6 || tab.ImputedCells != 3 || tab.X.At(1, 0) != 3.6 || tab.X.At(2, 1) != 3.25 {
		t.Errorf("mean: %v imputed %d", tab.X.RawMatrix().Data, tab.ImputedCells)
	}
	wantAt := []CellRef{{Row: 1, Var: 0}, {Row: 2, Var: 1}, {Row: 4, Var: 1}}
	for _, policy := range []MissingPolicy{MissingMean, MissingIterative} {
		tab = read(t, text, ReadOptions{Missing: policy})
		if !slices.Equal(tab.MissingAt, wantAt) {
			t.Errorf("%s: missing at %v, want %v", policy, tab.MissingAt, wantAt)
		}
	}
	tab = read(t, text, ReadOptions{Missing: MissingDrop})
	want := []DroppedRow{{ID: "x", Line: 3, Missing: []string{"a"}}, {ID: "y", Line: 4, Missing: []string{"b"}}, {ID: "v", Line: 6, Missing: []string{"b"}}}
	if len(tab.DroppedRows) != len(want) {
		t.Fatalf("dropped rows %v, want %v", tab.DroppedRows, want)
	}
	for i, w := range want {
		g := tab.DroppedRows[i]
		if g.ID != w.ID || g.Line != w.Line || !slices.Equal(g.Missing, w.Missing) {
			t.Errorf("dropped row %d: %+v, want %+v", i, g, w)
		}
	}
	// A constant column dropped after imputation takes its cells with it,
	// and the later variables' cells are renumbered.
	tab = read(t, "id,c,a,b\nw,5,1,2\nx,5,,4\ny,,3,NA\nz,5,5,6\n", ReadOptions{Missing: MissingMean})
	if want := []CellRef{{Row: 1, Var: 0}, {Row: 2, Var: 1}}; !slices.Equal(tab.MissingAt, want) {
		t.Errorf("after a constant column: missing at %v, want %v", tab.MissingAt, want)
	}
}

func TestConstantColumnDropped(t *testing.T) {
	tab := read(t, "id,a,b,k\nx,1,2,5\ny,4,5,5\nz,7,9,5\n", ReadOptions{})
	if strings.Join(tab.Variables, ",") != "a,b" || len(tab.DroppedVariables) != 1 || tab.DroppedVariables[0].Name != "k" {
		t.Errorf("variables %v dropped %v", tab.Variables, tab.DroppedVariables)
	}
	if tab.X.At(2, 1) != 9 {
		t.Errorf("columns not compacted: %v", tab.X.RawMatrix().Data)
	}
}

func TestTransformsAppliedOnRead(t *testing.T) {
	tab := read(t, "id,a,b\nx,1,10\ny,100,1000\nz,10,100\n", ReadOptions{Transform: TransformLog10})
	if d := tab.X.At(1, 0) - 2; d > 1e-15 || d < -1e-15 {
		t.Errorf("log10(100) = %g", tab.X.At(1, 0))
	}
	e := readErr(t, "id,a,b\nx,1,10\ny,-1,1000\nz,10,100\n", ReadOptions{Transform: TransformLog1p})
	if e.Line != 3 || e.Column != 2 {
		t.Errorf("log1p of -1: %v", e)
	}
}

func TestHashIsOfBytesRead(t *testing.T) {
	// sha256 of the exact bytes, BOM included (computed with coreutils sha256sum).
	tab := read(t, "\xEF\xBB\xBFid,a,b\nx,1,2\ny,3,5\nz,4,4\n", ReadOptions{})
	const want = "9accaf7069e80f1e713109d1ebab444300c17a4f1b5d9213686b12f09ae8bf00"
	if tab.SHA256 != want {
		t.Errorf("sha256 %s, want %s", tab.SHA256, want)
	}
}

// Numbers follow a strict grammar; what ParseFloat alone would also read
// (Go's hexadecimal floats and digit underscores) is text, and a nonzero
// number that rounds to 0 is refused. The limits are IEEE 754 binary64's:
// the largest finite value is about 1.8e308, the smallest subnormal
// 4.9e-324, and below half of it a value rounds to 0 (from memory).
func TestNumberGrammar(t *testing.T) {
	cases := []struct {
		cell string
		kind cellKind
		v    float64
	}{
		{"8", cellNumber, 8},
		{" -1.5e+3 ", cellNumber, -1500},
		{"+.5", cellNumber, 0.5},
		{"5.", cellNumber, 5},
		{"1E-2", cellNumber, 0.01},
		{"-0", cellNumber, 0},
		{"0e-999", cellNumber, 0},
		{"0.000e5", cellNumber, 0},
		{"5e-324", cellNumber, 5e-324},
		{"3e-324", cellNumber, 5e-324},
		{"2e-324", cellUnderflow, 0},
		{"1e-999", cellUnderflow, 0},
		{"-0.001e-330", cellUnderflow, 0},
		{"1e999", cellInfinite, 0},
		{"inf", cellInfinite, 0},
		{"-Infinity", cellInfinite, 0},
		{"+INF", cellInfinite, 0},
		{"NaN", cellMissing, 0},
		{"n/a", cellMissing, 0},
		{"0x1p3", cellText, 0},
		{"0x10", cellText, 0},
		{"1_000", cellText, 0},
		{"1e", cellText, 0},
		{"e5", cellText, 0},
		{".", cellText, 0},
		{"1.2.3", cellText, 0},
		{"--1", cellText, 0},
		{"1e+", cellText, 0},
		{"+nan", cellText, 0},
		{"infinit", cellText, 0},
		{"1 000", cellText, 0},
		{"١٢", cellText, 0}, // Arabic-Indic digits
	}
	for _, c := range cases {
		v, kind := parseCell([]byte(c.cell))
		if kind != c.kind || kind == cellNumber && v != c.v {
			t.Errorf("%q: %v kind %d, want %v kind %d", c.cell, v, kind, c.v, c.kind)
		}
	}
}

// The same bad cell gets the same message (reason, text, column) in row 5,
// which the first pass samples to classify the columns, in row 150, which
// only the row parser sees, and in rows 5 and 150 of a file large enough to
// be parsed in parallel (the threshold lowered to keep the test quick).
func TestSameTypoSameMessage(t *testing.T) {
	defer func(v int64) { parallelThreshold = v }(parallelThreshold)
	parallelThreshold = 16 << 10
	// table returns the lines of a table of at least rows rows and size
	// bytes; line i+1 is row i.
	table := func(rows, size int) []string {
		lines := []string{"id,a,b"}
		for i, n := 1, 7; i <= rows || n < size; i++ {
			lines = append(lines, fmt.Sprintf("s%04d,%s,%d", i, strconv.FormatFloat(float64(i%17)/4, 'f', 2, 64), i%5))
			n += len(lines[i]) + 1
		}
		return lines
	}
	small, large := table(200, 0), table(0, 2*int(parallelThreshold))
	// Ids of one width put the cell at the same byte of every line, which
	// the messages about bad bytes name.
	for _, typo := range []string{"0x1p3", "1_000", "1e-999", "12..5", "1'000", "abc", "inf", "NA", "1\xb0", "1\x00", "<0.05", "> 2000", "<", "<0", "<LOD"} {
		t.Run(typo, func(t *testing.T) {
			var reasons []string
			for _, c := range []struct {
				row   int
				lines []string
			}{{5, small}, {150, small}, {5, large}, {150, large}} {
				lines := slices.Clone(c.lines)
				lines[c.row] = fmt.Sprintf("s%04d,%s,1", c.row, typo)
				path := writeTemp(t, "t.csv", strings.Join(lines, "\n")+"\n")
				_, err := ReadTable(path, ReadOptions{})
				var ie *InputError
				if !errors.As(err, &ie) {
					t.Fatalf("row %d of %d: got %v", c.row, len(lines), err)
				}
				if ie.Line != c.row+1 || ie.Column != 2 || ie.Name != "a" || ie.Text != typo {
					t.Errorf("row %d of %d: at %d:%d (%s) %q", c.row, len(lines), ie.Line, ie.Column, ie.Name, ie.Text)
				}
				reasons = append(reasons, ie.Reason)
			}
			for _, r := range reasons[1:] {
				if r != reasons[0] {
					t.Errorf("messages differ: %q", reasons)
					break
				}
			}
		})
	}
}

// A column is text, and gets the message about text columns, only when its
// sampled cells are mostly text; the first column is the id column on the
// same condition.
func TestTextColumnsByMajority(t *testing.T) {
	e := readErr(t, "id,a,b\nx,1,2\ny,u,5\nz,v,4\n", ReadOptions{})
	if e.Line != 3 || e.Column != 2 || !strings.Contains(e.Reason, "column is not numeric") {
		t.Errorf("text column: %v", e)
	}
	e = readErr(t, "a,b,c\n1,2,3\n4,5,6\nx7,8,9\n10,11,12\n", ReadOptions{})
	if e.Line != 4 || e.Column != 1 || !strings.Contains(e.Reason, "cannot read as a number") {
		t.Errorf("a typo in a numeric first column must not make it the id column: %v", e)
	}
	tab := read(t, "a,b,c\nx1,2,3\nx4,5,7\n7,8,8\n", ReadOptions{})
	if tab.IDColumn != "a" {
		t.Errorf("mostly text first column: id column %q", tab.IDColumn)
	}
}
