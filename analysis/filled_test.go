package analysis

import (
	"math"
	"strings"
	"testing"

	"pcqc/analysis/intake"
)

// The values listed for mean-filled cells are the column means on the
// transformed scale, whether the analysis preprocessed the matrix in place
// or not, and with rows excluded from the fit.
func TestImputedCellsOnTheTransformedScale(t *testing.T) {
	const text = `id,a,b,c
s1,1,20,3
s2,,50,4
s3,3,,6
s4,4,70,1
s5,8,90,
s6,6,10,9
s7,2,30,8
`
	// Means of the logs of the values read (natural log), by hand:
	// a: (ln1+ln3+ln4+ln8+ln6+ln2)/6 = ln(1152)/6, b: ln(20·50·70·90·10·30)/6,
	// c: ln(3·4·6·1·9·8)/6.
	wantA, wantB, wantC := math.Log(1152)/6, math.Log(20*50*70*90*10*30)/6, math.Log(3*4*6*1*9*8)/6
	for _, tc := range []struct {
		name    string
		inPlace bool
		exclude []int
	}{{"copy", false, nil}, {"in place", true, nil}, {"in place, s3 excluded", true, []int{2}}} {
		t.Run(tc.name, func(t *testing.T) {
			tab, err := intake.ReadTableFrom("t.csv", strings.NewReader(text), intake.ReadOptions{Missing: intake.MissingMean, Transform: intake.TransformLog})
			if err != nil {
				t.Fatal(err)
			}
			res, err := Analyze(tab, Options{Components: ComponentRule{Kind: RuleFixed, Fixed: 1}, NoCrossValidation: true, InPlace: tc.inPlace, Exclude: tc.exclude, Threads: 1})
			if err != nil {
				t.Fatal(err)
			}
			got := res.ImputedCells()
			want := []intake.FilledCell{
				{ID: "s2", Variable: "a", Line: 3, Column: 2, Value: wantA},
				{ID: "s3", Variable: "b", Line: 4, Column: 3, Value: wantB},
				{ID: "s5", Variable: "c", Line: 6, Column: 4, Value: wantC},
			}
			if len(got) != len(want) {
				t.Fatalf("%+v", got)
			}
			for i, w := range want {
				g := got[i]
				if g.ID != w.ID || g.Variable != w.Variable || g.Line != w.Line || g.Column != w.Column || math.Abs(g.Value-w.Value) > 1e-12*math.Abs(w.Value) {
					t.Errorf("cell %d: %+v, want %+v", i, g, w)
				}
			}
		})
	}
}
