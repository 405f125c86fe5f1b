package main

import (
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/internal/fixture"
)

func writeFile(t *testing.T, dir, name, content string) string {
	t.Helper()
	path := filepath.Join(dir, name)
	if err := os.WriteFile(path, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

var usarrestsPath = filepath.Join("..", "..", "testdata", "datasets", "usarrests.csv")

func usarrestsOther(t *testing.T, centred bool, sc analysis.Scaling, k int) fixture.Other {
	t.Helper()
	tab, err := intake.ReadTable(usarrestsPath, intake.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	o, err := fixture.Compute(tab, centred, sc, k)
	if err != nil {
		t.Fatal(err)
	}
	return o
}

type reviewSummary struct {
	summaryChecks
	Review struct {
		BestVariant struct {
			Centered bool
			Scale    string
		} `json:"best_variant"`
		Variants        []map[string]any `json:"variants"`
		Findings        []string         `json:"findings"`
		LoadingsLayout  string           `json:"loadings_layout"`
		ScoresMatchedBy string           `json:"scores_matched_by"`
		VarianceKind    string           `json:"variance_kind"`
		VarianceFrom    string           `json:"variance_from"`
		VarianceReading string           `json:"variance_reading"`
	} `json:"review"`
}

// Acceptance 3: a transposed loadings file, a semicolon file and scores in
// shuffled order with ids are read correctly, and the layout found is
// stated; acceptance 1 end to end: every review check passes.
func TestReviewCommandReadsTheirTables(t *testing.T) {
	dir := t.TempDir()
	o := usarrestsOther(t, true, analysis.ScaleUnit, 2)
	o.Flip(1)
	order := rand.New(rand.NewPCG(7, 8)).Perm(50)
	cases := []struct {
		name, loadings, layout string
	}{
		{"rows", o.LoadingsCSV(",", func(a int) string { return fmt.Sprintf("PC%d", a+1) }), "variables as rows"},
		{"transposed", o.TransposedCSV(), "transposed"},
		{"semicolon", strings.ReplaceAll(o.LoadingsCSV(";", func(a int) string { return fmt.Sprintf("Komponente %d", a+1) }), ".", ","), "variables as rows"},
	}
	scores := writeFile(t, dir, "scores.csv", o.ScoresCSV(true, order))
	variance := writeFile(t, dir, "variance.csv", o.PercentCSV(2, 0))
	for i, c := range cases {
		loadings := writeFile(t, dir, c.name+".csv", c.loadings)
		out := filepath.Join(dir, "out-"+c.name)
		format := "none"
		if i == 0 {
			format = "md"
		}
		status, _, stderr := runPCQC(t, "review", usarrestsPath, "--loadings", loadings, "--scores", scores, "--variance", variance,
			"--claimed-scale", "unit", "--out", out, "--bootstrap", "50", "--permutations", "20", "--format", format)
		if status != exitOK && status != exitChecks {
			t.Fatalf("%s: status %d %s", c.name, status, stderr)
		}
		s := readSummaryFile[reviewSummary](t, out)
		if !strings.Contains(s.Review.LoadingsLayout, c.layout) || !strings.Contains(s.Review.ScoresMatchedBy, "sample id") || s.Review.VarianceKind != "percentages of the total variance" {
			t.Errorf("%s: layout %q, scores %q, variance %q", c.name, s.Review.LoadingsLayout, s.Review.ScoresMatchedBy, s.Review.VarianceKind)
		}
		if !s.Review.BestVariant.Centered || s.Review.BestVariant.Scale != "unit" || len(s.Review.Variants) != 8 {
			t.Errorf("%s: best variant %+v, %d variants", c.name, s.Review.BestVariant, len(s.Review.Variants))
		}
		for _, id := range []string{"review-centering", "review-scaling", "review-preprocessing", "review-subspace", "review-orthonormality", "review-scores", "review-uncorrelated", "review-variance", "review-order"} {
			if st := s.status(id); st != "pass" {
				t.Errorf("%s: %s is %s", c.name, id, st)
			}
		}
		if format == "none" {
			continue
		}
		md, _ := os.ReadFile(filepath.Join(out, "report.md"))
		if !strings.HasPrefix(string(md), "# Review of a PCA of usarrests.csv") || !strings.Contains(string(md), "## Review findings") ||
			strings.Index(string(md), "## Review findings") > strings.Index(string(md), "## Verdict") {
			t.Errorf("%s: the report does not open with the review findings", c.name)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "out-rows", "review-variants.csv")); err != nil {
		t.Errorf("review-variants.csv: %v", err)
	}
}

// Acceptance 2 end to end: uncentred tables fail review-centering, and the
// exit status says so.
func TestReviewCommandFailsUncentred(t *testing.T) {
	dir := t.TempDir()
	o := usarrestsOther(t, false, analysis.ScaleUnit, 2)
	loadings := writeFile(t, dir, "l.csv", o.LoadingsCSV(",", func(a int) string { return fmt.Sprintf("PC%d", a+1) }))
	out := filepath.Join(dir, "out")
	status, _, stderr := runPCQC(t, "review", usarrestsPath, "--loadings", loadings, "--out", out, "--bootstrap", "0", "--components", "2", "--format", "none")
	if status != exitChecks {
		t.Fatalf("status %d %s", status, stderr)
	}
	s := readSummaryFile[reviewSummary](t, out)
	if s.status("review-centering") != "fail" || s.Verdict != "fail" || s.Review.BestVariant.Centered {
		t.Errorf("centering %s, verdict %s, best %+v", s.status("review-centering"), s.Verdict, s.Review.BestVariant)
	}
	if len(s.Review.Findings) == 0 || !strings.Contains(s.Review.Findings[0], "not mean-centred") {
		t.Errorf("findings %v", s.Review.Findings)
	}
}

// Acceptance 6: unreadable or mismatched tables give exit status 2 and one
// clear line, and no output folder.
func TestReviewCommandRejectsMismatchedTables(t *testing.T) {
	dir := t.TempDir()
	o := usarrestsOther(t, true, analysis.ScaleUnit, 2)
	good := writeFile(t, dir, "good.csv", o.LoadingsCSV(",", func(a int) string { return fmt.Sprintf("PC%d", a+1) }))
	short := strings.Join(strings.Split(o.ScoresCSV(false, fixture.Identity(50)), "\n")[:31], "\n") + "\n"
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"--loadings", writeFile(t, dir, "names.csv", "name,PC1,PC2\nalpha,0.5,0.1\nbeta,0.5,-0.2\n")}, "no variable name in common"},
		{[]string{"--loadings", good, "--scores", writeFile(t, dir, "short.csv", short)}, "30 score rows for 50 samples"},
		{[]string{"--loadings", writeFile(t, dir, "empty.csv", "")}, "empty file"},
		{[]string{"--loadings", writeFile(t, dir, "ragged.csv", "v,PC1\nMurder,0.5\nAssault,0.4,0.3\n")}, "ragged row"},
		{[]string{"--loadings", filepath.Join(dir, "absent.csv")}, "cannot read the table: no such file"},
		{[]string{}, "needs --loadings"},
		{[]string{"--loadings", good, "--claimed-scale", "zscore"}, "invalid --claimed-scale"},
	}
	for _, c := range cases {
		out := filepath.Join(dir, "out")
		status, _, stderr := runPCQC(t, append([]string{"review", usarrestsPath, "--out", out}, c.args...)...)
		if status != exitUsage || !strings.Contains(stderr, c.want) || strings.Count(stderr, "\n") != 1 {
			t.Errorf("%v: status %d, stderr %q (want %q)", c.args, status, stderr, c.want)
		}
		if _, err := os.Stat(out); !os.IsNotExist(err) {
			t.Errorf("%v: output folder created", c.args)
		}
	}
}

// R's write.csv(pca$sdev) — a "" column of row names 1..4, then "x" — was
// read from its row names and failed a correct PCA. End to end with R's own
// files (testdata/review/generate.R, R 4.2.2): every review check passes and
// the reading is stated in summary.json.
func TestReviewCommandReadsRFiles(t *testing.T) {
	dir := t.TempDir()
	fixture := func(name string) string { return filepath.Join("..", "..", "testdata", "review", name) }
	for _, c := range []struct{ variance, kind, from string }{
		{"r-sdev.csv", "standard deviations", `column "x"`},
		{"r-importance.csv", "proportions of the total variance", `row "Proportion of Variance"`},
	} {
		out := filepath.Join(dir, c.variance)
		status, _, stderr := runPCQC(t, "review", usarrestsPath, "--loadings", fixture("r-loadings.csv"), "--scores", fixture("r-scores.csv"),
			"--variance", fixture(c.variance), "--out", out, "--bootstrap", "0", "--permutations", "0", "--format", "none")
		if status != exitOK && status != exitChecks {
			t.Fatalf("%s: status %d %s", c.variance, status, stderr)
		}
		s := readSummaryFile[reviewSummary](t, out)
		if s.Review.VarianceKind != c.kind || !strings.Contains(s.Review.VarianceFrom, c.from) || s.Review.VarianceReading == "" {
			t.Errorf("%s: read %q from %q: %q", c.variance, s.Review.VarianceKind, s.Review.VarianceFrom, s.Review.VarianceReading)
		}
		for _, id := range []string{"review-centering", "review-scaling", "review-preprocessing", "review-subspace", "review-orthonormality", "review-scores", "review-uncorrelated", "review-variance", "review-order"} {
			if st := s.status(id); st != "pass" {
				t.Errorf("%s: %s is %s", c.variance, id, st)
			}
		}
	}
}

// scikit-learn's default PCA of wine (centred, unscaled; files written by
// scikit-learn 1.2.1 and numpy 1.24.2, testdata/review/generate.py) is
// computed correctly, and every check of its computation passes; but
// proline's variance is 6.4 million times nonflavanoid_phenols's (numpy
// 1.24.2 on testdata/datasets/wine.csv) and PC1 holds 99.8 % of the
// variance (sklearn's explained_variance_ratio_[0] = 0.9981), which the
// review's findings must say, first, not only the audit's table.
func TestReviewCommandUnscaledWine(t *testing.T) {
	fixture := func(name string) string { return filepath.Join("..", "..", "testdata", "review", name) }
	out := filepath.Join(t.TempDir(), "wine")
	status, _, stderr := runPCQC(t, "review", filepath.Join("..", "..", "testdata", "datasets", "wine.csv"), "--group", "cultivar",
		"--loadings", fixture("sklearn-wine-loadings.csv"), "--scores", fixture("sklearn-wine-scores.csv"),
		"--variance", fixture("numpy-explained-variance-ratio.txt"), "--out", out, "--bootstrap", "0", "--permutations", "0", "--format", "md")
	if status != exitOK {
		t.Fatalf("status %d %s", status, stderr)
	}
	s := readSummaryFile[reviewSummary](t, out)
	if s.Verdict != "warn" || s.Review.BestVariant.Scale != "none" || !s.Review.BestVariant.Centered {
		t.Errorf("verdict %s, best variant %+v", s.Verdict, s.Review.BestVariant)
	}
	for _, id := range []string{"review-centering", "review-scaling", "review-subspace", "review-orthonormality", "review-scores", "review-uncorrelated", "review-variance", "review-order"} {
		if st := s.status(id); st != "pass" {
			t.Errorf("%s is %s", id, st)
		}
	}
	if st := s.status("review-preprocessing"); st != "warn" {
		t.Errorf("review-preprocessing is %s", st)
	}
	if len(s.Review.Findings) == 0 {
		t.Fatal("no findings")
	}
	first := s.Review.Findings[0]
	for _, want := range []string{"! warn", "computed correctly", "proline's variance is 6.4 million times nonflavanoid_phenols's", "PC1 holds 99.8 %", "almost entirely proline"} {
		if !strings.Contains(first, want) {
			t.Errorf("first finding lacks %q: %s", want, first)
		}
	}
	md, err := os.ReadFile(filepath.Join(out, "report.md"))
	if err != nil {
		t.Fatal(err)
	}
	findings := string(md)[strings.Index(string(md), "## Review findings"):strings.Index(string(md), "How their tables were read")]
	if !strings.Contains(findings, "PC1 holds 99.8 %") {
		t.Errorf("the report's review findings do not say it:\n%s", findings)
	}
}

// help review states review's own defaults, not run's: the best-matching
// scaling, their number of components, the -review folder; and --scale,
// --components, --permutations and --out each appear once.
func TestHelpReviewStatesItsDefaults(t *testing.T) {
	status, stdout, stderr := runPCQC(t, "help", "review")
	if status != exitOK {
		t.Fatalf("status %d %s", status, stderr)
	}
	for _, want := range []string{
		"(default: the scaling\n                      their loadings match best",
		"(default: their number of components",
		"0 turns it off, which review's default rule never",
		"output folder (default <DATA name>-review)",
	} {
		if !strings.Contains(stdout, want) {
			t.Errorf("help review lacks %q", want)
		}
	}
	for _, wrong := range []string{"default auto = parallel analysis", "(default unit", "Defaults in review"} {
		if strings.Contains(stdout, wrong) {
			t.Errorf("help review says %q", wrong)
		}
	}
	for _, flag := range []string{"  --scale ", "  --components ", "  --permutations ", "  --out "} {
		if n := strings.Count(stdout, "\n"+flag); n != 1 {
			t.Errorf("%q appears %d times", flag, n)
		}
	}
}
