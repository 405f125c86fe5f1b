package report

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg/draw"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/checks"
	"pcqc/internal/synth"
)

var allFormats = Formats{Markdown: true, PDF: true, HTML: true}

// smallAudit analyses a small synthetic table with the bootstrap on.
func smallAudit(t *testing.T) (*analysis.Result, []checks.Result) {
	t.Helper()
	x, _ := synth.LowRank(synth.RNG(4, 90), 40, 5, []float64{3, 2, 1}, 0.5)
	res, err := analysis.Analyze(intake.TableFromMatrix("small.csv", x, nil, nil),
		analysis.Options{Scaling: analysis.ScaleUnit, Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 3}, Bootstrap: 30, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	res.Table.SHA256 = strings.Repeat("ab", 32)
	return res, checks.RunAll(checks.Input{Run: res})
}

var (
	nan = math.NaN()
	inf = math.Inf(1)
)

// summary.json never meets NaN or infinity: such values are written as
// null, the rest as before, and the file stays valid JSON.
func TestSummaryWritesNonFiniteAsNull(t *testing.T) {
	res, results := smallAudit(t)
	res.Decomp.Eigenvalues[2] = nan
	res.Samples.Limits.Q95 = inf
	res.Stability.Components[0].CongruenceP5 = nan
	res.Stability.Eigenvalues[1].High = -inf
	results[0].Value = nan
	results[1].Limit = map[string]float64{"limit_95": inf, "limit_99": 2}
	meta := testMeta
	meta.Options = Options{{Name: "ratio", Value: nan}, {Name: "scale", Value: "unit"}}
	dir := t.TempDir()
	if err := WriteTables(dir, Audit{Result: res, Checks: results}, meta); err != nil {
		t.Fatalf("WriteTables: %v", err)
	}
	b, err := os.ReadFile(filepath.Join(dir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	var s struct {
		Options    map[string]any `json:"options"`
		Components struct {
			Eigenvalues []*float64 `json:"eigenvalues"`
			Percent     []*float64 `json:"percent"`
		} `json:"components"`
		Limits struct {
			Q95 *float64 `json:"q_95"`
			Q99 *float64 `json:"q_99"`
		} `json:"limits"`
		Stability struct {
			Components  []map[string]any `json:"components"`
			Eigenvalues []map[string]any `json:"eigenvalues"`
		} `json:"stability"`
		Checks []map[string]any `json:"checks"`
	}
	if err := json.Unmarshal(b, &s); err != nil {
		t.Fatalf("summary.json: %v", err)
	}
	nulls := map[string]bool{
		"eigenvalue 3":       s.Components.Eigenvalues[2] == nil,
		"eigenvalue 1 kept":  s.Components.Eigenvalues[0] != nil,
		"q_95":               s.Limits.Q95 == nil,
		"q_99 kept":          s.Limits.Q99 != nil,
		"congruence_p5":      s.Stability.Components[0]["congruence_p5"] == nil,
		"ci_high":            s.Stability.Eigenvalues[1]["ci_high"] == nil,
		"check value":        s.Checks[0]["value"] == nil,
		"check limit map":    s.Checks[1]["limit"].(map[string]any)["limit_95"] == nil,
		"check limit kept":   s.Checks[1]["limit"].(map[string]any)["limit_99"] == 2.0,
		"option":             s.Options["ratio"] == nil,
		"other option kept:": s.Options["scale"] == "unit",
	}
	for what, ok := range nulls {
		if !ok {
			t.Errorf("%s: wrong in %s", what, b)
		}
	}
	// The CSV tables leave such cells empty rather than writing NaN.
	variance, _ := os.ReadFile(filepath.Join(dir, "variance.csv"))
	if strings.Contains(strings.ToLower(string(variance)), "nan") {
		t.Errorf("variance.csv holds NaN:\n%s", variance)
	}
}

// Figures drop the points that are not finite numbers and say how many in
// their captions; a figure with nothing left to draw is left out with a
// sentence; the report is written either way.
func TestFiguresWithNonFiniteValues(t *testing.T) {
	skipRenderingWhenShort(t)
	cases := []struct {
		name    string
		poison  func(res *analysis.Result)
		caption map[string]string // figure stem → what its caption must say
		omitted []string          // stems of figures left out
		formats Formats
	}{
		{"some points", func(res *analysis.Result) {
			res.Scores.Set(0, 0, nan)
			res.Scores.Set(1, 1, inf)
			res.Samples.T2[2] = inf
			res.Samples.Q[3] = nan
			res.Decomp.Loadings.Set(1, 0, nan)
			res.Stability.Congruence[0][0] = nan
			res.Stability.Eigenvalues[1].Low = -inf
		}, map[string]string{
			"scores-pc1-pc2":        "2 samples left out",
			"scores-pc2-pc3":        "1 sample left out: its value is not a finite number.",
			"t2-q":                  "2 samples left out",
			"loadings-pc1":          "1 variable left out",
			"stability-congruence":  "1 resample value left out",
			"stability-eigenvalues": "1 component left out",
			"biplot":                "left out",
		}, nil, allFormats},
		{"nothing finite", func(res *analysis.Result) {
			for i := range res.Samples.T2 {
				res.Samples.T2[i], res.Samples.Q[i] = nan, inf
			}
			res.Samples.Limits.T2_95, res.Samples.Limits.T2_99 = nan, nan
			res.Samples.Limits.Q95, res.Samples.Limits.Q99 = inf, nan
			for a := range res.Stability.Congruence {
				for i := range res.Stability.Congruence[a] {
					res.Stability.Congruence[a][i] = nan
				}
			}
		}, nil, []string{"t2-q"}, Formats{Markdown: true}},
		{"limits only", func(res *analysis.Result) {
			res.Samples.Limits.T2_95, res.Samples.Limits.T2_99 = inf, nan
			res.Samples.Limits.Q95, res.Samples.Limits.Q99 = nan, -inf
		}, map[string]string{"t2-q": "99 % (solid) limits. Hollow grey rings"}, nil, Formats{Markdown: true}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			res, results := smallAudit(t)
			c.poison(res)
			d := BuildDocument(Audit{Result: res, Checks: results}, testMeta, ReportOptions{Date: "2026-01-02"})
			figures := map[string]Figure{}
			for _, job := range d.figures {
				figures[job.fig.Stem] = *job.fig
			}
			for stem, want := range c.caption {
				f := figures[stem]
				if f.Omitted != "" || !strings.Contains(f.Caption, want) || !strings.Contains(want, "left out") && strings.Contains(f.Caption, "left out") {
					t.Errorf("%s: caption %q, omitted %q; want %q", stem, f.Caption, f.Omitted, want)
				}
			}
			for _, stem := range c.omitted {
				if figures[stem].Omitted == "" {
					t.Errorf("%s drawn with nothing to draw", stem)
				}
			}
			dir := t.TempDir()
			if err := WriteReport(dir, Audit{Result: res, Checks: results}, testMeta, ReportOptions{Date: "2026-01-02"}, c.formats); err != nil {
				t.Fatalf("WriteReport: %v", err)
			}
			md, _ := os.ReadFile(filepath.Join(dir, "report.md"))
			for _, stem := range c.omitted {
				if _, err := os.Stat(filepath.Join(dir, "figures", stem+".png")); err == nil {
					t.Errorf("%s.png written for a figure left out", stem)
				}
				if strings.Contains(string(md), stem+".png") || !strings.Contains(string(md), "is left out: its values are not finite numbers") {
					t.Errorf("report.md does not say %s is left out", stem)
				}
			}
			for _, bad := range []string{"NaN", "+Inf"} {
				if strings.Contains(string(md), bad) {
					t.Errorf("report.md shows %s", bad)
				}
			}
		})
	}
}

// gonum/plot is never handed a range it cannot draw: axes of no finite
// width are refused before drawing, and a panic inside the library becomes
// an error.
func TestDrawRefusesUndrawableRanges(t *testing.T) {
	for _, r := range [][2]float64{{nan, 1}, {0, inf}, {-1e308, 1e308}, {inf, -inf}} {
		p := newPlot("x", "x", "y")
		p.X.Min, p.X.Max = r[0], r[1]
		d := drawing{plot: p, w: figWidth, h: figHeight}
		if err := d.draw(nullCanvas{d.w, d.h}); err == nil {
			t.Errorf("range %v drawn", r)
		}
	}
	p := newPlot("x", "x", "y")
	p.Add(panicky{})
	d := drawing{plot: p, w: figWidth, h: figHeight}
	if err := d.draw(nullCanvas{d.w, d.h}); err == nil || !strings.Contains(err.Error(), "plotting library failed") {
		t.Errorf("a panic while drawing: %v", err)
	}
}

type panicky struct{}

func (panicky) Plot(draw.Canvas, *plot.Plot) { panic("boom") }
func (panicky) DataRange() (float64, float64, float64, float64) {
	return 0, 1, 0, 1
}

// An application whose values slipped past CheckNewValues (T² infinite)
// still writes its tables, summary and report.
func TestApplyWithNonFiniteStatistics(t *testing.T) {
	x, _ := synth.LowRank(synth.RNG(5, 91), 50, 4, []float64{2, 1}, 0.5)
	res, err := analysis.Analyze(intake.TableFromMatrix("train.csv", mat.DenseCopyOf(x), nil, nil),
		analysis.Options{Scaling: analysis.ScaleUnit, Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 2}})
	if err != nil {
		t.Fatal(err)
	}
	res.Table.SHA256 = strings.Repeat("cd", 32)
	newX := mat.DenseCopyOf(x.Slice(0, 6, 0, 4))
	newX.Set(2, 1, 1e200)
	tab := intake.TableFromMatrix("new.csv", newX, nil, nil)
	tab.SHA256 = strings.Repeat("ef", 32)
	app := analysis.Apply(analysis.NewModel(res, "test"), tab)
	if !math.IsInf(app.T2[2], 0) && !math.IsNaN(app.T2[2]) {
		t.Fatalf("T² %g: the test needs it not finite", app.T2[2])
	}
	run := ApplyRun{App: app, Checks: checks.RunAll(checks.Input{Apply: app})}
	dir := t.TempDir()
	if err := WriteApplyTables(dir, run, testMeta); err != nil {
		t.Fatalf("WriteApplyTables: %v", err)
	}
	if err := WriteApplyReport(dir, run, testMeta, ReportOptions{Date: "2026-01-02"}, allFormats); err != nil {
		t.Fatalf("WriteApplyReport: %v", err)
	}
	b, _ := os.ReadFile(filepath.Join(dir, "summary.json"))
	var s map[string]any
	if err := json.Unmarshal(b, &s); err != nil {
		t.Fatalf("summary.json: %v", err)
	}
	md, _ := os.ReadFile(filepath.Join(dir, "report.md"))
	if !strings.Contains(string(md), "1 sample left out") {
		t.Errorf("the apply report does not say a sample was left out of its figures")
	}
}
