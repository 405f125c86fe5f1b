package report

import (
	"bytes"
	"fmt"
	"os"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/checks"
	"pcqc/demo"
)

func rect(x0, y0, x1, y1 float64) vg.Rectangle {
	return vg.Rectangle{Min: vg.Point{X: vg.Length(x0), Y: vg.Length(y0)}, Max: vg.Point{X: vg.Length(x1), Y: vg.Length(y1)}}
}

// The checker the acceptance test relies on must catch each kind of fault.
func TestLayoutProblems(t *testing.T) {
	canvas := rect(0, 0, 400, 300)
	tests := []struct {
		name string
		lay  figLayout
		want []string // substrings of the problems, in order; none for a clean layout
	}{
		{"clean", figLayout{Canvas: canvas,
			Labels: []layoutLabel{{"a", rect(10, 10, 40, 20)}, {"b", rect(40, 10, 70, 20)}}, // touching is not overlapping
			Tips:   []vg.Rectangle{rect(80, 10, 85, 15)},
			Points: []layoutPoint{{vg.Point{X: 200, Y: 200}, 2}},
			Legend: rect(300, 250, 390, 290)}, nil},
		{"two labels overlap", figLayout{Canvas: canvas,
			Labels: []layoutLabel{{"a", rect(10, 10, 40, 20)}, {"b", rect(39, 19, 70, 30)}}}, []string{`labels "a" and "b" overlap`}},
		{"label on an arrow tip", figLayout{Canvas: canvas,
			Labels: []layoutLabel{{"mean_area", rect(10, 10, 60, 20)}},
			Tips:   []vg.Rectangle{rect(55, 5, 62, 12)}}, []string{`label "mean_area" covers an arrow tip`}},
		{"label off the figure", figLayout{Canvas: canvas,
			Labels: []layoutLabel{{"Q 99 %", rect(380, 100, 410, 110)}}}, []string{`label "Q 99 %" leaves the figure`}},
		{"legend over a point", figLayout{Canvas: canvas,
			Points: []layoutPoint{{vg.Point{X: 100, Y: 100}, 2}, {vg.Point{X: 301, Y: 251}, 2.6}},
			Legend: rect(300, 250, 390, 290)}, []string{"the legend covers the data point at (301.0, 251.0)"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := tt.lay.problems()
			if len(got) != len(tt.want) {
				t.Fatalf("problems %q, want %d like %q", got, len(tt.want), tt.want)
			}
			for i := range got {
				if !strings.Contains(got[i], tt.want[i]) {
					t.Errorf("problem %q, want %q", got[i], tt.want[i])
				}
			}
		})
	}
}

// A crowd of flagged points at one place, limit lines at the very edge of
// the data and two limits almost on one another: the labeller names what
// it has room for, no two names meet, every limit line is named inside the
// figure, and the caption counts the names drawn.
func TestLabellerInACrowd(t *testing.T) {
	const n = 40
	x, y := make([]float64, n), make([]float64, n)
	ids := make([]string, n)
	flagged := make([]int, n)
	for i := range x {
		x[i], y[i] = 10+0.01*float64(i%7), 20+0.01*float64(i/7)
		ids[i] = fmt.Sprintf("long-sample-identifier-%02d", i)
		flagged[i] = i
	}
	x[0], y[0] = 30, 40 // the corner of the data: the last tick of both axes
	lim := analysis.Limits{T2_95: 30, T2_99: 30, Q95: 40, Q99: 39.9, QMethod: analysis.QJacksonMudholkar}
	d := t2qDrawing("crowd", x, y, lim, flagged, ids)
	d.w, d.h = 9*vg.Centimeter, 6*vg.Centimeter // small, so that room runs out
	if err := d.draw(nullCanvas{d.w, d.h}); err != nil {
		t.Fatal(err)
	}
	lay := d.ann.lay
	if p := lay.problems(); len(p) > 0 {
		t.Errorf("layout problems: %q", p)
	}
	texts := map[string]bool{}
	for _, l := range lay.Labels {
		texts[l.Text] = true
	}
	for _, want := range []string{"T² 95 %", "T² 99 %", "Q 95 %", "Q 99 %"} {
		if !texts[want] {
			t.Errorf("limit line %q is not named", want)
		}
	}
	named := d.ann.placed
	if named == 0 || named >= labelledSamples {
		t.Errorf("%d names drawn; a crowd of %d should leave room for some but not all %d", named, n, labelledSamples)
	}
	for i := 0; i < named; i++ {
		if !texts[ids[i]] {
			t.Errorf("%s, the %d-th most extreme, is not among the names drawn", ids[i], i+1)
		}
	}
	want := fmt.Sprintf("The %d most extreme of the %d samples beyond a 99 %% limit are named.", named, n)
	if note := d.ann.note(named); !strings.Contains(note, want) {
		t.Errorf("caption note %q, want %q", note, want)
	}
}

func TestNamedNote(t *testing.T) {
	tests := []struct {
		named, total int
		want         string
	}{
		{0, 0, "No sample is beyond X, so none is named."},
		{1, 1, "The one sample beyond X is named."},
		{4, 4, "The 4 samples beyond X are named."},
		{1, 39, "The most extreme of the 39 samples beyond X is named."},
		{15, 39, "The 15 most extreme of the 39 samples beyond X are named."},
		{0, 3, "3 samples are beyond X: the figure has no room to name them."},
	}
	for _, tt := range tests {
		if got := namedNote(tt.named, tt.total, "beyond X"); got != tt.want {
			t.Errorf("namedNote(%d, %d) = %q, want %q", tt.named, tt.total, got, tt.want)
		}
	}
}

// Groups differ in colour and shape together, and the first eight in
// shape alone, so that no figure relies on colour; every mark is filled.
func TestGroupStylesDiffer(t *testing.T) {
	seen, shapes := map[string]int{}, map[string]int{}
	for g := 0; g < maxColouredGroups; g++ {
		s := groupStyle(g)
		shape := fmt.Sprintf("%#v", s.Shape)
		k := fmt.Sprintf("%v %s", s.Color, shape)
		if h, ok := seen[k]; ok {
			t.Errorf("groups %d and %d are drawn alike (%s)", h, g, k)
		}
		seen[k] = g
		if h, ok := shapes[shape]; ok && g < 8 {
			t.Errorf("groups %d and %d have one shape (%s)", h, g, shape)
		}
		shapes[shape] = g
		switch s.Shape.(type) {
		case draw.RingGlyph, draw.SquareGlyph, draw.TriangleGlyph, draw.CrossGlyph, draw.PlusGlyph:
			t.Errorf("group %d is drawn hollow (%s)", g, shape)
		}
	}
}

// checkLayouts draws every figure of a report as the report does and
// checks the layout of each that carries labels; it returns the figures by
// stem, drawn.
func checkLayouts(t *testing.T, name string, jobs []figureJob) map[string]drawing {
	t.Helper()
	out := map[string]drawing{}
	for i, job := range jobs {
		if job.fig.Omitted != "" {
			t.Errorf("%s: %s omitted: %s", name, job.fig.Stem, job.fig.Omitted)
			continue
		}
		d, err := job.build(i)
		if err == nil {
			err = d.draw(nullCanvas{d.w, d.h})
		}
		if err != nil {
			t.Errorf("%s: %s: %v", name, job.fig.Stem, err)
			continue
		}
		out[job.fig.Stem] = d
		if d.ann == nil {
			continue
		}
		lay := d.ann.lay
		for _, p := range lay.problems() {
			t.Errorf("%s, figure %s: %s", name, job.fig.Stem, p)
		}
		texts := map[string]bool{}
		for _, l := range lay.Labels {
			texts[l.Text] = true
		}
		for _, r := range d.ann.refs {
			if !texts[r.text] {
				t.Errorf("%s, figure %s: the limit line %q is not named", name, job.fig.Stem, r.text)
			}
		}
		if d.ann.note != nil && !strings.Contains(job.fig.Caption, d.ann.note(d.ann.placed)) {
			t.Errorf("%s, figure %s: the caption %q does not say what the figure names", name, job.fig.Stem, job.fig.Caption)
		}
	}
	return out
}

// Acceptance: the demo (audit and later batch) and the 30-variable breast
// cancer table, drawn as the report draws them: no two labels meet, no
// label covers an arrow tip, no legend covers a data point, every limit
// line is named, and the captions count the names.
func TestFigureLayoutsOnOpenData(t *testing.T) {
	res, results := demoAudit(t, 50)
	doc := BuildDocument(Audit{Result: res, Checks: results}, testMeta, ReportOptions{Date: "2026-01-02"})
	demoFigs := checkLayouts(t, "demo", doc.figures)
	if d, ok := demoFigs["t2-q"]; !ok || d.ann.placed == 0 {
		t.Errorf("the demo's T²–Q plot names no sample")
	}

	later, err := intake.ReadTableFrom("later.csv", bytes.NewReader(demo.LaterBatch()), intake.ReadOptions{IDColumn: demo.SampleID, GroupColumn: demo.Station})
	if err != nil {
		t.Fatal(err)
	}
	app := analysis.Apply(analysis.NewModel(res, "test"), later)
	run := ApplyRun{App: app, Checks: checks.RunAll(checks.Input{Apply: app}), TrainingScores: res.Scores}
	applyDoc := BuildApplyDocument(run, testMeta, ReportOptions{Date: "2026-01-02"})
	laterFigs := checkLayouts(t, "demo later batch", applyDoc.figures)
	if d := laterFigs["new-t2-q"]; d.ann == nil || len(app.Flagged) <= labelledSamples || d.ann.placed == 0 {
		t.Errorf("the later batch should flag more samples than a figure names (%d flagged)", len(app.Flagged))
	} else if want := fmt.Sprintf("most extreme of the %d samples", len(app.Flagged)); !strings.Contains(applyDoc.T2QFig.Caption, want) {
		t.Errorf("apply T²–Q caption %q lacks %q", applyDoc.T2QFig.Caption, want)
	}

	// Breast cancer: Street, Wolberg & Mangasarian (1993), via scikit-learn
	// (testdata/datasets/README.md); 30 variables, all of them arrows.
	f, err := os.Open("../testdata/datasets/breast_cancer.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	tab, err := intake.ReadTableFrom("breast_cancer.csv", f, intake.ReadOptions{GroupColumn: "diagnosis"})
	if err != nil {
		t.Fatal(err)
	}
	bres, err := analysis.Analyze(tab, analysis.Options{Scaling: analysis.ScaleUnit, Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 5}, Bootstrap: 30, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	bdoc := BuildDocument(Audit{Result: bres, Checks: checks.RunAll(checks.Input{Run: bres})}, testMeta, ReportOptions{Date: "2026-01-02"})
	bFigs := checkLayouts(t, "breast cancer", bdoc.figures)
	bi, ok := bFigs["biplot"]
	if !ok || bdoc.Scores.Biplot == nil {
		t.Fatalf("breast cancer has no biplot (%d retained, %d variables)", bres.Retained, bres.Decomp.Vars)
	}
	if len(bi.ann.arrows) != 30 {
		t.Errorf("biplot draws %d arrows, want 30", len(bi.ann.arrows))
	}
	named := bi.ann.placed
	if named < 5 || named > biplotLabels {
		t.Errorf("biplot names %d arrows, want between 5 and %d", named, biplotLabels)
	}
	if got := len(bdoc.Scores.Biplot.TableRows); got != 30-named {
		t.Errorf("the biplot's table lists %d variables, want the %d not named", got, 30-named)
	}
	if want := fmt.Sprintf("The %d longest arrows are named; the table below lists the other %d variables", named, 30-named); !strings.Contains(bdoc.Scores.Biplot.Caption, want) {
		t.Errorf("biplot caption %q lacks %q", bdoc.Scores.Biplot.Caption, want)
	}

	// The layout is the same on the image canvas the PNG is drawn on as on
	// the null one the captions are counted on, for a drawing made afresh
	// as saveFigures makes it.
	for i, job := range bdoc.figures {
		if job.fig.Stem != "biplot" {
			continue
		}
		again, err := job.build(i)
		if err != nil {
			t.Fatal(err)
		}
		img := vgimg.NewWith(vgimg.UseWH(again.w, again.h), vgimg.UseDPI(figureDPI))
		if err := again.draw(img); err != nil {
			t.Fatal(err)
		}
		if before, after := fmt.Sprint(bi.ann.lay), fmt.Sprint(again.ann.lay); after != before {
			t.Errorf("the biplot's layout differs between the null canvas and an image:\n%s\n%s", before, after)
		}
	}
}
