package analysis

import (
	"errors"
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
