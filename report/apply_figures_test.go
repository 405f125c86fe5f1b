package report

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/checks"
	"pcqc/internal/synth"
)

// plantedApplication fits a two-component model to a clean low-rank table
// and applies it to a fresh batch from the same law in which sample 0 is
// raised by 6 training sd in v3 and sample 1 lowered by 6 in v5.
func plantedApplication(t *testing.T) *analysis.Application {
	t.Helper()
	x, _ := synth.LowRank(synth.RNG(31, 7), 200, 6, []float64{3, 2}, 0.4)
	res, err := analysis.Analyze(intake.TableFromMatrix("train", x, nil, nil), analysis.Options{Scaling: analysis.ScaleUnit, Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 2}})
	if err != nil {
		t.Fatal(err)
	}
	fresh, _ := synth.LowRank(synth.RNG(31, 8), 30, 6, []float64{3, 2}, 0.4)
	newX := mat.DenseCopyOf(fresh)
	newX.Set(0, 2, newX.At(0, 2)+6*res.Prep.SDs[2])
	newX.Set(1, 4, newX.At(1, 4)-6*res.Prep.SDs[4])
	return analysis.Apply(analysis.NewModel(res, "test"), intake.TableFromMatrix("new", newX, nil, nil))
}

// The residual figure of a flagged sample puts the planted variable at the
// top, with the planted sign, and its bars are the sample's residuals.
func TestResidualFigureShowsThePlantedVariable(t *testing.T) {
	app := plantedApplication(t)
	planted := map[int]struct {
		variable int
		sign     float64
	}{0: {2, +1}, 1: {4, -1}}
	found := 0
	for _, c := range app.Contributions {
		want, ok := planted[c.Sample]
		if !ok {
			continue
		}
		found++
		values, names, finite, left := residualRows(app.Model.Variables, c.Residual)
		if len(values) != 6 || finite != 6 || left != 0 {
			t.Fatalf("sample %d: %d bars of %d finite, %d left out; want one per variable (6)", c.Sample, len(values), finite, left)
		}
		if top, name := names[len(names)-1], app.Model.Variables[want.variable]; top != name {
			t.Errorf("sample %d: the top bar is %s, want the planted %s", c.Sample, top, name)
		}
		if got := values[len(values)-1]; got*want.sign < 3 || got != c.Residual[want.variable] {
			t.Errorf("sample %d: top bar %g, residual %g, planted sign %+g", c.Sample, got, c.Residual[want.variable], want.sign)
		}
		sum := 0.0
		for _, v := range values {
			sum += v * v
		}
		if math.Abs(sum-app.Q[c.Sample]) > 1e-9*app.Q[c.Sample] {
			t.Errorf("sample %d: squared bars sum to %g, Q is %g", c.Sample, sum, app.Q[c.Sample])
		}
		if dr := residualFigure(app, c); !strings.Contains(dr.plot.Title.Text, app.Table.IDs[c.Sample]) {
			t.Errorf("sample %d: title %q does not name it", c.Sample, dr.plot.Title.Text)
		}
	}
	if found != 2 {
		t.Fatalf("%d of the 2 planted samples flagged", found)
	}
}

// The apply report pairs each of the worst samples' contribution figure
// with its residual figure, and each residual caption says which of how
// many flagged samples it is.
func TestApplyReportHasResidualFigures(t *testing.T) {
	app := plantedApplication(t)
	app.Table.SHA256 = strings.Repeat("0", 64) // a table made in memory has no file to hash
	run := ApplyRun{App: app, Checks: checks.RunAll(checks.Input{Apply: app})}
	d := BuildApplyDocument(run, Meta{Version: "test", Command: []string{"pcqc", "apply"}}, ReportOptions{Date: "2024-01-01"})
	shown := min(contributionFigures, len(app.Flagged))
	if len(d.Contributions) != 2*shown {
		t.Fatalf("%d figures, want %d pairs", len(d.Contributions), shown)
	}
	for k := 0; k < shown; k++ {
		contrib, resid := d.Contributions[2*k], d.Contributions[2*k+1]
		id := app.Table.IDs[app.Contributions[k].Sample]
		if contrib.Stem != fmt.Sprintf("contributions-%d", k+1) || resid.Stem != fmt.Sprintf("residuals-%d", k+1) {
			t.Errorf("pair %d: stems %s, %s", k+1, contrib.Stem, resid.Stem)
		}
		if resid.Omitted != "" || !strings.Contains(resid.Caption, "sample "+id+":") {
			t.Errorf("pair %d: residual figure %q / %q", k+1, resid.Omitted, resid.Caption)
		}
		if want := fmt.Sprintf("of the %d samples beyond a 99 %% limit", len(app.Flagged)); len(app.Flagged) > 1 && !strings.Contains(resid.Caption, want) {
			t.Errorf("pair %d: caption %q lacks %q", k+1, resid.Caption, want)
		}
	}
}

func TestResidualCaption(t *testing.T) {
	head := "Signed residuals of sample S9: in each variable, its value less what the model's components reconstruct, in "
	mid := "; a bar to the right means the sample is higher than the model expects. The squares of the bars sum to its Q residual. "
	cases := []struct {
		rank, shown, flagged int
		scaling              analysis.Scaling
		want                 string
	}{
		{1, 3, 39, analysis.ScaleUnit, head + "training standard deviations" + mid + "It is the most extreme of the 39 samples beyond a 99 % limit; residuals are drawn for the 3 most extreme of them."},
		{2, 3, 39, analysis.ScalePareto, head + "preprocessed units" + mid + "It is the 2nd most extreme of the 39 samples beyond a 99 % limit; residuals are drawn for the 3 most extreme of them."},
		{2, 2, 2, analysis.ScaleUnit, head + "training standard deviations" + mid + "It is the 2nd most extreme of the 2 samples beyond a 99 % limit; residuals are drawn for all 2."},
		{1, 1, 1, analysis.ScaleNone, head + "preprocessed units" + mid + "It is the only sample beyond a 99 % limit."},
	}
	for _, c := range cases {
		if got := residualCaption("S9", c.rank, c.shown, c.flagged, c.scaling); got != c.want {
			t.Errorf("rank %d of %d shown, %d flagged:\n got %s\nwant %s", c.rank, c.shown, c.flagged, got, c.want)
		}
	}
	for n, want := range map[int]string{1: "1st", 2: "2nd", 3: "3rd", 4: "4th", 11: "11th", 12: "12th", 13: "13th", 21: "21st", 112: "112th"} {
		if got := ordinal(n); got != want {
			t.Errorf("ordinal(%d) = %s, want %s", n, got, want)
		}
	}
}
