package intake

import (
	"errors"
	"fmt"
	"reflect"
	"strings"
	"testing"
)

// values returns the table's matrix row by row, for exact comparisons.
func values(tab *Table) [][]float64 {
	n, p := tab.X.Dims()
	out := make([][]float64, n)
	for i := range out {
		out[i] = make([]float64, p)
		for j := range out[i] {
			out[i][j] = tab.X.At(i, j)
		}
	}
	return out
}

// Preamble and comment lines are not read, and every position stays the
// file's own line number.
func TestPreambleAndComments(t *testing.T) {
	want := [][]float64{{1, 2}, {3, 5}, {4, 4}}
	cases := []struct {
		name, text string
		opt        ReadOptions
		lines      []int
		skipped    int
		comments   int
	}{
		{"title with quotes and other delimiters", "Run \"A\"; 2024-01-05, lab 3\n\tinstrument: x;y\nid,a,b\nx,1,2\ny,3,5\nz,4,4\n",
			ReadOptions{Skip: 2}, []int{4, 5, 6}, 2, 0},
		{"skipped lines hold bytes a table may not", "\xe9t\xe9 title\nid;a;b\nx;1;2\ny;3;5\nz;4;4\n",
			ReadOptions{Skip: 1}, []int{3, 4, 5}, 1, 0},
		{"a skipped sep= line is not read", "sep=|\nid,a,b\nx,1,2\ny,3,5\nz,4,4\n",
			ReadOptions{Skip: 1}, []int{3, 4, 5}, 1, 0},
		{"comments before the header and among rows", "# exported 2024, by \"lab\"; v2\n\n# columns: a,b\nid,a,b\nx,1,2\n# a note, \xff\ny,3,5\n#\nz,4,4\n# end\n",
			ReadOptions{Comment: '#'}, []int{5, 7, 9}, 0, 5},
		{"skip, then comments, CRLF", "title\r\n!note\r\nid,a,b\r\nx,1,2\r\n!x\r\ny,3,5\r\nz,4,4\r\n",
			ReadOptions{Skip: 1, Comment: '!'}, []int{4, 6, 7}, 1, 2},
		{"a comment character in a cell is kept", "id,a,b\nx#1,1,2\ny,3,5\nz,4,4\n",
			ReadOptions{Comment: '#'}, []int{2, 3, 4}, 0, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tab := read(t, c.text, c.opt)
			if !reflect.DeepEqual(values(tab), want) || !reflect.DeepEqual(tab.Lines, c.lines) {
				t.Errorf("values %v lines %v, want %v %v", values(tab), tab.Lines, want, c.lines)
			}
			if tab.SkippedLines != c.skipped || tab.CommentLines != c.comments {
				t.Errorf("skipped %d comments %d, want %d %d", tab.SkippedLines, tab.CommentLines, c.skipped, c.comments)
			}
		})
	}
}

func TestLeadErrors(t *testing.T) {
	cases := []struct {
		name, text string
		opt        ReadOptions
		line, col  int
		reason     string
	}{
		{"skip past the end", "a\nb\n", ReadOptions{Skip: 5}, 2, 0, "--skip 5 passes the end of the file, which has 2 lines"},
		{"a bad cell after a preamble", "t\nt\nid,a,b\nx,1,2\ny,q,5\nz,4,4\n", ReadOptions{Skip: 2}, 5, 2, "cannot read as a number:"},
		{"a bad cell after comments", "#\nid,a,b\n#\nx,1,2\n#\ny,q,5\nz,4,4\n", ReadOptions{Comment: '#'}, 6, 2, "cannot read as a number:"},
		{"comment is the delimiter", "id;a;b\nx;1;2\ny;3;5\nz;4;4\n", ReadOptions{Comment: ';'}, 1, 0, "--comment ; is the field separator of this file; choose another comment character"},
		{"comment is a minus", "id,a\n", ReadOptions{Comment: '-'}, 0, 0, "--comment '-': a number can begin with it; use a character such as # or !"},
		{"comment is a digit", "id,a\n", ReadOptions{Comment: '7'}, 0, 0, "--comment '7': a number can begin with it; use a character such as # or !"},
		{"comment is the decimal comma", "id;a\n", ReadOptions{Comment: ',', Decimal: ','}, 0, 0, "--comment ',': a number can begin with it; use a character such as # or !"},
		{"comment is a letter", "id,a\n", ReadOptions{Comment: 'C'}, 0, 0, "--comment 'C': a name or label can begin with a letter; use a character such as # or !"},
		{"comment is a quote", "id,a\n", ReadOptions{Comment: '"'}, 0, 0, "--comment '\"': quoted fields begin with it; use a character such as # or !"},
		{"thousands is the decimal mark", "id,a\n", ReadOptions{Thousands: '.'}, 0, 0, "--thousands . is also the decimal mark; give --decimal comma with --thousands . (or the reverse)"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			e := readErr(t, c.text, c.opt)
			if e.Line != c.line || e.Column != c.col || e.Reason != c.reason {
				t.Errorf("got %d:%d %q, want %d:%d %q", e.Line, e.Column, e.Reason, c.line, c.col, c.reason)
			}
		})
	}
}

// Comment lines among the data rows of a file large enough to be parsed in
// parallel (threshold lowered) are passed over there too: the same table,
// the same lines, the same count and the same message for a bad cell as
// the sequential reader gives.
func TestCommentsParallel(t *testing.T) {
	defer func(v int64) { parallelThreshold = v }(parallelThreshold)
	parallelThreshold = 16 << 10
	var b strings.Builder
	b.WriteString("# preamble\nTitle line, with commas\n# more\nid,a,b\nunit,mg/L,%\n")
	comments := 2
	for i := 1; b.Len() < 3*int(parallelThreshold); i++ {
		if i%37 == 0 {
			b.WriteString("# checkpoint\n")
			comments++
		}
		fmt.Fprintf(&b, "s%05d,%d,%d\n", i, i%13, i%7+i%3)
	}
	text := b.String()
	opt := ReadOptions{Skip: 2, Comment: '#', UnitsRow: true}
	par, err := ReadTable(writeTemp(t, "t.csv", text), opt)
	if err != nil {
		t.Fatal(err)
	}
	seq := read(t, text, opt)
	if !reflect.DeepEqual(values(par), values(seq)) || !reflect.DeepEqual(par.Lines, seq.Lines) || !reflect.DeepEqual(par.IDs, seq.IDs) {
		t.Fatal("parallel and sequential readings differ")
	}
	// Line 6 is s00001; s00037 follows the first checkpoint comment.
	if par.Lines[0] != 6 || par.IDs[36] != "s00037" || par.Lines[36] != 6+36+1 {
		t.Errorf("lines: first %d, s00037 at %d (%s)", par.Lines[0], par.Lines[36], par.IDs[36])
	}
	// The preamble comment after the skipped lines counts; the first one
	// was skipped.
	if par.CommentLines != comments-1 || seq.CommentLines != comments-1 {
		t.Errorf("comments: parallel %d, sequential %d, want %d", par.CommentLines, seq.CommentLines, comments-1)
	}
	if !reflect.DeepEqual(par.Units, []string{"mg/L", "%"}) {
		t.Errorf("units %q", par.Units)
	}
	bad := strings.Replace(text, "s00100,9,", "s00100,9x,", 1)
	_, err = ReadTable(writeTemp(t, "t.csv", bad), opt)
	var ie *InputError
	if !errors.As(err, &ie) || ie.Line != 6+99+2 || ie.Column != 2 || ie.Text != "9x" {
		t.Errorf("bad cell in the parallel path: %v", err)
	}
}

func TestUnitsRow(t *testing.T) {
	text := "id,group,nitrate,cond,temp,flat\n,class,mg/L, (µS/cm) ,NA,m\nx,u,1.5,200,10,3\ny,v,2.5,180,12,3\nz,u,0.5,210,11,3\n"
	tab := read(t, text, ReadOptions{UnitsRow: true, GroupColumn: "group"})
	if !reflect.DeepEqual(tab.Variables, []string{"nitrate", "cond", "temp"}) ||
		!reflect.DeepEqual(tab.Units, []string{"mg/L", "(µS/cm)", ""}) {
		t.Errorf("variables %q units %q (the constant flat is dropped with its unit)", tab.Variables, tab.Units)
	}
	if want := [][]float64{{1.5, 200, 10}, {2.5, 180, 12}, {0.5, 210, 11}}; !reflect.DeepEqual(values(tab), want) {
		t.Errorf("values %v", values(tab))
	}
	if !reflect.DeepEqual(tab.Lines, []int{3, 4, 5}) {
		t.Errorf("lines %v", tab.Lines)
	}
	if sub := tab.Subset([]int{0, 2}); !reflect.DeepEqual(sub.Units, []string{"mg/L", ""}) {
		t.Errorf("subset units %q", sub.Units)
	}
	if sel := tab.SelectRows([]int{2, 0}); !reflect.DeepEqual(sel.Units, tab.Units) {
		t.Errorf("selected rows' units %q", sel.Units)
	}
	if tab := read(t, "a,b\n1,2\n3,5\n4,4\n", ReadOptions{}); tab.Units != nil {
		t.Errorf("units without a units row: %q", tab.Units)
	}
}

func TestUnitsRowErrors(t *testing.T) {
	eleven := "id,c1,c2,c3,c4,c5,c6,c7,c8,c9,c10,c11\n-,mg/L,mg/L,ug/L,pH,C,uS,x,y,z,w,v\n"
	for i := 0; i < 4; i++ {
		eleven += fmt.Sprintf("s%d,%d,2,3,4,5,6,7,8,9,10,%d\n", i, i, 11+i%2)
	}
	cases := []struct {
		name, text string
		opt        ReadOptions
		line, col  int
		colName    string
		text2      string
		reason     string
	}{
		{"undeclared, every column", eleven, ReadOptions{}, 2, 2, "c1", "mg/L",
			"this row looks like units under the header, not data (text above numbers in 11 of 11 variable columns); give --units-row to read it as units; first such cell:"},
		{"undeclared, one column, unit-like", "id,a,b,c\n,,[°C],\nx,1,2,3\ny,3,5,4\nz,4,4,7\n", ReadOptions{}, 2, 3, "b", "[°C]",
			"this row looks like units under the header, not data (text above numbers in 1 of 3 variable columns); give --units-row to read it as units; first such cell:"},
		{"a typo in the first row is not a units row", "id,a,b,c\nx,1..2,2,3\ny,3,5,4\nz,4,4,7\n", ReadOptions{}, 2, 2, "a", "1..2", "cannot read as a number:"},
		{"declared, but numbers", "id,a,b\nw,1,2\nx,1,2\ny,3,5\nz,4,4\n", ReadOptions{UnitsRow: true}, 2, 2, "a", "1",
			"--units-row is given, but this row holds numbers in every variable column, so it looks like data; leave out --units-row:"},
		{"declared, no row", "id,a,b\n", ReadOptions{UnitsRow: true}, 1, 0, "", "", "--units-row is given but no row follows the header"},
		{"declared, ragged", "id,a,b\nmg,g\nx,1,2\n", ReadOptions{UnitsRow: true}, 2, 3, "b", "", "ragged row: 2 fields but the header has 3"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			e := readErr(t, c.text, c.opt)
			if e.Line != c.line || e.Column != c.col || e.Name != c.colName || e.Text != c.text2 || e.Reason != c.reason {
				t.Errorf("got %d:%d (%s) %q %q", e.Line, e.Column, e.Name, e.Text, e.Reason)
			}
			if strings.Contains(e.Reason, "--drop") {
				t.Errorf("a units row must not lead to --drop: %q", e.Reason)
			}
		})
	}
}

func TestLooksLikeUnit(t *testing.T) {
	for _, c := range []struct {
		s    string
		want bool
	}{{"mg/L", true}, {"(µS/cm)", true}, {"[°C]", true}, {"%", true}, {"ppm", true}, {"m²", true},
		{"pH", true}, {"abc", false}, {"1..2", false}, {"n.d.", false}, {"x", false}} {
		if got := looksLikeUnit(c.s); got != c.want {
			t.Errorf("looksLikeUnit(%q) = %v", c.s, got)
		}
	}
}

// Thousands separators are removed only from well-formed groups of three.
func TestThousands(t *testing.T) {
	cases := []struct {
		cell      string
		sep, dec  byte
		want      string // the number text after stripping; "" when refused
		wantGroup bool
	}{
		{"1,234", ',', '.', "1234", true},
		{"-1,234,567.25", ',', '.', "-1234567.25", true},
		{" +12,345e3 ", ',', '.', "+12345e3", true},
		{"999", ',', '.', "999", false},
		{"1234.5", ',', '.', "1234.5", false},
		{"1.234,5", '.', ',', "1234,5", true},
		{"1 234 567", ' ', '.', "1234567", true},
		{"1\u00a0234", ' ', ',', "1234", true},
		{"1\u202f234,5", ' ', ',', "1234,5", true},
		{"1'234'567", '\'', '.', "1234567", true},
		{"1,23,4", ',', '.', "", false},
		{"1234,567", ',', '.', "", false},
		{",123", ',', '.', "", false},
		{"1,234.5,6", ',', '.', "", false},
		{"0.123,4", ',', '.', "", false},
		{"1,2a4", ',', '.', "", false},
	}
	for _, c := range cases {
		out, grouped, ok := stripGroups([]byte(c.cell), c.sep, c.dec, nil)
		if c.want == "" {
			if ok {
				t.Errorf("%q: read as %q, want refused", c.cell, out)
			}
			continue
		}
		got := strings.TrimSpace(string(out))
		if !ok || got != c.want || grouped != c.wantGroup {
			t.Errorf("%q: %q grouped %v ok %v, want %q %v", c.cell, got, grouped, ok, c.want, c.wantGroup)
		}
	}
	tab := read(t, "id,a,b\nx,\"1,234\",2\ny,\"12,345.5\",5\nz,4,\"1,000,000\"\n", ReadOptions{Thousands: ','})
	if want := [][]float64{{1234, 2}, {12345.5, 5}, {4, 1e6}}; !reflect.DeepEqual(values(tab), want) || tab.GroupedNumbers != 3 {
		t.Errorf("values %v grouped %d", values(tab), tab.GroupedNumbers)
	}
	tab = read(t, "id;a;b\nx;1.234,5;2\ny;3;5\nz;4;4\n", ReadOptions{Thousands: '.', Decimal: ','})
	if tab.X.At(0, 0) != 1234.5 {
		t.Errorf("1.234,5 read as %v", tab.X.At(0, 0))
	}
}

// The advice for a grouped number points to --thousands, never to
// --decimal comma where the comma separates the fields.
func TestThousandsAdvice(t *testing.T) {
	cases := []struct {
		name, text string
		opt        ReadOptions
		line, col  int
		reason     string
	}{
		{"one comma, three digits, comma file", "id,a,b\nx,\"1,234\",2\ny,3,5\nz,4,4\n", ReadOptions{}, 2, 2,
			"cannot read as a number (a thousands separator? give --thousands , to read 1,234 as 1234; if it is a decimal comma, --decimal comma needs semicolons or tabs between the fields, so export the file with one of them):"},
		{"one comma, two digits, semicolon file", "id;a;b\nx;1,25;2\ny;3;5\nz;4;4\n", ReadOptions{}, 2, 2,
			"cannot read as a number (a decimal comma? use --decimal comma):"},
		{"several groups", "id,a,b\nx,\"1,234,567\",2\ny,3,5\nz,4,4\n", ReadOptions{}, 2, 2,
			"cannot read as a number (thousands separators? give --thousands , to read them):"},
		{"points and a decimal comma", "id;a;b\nx;1.234.567,5;2\ny;3;5\nz;4;4\n", ReadOptions{}, 2, 2,
			"cannot read as a number (thousands separators? give --thousands . --decimal comma to read them):"},
		{"spaces", "id;a;b\nx;1 234 567;2\ny;3;5\nz;4;4\n", ReadOptions{}, 2, 2,
			"cannot read as a number (thousands separators? give --thousands space to read them):"},
		{"irregular groups under --thousands", "id,a,b\nx,1,2\ny,\"1,23,4\",5\nz,4,4\n", ReadOptions{Thousands: ','}, 3, 2,
			"cannot read as a number (digits grouped irregularly for --thousands ,: a first group of 1 to 3 digits, then groups of exactly 3, before the decimal mark):"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			e := readErr(t, c.text, c.opt)
			if e.Line != c.line || e.Column != c.col || e.Reason != c.reason {
				t.Errorf("got %d:%d %q", e.Line, e.Column, e.Reason)
			}
		})
	}
}
