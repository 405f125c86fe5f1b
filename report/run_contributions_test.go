package report

import (
	"encoding/csv"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"

	"pcqc/analysis"
	"pcqc/internal/synth"
)

// plantedAudit analyses a clean two-component table of 200 samples and 6
// variables in which the given samples are raised by 8 standard deviations
// in variable v3 (column 2), off the model.
func plantedAudit(t *testing.T, planted ...int) *analysis.Result {
	t.Helper()
	x, _ := synth.LowRank(synth.RNG(41, 3), 200, 6, []float64{3, 2}, 0.4)
	col := mat.Col(nil, 2, x)
	sd := stat.StdDev(col, nil)
	for _, i := range planted {
		x.Set(i, 2, x.At(i, 2)+8*sd)
	}
	return analyze(t, matrixTable("planted.csv", x), analysis.Options{Scaling: analysis.ScaleUnit,
		Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 2}, NoCrossValidation: true})
}

func readCSVFile(t *testing.T, path string) [][]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return rows
}

// Acceptance 5, end to end: contributions.csv of an audit holds every
// variable of every sample beyond a family-wise limit, the planted ones
// among them, and its Q contributions sum to the Q of samples.csv (1e-10)
// and its residuals square to them; a clean table gets the header only.
func TestRunContributionsTable(t *testing.T) {
	for _, tc := range []struct {
		name    string
		planted []int
	}{
		{"two planted", []int{11, 150}},
		{"clean", nil},
	} {
		res := plantedAudit(t, tc.planted...)
		dir := t.TempDir()
		if err := WriteTables(dir, auditOf(res), testMeta); err != nil {
			t.Fatal(err)
		}
		rows := readCSVFile(t, filepath.Join(dir, "contributions.csv"))
		if strings.Join(rows[0], ",") != strings.Join(contributionsHeader, ",") {
			t.Fatalf("%s: header %v", tc.name, rows[0])
		}
		q := map[string]float64{}
		for _, r := range readCSVFile(t, filepath.Join(dir, "samples.csv"))[1:] {
			q[r[0]], _ = strconv.ParseFloat(r[2], 64)
		}
		sums, largest, largestVar := map[string]float64{}, map[string]float64{}, map[string]string{}
		for _, r := range rows[1:] {
			qc, err1 := strconv.ParseFloat(r[3], 64)
			e, err2 := strconv.ParseFloat(r[4], 64)
			if err1 != nil || err2 != nil {
				t.Fatalf("%s: row %v does not parse", tc.name, r)
			}
			if math.Abs(e*e-qc) > 1e-12*math.Max(1, qc) {
				t.Errorf("%s: %s %s residual² %g ≠ Q contribution %g", tc.name, r[0], r[1], e*e, qc)
			}
			sums[r[0]] += qc
			if qc > largest[r[0]] {
				largest[r[0]], largestVar[r[0]] = qc, r[1]
			}
		}
		p := len(res.Table.Variables)
		if len(rows)-1 != len(sums)*p {
			t.Errorf("%s: %d rows for %d samples of %d variables", tc.name, len(rows)-1, len(sums), p)
		}
		for id, s := range sums {
			if math.Abs(s-q[id]) > 1e-10*q[id] {
				t.Errorf("%s: sample %s Q contributions sum to %.15g, samples.csv Q %.15g", tc.name, id, s, q[id])
			}
		}
		for _, i := range tc.planted {
			id := res.Table.IDs[i]
			if _, ok := sums[id]; !ok {
				t.Errorf("%s: planted sample %s not in contributions.csv", tc.name, id)
			} else if largestVar[id] != res.Table.Variables[2] {
				t.Errorf("%s: planted sample %s's largest Q contribution is %s, want %s", tc.name, id, largestVar[id], res.Table.Variables[2])
			}
		}
		if tc.planted == nil && len(rows) != 1 {
			t.Errorf("clean table: %d contribution rows (samples %v), want none", len(rows)-1, sums)
		}
	}
}

// The Outliers section shows a contribution and a residual figure for each
// of the most extreme flagged samples, says how many of how many, and cites
// Westerhuis, Gurden & Smilde (2000).
func TestRunReportContributionFigures(t *testing.T) {
	for _, tc := range []struct {
		planted   []int
		figures   int
		shownText string
	}{
		{nil, 0, ""},
		{[]int{5}, 2, "only flagged sample"},
		{[]int{5, 60, 120, 190}, 6, "3 most extreme of the 4 flagged samples"},
	} {
		res := plantedAudit(t, tc.planted...)
		d := BuildDocument(auditOf(res), testMeta, ReportOptions{Date: "2026-01-02"})
		o := d.Outliers
		if len(o.Contributions) != tc.figures {
			t.Errorf("planted %v: %d contribution figures, want %d", tc.planted, len(o.Contributions), tc.figures)
			continue
		}
		if tc.figures == 0 {
			if o.ContributionsNote != "" {
				t.Errorf("clean table: note %q", o.ContributionsNote)
			}
			continue
		}
		if !strings.Contains(o.ContributionsNote, tc.shownText) || !strings.Contains(o.ContributionsNote, "Westerhuis, Gurden & Smilde 2000") {
			t.Errorf("planted %v: note %q lacks %q or the citation", tc.planted, o.ContributionsNote, tc.shownText)
		}
		planted := map[string]bool{}
		for _, i := range tc.planted {
			planted[res.Table.IDs[i]] = true
		}
		for f := 0; f < len(o.Contributions); f += 2 {
			c, r := o.Contributions[f], o.Contributions[f+1]
			id := strings.TrimPrefix(c.Alt, "Contributions of ")
			if !planted[id] || r.Alt != "Signed residuals of "+id {
				t.Errorf("planted %v: figures %q and %q are not of one planted sample", tc.planted, c.Alt, r.Alt)
			}
			_, qList, _ := strings.Cut(c.Caption, "; to Q, ")
			if !strings.Contains(", "+strings.TrimSuffix(qList, ".")+",", ", "+res.Table.Variables[2]+",") {
				t.Errorf("planted %v: caption %q does not name the planted variable beyond its Q contribution limit", tc.planted, c.Caption)
			}
		}
		md := renderAudit(t, auditOf(res))
		if !strings.Contains(md, "figures/contributions-1.png") || !strings.Contains(md, "Westerhuis, J. A., Gurden, S. P. & Smilde, A. K. (2000)") {
			t.Errorf("planted %v: the rendered report lacks the figure or the reference", tc.planted)
		}
	}
}

func TestShownText(t *testing.T) {
	for _, tc := range []struct {
		shown, flagged int
		want           string
	}{
		{1, 1, "only flagged sample"},
		{2, 2, "all 2 flagged samples"},
		{3, 7, "3 most extreme of the 7 flagged samples"},
	} {
		if got := shownText(tc.shown, tc.flagged); got != tc.want {
			t.Errorf("shownText(%d, %d) = %q, want %q", tc.shown, tc.flagged, got, tc.want)
		}
	}
}
