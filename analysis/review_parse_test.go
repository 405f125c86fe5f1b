package analysis

import (
	"errors"
	"fmt"
	"strings"
	"testing"

	"pcqc/analysis/intake"
)

func looseText(t *testing.T, name, text string) *intake.LooseTable {
	t.Helper()
	lt, err := intake.ReadLooseTableFrom(name, strings.NewReader(text))
	if err != nil {
		t.Fatal(err)
	}
	return lt
}

// A cell of their loadings, scores or variances whose magnitude would
// overflow the review's sums of squares (beyond 1e100), or that is
// infinite, is refused with its file, line, column, name and text, in every
// layout; values up to 1e100 and down to denormals are read.
func TestReviewTablesRefuseOverflowingCells(t *testing.T) {
	vars := []string{"a", "b", "c", "d"}
	ids := []string{"s1", "s2", "s3"}
	type parse func(*intake.LooseTable) error
	loadings := func(lt *intake.LooseTable) error { _, err := ParseLoadings(lt, vars); return err }
	scores := func(lt *intake.LooseTable) error { _, err := ParseScores(lt, ids, 2); return err }
	variance := func(lt *intake.LooseTable) error { _, err := ParseVariance(lt); return err }
	cases := []struct {
		name, text string
		parse      parse
		line, col  int
		column     string
		cell       string // "" when the table must be accepted
	}{
		{"loadings 1e308", "v,PC1,PC2\na,0.5,0.1\nb,1e308,0.2\nc,0.5,0.3\nd,0.5,0.4\n", loadings, 3, 2, "PC1", "1e308"},
		{"loadings 1e999", "v,PC1,PC2\na,0.5,0.1\nb,0.5,0.2\nc,0.5,1e999\nd,0.5,0.4\n", loadings, 4, 3, "PC2", "1e999"},
		{"loadings Inf", "v,PC1,PC2\na,0.5,0.1\nb,0.5,-Inf\nc,0.5,0.3\nd,0.5,0.4\n", loadings, 3, 3, "PC2", "-Inf"},
		{"loadings transposed", "pc,a,b,c,d\nPC1,0.5,0.5,0.5,0.5\nPC2,0.1,-1e300,0.3,0.4\n", loadings, 3, 3, "b", "-1e300"},
		{"loadings decimal comma", "v;PC1;PC2\na;0,5;0,1\nb;0,5;2,5e200\nc;0,5;0,3\nd;0,5;0,4\n", loadings, 3, 3, "PC2", "2,5e200"},
		{"loadings at the limit", "v,PC1,PC2\na,1e100,0.1\nb,0.5,5e-324\nc,0.5,0.3\nd,0.5,0.4\n", loadings, 0, 0, "", ""},
		{"scores by id", "id,t1,t2\ns1,1,2\ns2,1e300,3\ns3,4,5\n", scores, 3, 2, "t1", "1e300"},
		{"scores by row", "t1,t2\n1,2\n3,4\n5,-1e101\n", scores, 4, 2, "t2", "-1e101"},
		{"unused score column", "id,t1,t2,t3\ns1,1,2,1e300\ns2,1,3,1\ns3,4,5,1\n", scores, 0, 0, "", ""},
		{"variance column", "pc,eigenvalue\nPC1,2.5\nPC2,1e300\n", variance, 3, 2, "eigenvalue", "1e300"},
		{"variance row", "PC1,PC2,PC3\n2.5,1e300,0.1\n", variance, 2, 2, "PC2", "1e300"},
	}
	for _, c := range cases {
		err := c.parse(looseText(t, "their.csv", c.text))
		if c.cell == "" {
			if err != nil {
				t.Errorf("%s: %v", c.name, err)
			}
			continue
		}
		var ie *intake.InputError
		if !errors.As(err, &ie) || ie.File != "their.csv" || ie.Line != c.line || ie.Column != c.col || ie.Name != c.column || ie.Text != c.cell {
			t.Errorf("%s: got %v, want their.csv:%d:%d (%s) %q", c.name, err, c.line, c.col, c.column, c.cell)
		}
	}
}

// 200,000 loadings rows that match no variable give one note, not 200,000;
// so do unmatched columns of transposed loadings and unknown samples.
func TestUnmatchedRowsGiveOneNote(t *testing.T) {
	var b strings.Builder
	b.WriteString("v,PC1\na,0.5\nb,0.5\nc,0.5\nd,0.5\n")
	for i := 0; i < 200_000; i++ {
		fmt.Fprintf(&b, "x%d,0.1\n", i)
	}
	l, err := ParseLoadings(looseText(t, "l.csv", b.String()), []string{"a", "b", "c", "d"})
	if err != nil {
		t.Fatal(err)
	}
	want := `200000 rows name no data variable and were ignored, e.g. "x0" (line 6), "x1" (line 7), "x2" (line 8)`
	if len(l.Notes) != 1 || l.Notes[0] != want {
		t.Errorf("notes %.200q, want one: %q", l.Notes, want)
	}

	b.Reset()
	b.WriteString("pc,a,b,c")
	for i := 0; i < 1000; i++ {
		fmt.Fprintf(&b, ",y%d", i)
	}
	b.WriteString("\nPC1,0.5,0.5,0.7" + strings.Repeat(",1", 1000) + "\n")
	l, err = ParseLoadings(looseText(t, "l.csv", b.String()), []string{"a", "b", "c"})
	if err != nil {
		t.Fatal(err)
	}
	if len(l.Notes) != 1 || !strings.HasPrefix(l.Notes[0], `1000 columns name no data variable and were ignored, e.g. "y0", "y1", "y2"`) {
		t.Errorf("transposed notes: %.200q", l.Notes)
	}

	b.Reset()
	b.WriteString("id,t1\ns1,1\ns2,2\ns3,3\n")
	for i := 0; i < 5000; i++ {
		fmt.Fprintf(&b, "z%d,1\n", i)
	}
	s, err := ParseScores(looseText(t, "s.csv", b.String()), []string{"s1", "s2", "s3"}, 1)
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Notes) != 1 || !strings.HasPrefix(s.Notes[0], `5000 samples are not in the data and were ignored, e.g. "z0" (line 5)`) {
		t.Errorf("score notes: %.200q", s.Notes)
	}
}
