package report

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"regexp"
	"slices"
	"strings"
	"testing"

	"pcqc/analysis"
	"pcqc/analysis/intake"
)

// grammarFaults lints a methods paragraph for the faults it used to have
// and for the ones a sentence builder could reintroduce: a rule's
// description spliced after "by", a list cut short, singular and plural
// mixed up, stray spaces and punctuation, a sentence in lower case,
// unbalanced parentheses.
func grammarFaults(p string) []string {
	var out []string
	for _, bad := range []string{"by fixed", "more)", "(…", "… and", "  ", " ,", " .", "..", ";.", ",.", "()", " ;"} {
		if strings.Contains(p, bad) {
			out = append(out, fmt.Sprintf("contains %q", bad))
		}
	}
	for _, re := range []string{
		`\b1 (samples|components|variables|missing values|rows)\b`,
		`\b([02-9]|\d\d+) (sample|component|variable|missing value) (was|explains)\b`,
		`\bcomponents explains\b|\bcomponent explain\b`,
		`\. \p{Ll}`, // a sentence starting in lower case
	} {
		if m := regexp.MustCompile(re).FindString(p); m != "" {
			out = append(out, fmt.Sprintf("%q", m))
		}
	}
	if strings.Count(p, "(") != strings.Count(p, ")") {
		out = append(out, "unbalanced parentheses")
	}
	if !strings.HasSuffix(p, ".") {
		out = append(out, "does not end with a full stop")
	}
	return out
}

func TestGrammarFaultsFindsFaults(t *testing.T) {
	for _, p := range []string{
		"The number of components, 3, was chosen by fixed by the user (3).",
		"Variables were left out (a; b; c; and 5 more).",
		"The retained components explains 40 %.",
		"Before the analysis, 1 samples were removed.",
		"It was done. then it was not.",
		"It was done (twice.",
	} {
		if len(grammarFaults(p)) == 0 {
			t.Errorf("no fault found in %q", p)
		}
	}
	if f := grammarFaults("Values were mean-centred (van den Berg et al. 2006). The analysis retained 1 component."); f != nil {
		t.Errorf("faults found in a clean text: %v", f)
	}
}

func TestExclusionAndMissingSentences(t *testing.T) {
	var many []intake.DroppedVariable
	var names []string
	for i := 1; i <= 12; i++ {
		many = append(many, intake.DroppedVariable{Name: fmt.Sprintf("v%d", i), Reason: "left out with --drop"})
		names = append(names, fmt.Sprintf("v%d", i))
	}
	cases := []struct {
		name    string
		dropped []intake.DroppedVariable
		want    []string
	}{
		{"none", nil, nil},
		{"one constant", []intake.DroppedVariable{{Name: "Lab", Reason: "constant: every value is 7"}},
			[]string{"The constant variable Lab was left out, having no variance to analyse."}},
		{"twelve by request, never cut short", many,
			[]string{"The variables " + strings.Join(names[:11], ", ") + " and v12 were left out at the user's request (--drop)."}},
		{"mixed reasons, grouped in order of first appearance", []intake.DroppedVariable{
			{Name: "a", Reason: "constant: every value is 0"},
			{Name: "b", Reason: "left out with --drop"},
			{Name: "c", Reason: "constant: every value is 1"},
			{Name: "d", Reason: "not in the reviewed loadings"},
		}, []string{
			"The constant variables a and c were left out, having no variance to analyse.",
			"The variable b was left out at the user's request (--drop).",
			"The variable d was left out: not in the reviewed loadings.",
		}},
	}
	for _, c := range cases {
		if got := exclusionSentences(c.dropped); !slices.Equal(got, c.want) {
			t.Errorf("%s:\n got %q\nwant %q", c.name, got, c.want)
		}
	}

	tables := []struct {
		t          intake.Table
		rows, cell string
	}{
		{intake.Table{}, "", ""},
		{intake.Table{RowsDropped: 1}, "Before the analysis, one sample with missing values was removed.", ""},
		{intake.Table{RowsDropped: 3}, "Before the analysis, 3 samples with missing values were removed.", ""},
		{intake.Table{ImputedCells: 1, Transform: intake.TransformLog},
			"", "The one missing value was replaced by the mean of its variable on the transformed scale, before centring."},
		{intake.Table{ImputedCells: 5, Transform: intake.TransformNone},
			"", "The 5 missing values were replaced by the mean of their variable, before centring."},
	}
	lists := []struct {
		t    intake.Table
		want string
	}{
		{intake.Table{}, ""},
		{intake.Table{MissingCells: 4, RowsDropped: 3}, "The 3 samples dropped and the variables each lacked are listed in the Data section and in missing-by-sample.csv."},
		{intake.Table{MissingCells: 1, ImputedCells: 1}, "The cell imputed, with the value used, is listed in the Data section"},
		{intake.Table{MissingCells: 5, ImputedCells: 5}, "The 5 cells imputed, with the values used, are listed in the Data section and in imputed-cells.csv"},
	}
	for _, c := range lists {
		if got := missingListSentence(&c.t); !strings.HasPrefix(got, c.want) || (c.want == "") != (got == "") {
			t.Errorf("list sentence for %+v: %q, want it to start %q", c.t, got, c.want)
		}
	}
	for _, c := range tables {
		if got := rowsSentence(&c.t); got != c.rows {
			t.Errorf("rows %d: %q, want %q", c.t.RowsDropped, got, c.rows)
		}
		if got := imputationSentence(&c.t); got != c.cell {
			t.Errorf("cells %d: %q, want %q", c.t.ImputedCells, got, c.cell)
		}
	}
}

func TestPreprocessingSentence(t *testing.T) {
	want := map[[2]string]string{
		{"none", "unit"}:   "Every variable was mean-centred and scaled to unit variance (divided by its sample standard deviation, n − 1).",
		{"none", "none"}:   "Every variable was mean-centred but not scaled, so that the variables keep their units (covariance PCA).",
		{"log", "pareto"}:  "Every value was replaced by its natural logarithm, and every variable was then mean-centred and Pareto-scaled (divided by the square root of its standard deviation; van den Berg et al. 2006).",
		{"log10", "range"}: "Every value was replaced by its base-10 logarithm, and every variable was then mean-centred and range-scaled (divided by its range; van den Berg et al. 2006).",
		{"log1p", "none"}:  "Every value x was replaced by log(1 + x), and every variable was then mean-centred but not scaled, so that the variables keep their units (covariance PCA).",
	}
	seen := 0
	for _, tr := range []intake.Transform{intake.TransformNone, intake.TransformLog, intake.TransformLog10, intake.TransformLog1p} {
		for _, sc := range analysis.Scalings {
			res := &analysis.Result{Table: &intake.Table{Transform: tr}, Prep: analysis.Preprocessing{Scaling: sc}}
			got := preprocessingSentence(res)
			if f := grammarFaults(got); f != nil {
				t.Errorf("%s, %s: %q: %v", tr, sc, got, f)
			}
			if w, ok := want[[2]string{string(tr), string(sc)}]; ok {
				seen++
				if got != w {
					t.Errorf("%s, %s:\n got %q\nwant %q", tr, sc, got, w)
				}
			}
		}
	}
	if seen != len(want) {
		t.Errorf("%d of %d expected combinations met: transform or scaling names changed?", seen, len(want))
	}
}

// usarrestsEigenvalues are the eigenvalues of USArrests' correlation
// matrix (R 4.2.2 stats::prcomp(USArrests, scale. = TRUE), as in
// testdata/datasets/README.md).
var usarrestsEigenvalues = []float64{2.48024158, 0.98976515, 0.35656318, 0.17343009}

// ruleResult builds the parts of a result the component sentences read:
// USArrests' eigenvalues and every rule's count on them (broken stick 1,
// Kaiser 1, 80 % of the variance 2, from the eigenvalues above; parallel
// analysis and cross-validation 1, as pcqc finds them).
func ruleResult(rule analysis.ComponentRule, retained int, counts map[analysis.RuleKind]int) *analysis.Result {
	base := []analysis.RuleCount{
		{Rule: analysis.RuleParallel, Count: 1, Applies: true},
		{Rule: analysis.RuleBrokenStick, Count: 1, Applies: true},
		{Rule: analysis.RuleCV, Count: 1, Applies: true},
		{Rule: analysis.RuleKaiser, Count: 1, Applies: true},
		{Rule: analysis.RuleVariance, Count: 2, Applies: true, Note: "≥ 80 %"},
	}
	for i, rc := range base {
		if n, ok := counts[rc.Rule]; ok {
			base[i].Count = n
			base[i].Applies = n >= 0
		}
	}
	return &analysis.Result{
		Decomp:   &analysis.Decomposition{Eigenvalues: usarrestsEigenvalues},
		Rule:     rule,
		Retained: retained,
		Counts: analysis.ComponentCounts{
			Parallel: analysis.Parallel{Permutations: 100, Cap: 2000, Borderline: -1},
			CV:       analysis.CrossValidation{Folds: 7, Rows: 50},
			Counts:   base,
		},
	}
}

// Acceptance (methods): the sentences on the number of components, in
// full, for each rule; the first case is the one that used to read "was
// chosen by fixed by the user (3)". Shares of variance from R (above).
func TestComponentSentences(t *testing.T) {
	parallelSentence := "The analysis retained 1 component, chosen by parallel analysis (Horn 1965), which keeps the leading components whose eigenvalues are significantly above those of column-wise permuted data at 5 % (Glorfeld 1995)."
	cases := []struct {
		name string
		res  *analysis.Result
		want []string
	}{
		{"fixed", ruleResult(analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 3}, 3, nil), []string{
			"The analysis retained 3 components, the number set by the user.",
			"For comparison, parallel analysis (Horn 1965; 100 permutations), the broken-stick rule (Frontier 1976), element-wise 7-fold cross-validation (Bro et al. 2008) and the Kaiser criterion (Kaiser 1960) would have retained 1 component; a cumulative share of 80 % of the variance would have retained 2.",
			"The retained components explain 95.7 % of the total variance (PC1 62.0 %, PC2 24.7 %, PC3 8.9 %).",
		}},
		{"fixed, agreeing with a rule", ruleResult(analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 2}, 2, map[analysis.RuleKind]int{analysis.RuleParallel: -1, analysis.RuleCV: -1}), []string{
			"The analysis retained 2 components, the number set by the user.",
			"For comparison, a cumulative share of 80 % of the variance would have retained the same number; the broken-stick rule (Frontier 1976) and the Kaiser criterion (Kaiser 1960) would have retained 1 component.",
			"The retained components explain 86.8 % of the total variance (PC1 62.0 %, PC2 24.7 %).",
		}},
		{"auto", ruleResult(analysis.DefaultComponentRule, 1, nil), []string{
			parallelSentence,
			"Permutations were run in batches of 100 until 99 % Clopper–Pearson bounds (Clopper & Pearson 1934) settled every decision, which took 100 of at most 2000.",
			"For comparison, the broken-stick rule (Frontier 1976), element-wise 7-fold cross-validation (Bro et al. 2008) and the Kaiser criterion (Kaiser 1960) would also have retained 1 component; a cumulative share of 80 % of the variance would have retained 2.",
			"The retained component explains 62.0 % of the total variance.",
		}},
		{"parallel with a borderline component", func() *analysis.Result {
			r := ruleResult(analysis.ComponentRule{Kind: analysis.RuleParallel}, 1, nil)
			r.Counts.Parallel = analysis.Parallel{Permutations: 2000, Cap: 2000, Borderline: 1}
			return r
		}(), []string{
			parallelSentence,
			"Permutations were run in batches of 100 until 99 % Clopper–Pearson bounds (Clopper & Pearson 1934) settled every decision, which took 2000 of at most 2000; PC2 stayed borderline and was not counted.",
			"For comparison, the broken-stick rule (Frontier 1976), element-wise 7-fold cross-validation (Bro et al. 2008) and the Kaiser criterion (Kaiser 1960) would also have retained 1 component; a cumulative share of 80 % of the variance would have retained 2.",
			"The retained component explains 62.0 % of the total variance.",
		}},
		{"cross-validation", ruleResult(analysis.ComponentRule{Kind: analysis.RuleCV}, 1, map[analysis.RuleKind]int{analysis.RuleParallel: -1}), []string{
			"The analysis retained 1 component, chosen by element-wise 7-fold cross-validation (Bro et al. 2008) on 50 rows, as the fewest components within one standard error of the smallest PRESS.",
			"For comparison, the broken-stick rule (Frontier 1976) and the Kaiser criterion (Kaiser 1960) would also have retained 1 component; a cumulative share of 80 % of the variance would have retained 2.",
			"The retained component explains 62.0 % of the total variance.",
		}},
		{"Kaiser", ruleResult(analysis.ComponentRule{Kind: analysis.RuleKaiser}, 1, map[analysis.RuleKind]int{analysis.RuleParallel: -1, analysis.RuleCV: -1, analysis.RuleVariance: 1}), []string{
			"The analysis retained 1 component, chosen by the Kaiser criterion (Kaiser 1960), which keeps the components whose eigenvalue exceeds 1, the variance of one unit-scaled variable.",
			"For comparison, the broken-stick rule (Frontier 1976) and a cumulative share of 80 % of the variance would also have retained 1 component.",
			"The retained component explains 62.0 % of the total variance.",
		}},
		{"variance share", func() *analysis.Result {
			r := ruleResult(analysis.ComponentRule{Kind: analysis.RuleVariance, Variance: 0.9}, 3, map[analysis.RuleKind]int{analysis.RuleVariance: 3})
			r.Counts.Counts[4].Note = "≥ 90 %"
			return r
		}(), []string{
			"The analysis retained 3 components, chosen by the smallest number of components whose cumulative share of the variance reaches 90 %.",
			"For comparison, parallel analysis (Horn 1965; 100 permutations), the broken-stick rule (Frontier 1976), element-wise 7-fold cross-validation (Bro et al. 2008) and the Kaiser criterion (Kaiser 1960) would have retained 1 component.",
			"The retained components explain 95.7 % of the total variance (PC1 62.0 %, PC2 24.7 %, PC3 8.9 %).",
		}},
		{"broken stick finding no structure", func() *analysis.Result {
			r := ruleResult(analysis.ComponentRule{Kind: analysis.RuleBrokenStick}, 1, map[analysis.RuleKind]int{analysis.RuleBrokenStick: 0, analysis.RuleParallel: 0, analysis.RuleCV: -1})
			r.NoStructure = true
			return r
		}(), []string{
			"No component was retained by the broken-stick rule (Frontier 1976; Jackson 1993), which keeps the leading components whose share of the variance exceeds the share expected under the broken stick, so PC1 is kept for reference only.",
			"For comparison, parallel analysis (Horn 1965; 100 permutations) would also have retained none; the Kaiser criterion (Kaiser 1960) would have retained 1 component; a cumulative share of 80 % of the variance would have retained 2.",
			"The retained component explains 62.0 % of the total variance.",
		}},
	}
	for _, c := range cases {
		got := componentSentences(c.res)
		if !slices.Equal(got, c.want) {
			t.Errorf("%s:\n got %q\nwant %q", c.name, got, c.want)
		}
		if f := grammarFaults(strings.Join(got, " ")); f != nil {
			t.Errorf("%s: %v", c.name, f)
		}
	}
}

// Acceptance (methods): the whole paragraph of real analyses of USArrests
// holds the expected sentences in full (shares of variance from R,
// testdata/reference/methods_usarrests.R), and the paragraph of every
// combination of scaling, transform, missing-value policy, exclusion and
// component rule passes the grammar lint.
func TestMethodsParagraph(t *testing.T) {
	text := usarrestsCSV(t)
	sum := sha256.Sum256([]byte(text))
	data := func(n, p int) string {
		return fmt.Sprintf("Principal component analysis (Jolliffe & Cadima 2016) was carried out with pcqc test on %d samples and %d variables of usarrests.csv (SHA-256 %s…).", n, p, hex.EncodeToString(sum[:])[:12])
	}
	holes := withMissing(text, [2]int{3, 0}, [2]int{10, 3}) // Murder of the 4th state, Rape of the 11th
	holesData := func(n, p int) string {
		s := sha256.Sum256([]byte(holes))
		return fmt.Sprintf("Principal component analysis (Jolliffe & Cadima 2016) was carried out with pcqc test on %d samples and %d variables of usarrests.csv (SHA-256 %s…).", n, p, hex.EncodeToString(s[:])[:12])
	}
	fixed := func(k int) analysis.ComponentRule {
		return analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: k}
	}
	quick := func(sc analysis.Scaling, rule analysis.ComponentRule) analysis.Options {
		return analysis.Options{Scaling: sc, Components: rule, NoCrossValidation: true}
	}
	noBootstrap := "Loading stability was not assessed: no bootstrap was run (--bootstrap 0)."
	cases := []struct {
		name string
		csv  string
		ro   intake.ReadOptions
		opt  analysis.Options
		want []string
	}{
		{"unit, fixed", text, intake.ReadOptions{}, quick(analysis.ScaleUnit, fixed(2)), []string{
			data(50, 4),
			"Every variable was mean-centred and scaled to unit variance (divided by its sample standard deviation, n − 1).",
			"The analysis retained 2 components, the number set by the user.",
			"For comparison, a cumulative share of 80 % of the variance would have retained the same number; the broken-stick rule (Frontier 1976) and the Kaiser criterion (Kaiser 1960) would have retained 1 component.",
			"The retained components explain 86.8 % of the total variance (PC1 62.0 %, PC2 24.7 %).",
			noBootstrap, "Random streams were seeded with 1.",
		}},
		{"log, unit, fixed", text, intake.ReadOptions{Transform: intake.TransformLog}, quick(analysis.ScaleUnit, fixed(3)), []string{
			data(50, 4),
			"Every value was replaced by its natural logarithm, and every variable was then mean-centred and scaled to unit variance (divided by its sample standard deviation, n − 1).",
			"The analysis retained 3 components, the number set by the user.",
			"For comparison, the broken-stick rule (Frontier 1976) and the Kaiser criterion (Kaiser 1960) would have retained 1 component; a cumulative share of 80 % of the variance would have retained 2.",
			"The retained components explain 96.0 % of the total variance (PC1 67.4 %, PC2 21.6 %, PC3 7.0 %).",
		}},
		{"Pareto, variance share", text, intake.ReadOptions{}, quick(analysis.ScalePareto, analysis.ComponentRule{Kind: analysis.RuleVariance, Variance: 0.9}), []string{
			"Every variable was mean-centred and Pareto-scaled (divided by the square root of its standard deviation; van den Berg et al. 2006).",
			"The analysis retained 2 components, chosen by the smallest number of components whose cumulative share of the variance reaches 90 %.",
			"For comparison, the broken-stick rule (Frontier 1976) would have retained 1 component.",
			"The retained components explain 95.0 % of the total variance (PC1 82.3 %, PC2 12.6 %).",
		}},
		{"no scaling, rows dropped, variable left out, broken stick", holes, intake.ReadOptions{Missing: intake.MissingDrop, Drop: []string{"UrbanPop"}},
			quick(analysis.ScaleNone, analysis.ComponentRule{Kind: analysis.RuleBrokenStick}), []string{
				holesData(48, 3),
				"Before the analysis, 2 samples with missing values were removed.",
				"The variable UrbanPop was left out at the user's request (--drop).",
				"Every variable was mean-centred but not scaled, so that the variables keep their units (covariance PCA).",
				"The analysis retained 1 component, chosen by the broken-stick rule (Frontier 1976; Jackson 1993), which keeps the leading components whose share of the variance exceeds the share expected under the broken stick.",
				"For comparison, a cumulative share of 80 % of the variance would also have retained 1 component.",
				"The retained component explains 99.2 % of the total variance.",
			}},
		{"log10, missing values replaced", holes, intake.ReadOptions{Missing: intake.MissingMean, Transform: intake.TransformLog10}, quick(analysis.ScaleUnit, fixed(2)), []string{
			holesData(50, 4),
			"Every value was replaced by its base-10 logarithm, and every variable was then mean-centred and scaled to unit variance (divided by its sample standard deviation, n − 1).",
			"The 2 missing values were replaced by the mean of their variable on the transformed scale, before centring.",
			"For comparison, a cumulative share of 80 % of the variance would have retained the same number; the broken-stick rule (Frontier 1976) and the Kaiser criterion (Kaiser 1960) would have retained 1 component.",
			"The retained components explain 88.9 % of the total variance (PC1 67.6 %, PC2 21.4 %).",
		}},
	}
	for _, c := range cases {
		res := analyze(t, readCSV(t, "usarrests.csv", c.csv, c.ro), c.opt)
		p, _ := methods(res, testMeta)
		for _, w := range c.want {
			if !strings.Contains(p, w) {
				t.Errorf("%s: the paragraph lacks\n  %q\nin\n  %s", c.name, w, p)
			}
		}
		if f := grammarFaults(p); f != nil {
			t.Errorf("%s: %v in %s", c.name, f, p)
		}
	}

	// Every combination, for the lint. Rules are taken in turn so that
	// each meets each scaling; Kaiser only with unit scaling, where it
	// applies.
	rules := []string{"2", "broken-stick", "variance:0.75", "cv", "auto", "1"}
	n := 0
	for _, sc := range analysis.Scalings {
		for _, tr := range []intake.Transform{intake.TransformNone, intake.TransformLog} {
			for _, missing := range []intake.MissingPolicy{intake.MissingFail, intake.MissingMean, intake.MissingDrop} {
				for _, drop := range [][]string{nil, {"UrbanPop"}} {
					ro := intake.ReadOptions{Transform: tr, Drop: drop, Missing: missing}
					csv := text
					if missing != intake.MissingFail {
						csv = holes
					}
					r := rules[n%len(rules)]
					if sc == analysis.ScaleUnit && n%4 == 0 {
						r = "kaiser"
					}
					n++
					rule, err := analysis.ParseComponentRule(r)
					if err != nil {
						t.Fatal(err)
					}
					opt := analysis.Options{Scaling: sc, Components: rule, Permutations: 100, NoCrossValidation: rule.Kind != analysis.RuleCV}
					res := analyze(t, readCSV(t, "usarrests.csv", csv, ro), opt)
					p, _ := methods(res, testMeta)
					if f := grammarFaults(p); f != nil {
						t.Errorf("%s, %s, missing %s, drop %v, rule %s: %v in\n%s", sc, tr, missing, drop, r, f, p)
					}
				}
			}
		}
	}
}
