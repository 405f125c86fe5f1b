package intake

import (
	"math"
	"reflect"
	"testing"
)

// A small table whose missing cells are counted by hand: 8 rows, 3
// variables and a constant k; a misses rows s2 and s5, b misses s2, c
// misses s4 and s6, k misses s6.
const gappy = `id,a,b,c,k
s1,1,2,3,7
s2,NA,,4,7
s3,3,5,6,7
s4,4,7,,7
s5,,9,1,7
s6,6,1,NA,
s7,2,3,8,7
s8,5,4,2,7
`

func TestMissingEvidenceUnderEachPolicy(t *testing.T) {
	wantVars := []VariableMissing{
		{"a", 2, 2.0 / 8}, {"b", 1, 1.0 / 8}, {"c", 2, 2.0 / 8},
	}
	for _, pol := range []MissingPolicy{MissingDrop, MissingMean, MissingIterative} {
		t.Run(string(pol), func(t *testing.T) {
			tab := read(t, gappy, ReadOptions{Missing: pol})
			// k is constant (and misses one cell): it is left out, and so
			// are its cells from the counts.
			if got := tab.MissingByVariable(); !reflect.DeepEqual(got, wantVars) {
				t.Errorf("by variable: %+v, want %+v", got, wantVars)
			}
			wantRows := []SampleMissing{
				{ID: "s2", Line: 3, Cells: 2, Share: 2.0 / 3, Variables: []string{"a", "b"}},
				{ID: "s4", Line: 5, Cells: 1, Share: 1.0 / 3, Variables: []string{"c"}},
				{ID: "s5", Line: 6, Cells: 1, Share: 1.0 / 3, Variables: []string{"a"}},
				{ID: "s6", Line: 7, Cells: 1, Share: 1.0 / 3, Variables: []string{"c"}},
			}
			for i := range wantRows {
				wantRows[i].Dropped = pol == MissingDrop
			}
			if got := tab.MissingBySample(); !reflect.DeepEqual(got, wantRows) {
				t.Errorf("by sample: %+v, want %+v", got, wantRows)
			}
		})
	}
}

func TestDropListsTheDroppedRows(t *testing.T) {
	tab := read(t, gappy, ReadOptions{Missing: MissingDrop})
	var ids []string
	var lines []int
	for _, r := range tab.DroppedRows {
		ids, lines = append(ids, r.ID), append(lines, r.Line)
	}
	if !reflect.DeepEqual(ids, []string{"s2", "s4", "s5", "s6"}) || !reflect.DeepEqual(lines, []int{3, 5, 6, 7}) {
		t.Errorf("dropped %v at lines %v", ids, lines)
	}
	// The dropped row names every missing variable, the constant one too:
	// that is why it went.
	if got := tab.DroppedRows[3].Missing; !reflect.DeepEqual(got, []string{"c", "k"}) {
		t.Errorf("s6 missing %v, want [c k]", got)
	}
	if !reflect.DeepEqual(tab.IDs, []string{"s1", "s3", "s7", "s8"}) {
		t.Errorf("kept %v", tab.IDs)
	}
}

func TestMeanFillsListedCells(t *testing.T) {
	tab := read(t, gappy, ReadOptions{Missing: MissingMean})
	got := tab.FilledCells(func(i, j int) float64 { return tab.X.At(i, j) })
	// Column means of the values read, by hand: a (1+3+4+6+2+5)/6 = 3.5,
	// b (2+5+7+9+1+3+4)/7 = 31/7, c (3+4+6+1+8+2)/6 = 4.
	want := []FilledCell{
		{"s2", "a", 3, 2, 3.5}, {"s2", "b", 3, 3, 31.0 / 7}, {"s4", "c", 5, 4, 4},
		{"s5", "a", 6, 2, 3.5}, {"s6", "c", 7, 4, 4},
	}
	if len(got) != len(want) {
		t.Fatalf("%d cells listed, want %d: %+v", len(got), len(want), got)
	}
	for i := range want {
		g, w := got[i], want[i]
		if g.ID != w.ID || g.Variable != w.Variable || g.Line != w.Line || g.Column != w.Column || math.Abs(g.Value-w.Value) > 1e-12 {
			t.Errorf("cell %d: %+v, want %+v", i, g, w)
		}
	}
}

func TestSelectRowsRenumbersFilledCells(t *testing.T) {
	tab := read(t, gappy, ReadOptions{Missing: MissingMean})
	sub := tab.SelectRows([]int{0, 3, 4}) // s1, s4, s5
	want := []CellRef{{Row: 1, Var: 2}, {Row: 2, Var: 0}}
	if !reflect.DeepEqual(sub.MissingAt, want) {
		t.Errorf("MissingAt %+v, want %+v", sub.MissingAt, want)
	}
	if !reflect.DeepEqual(sub.MissingRows, tab.MissingRows) {
		t.Error("the rows as read must survive SelectRows")
	}
}
