package intake

import (
	"fmt"
	"math"
	"reflect"
	"strings"
	"testing"
)

// Each policy replaces exactly the censored cells, by the documented rule,
// and lists them by row and variable with the text as written. The expected
// numbers are arithmetic on the limits (0.05/2 = 0.025; 0.05/√2 =
// 0.035355339059327376 and log(0.025) = -3.6888794541139363, Python 3.11
// math module).
func TestCensoredPolicies(t *testing.T) {
	const text = "id,a,b\ns1,<0.05,1\ns2,0.2,2\ns3,> 2000,3\ns4,< 0.1,<4\n"
	cases := []struct {
		name string
		text string
		opt  ReadOptions
		a, b []float64
		list []CensoredCell
	}{
		{"half", text, ReadOptions{Censored: CensorHalf},
			[]float64{0.025, 0.2, 2000, 0.05}, []float64{1, 2, 3, 2},
			[]CensoredCell{{0, 0, "<0.05", 0.025, "below"}, {2, 0, "> 2000", 2000, "above"}, {3, 0, "< 0.1", 0.05, "below"}, {3, 1, "<4", 2, "below"}}},
		{"sqrt2", text, ReadOptions{Censored: CensorSqrt2},
			[]float64{0.035355339059327376, 0.2, 2000, 0.07071067811865475}, []float64{1, 2, 3, 2.82842712474619},
			[]CensoredCell{{0, 0, "<0.05", 0.035355339059327376, "below"}, {2, 0, "> 2000", 2000, "above"}, {3, 0, "< 0.1", 0.07071067811865475, "below"}, {3, 1, "<4", 2.82842712474619, "below"}}},
		{"decimal comma", "id;a;b\ns1;<0,05;1\ns2;0,2;2\ns3;>2000;3\ns4;< 0,1;4\n", ReadOptions{Censored: CensorHalf, Decimal: ','},
			[]float64{0.025, 0.2, 2000, 0.05}, []float64{1, 2, 3, 4},
			[]CensoredCell{{0, 0, "<0,05", 0.025, "below"}, {2, 0, ">2000", 2000, "above"}, {3, 0, "< 0,1", 0.05, "below"}}},
		// The sign comes off before the digit groups are read: "<1,000"
		// under --thousands is a limit of 1000.
		{"digit groups", "id,a,b\ns1,\"<1,000\",1\ns2,\"2,500\",2\ns3,\"> 12,000\",3\ns4,40,4\n", ReadOptions{Censored: CensorHalf, Thousands: ','},
			[]float64{500, 2500, 12000, 40}, []float64{1, 2, 3, 4},
			[]CensoredCell{{0, 0, "<1,000", 500, "below"}, {2, 0, "> 12,000", 12000, "above"}}},
		// The substitution comes first: log("<0.05") is log(0.025).
		{"before the transform", text, ReadOptions{Censored: CensorHalf, Transform: TransformLog},
			[]float64{-3.6888794541139363, math.Log(0.2), math.Log(2000), math.Log(0.05)}, []float64{0, math.Log(2), math.Log(3), math.Log(2)},
			[]CensoredCell{{0, 0, "<0.05", 0.025, "below"}, {2, 0, "> 2000", 2000, "above"}, {3, 0, "< 0.1", 0.05, "below"}, {3, 1, "<4", 2, "below"}}},
		// A row dropped for a missing cell takes its censored cells with it,
		// and the rows after it are renumbered.
		{"dropped row", "id,a,b\ns1,<0.05,1\ns2,NA,<2\ns3,> 2000,3\ns4,0.3,4\n", ReadOptions{Censored: CensorHalf, Missing: MissingDrop},
			[]float64{0.025, 2000, 0.3}, []float64{1, 3, 4},
			[]CensoredCell{{0, 0, "<0.05", 0.025, "below"}, {1, 0, "> 2000", 2000, "above"}}},
		// A constant column is dropped with its censored cells; the next
		// variable's index moves down.
		{"constant dropped", "id,c,a,b\ns1,<1,<0.05,1\ns2,<1,0.2,2\ns3,<1,0.3,<4\n", ReadOptions{Censored: CensorHalf},
			[]float64{0.025, 0.2, 0.3}, []float64{1, 2, 2},
			[]CensoredCell{{0, 0, "<0.05", 0.025, "below"}, {2, 1, "<4", 2, "below"}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tab := read(t, c.text, c.opt)
			for i := range c.a {
				for k, want := range [][]float64{c.a, c.b} {
					if got := tab.X.At(i, k); math.Abs(got-want[i]) > 1e-12*math.Max(1, math.Abs(want[i])) {
						t.Errorf("row %d var %d: %v, want %v", i, k, got, want[i])
					}
				}
			}
			if len(tab.Censored) != len(c.list) {
				t.Fatalf("censored %+v, want %+v", tab.Censored, c.list)
			}
			for i, w := range c.list {
				g := tab.Censored[i]
				if g.Row != w.Row || g.Var != w.Var || g.Text != w.Text || g.Side != w.Side || math.Abs(g.Value-w.Value) > 1e-15 {
					t.Errorf("cell %d: %+v, want %+v", i, g, w)
				}
			}
			if tab.Censoring != c.opt.Censored {
				t.Errorf("policy %q", tab.Censoring)
			}
		})
	}
}

// Under the default policy a censored cell stops the reading at its
// position with advice to use --censored, also in a column made mostly of
// limits (which used to be called text, with advice to drop it); a limit
// that is missing or not positive is refused under every policy.
func TestCensoredRefused(t *testing.T) {
	cases := []struct {
		name, text string
		opt        ReadOptions
		line, col  int
		cell, want string
	}{
		{"fail below", "id,a,b\ns1,1,1\ns2,<0.05,2\ns3,3,3\n", ReadOptions{}, 3, 2, "<0.05", "use --censored half or --censored sqrt2"},
		{"fail above", "id,a,b\ns1,1,1\ns2,>2000,2\ns3,3,3\n", ReadOptions{}, 3, 2, ">2000", "above a reporting limit"},
		{"mostly limits", "id,a,b\ns1,<0.05,1\ns2,<0.05,2\ns3,<0.1,3\ns4,0.4,4\n", ReadOptions{}, 2, 2, "<0.05", "below a detection limit"},
		{"zero limit", "id,a,b\ns1,1,1\ns2,<0,2\ns3,3,3\n", ReadOptions{Censored: CensorHalf}, 3, 2, "<0", "must be a positive finite number"},
		{"negative limit", "id,a,b\ns1,1,1\ns2,<-1,2\ns3,3,3\n", ReadOptions{Censored: CensorHalf}, 3, 2, "<-1", "must be a positive finite number"},
		{"bare sign", "id,a,b\ns1,1,1\ns2,< ,2\ns3,3,3\n", ReadOptions{Censored: CensorSqrt2}, 3, 2, "< ", "a limit sign without its value"},
		{"word limit", "id,a,b\ns1,1,1\ns2,<LOD,2\ns3,3,3\n", ReadOptions{Censored: CensorHalf}, 3, 2, "<LOD", "a limit needs its value"},
		{"column of words", "id,a,b\ns1,<LOD,1\ns2,<LOD,2\ns3,3,3\n", ReadOptions{Censored: CensorHalf}, 2, 2, "<LOD", "a limit needs its value"},
		{"transform domain", "id,a,b\ns1,1,1\ns2,<0.05,2\ns3,3,3\n", ReadOptions{Censored: CensorHalf, Transform: TransformLog1p}, 0, 0, "", ""},
		{"decimal comma fail", "id;a;b\ns1;1;1\ns2;<0,05;2\ns3;3;3\n", ReadOptions{Decimal: ','}, 3, 2, "<0,05", "below a detection limit"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if c.want == "" {
				read(t, c.text, c.opt) // log1p of 0.025 is defined
				return
			}
			e := readErr(t, c.text, c.opt)
			if e.Line != c.line || e.Column != c.col || e.Name != "a" || e.Text != c.cell || !strings.Contains(e.Reason, c.want) {
				t.Errorf("got %v", e)
			}
			if strings.Contains(e.Reason, "--drop") {
				t.Errorf("advice to drop the column: %v", e)
			}
		})
	}
}

// The parallel chunk path lists the same cells, in the same order, as the
// sequential one.
func TestCensoredParallel(t *testing.T) {
	defer func(v int64) { parallelThreshold = v }(parallelThreshold)
	var b strings.Builder
	b.WriteString("id,a,b\n")
	for i := 1; b.Len() < 64<<10; i++ {
		a := fmt.Sprint(float64(i%13) + 0.5)
		if i%7 == 0 {
			a = "<0.5"
		}
		fmt.Fprintf(&b, "s%05d,%s,%d\n", i, a, i%5)
	}
	path := writeTemp(t, "t.csv", b.String())
	var lists [][]CensoredCell
	for _, threshold := range []int64{1 << 40, 16 << 10} {
		parallelThreshold = threshold
		tab, err := ReadTable(path, ReadOptions{Censored: CensorHalf})
		if err != nil {
			t.Fatal(err)
		}
		lists = append(lists, tab.Censored)
	}
	if len(lists[0]) == 0 || !reflect.DeepEqual(lists[0], lists[1]) {
		t.Errorf("sequential %d cells, parallel %d cells, or they differ", len(lists[0]), len(lists[1]))
	}
	if c := lists[0][0]; c.Row != 6 || c.Value != 0.25 {
		t.Errorf("first cell %+v, want row 6 (s00007) value 0.25", c)
	}
}

// Subset and SelectRows keep each censored cell with its variable and row.
func TestCensoredFollowsSubsets(t *testing.T) {
	tab := read(t, "id,a,b,c\ns1,<1,1,5\ns2,2,>9,6\ns3,3,3,<7\ns4,4,4,8\n", ReadOptions{Censored: CensorHalf})
	sub := tab.Subset([]int{1, 2})
	want := []CensoredCell{{1, 0, ">9", 9, "above"}, {2, 1, "<7", 3.5, "below"}}
	if !reflect.DeepEqual(sub.Censored, want) {
		t.Errorf("Subset: %+v, want %+v", sub.Censored, want)
	}
	rows := tab.SelectRows([]int{2, 0})
	want = []CensoredCell{{0, 2, "<7", 3.5, "below"}, {1, 0, "<1", 0.5, "below"}}
	if !reflect.DeepEqual(rows.Censored, want) {
		t.Errorf("SelectRows: %+v, want %+v", rows.Censored, want)
	}
	below, above := tab.CensoredCounts()
	if !reflect.DeepEqual(below, []int{1, 0, 1}) || !reflect.DeepEqual(above, []int{0, 1, 0}) {
		t.Errorf("counts %v %v", below, above)
	}
}
