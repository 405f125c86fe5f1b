package checks

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/demo"
	"pcqc/internal/fixture"
)

func usarrestsTable(t *testing.T) *intake.Table {
	t.Helper()
	tab, err := intake.ReadTable(filepath.Join("..", "testdata", "datasets", "usarrests.csv"), intake.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	return tab
}

func demoTable(t *testing.T) *intake.Table {
	t.Helper()
	tab, err := intake.ReadTableFrom("demo-data.csv", bytes.NewReader(demo.Survey()), intake.ReadOptions{IDColumn: demo.SampleID, GroupColumn: demo.Station})
	if err != nil {
		t.Fatal(err)
	}
	return tab
}

func looseTable(t *testing.T, text string) *intake.LooseTable {
	t.Helper()
	lt, err := intake.ReadLooseTableFrom("their.csv", strings.NewReader(text))
	if err != nil {
		t.Fatal(err)
	}
	return lt
}

// reviewChecks runs the review of their tables against tab and returns the
// review checks' results by id.
func reviewChecks(t *testing.T, tab *intake.Table, loadings, scores, variance string, claimed analysis.Scaling) map[string]Result {
	t.Helper()
	l, err := analysis.ParseLoadings(looseTable(t, loadings), tab.Variables)
	if err != nil {
		t.Fatal(err)
	}
	sub := tab.Subset(l.Variables)
	_, k := l.V.Dims()
	var s *analysis.TheirScores
	if scores != "" {
		if s, err = analysis.ParseScores(looseTable(t, scores), sub.IDs, k); err != nil {
			t.Fatal(err)
		}
	}
	var v *analysis.TheirVariance
	if variance != "" {
		if v, err = analysis.ParseVariance(looseTable(t, variance)); err != nil {
			t.Fatal(err)
		}
	}
	rv, err := analysis.CompareReview(sub, l, s, v, claimed)
	if err != nil {
		t.Fatal(err)
	}
	res, err := analysis.Analyze(sub, analysis.Options{Scaling: rv.Variants[rv.Best].Scaling, Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: k}})
	if err != nil {
		t.Fatal(err)
	}
	out := map[string]Result{}
	for _, r := range RunAll(Input{Run: res, Review: rv}) {
		if strings.HasPrefix(r.ID, "review-") {
			out[r.ID] = r
		}
	}
	if len(out) != 9 {
		t.Fatalf("%d review checks ran", len(out))
	}
	return out
}

func other(t *testing.T, tab *intake.Table, centred bool, sc analysis.Scaling, k int) fixture.Other {
	t.Helper()
	o, err := fixture.Compute(tab, centred, sc, k)
	if err != nil {
		t.Fatal(err)
	}
	return o
}

func dimName(a int) string { return fmt.Sprintf("Dim.%d", a+1) }

// Acceptance 1: correct loadings and scores from each scaling variant, with
// arbitrary sign flips and renamed columns, pass every review check and the
// right variant is named.
func TestReviewChecksPassOnCorrectTables(t *testing.T) {
	for _, tab := range []*intake.Table{usarrestsTable(t), demoTable(t)} {
		for _, sc := range analysis.Scalings {
			o := other(t, tab, true, sc, 3)
			o.Flip(0)
			o.Flip(2)
			rs := reviewChecks(t, tab, o.LoadingsCSV(",", dimName), o.ScoresCSV(true, fixture.Identity(len(o.IDs))), o.PercentCSV(3, 0), sc)
			// Unscaled, both tables weigh their variables by their units
			// (variance ratios 366 and 1.6 million): a correct PCA, and
			// the wrong analysis, which the review must say.
			if r := rs["review-preprocessing"]; sc == analysis.ScaleNone {
				if r.Status != Warn || !strings.Contains(r.Message, "computed correctly (their loadings match the centred, no scaling recomputation), but without scaling") {
					t.Errorf("%s unscaled: review-preprocessing %s: %s", tab.File, r.Status, r.Message)
				}
				delete(rs, "review-preprocessing")
			}
			for id, r := range rs {
				if r.Status != Pass {
					t.Errorf("%s %s: %s is %s: %s", tab.File, sc, id, r.Status, r.Message)
				}
			}
			if got := rs["review-scaling"].Value; got != analysis.ScalingName(sc) {
				t.Errorf("%s %s: scaling found %v", tab.File, sc, got)
			}
			if !strings.Contains(rs["review-subspace"].Message, "sign reversed") {
				t.Errorf("%s %s: sign flips not reported: %s", tab.File, sc, rs["review-subspace"].Message)
			}
		}
	}
}

// Acceptance 2: loadings and scores from uncentred data fail
// review-centering with the plain message, on USArrests and the demo.
func TestReviewCenteringFailsOnUncentredData(t *testing.T) {
	for _, tab := range []*intake.Table{usarrestsTable(t), demoTable(t)} {
		o := other(t, tab, false, analysis.ScaleUnit, 2)
		rs := reviewChecks(t, tab, o.LoadingsCSV(",", dimName), o.ScoresCSV(true, fixture.Identity(len(o.IDs))), "", analysis.ScaleUnit)
		r := rs["review-centering"]
		if r.Status != Fail || !strings.Contains(r.Message, "not mean-centred before the decomposition") || !strings.Contains(r.Message, "chases") && !strings.Contains(r.Message, "towards the mean") {
			t.Errorf("%s: %s %s", tab.File, r.Status, r.Message)
		}
		// Loadings alone are enough to tell.
		rs = reviewChecks(t, tab, o.LoadingsCSV(",", dimName), "", "", "")
		if rs["review-centering"].Status != Fail {
			t.Errorf("%s, loadings only: %s", tab.File, rs["review-centering"].Status)
		}
	}
}

// Acceptance 4: two components swapped warn review-order; scores from a
// different row order without ids fail review-scores.
func TestReviewOrderAndScoreRows(t *testing.T) {
	tab := usarrestsTable(t)
	o := other(t, tab, true, analysis.ScaleUnit, 3)
	o.Swap(0, 1)
	rs := reviewChecks(t, tab, o.LoadingsCSV(",", dimName), "", "", "")
	if r := rs["review-order"]; r.Status != Warn || !strings.Contains(r.Message, "Dim.2 carries more variance than Dim.1") {
		t.Errorf("swapped: %s %s", r.Status, r.Message)
	}
	if rs["review-subspace"].Status != Pass {
		t.Errorf("swapping keeps the subspace: %s", rs["review-subspace"].Message)
	}
	o = other(t, tab, true, analysis.ScaleUnit, 2)
	order := rand.New(rand.NewPCG(5, 6)).Perm(50)
	rs = reviewChecks(t, tab, o.LoadingsCSV(",", dimName), o.ScoresCSV(false, order), "", "")
	if r := rs["review-scores"]; r.Status != Fail || !strings.Contains(r.Message, "row order") {
		t.Errorf("shuffled without ids: %s %s", r.Status, r.Message)
	}
}

// Acceptance 5: percentages off by 3 points fail review-variance.
func TestReviewVarianceFails(t *testing.T) {
	tab := usarrestsTable(t)
	o := other(t, tab, true, analysis.ScaleUnit, 2)
	rs := reviewChecks(t, tab, o.LoadingsCSV(",", dimName), "", o.PercentCSV(2, 3), "")
	if r := rs["review-variance"]; r.Status != Fail || !strings.Contains(r.Message, "3.0 percentage points") || !strings.Contains(r.Message, "percentages") {
		t.Errorf("%s %s", r.Status, r.Message)
	}
	rs = reviewChecks(t, tab, o.LoadingsCSV(",", dimName), "", o.PercentCSV(2, 1), "")
	if r := rs["review-variance"]; r.Status != Warn {
		t.Errorf("1 point off: %s", r.Status)
	}
}

func TestReviewScalingAndLoadingConventions(t *testing.T) {
	tab := usarrestsTable(t)
	o := other(t, tab, true, analysis.ScaleNone, 2)
	rs := reviewChecks(t, tab, o.LoadingsCSV(",", dimName), "", "", analysis.ScaleUnit)
	if r := rs["review-scaling"]; r.Status != Warn || !strings.Contains(r.Message, "not the stated unit variance") {
		t.Errorf("claimed unit, used none: %s %s", r.Status, r.Message)
	}
	// Loadings scaled by the components' standard deviations: orthogonal,
	// not unit length, a convention to state.
	o = other(t, tab, true, analysis.ScaleUnit, 2)
	for a := 0; a < 2; a++ {
		s := math.Sqrt(o.Eig[a])
		for _, row := range o.Loadings {
			row[a] *= s
		}
	}
	rs = reviewChecks(t, tab, o.LoadingsCSV(",", dimName), "", "", "")
	if r := rs["review-orthonormality"]; r.Status != Warn || !strings.Contains(r.Message, "standard deviations") {
		t.Errorf("sd-scaled loadings: %s %s", r.Status, r.Message)
	}
	if rs["review-subspace"].Status != Pass {
		t.Errorf("scaled loadings span the same subspace: %s", rs["review-subspace"].Message)
	}
}

// Loadings that are zero, or denormal like 5e-324, fail the orthonormality
// finding whatever their printed precision ("0" has no decimals, which
// alone would allow an error of 2√p · 0.5); the review order does not call
// a zero column our first component; correct loadings printed with an
// exponent pass, their decimals counted through the exponent.
func TestReviewOrthonormalityOfDegenerateLoadings(t *testing.T) {
	tab := usarrestsTable(t)
	rows := func(cells [4][2]string) string {
		var b strings.Builder
		b.WriteString(",PC1,PC2\n")
		for j, v := range []string{"Murder", "Assault", "UrbanPop", "Rape"} {
			fmt.Fprintf(&b, "%s,%s,%s\n", v, cells[j][0], cells[j][1])
		}
		return b.String()
	}
	all := func(c string) [4][2]string { return [4][2]string{{c, c}, {c, c}, {c, c}, {c, c}} }
	// prcomp(USArrests, scale. = TRUE)$rotation[, 1:2], R 4.3 (from memory,
	// and reproduced by the recomputation in this test), printed in
	// scientific notation with 4 significant digits.
	exp := [4][2]string{{"-5.359e-01", "4.182e-01"}, {"-5.832e-01", "1.880e-01"}, {"-2.782e-01", "-8.728e-01"}, {"-5.434e-01", "-1.673e-01"}}
	cases := []struct {
		name     string
		loadings string
		want     Status
		message  string
	}{
		{"zeros", rows(all("0")), Fail, "are zero or vanishingly small"},
		{"zeros with decimals", rows(all("0.000")), Fail, "are zero or vanishingly small"},
		{"denormal", rows(all("5e-324")), Fail, "are zero or vanishingly small"},
		{"one zero column", rows([4][2]string{{"-0.536", "0"}, {"-0.583", "0"}, {"-0.278", "0"}, {"-0.543", "0"}}), Fail, "of PC2 are zero"},
		{"exponent notation", rows(exp), Pass, "for 4 decimals"},
	}
	for _, c := range cases {
		r := reviewChecks(t, tab, c.loadings, "", "", "")
		got := r["review-orthonormality"]
		if got.Status != c.want || !strings.Contains(got.Message, c.message) {
			t.Errorf("%s: %s %q, want %s with %q", c.name, got.Status, got.Message, c.want, c.message)
		}
		if c.want == Fail && strings.Contains(r["review-order"].Message, "PC2 is the recomputed PC1") {
			t.Errorf("%s: a zero column is matched to our PC1: %s", c.name, r["review-order"].Message)
		}
	}
}

// Score columns permuted against the loadings under the loadings' names are
// diagnosed as permuted (warn), not as scores from other data; columns only
// listed in another order under their own names pass; correct columns stay
// a pass. The files are R 4.2.2's own (testdata/review/generate.R).
func TestReviewScoreColumnsPermuted(t *testing.T) {
	tab := usarrestsTable(t)
	read := func(name string) string {
		b, err := os.ReadFile(filepath.Join("..", "testdata", "review", name))
		if err != nil {
			t.Fatal(err)
		}
		return string(b)
	}
	cases := []struct {
		loadings, scores string
		want             Status
		message          []string
	}{
		{"r-loadings-3.csv", "r-scores-permuted.csv", Warn, []string{
			`score column "PC1" holds the scores on "PC2"`, `"PC2" holds the scores on "PC3"`, `"PC3" holds the scores on "PC1"`, "permuted against the loadings"}},
		{"r-loadings.csv", "r-scores-reordered.csv", Pass, []string{`only listed in another order, "PC2", "PC1"`}},
		{"r-loadings.csv", "r-scores.csv", Pass, []string{"equal the centred, unit variance data projected"}},
	}
	for _, c := range cases {
		r := reviewChecks(t, tab, read(c.loadings), read(c.scores), "", "")["review-scores"]
		if r.Status != c.want {
			t.Errorf("%s: %s: %s", c.scores, r.Status, r.Message)
		}
		for _, m := range c.message {
			if !strings.Contains(r.Message, m) {
				t.Errorf("%s: message lacks %q: %s", c.scores, m, r.Message)
			}
		}
	}
	// Two columns swapped in a fixture of another person's tables (no
	// names to go by): a warning naming both.
	o := other(t, tab, true, analysis.ScaleUnit, 3)
	scores := o.ScoresCSV(true, fixture.Identity(50))
	lines := strings.Split(strings.TrimSpace(scores), "\n")
	for i, line := range lines {
		f := strings.Split(line, ",")
		if i > 0 {
			f[1], f[2] = f[2], f[1]
		}
		lines[i] = strings.Join(f, ",")
	}
	r := reviewChecks(t, tab, o.LoadingsCSV(",", dimName), strings.Join(lines, "\n")+"\n", "", "")["review-scores"]
	if r.Status != Warn || !strings.Contains(r.Message, "permuted") {
		t.Errorf("swapped fixture columns: %s %s", r.Status, r.Message)
	}
}
