package report

import (
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/checks"
	"pcqc/internal/fixture"
	"pcqc/internal/synth"
)

// usarrestsCSV is the open USArrests table (testdata/datasets/README.md),
// optionally edited by the case that reads it.
func usarrestsCSV(t *testing.T) string {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "testdata", "datasets", "usarrests.csv"))
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// withMissing blanks the cells (row, column) of a CSV text, counting data
// rows and columns from 0 after the header and the id column.
func withMissing(csv string, cells ...[2]int) string {
	lines := strings.Split(csv, "\n")
	for _, c := range cells {
		f := strings.Split(lines[c[0]+1], ",")
		f[c[1]+1] = ""
		lines[c[0]+1] = strings.Join(f, ",")
	}
	return strings.Join(lines, "\n")
}

// withLimits writes the cells (row, column) of a CSV text as limits, sign
// followed by the value, counting as withMissing does.
func withLimits(csv, sign string, cells ...[2]int) string {
	lines := strings.Split(csv, "\n")
	for _, c := range cells {
		f := strings.Split(lines[c[0]+1], ",")
		f[c[1]+1] = sign + f[c[1]+1]
		lines[c[0]+1] = strings.Join(f, ",")
	}
	return strings.Join(lines, "\n")
}

// withConstant appends a constant column to a CSV text.
func withConstant(csv, name string) string {
	lines := strings.Split(strings.TrimRight(csv, "\n"), "\n")
	lines[0] += "," + name
	for i := 1; i < len(lines); i++ {
		lines[i] += ",7"
	}
	return strings.Join(lines, "\n") + "\n"
}

func readCSV(t *testing.T, name, text string, ro intake.ReadOptions) *intake.Table {
	t.Helper()
	tab, err := intake.ReadTableFrom(name, strings.NewReader(text), ro)
	if err != nil {
		t.Fatal(err)
	}
	return tab
}

func matrixTable(name string, x *mat.Dense) *intake.Table {
	tab := intake.TableFromMatrix(name, x, nil, nil)
	tab.SHA256 = strings.Repeat("ab", 32)
	return tab
}

func analyze(t *testing.T, tab *intake.Table, opt analysis.Options) *analysis.Result {
	t.Helper()
	if opt.Seed == 0 {
		opt.Seed = 1
	}
	res, err := analysis.Analyze(tab, opt)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// renderAudit renders an audit's (or review's) Markdown the way
// WriteReport does, reference list included.
func renderAudit(t *testing.T, a Audit) string {
	t.Helper()
	d := BuildDocument(a, testMeta, ReportOptions{Date: "2026-01-02"})
	md, err := renderCiting(func() ([]byte, error) { return RenderMarkdown(d) }, &d.References)
	if err != nil {
		t.Fatal(err)
	}
	return string(md)
}

func renderApply(t *testing.T, run ApplyRun) string {
	t.Helper()
	d := BuildApplyDocument(run, testMeta, ReportOptions{Date: "2026-01-02"})
	md, err := renderCiting(func() ([]byte, error) { return renderTemplate("apply.md.tmpl", d) }, &d.References)
	if err != nil {
		t.Fatal(err)
	}
	return string(md)
}

func auditOf(res *analysis.Result) Audit {
	return Audit{Result: res, Checks: checks.RunAll(checks.Input{Run: res})}
}

// reviewOf reviews "another person's" PCA of tab, computed with the
// given centring and scaling and k components, against tab; claimed is
// the scaling they say they used.
func reviewOf(t *testing.T, tab *intake.Table, sc, claimed analysis.Scaling, k int, withScores, withVariances bool) Audit {
	t.Helper()
	o, err := fixture.Compute(tab, true, sc, k)
	if err != nil {
		t.Fatal(err)
	}
	o.Flip(1)
	loose := func(text string) *intake.LooseTable {
		lt, err := intake.ReadLooseTableFrom("their.csv", strings.NewReader(text))
		if err != nil {
			t.Fatal(err)
		}
		return lt
	}
	l, err := analysis.ParseLoadings(loose(o.LoadingsCSV(",", func(a int) string { return fmt.Sprintf("PC%d", a+1) })), tab.Variables)
	if err != nil {
		t.Fatal(err)
	}
	sub := tab.Subset(l.Variables)
	var s *analysis.TheirScores
	if withScores {
		if s, err = analysis.ParseScores(loose(o.ScoresCSV(true, fixture.Identity(len(o.IDs)))), sub.IDs, k); err != nil {
			t.Fatal(err)
		}
	}
	var variance *analysis.TheirVariance
	if withVariances {
		if variance, err = analysis.ParseVariance(loose(o.PercentCSV(k, 0))); err != nil {
			t.Fatal(err)
		}
	}
	rv, err := analysis.CompareReview(sub, l, s, variance, claimed)
	if err != nil {
		t.Fatal(err)
	}
	res := analyze(t, sub, analysis.Options{Scaling: rv.Variants[rv.Best].Scaling, Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: k}, Bootstrap: 20})
	return Audit{Result: res, Review: rv, Checks: checks.RunAll(checks.Input{Run: res, Review: rv})}
}

// applyOf scores rows [from, to) of the training table, with shift
// training standard deviations added to variable j, against the model.
func applyOf(t *testing.T, res *analysis.Result, from, to, j int, shift float64, keep []int) ApplyRun {
	t.Helper()
	m := analysis.NewModel(res, "test")
	src := res.Table
	if keep == nil {
		keep = make([]int, len(src.Variables))
		for c := range keep {
			keep[c] = c
		}
	}
	x := mat.NewDense(to-from, len(keep), nil)
	var names []string
	for c, v := range keep {
		names = append(names, src.Variables[v])
		for i := from; i < to; i++ {
			val := src.X.At(i, v)
			if v == j {
				val += shift * m.SDs[v]
			}
			x.Set(i-from, c, val)
		}
	}
	tab := intake.TableFromMatrix("new.csv", x, names, src.IDs[from:to])
	tab.SHA256 = strings.Repeat("ef", 32)
	app := analysis.Apply(m, tab)
	return ApplyRun{App: app, Checks: checks.RunAll(checks.Input{Apply: app})}
}

// Acceptance (references): across the three kinds of report and many
// combinations of options, every author–year citation in the rendered
// report names a work of its reference list with the right authors, and
// every work of the list is cited. Each case also names works it must
// cite, so that a case that stops exercising its path is noticed.
func TestEveryReportCitesItsReferenceList(t *testing.T) {
	arrests := usarrestsCSV(t)
	idArrests := intake.ReadOptions{IDColumn: "state"}
	arrestsTab := readCSV(t, "usarrests.csv", arrests, idArrests)
	irisText, err := os.ReadFile(filepath.Join("..", "testdata", "datasets", "iris.csv"))
	if err != nil {
		t.Fatal(err)
	}
	holes := withMissing(arrests, [2]int{3, 0}, [2]int{10, 2}, [2]int{20, 3})
	train := analyze(t, arrestsTab, analysis.Options{Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 2}, Permutations: 100})

	type reportCase struct {
		name   string
		render func(t *testing.T) string
		want   []string // keys the report must cite
	}
	audit := func(name string, tab func(t *testing.T) *intake.Table, opt analysis.Options, want ...string) reportCase {
		return reportCase{name, func(t *testing.T) string { return renderAudit(t, auditOf(analyze(t, tab(t), opt))) }, want}
	}
	arrestsWith := func(text string, ro intake.ReadOptions) func(t *testing.T) *intake.Table {
		return func(t *testing.T) *intake.Table { return readCSV(t, "usarrests.csv", text, ro) }
	}
	rule := func(s string) analysis.ComponentRule {
		r, err := analysis.ParseComponentRule(s)
		if err != nil {
			t.Fatal(err)
		}
		return r
	}
	cases := []reportCase{
		audit("unit, auto, bootstrap", arrestsWith(arrests, idArrests),
			analysis.Options{Components: rule("auto"), Permutations: 200, Bootstrap: 30},
			"horn1965", "glorfeld1995", "clopper1934", "efron1979", "tucker1951", "gorsuch1983", "maccallum1999", "peresneto2005"),
		audit("no scaling, cross-validation, no bootstrap", arrestsWith(arrests, idArrests),
			analysis.Options{Scaling: analysis.ScaleNone, Components: rule("cv"), Permutations: 100},
			"bro2008", "jolliffe2016"),
		audit("Pareto, broken stick, no permutations", arrestsWith(arrests, idArrests),
			analysis.Options{Scaling: analysis.ScalePareto, Components: rule("broken-stick"), Bootstrap: 20},
			"vandenberg2006", "frontier1976", "jackson1993"),
		audit("range, variance share", arrestsWith(arrests, idArrests),
			analysis.Options{Scaling: analysis.ScaleRange, Components: rule("variance:0.9"), Permutations: 100},
			"vandenberg2006"),
		audit("unit, Kaiser", arrestsWith(arrests, idArrests),
			analysis.Options{Components: rule("kaiser"), Permutations: 100}, "kaiser1960"),
		audit("log transform, dropped variable, groups", func(t *testing.T) *intake.Table {
			return readCSV(t, "iris.csv", string(irisText), intake.ReadOptions{GroupColumn: "species", Transform: intake.TransformLog, Drop: []string{"sepal_width"}})
		}, analysis.Options{Components: rule("2"), Permutations: 100, Bootstrap: 20}),
		audit("missing values replaced, log10", arrestsWith(holes, intake.ReadOptions{IDColumn: "state", Missing: intake.MissingMean, Transform: intake.TransformLog10}),
			analysis.Options{Components: rule("3"), Permutations: 100}),
		audit("censored cells, log", arrestsWith(withLimits(arrests, "<", [2]int{2, 0}, [2]int{7, 3}), intake.ReadOptions{IDColumn: "state", Censored: intake.CensorHalf, Transform: intake.TransformLog}),
			analysis.Options{Components: rule("2"), Permutations: 100}, "hornung1990", "croghan2003"),
		audit("missing rows dropped, constant variable, log1p, Pareto", arrestsWith(withConstant(holes, "Constant"), intake.ReadOptions{IDColumn: "state", Missing: intake.MissingDrop, Transform: intake.TransformLog1p}),
			analysis.Options{Scaling: analysis.ScalePareto, Components: rule("auto"), Permutations: 100}),
		audit("more variables than samples, bootstrap", func(t *testing.T) *intake.Table {
			x, _ := synth.LowRank(synth.RNG(3, 1), 12, 20, []float64{3, 2}, 0.3)
			return matrixTable("wide.csv", x)
		}, analysis.Options{Components: rule("2"), Permutations: 100, Bootstrap: 20}, "fisher2016"),
		audit("uncorrelated noise", func(t *testing.T) *intake.Table {
			return matrixTable("noise.csv", synth.Gaussian(synth.RNG(4, 1), 40, 6))
		}, analysis.Options{Components: rule("auto"), Permutations: 200}),
		{"review with scores and variances", func(t *testing.T) string {
			return renderAudit(t, reviewOf(t, arrestsTab, analysis.ScaleUnit, analysis.ScaleUnit, 2, true, true))
		}, []string{"bjorck1973"}},
		{"review of loadings alone", func(t *testing.T) string {
			return renderAudit(t, reviewOf(t, arrestsTab, analysis.ScaleUnit, "", 2, false, false))
		}, []string{"bjorck1973"}},
		{"review of an unscaled PCA claimed as unit-scaled", func(t *testing.T) string {
			return renderAudit(t, reviewOf(t, arrestsTab, analysis.ScaleNone, analysis.ScaleUnit, 2, true, true))
		}, []string{"bjorck1973"}},
		{"apply, shifted batch", func(t *testing.T) string {
			return renderApply(t, applyOf(t, train, 0, 12, 1, 6, nil))
		}, []string{"westerhuis2000", "miller1998", "shewhart1931", "tracy1992", "sidak1967"}},
		{"apply, clean batch", func(t *testing.T) string {
			return renderApply(t, applyOf(t, train, 20, 35, 0, 0, nil))
		}, []string{"jackson1979", "shewhart1931"}},
		{"apply, a model variable missing", func(t *testing.T) string {
			return renderApply(t, applyOf(t, train, 0, 10, 0, 0, []int{0, 1, 2}))
		}, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			md := c.render(t)
			for _, p := range citationProblems(md) {
				t.Error(p)
			}
			var keys []string
			for _, cit := range findCitations(md) {
				keys = append(keys, cit.Keys()...)
			}
			for _, k := range c.want {
				if !slices.Contains(keys, k) {
					t.Errorf("the report does not cite %s", k)
				}
			}
		})
	}
}

// references.bib, as written beside the report, holds exactly the works
// of the report's reference list.
func TestReferencesBibMatchesList(t *testing.T) {
	res := analyze(t, readCSV(t, "usarrests.csv", usarrestsCSV(t), intake.ReadOptions{IDColumn: "state"}),
		analysis.Options{Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 2}, Permutations: 100})
	dir := t.TempDir()
	if err := WriteReport(dir, auditOf(res), testMeta, ReportOptions{Date: "2026-01-02"}, Formats{Markdown: true}); err != nil {
		t.Fatal(err)
	}
	md, _ := os.ReadFile(filepath.Join(dir, "report.md"))
	bib, _ := os.ReadFile(filepath.Join(dir, "references.bib"))
	for _, p := range citationProblems(string(md)) {
		t.Error(p)
	}
	var inBib []string
	for _, m := range regexp.MustCompile(`(?m)^@\w+\{(\w+),`).FindAllSubmatch(bib, -1) {
		inBib = append(inBib, string(m[1]))
	}
	var listed []string
	// Everything but the References section itself (an appendix may follow it).
	text := string(md)
	if i := strings.Index(text, referencesHeading); i >= 0 {
		rest := text[i+len(referencesHeading):]
		end := len(rest)
		if j := strings.Index(rest, "\n## "); j >= 0 {
			end = j
		}
		text = text[:i] + rest[end:]
	}
	for _, r := range referencesIn(text) {
		listed = append(listed, r.Key)
	}
	slices.Sort(inBib)
	slices.Sort(listed)
	if len(listed) < 20 || !slices.Equal(inBib, listed) {
		t.Errorf("references.bib holds %v; the report cites %v", inBib, listed)
	}
}
