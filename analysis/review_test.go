package analysis_test

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	. "pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/internal/fixture"
)

func computeOther(t *testing.T, tab *intake.Table, centred bool, scaling Scaling, k int) fixture.Other {
	t.Helper()
	o, err := fixture.Compute(tab, centred, scaling, k)
	if err != nil {
		t.Fatal(err)
	}
	return o
}

func loose(t *testing.T, name, text string) *intake.LooseTable {
	t.Helper()
	lt, err := intake.ReadLooseTableFrom(name, strings.NewReader(text))
	if err != nil {
		t.Fatal(err)
	}
	return lt
}

func usarrests(t *testing.T) *intake.Table {
	t.Helper()
	tab, err := intake.ReadTable(filepath.Join("..", "testdata", "datasets", "usarrests.csv"), intake.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	return tab
}

func review(t *testing.T, tab *intake.Table, loadings, scores, variance string, claimed Scaling) *Review {
	t.Helper()
	l, err := ParseLoadings(loose(t, "loadings.csv", loadings), tab.Variables)
	if err != nil {
		t.Fatal(err)
	}
	sub := tab.Subset(l.Variables)
	var s *TheirScores
	if scores != "" {
		_, k := l.V.Dims()
		if s, err = ParseScores(loose(t, "scores.csv", scores), sub.IDs, k); err != nil {
			t.Fatal(err)
		}
	}
	var v *TheirVariance
	if variance != "" {
		if v, err = ParseVariance(loose(t, "variance.csv", variance)); err != nil {
			t.Fatal(err)
		}
	}
	r, err := CompareReview(sub, l, s, v, claimed)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// Acceptance 1: correct loadings and scores from each scaling variant, with
// sign flips and renamed columns, are matched to the right variant.
func TestReviewFindsTheVariant(t *testing.T) {
	tab := usarrests(t)
	for _, sc := range []Scaling{ScaleUnit, ScaleNone, ScalePareto, ScaleRange} {
		o := computeOther(t, tab, true, sc, 2)
		o.Flip(1)
		r := review(t, tab, o.LoadingsCSV(",", func(a int) string { return fmt.Sprintf("Comp.%d", a+1) }),
			o.ScoresCSV(true, fixture.Identity(50)), o.PercentCSV(2, 0), "")
		best := r.Variants[r.Best]
		if !best.Centered || best.Scaling != sc {
			t.Errorf("%s: best variant %s", sc, best.Name())
		}
		if best.MaxAngle > 1e-3 {
			t.Errorf("%s: largest angle %.2g°", sc, best.MaxAngle)
		}
		if !r.Flipped[1] || r.Flipped[0] || r.Congruence[1] < 0.9999 {
			t.Errorf("%s: flips %v congruence %v", sc, r.Flipped, r.Congruence)
		}
		if m := maxAbs(r.ScoreResiduals); m > 1e-4 {
			t.Errorf("%s: score residual %.2g", sc, m)
		}
		if r.VarianceKind != VariancePercentages || maxAbs(r.VarianceDiff) > 1e-3 {
			t.Errorf("%s: variance %s %v", sc, r.VarianceKind, r.VarianceDiff)
		}
		// The other variants really differ: the nearest is degrees away.
		for i, v := range r.Variants {
			if i != r.Best && v.MaxAngle < 0.5 {
				t.Errorf("%s: variant %s also matches (%.3g°)", sc, v.Name(), v.MaxAngle)
			}
		}
	}
}

func maxAbs(x []float64) float64 {
	m := 0.0
	for _, v := range x {
		m = math.Max(m, math.Abs(v))
	}
	return m
}

// Acceptance 2: loadings and scores of uncentred data are recognised.
func TestReviewRecognisesUncentredData(t *testing.T) {
	tab := usarrests(t)
	o := computeOther(t, tab, false, ScaleUnit, 2)
	r := review(t, tab, o.LoadingsCSV(",", func(a int) string { return fmt.Sprintf("PC%d", a+1) }), o.ScoresCSV(true, fixture.Identity(50)), "", "")
	if r.Variants[r.Best].Centered {
		t.Errorf("uncentred loadings matched %s", r.Variants[r.Best].Name())
	}
	if u, c := r.Variants[r.BestUncentred].MaxAngle, r.Variants[r.BestCentred].MaxAngle; u > 1e-3 || c < 5 {
		t.Errorf("uncentred %.3g°, best centred %.3g°", u, c)
	}
	if r.Variants[r.ScoreBest].Centered || r.ScoreMeanShift < 1 {
		t.Errorf("scores: best variant %s, mean shift %.3g", r.Variants[r.ScoreBest].Name(), r.ScoreMeanShift)
	}
}

// Acceptance 3: a transposed loadings file, a semicolon file with decimal
// commas, and scores in shuffled order with ids are all read correctly.
func TestReviewReadsTolerantly(t *testing.T) {
	tab := usarrests(t)
	o := computeOther(t, tab, true, ScaleUnit, 3)
	r := review(t, tab, o.TransposedCSV(), "", "", "")
	if r.Loadings.Layout != LayoutVariableColumns || r.Variants[r.Best].MaxAngle > 1e-3 {
		t.Errorf("transposed: %s, %.3g°", r.Loadings.Layout, r.Variants[r.Best].MaxAngle)
	}
	semicolon := strings.ReplaceAll(o.LoadingsCSV(";", func(a int) string { return fmt.Sprintf("Factor %d", a+1) }), ".", ",")
	r = review(t, tab, semicolon, "", "", "")
	if r.Loadings.Layout != LayoutVariableRows || r.Variants[r.Best].MaxAngle > 1e-3 || r.Loadings.Components[2] != "Factor 3" {
		t.Errorf("semicolon: %s %v %.3g°", r.Loadings.Layout, r.Loadings.Components, r.Variants[r.Best].MaxAngle)
	}
	order := rand.New(rand.NewPCG(1, 2)).Perm(50)
	r = review(t, tab, o.LoadingsCSV(",", func(a int) string { return fmt.Sprintf("PC%d", a+1) }), o.ScoresCSV(true, order), "", "")
	if !strings.Contains(r.Scores.MatchedBy, "sample id") || maxAbs(r.ScoreResiduals) > 1e-4 {
		t.Errorf("shuffled scores with ids: %s, residual %.3g", r.Scores.MatchedBy, maxAbs(r.ScoreResiduals))
	}
}

// Acceptance 4 (review side): scores in another row order without ids do
// not follow from the loadings.
func TestReviewDetectsScoresOutOfOrder(t *testing.T) {
	tab := usarrests(t)
	o := computeOther(t, tab, true, ScaleUnit, 2)
	order := rand.New(rand.NewPCG(3, 4)).Perm(50)
	r := review(t, tab, o.LoadingsCSV(",", func(a int) string { return fmt.Sprintf("PC%d", a+1) }), o.ScoresCSV(false, order), "", "")
	if !strings.Contains(r.Scores.MatchedBy, "row order") || maxAbs(r.ScoreResiduals) < 0.5 {
		t.Errorf("shuffled scores without ids: %s, residual %.3g", r.Scores.MatchedBy, maxAbs(r.ScoreResiduals))
	}
}

// Acceptance 5 (review side): percentages 3 points off are read as
// percentages and measured 3 points off.
func TestReviewVarianceOffByThreePoints(t *testing.T) {
	tab := usarrests(t)
	o := computeOther(t, tab, true, ScaleUnit, 2)
	r := review(t, tab, o.LoadingsCSV(",", func(a int) string { return fmt.Sprintf("PC%d", a+1) }), "", o.PercentCSV(2, 3), "")
	if r.VarianceKind != VariancePercentages || math.Abs(r.VarianceDiff[1]-3) > 1e-3 || math.Abs(r.VarianceDiff[0]) > 1e-3 {
		t.Errorf("%s %v", r.VarianceKind, r.VarianceDiff)
	}
	// The same shares stated as eigenvalues, standard deviations and
	// proportions are recognised as such.
	for _, c := range []struct {
		kind VarianceKind
		f    func(e, total float64) float64
	}{
		{VarianceEigenvalues, func(e, _ float64) float64 { return e }},
		{VarianceSD, func(e, _ float64) float64 { return math.Sqrt(e) }},
		{VarianceProportions, func(e, total float64) float64 { return e / total }},
	} {
		total := 0.0
		for _, e := range o.Eig {
			total += e
		}
		var b strings.Builder
		b.WriteString("value\n")
		for a := 0; a < 2; a++ {
			b.WriteString(fmt.Sprintf("%.6f\n", c.f(o.Eig[a], total)))
		}
		r := review(t, tab, o.LoadingsCSV(",", func(a int) string { return fmt.Sprintf("PC%d", a+1) }), "", b.String(), "")
		if r.VarianceKind != c.kind || maxAbs(r.VarianceDiff) > 1e-3 {
			t.Errorf("%s read as %s, %v", c.kind, r.VarianceKind, r.VarianceDiff)
		}
	}
}

// Acceptance 6 (review side): tables that do not fit the data are errors
// that say why.
func TestReviewRejectsMismatchedTables(t *testing.T) {
	tab := usarrests(t)
	o := computeOther(t, tab, true, ScaleUnit, 2)
	_, err := ParseLoadings(loose(t, "l.csv", "var,PC1,PC2\nfoo,0.1,0.2\nbar,0.3,0.4\n"), tab.Variables)
	var ie *intake.InputError
	if !errors.As(err, &ie) || !strings.Contains(err.Error(), "no variable name in common") {
		t.Errorf("no names in common: %v", err)
	}
	short := strings.Join(strings.Split(o.ScoresCSV(false, fixture.Identity(50)), "\n")[:40], "\n") + "\n"
	l, _ := ParseLoadings(loose(t, "l.csv", o.LoadingsCSV(",", func(a int) string { return fmt.Sprintf("PC%d", a+1) })), tab.Variables)
	_, err = ParseScores(loose(t, "s.csv", short), tab.IDs, 2)
	if !errors.As(err, &ie) || !strings.Contains(err.Error(), "39 score rows for 50 samples") {
		t.Errorf("wrong number of rows: %v", err)
	}
	_ = l
}

// Loadings and scores files get the same encoding checks as the data table:
// a UTF-16 or binary file is refused with a reason, a UTF-8 byte order mark is
// skipped (common practice for spreadsheet exports).
func TestLooseTableEncoding(t *testing.T) {
	cases := []struct {
		name, text, reason string
	}{
		{"utf16", "\xff\xfev\x00a\x00r\x00\n\x00", "UTF-16"},
		{"utf16 no mark", "v\x00a\x00r\x00,\x00P\x00C\x001\x00\n\x00x\x00,\x001\x00\n\x00", "UTF-16"},
		{"binary", "PK\x03\x04\x00\x00\x08\x00\x00\x00xl/workbook.xml\x00", "binary"},
	}
	for _, c := range cases {
		_, err := intake.ReadLooseTableFrom(c.name, strings.NewReader(c.text))
		var ie *intake.InputError
		if !errors.As(err, &ie) || !strings.Contains(ie.Reason, c.reason) {
			t.Errorf("%s: got %v, want an input error about %s", c.name, err, c.reason)
		}
	}
	lt := loose(t, "bom", "\xef\xbb\xbfvariable,PC1\nx,0.5\n")
	if lt.Header[0] != "variable" {
		t.Errorf("byte order mark kept: header %q", lt.Header)
	}
}

// Principal angles come from their sines below 45°, so that an exact match
// reads 0° and angles of 1e-12 to 1e-8 rad, which an arccosine rounds to 0
// or to 1e-6° of noise, are measured. Reference: scipy 1.10.1
// scipy.linalg.subspace_angles on the same bases (testdata/review/angles.py).
func TestPrincipalAnglesFromSines(t *testing.T) {
	raw, err := os.ReadFile(filepath.Join("..", "testdata", "review", "angles.json"))
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Cases []struct {
			Name       string
			A, B       [][]float64
			PlantedRad []float64 `json:"planted_rad"`
			ScipyDeg   []float64 `json:"scipy_deg"`
		}
	}
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatal(err)
	}
	dense := func(rows [][]float64) *mat.Dense {
		m := mat.NewDense(len(rows), len(rows[0]), nil)
		for i, r := range rows {
			m.SetRow(i, r)
		}
		return m
	}
	if len(ref.Cases) != 4 {
		t.Fatalf("%d reference cases", len(ref.Cases))
	}
	for _, c := range ref.Cases {
		got := PrincipalAngles(dense(c.A), dense(c.B))
		if len(got) != len(c.ScipyDeg) {
			t.Fatalf("%s: %d angles, scipy %d", c.Name, len(got), len(c.ScipyDeg))
		}
		for i, want := range c.ScipyDeg {
			switch {
			case c.PlantedRad != nil && c.PlantedRad[i] == 0:
				// scipy leaves 1e-14° of rounding; an exact match is 0.
				if got[i] != 0 || want > 1e-12 {
					t.Errorf("%s: angle %d is %g°, scipy %g°, want 0", c.Name, i, got[i], want)
				}
			case want < 1:
				// Tiny angles agree with scipy to 1e-6 relative, or to
				// 1e-13° (2e-15 rad, ten units of rounding of the bases)
				// below 1e-9 rad, where that rounding is the larger.
				if math.Abs(got[i]-want) > 1e-6*want+1e-13 {
					t.Errorf("%s: angle %d is %.10g°, scipy %.10g°", c.Name, i, got[i], want)
				}
			default:
				if math.Abs(got[i]-want) > 1e-9 {
					t.Errorf("%s: angle %d is %.12g°, scipy %.12g°", c.Name, i, got[i], want)
				}
			}
		}
		// The same subspace given with its bases swapped has the same angles.
		back := PrincipalAngles(dense(c.B), dense(c.A))
		for i := range got {
			if math.Abs(back[i]-got[i]) > 1e-6*got[i]+1e-12 {
				t.Errorf("%s: angle %d is %g° one way, %g° the other", c.Name, i, got[i], back[i])
			}
		}
	}
	// Bases of different sizes: a plane inside a 3-dimensional space meets
	// it at 0° twice, whichever is given first.
	a := mat.NewDense(4, 3, []float64{1, 0, 0, 0, 1, 0, 0, 0, 1, 0, 0, 0})
	b := mat.NewDense(4, 2, []float64{0.6, 0, 0.8, 0, 0, 1, 0, 0})
	for _, got := range [][]float64{PrincipalAngles(a, b), PrincipalAngles(b, a)} {
		if len(got) != 2 || got[0] != 0 || got[1] != 0 {
			t.Errorf("plane in a 3-space: %v", got)
		}
	}
}

// The variance files people send, written by R 4.2.2, scikit-learn 1.2.1,
// numpy 1.24.2 and pandas 1.5.3 themselves (testdata/review/generate.R and
// generate.py), are each read as what they hold, from the right column or
// row, and agree with the recomputed analysis; the file's shape decides
// where the values are, its header or content what they are.
func TestReviewReadsVarianceFileShapes(t *testing.T) {
	dir := filepath.Join("..", "testdata", "review")
	wine, err := intake.ReadTable(filepath.Join("..", "testdata", "datasets", "wine.csv"), intake.ReadOptions{GroupColumn: "cultivar"})
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		file, loadings string
		tab            *intake.Table
		kind           VarianceKind
		from, why      string
		ambiguous      bool
		points         float64 // the largest difference allowed by the printed rounding
	}{
		// R write.csv(pca$sdev): the row names 1..4 are an index, "x" says
		// nothing, and only standard deviations fit.
		{"r-sdev.csv", "r-loadings.csv", usarrests(t), VarianceSD, `column "x"`, `the label "x" does not say`, false, 1e-9},
		// R summary(pca)$importance: rows named by what they hold.
		{"r-importance.csv", "r-loadings.csv", usarrests(t), VarianceProportions, `row "Proportion of Variance"`, "says so", false, 1e-3},
		// pandas Series of explained_variance_ratio_: header ",0", index 0..12.
		{"pandas-ratio-series.csv", "sklearn-wine-loadings.csv", wine, VarianceProportions, `column "0"`, "they sum to 1", false, 1e-9},
		// pandas Series of explained_variance_: eigenvalues, not a share.
		{"pandas-variance-series.csv", "sklearn-wine-loadings.csv", wine, VarianceEigenvalues, `column "0"`, "does not say", false, 1e-9},
		// pandas DataFrame: index column, named columns, a cumulative one.
		{"pandas-variance-frame.csv", "sklearn-wine-loadings.csv", wine, VarianceProportions, `column "explained_variance_ratio"`, "says so", false, 1e-9},
		// pandas with the component names as index, a column "sd".
		{"pandas-sd-named-index.csv", "sklearn-wine-loadings.csv", wine, VarianceSD, `column "sd"`, "says so", false, 1e-9},
		// numpy savetxt: a bare column, no header.
		{"numpy-explained-variance.txt", "sklearn-wine-loadings.csv", wine, VarianceEigenvalues, "the one column", "no header says", false, 1e-9},
		{"numpy-explained-variance-ratio.txt", "sklearn-wine-loadings.csv", wine, VarianceProportions, "the one column", "they sum to 1", false, 1e-9},
		// numpy savetxt with a header, written as "# name".
		{"numpy-ratio-header.txt", "sklearn-wine-loadings.csv", wine, VarianceProportions, `column "explained_variance_ratio"`, "says so", false, 1e-9},
		// A bare column of percentages to two decimals: they sum to 100.
		{"numpy-percent-2dp.txt", "sklearn-wine-loadings.csv", wine, VariancePercentages, "the one column", "they sum to 100", false, 0.005},
	}
	for _, c := range cases {
		read := func(name string) string {
			b, err := os.ReadFile(filepath.Join(dir, name))
			if err != nil {
				t.Fatal(err)
			}
			return string(b)
		}
		r := review(t, c.tab, read(c.loadings), "", read(c.file), "")
		got := r.VarianceReading
		if got.Kind != c.kind || !strings.Contains(r.Variance.From, c.from) || !strings.Contains(got.Why, c.why) || got.Ambiguous != c.ambiguous {
			t.Errorf("%s: read %s from %s (ambiguous %v): %s", c.file, got.Kind, r.Variance.From, got.Ambiguous, got.Why)
		}
		if m := maxAbs(r.VarianceDiff); m > c.points || len(r.VarianceDiff) < 2 {
			t.Errorf("%s: %d values, largest difference %.3g points", c.file, len(r.VarianceDiff), m)
		}
	}
}

// When neither header nor content tells and two readings fit, the reading
// is called ambiguous and says which was taken and why; values that fit no
// reading are not called ambiguous. Eigenvalues near 1 (a near-spherical
// table) are equally standard deviations; the values are invented.
func TestVarianceReadingAmbiguity(t *testing.T) {
	eig := []float64{1.02, 1.0, 0.99, 0.99} // sums to 4
	cases := []struct {
		text      string
		kind      VarianceKind
		ambiguous bool
		why       string
	}{
		{"v\n1.02\n1.00\n0.99\n0.99\n", VarianceEigenvalues, true, "more than one reading fits"},
		{"v\n1.02\n1.00\n", VarianceEigenvalues, true, "more than one reading fits"},
		{"sdev\n1.02\n1.00\n", VarianceSD, false, "says so"},
		// The first two of four proportions: below 1, so not "sum to 1";
		// only the proportions reading fits.
		{"v\n0.255\n0.25\n", VarianceProportions, false, "only this one agrees"},
		// 0.255 + 0.25 + … = 1: fractions, whatever else might fit.
		{"v\n0.255\n0.25\n0.2475\n0.2475\n", VarianceProportions, false, "they sum to 1"},
		// A label contradicted by the content: "proportion" above 1.
		{"proportion\n25.5\n25\n24.75\n24.75\n", VariancePercentages, false, `the label "proportion" says proportions of the total variance, but a value of 25.5 exceeds 1`},
		// A label the values do not fit, while another reading does.
		{"variance\n1.0100\n1.0000\n", VarianceEigenvalues, false, "says so"},
		{"eigenvalue\n1.0404\n1.0000\n0.9801\n0.9801\n", VarianceEigenvalues, false, "says so"},
		{"eigenvalue\n0.255\n0.25\n0.2475\n0.2475\n", VarianceEigenvalues, false, "as proportions of the total variance they would agree"},
	}
	for _, c := range cases {
		v, err := ParseVariance(loose(t, "v.csv", c.text))
		if err != nil {
			t.Fatal(err)
		}
		r := v.Read(eig)
		if r.Kind != c.kind || r.Ambiguous != c.ambiguous || !strings.Contains(r.Why, c.why) {
			t.Errorf("%q: %s, ambiguous %v: %s", c.text, r.Kind, r.Ambiguous, r.Why)
		}
	}
}

// Scores saved with a row index: pandas' default to_csv (0, 1, 2 …, here
// written by pandas 1.5.3 from scikit-learn's scores, as
// testdata/review/generate.py writes them) would match the data's row-number
// ids one row off; R's write.csv of a data frame without row names (1, 2,
// 3 …) against data with named samples would make the index a component.
// Both are read as an index, rows in data order.
func TestReviewScoresWithRowIndex(t *testing.T) {
	wine, err := intake.ReadTable(filepath.Join("..", "testdata", "datasets", "wine.csv"), intake.ReadOptions{GroupColumn: "cultivar"})
	if err != nil {
		t.Fatal(err)
	}
	read := func(name string) string {
		b, err := os.ReadFile(filepath.Join("..", "testdata", "review", name))
		if err != nil {
			t.Fatal(err)
		}
		return string(b)
	}
	withIndex := func(text string, from int) string {
		lines := strings.Split(strings.TrimSpace(text), "\n")
		for i := range lines {
			if i == 0 {
				lines[i] = "," + lines[i]
			} else {
				lines[i] = fmt.Sprintf("%d,%s", i-1+from, lines[i])
			}
		}
		return strings.Join(lines, "\n") + "\n"
	}
	o := computeOther(t, usarrests(t), true, ScaleUnit, 2)
	usScores := o.ScoresCSV(false, fixture.Identity(50))
	cases := []struct {
		name             string
		tab              *intake.Table
		loadings, scores string
	}{
		{"pandas index from 0, row-number ids", wine, read("sklearn-wine-loadings.csv"), read("sklearn-wine-scores-indexed.csv")},
		{"index from 1, named samples", usarrests(t), o.LoadingsCSV(",", func(a int) string { return fmt.Sprintf("PC%d", a+1) }), withIndex(usScores, 1)},
		{"index from 0, named samples", usarrests(t), o.LoadingsCSV(",", func(a int) string { return fmt.Sprintf("PC%d", a+1) }), withIndex(usScores, 0)},
	}
	for _, c := range cases {
		r := review(t, c.tab, c.loadings, c.scores, "", "")
		if !strings.Contains(r.Scores.MatchedBy, "row order") || len(r.Scores.Columns) != 2 || maxAbs(r.ScoreResiduals) > 1e-6 ||
			len(r.Scores.Notes) == 0 || !strings.Contains(r.Scores.Notes[0], "counts the rows") {
			t.Errorf("%s: matched %s, columns %v, residual %.3g, notes %v", c.name, r.Scores.MatchedBy, r.Scores.Columns, maxAbs(r.ScoreResiduals), r.Scores.Notes)
		}
	}
}
