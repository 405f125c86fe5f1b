package report

import (
	"fmt"
	"math"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/checks"
)

// Document is the content of the report, filled from the analysis and the
// check results, with every number already formatted. The Markdown templates
// lay it out; nothing in them computes.
type Document struct {
	Title, Author, Date, Version string
	Invented                     string // a note that the data are invented (demo), or ""

	Review  *ReviewBlock // review mode only
	Verdict VerdictBlock
	Checks  []CheckRow

	Data       DataBlock
	Missing    MissingBlock
	Components ComponentsBlock
	Loadings   LoadingsBlock
	Scores     ScoresBlock
	Outliers   OutliersBlock
	Robust     RobustBlock
	Stability  StabilityBlock
	Excluded   *ExcludedBlock // nil when no sample was excluded
	WhatIf     *WhatIfBlock   // nil when no sample is flagged

	Methods    string
	References []Reference

	Command  string
	Options  [][2]string
	Cautions []string

	figures []figureJob
}

// figureJob pairs a figure of the document with its drawing, made when
// the report is written. fig points into the document, so that
// prepareFigures can amend what the report says about it.
type figureJob struct {
	fig     *Figure
	drawing func() drawing
}

type VerdictBlock struct {
	Word, Symbol string
	Counts       string // "14 pass, 4 warn, 0 fail, 1 skip"
	Sentence     string
}

type CheckRow struct {
	ID, Title, Word, Symbol  string
	Measured, Limit, Meaning string
	Message, Source          string
	// Brief is the limit as page 1 shows it: the limit the check judges
	// by, without the other numbers of a map of limits.
	Brief string
}

// Overview is what the report shows first: a headline for the verdict
// banner, the checks that did not pass (fail, then warn, then skip, each
// group in report order) and the passing checks, for a compact list.
type Overview struct {
	Headline string // "! WARN: 2 of 20 checks call for attention"
	Counts   string // "+ 18 pass · ! 2 warn · × 0 fail · – 0 not applicable"
	// Attention are the checks that did not pass, most serious first.
	Attention []CheckRow
	Passed    []CheckRow
}

// overview arranges the check rows for the report's first page. Its
// status comes from the verdict, which the rows' statuses determine.
func overview(v VerdictBlock, rows []CheckRow) Overview {
	var o Overview
	count := map[string]int{}
	for _, want := range []string{string(checks.Fail), string(checks.Warn), string(checks.Skip)} {
		for _, r := range rows {
			if r.Word == want {
				o.Attention = append(o.Attention, r)
			}
		}
	}
	for _, r := range rows {
		count[r.Word]++
		if r.Word == string(checks.Pass) {
			o.Passed = append(o.Passed, r)
		}
	}
	n := len(rows)
	fail, warn, skip := count[string(checks.Fail)], count[string(checks.Warn)], count[string(checks.Skip)]
	checksOf := func(k int) string {
		if k == 1 {
			return "1 check"
		}
		return fmt.Sprintf("%d checks", k)
	}
	mark := v.Symbol + " " + v.Word + ": "
	switch {
	case fail > 0:
		o.Headline = fmt.Sprintf("%s%d of %s failed", mark, fail, checksOf(n))
		if warn > 0 {
			o.Headline += fmt.Sprintf(", %d more warn", warn)
		}
	case warn > 0:
		o.Headline = fmt.Sprintf("%s%d of %s call for attention", mark, warn, checksOf(n))
		if warn == 1 {
			o.Headline = fmt.Sprintf("%s1 of %s calls for attention", mark, checksOf(n))
		}
	case skip > 0:
		o.Headline = fmt.Sprintf("%severy applicable check passed (%d of %d; %d not applicable)", mark, n-skip, n, skip)
	default:
		o.Headline = fmt.Sprintf("%sall %s passed", mark, checksOf(n))
	}
	o.Counts = fmt.Sprintf("%s %d pass · %s %d warn · %s %d fail · %s %d not applicable",
		checks.Pass.Symbol(), count[string(checks.Pass)], checks.Warn.Symbol(), warn, checks.Fail.Symbol(), fail, checks.Skip.Symbol(), skip)
	return o
}

// briefLimit is a check's limit as page 1 shows it: a map of limits by its
// first entry (the limit the check judges by), anything else in full.
func briefLimit(v any) string {
	if m, ok := v.(map[string]float64); ok && len(m) > 0 {
		return strings.SplitN(formatLimits(m), "; ", 2)[0]
	}
	return formatMeasure(v)
}

type DataBlock struct {
	File, SHA256                string
	Sheet                       string // the worksheet read, for a workbook
	RowsRead, Rows, RowsDropped int
	VariablesUsed               int
	VariableList                string
	Dropped                     []intake.DroppedVariable
	IDColumn, GroupColumn       string
	Missing, Transform, Scaling string
	Centring                    string
	Censored                    *CensoredBlock // nil when no cell was written as a limit
	Layout                      string         // preamble, comments, units, digit groups; "" when none
}

type ComponentsBlock struct {
	Header    []string
	Rows      [][]string
	Truncated string // a note when not every component is listed
	Rules     [][]string
	Used      string
	Scree     Figure
	Press     *Figure // nil when cross-validation did not run
}

type LoadingsBlock struct {
	Header    []string
	Rows      [][]string
	Truncated string
	Note      string
	Figures   []Figure
}

type ScoresBlock struct {
	Figures []Figure
	Biplot  *Figure
	Note    string
}

type OutliersBlock struct {
	Limits    string
	Figure    Figure
	Influence *Figure // nil when influence was not computed
	Header    []string
	Rows      [][]string
	Truncated string
	None      string
	// Contributions holds, for each of the most extreme samples beyond a
	// family-wise limit, its contribution figure and then its residual
	// figure (run_contributions.go).
	Contributions     []Figure
	ContributionsNote string
}

type StabilityBlock struct {
	Enabled    bool
	Skipped    string
	Summary    string
	Header     []string
	Rows       [][]string
	EigHeader  []string
	EigRows    [][]string
	Congruence Figure
	Eigen      Figure
}

// ReportOptions are the choices that shape the report.
type ReportOptions struct {
	Title    string
	Author   string
	Date     string // YYYY-MM-DD
	Invented string // set by the demo: a note that the data are invented
}

// Row limits of the report's tables; the CSV files always hold everything.
const (
	maxVarianceRows = 30
	maxLoadingRows  = 500
	maxOutlierRows  = 100
)

// notANumber is what the report shows for a value that is not a finite
// number, rather than Go's "NaN" or "+Inf".
const notANumber = "n/a"

func isFinite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

func f3(x float64) string {
	if !isFinite(x) {
		return notANumber
	}
	return strconv.FormatFloat(x, 'f', 3, 64)
}

func pctText(x float64) string {
	if !isFinite(x) {
		return notANumber
	}
	return strconv.FormatFloat(x, 'f', 1, 64) + " %"
}

// g4 formats a number with four significant digits, without exponent for
// ordinary magnitudes.
func g4(x float64) string {
	if !isFinite(x) {
		return notANumber
	}
	a := math.Abs(x)
	if a != 0 && (a < 1e-3 || a >= 1e6) {
		return strconv.FormatFloat(x, 'e', 2, 64)
	}
	return strconv.FormatFloat(x, 'g', 4, 64)
}

// formatMeasure renders a check's value or limit for the table. A
// p-value reads as in the check's message ("< 1e-16", never 0).
func formatMeasure(v any) string {
	switch x := v.(type) {
	case nil:
		return "–"
	case checks.Probability:
		return checks.FormatP(float64(x))
	case float64:
		return g4(x)
	case int:
		return strconv.Itoa(x)
	case string:
		return x
	case map[string]float64:
		return formatLimits(x)
	}
	return fmt.Sprint(v)
}

// limitLabels names the numbers of a check's map of limits for the table,
// in the order the table lists them: the limit the check judges by first.
// Keys not listed here follow in alphabetical order, named after the key.
var limitLabels = []struct{ key, label string }{
	{"limit_family", "family-wise"},
	{"family_confidence", "per-sample confidence"},
	{"limit_family_component_tail", "family-wise from the components' tail"},
	{"limit_95", "95 %"},
	{"limit_99", "99 %"},
	{"limit_count_95", "count test beyond"},
	{"binomial_alpha", "count test α"},
	{"tail_df", "tail ν"},
	{"component_tail_df", "components' tail ν"},
	{"phase1_kept", "Phase I kept"},
	{"phase1_rounds", "Phase I rounds"},
}

// formatLimits writes a map of limits as "label: value" pairs. A
// confidence near 1 is written 1 − ε, so that 0.99996 does not read as 1.
func formatLimits(m map[string]float64) string {
	rank := map[string]int{}
	for i, l := range limitLabels {
		rank[l.key] = i + 1
	}
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.SortFunc(keys, func(a, b string) int {
		ra, rb := rank[a], rank[b]
		switch {
		case ra == 0 && rb == 0:
			return strings.Compare(a, b)
		case ra == 0:
			return 1
		case rb == 0:
			return -1
		}
		return ra - rb
	})
	parts := make([]string, len(keys))
	for i, k := range keys {
		label := strings.ReplaceAll(strings.TrimPrefix(k, "limit_"), "_", " ")
		if r := rank[k]; r > 0 {
			label = limitLabels[r-1].label
		}
		value := g4(m[k])
		if strings.HasSuffix(k, "confidence") && m[k] < 1 && m[k] > 0.99 {
			value = "1 − " + g4(1-m[k])
		}
		parts[i] = label + ": " + value
	}
	return strings.Join(parts, "; ")
}

// firstSentence returns the message up to its first full stop followed by a
// space: check messages put their verdict in the first sentence.
func firstSentence(msg string) string {
	if i := strings.Index(msg, ". "); i >= 0 {
		return msg[:i+1]
	}
	return msg
}

func statusWord(s checks.Status) string { return string(s) }

// BuildDocument fills the report model. meta.Command is the command line.
func BuildDocument(audit Audit, meta Meta, opt ReportOptions) *Document {
	res, results := audit.Result, audit.Checks
	t := res.Table
	d := &Document{
		Title:    opt.Title,
		Author:   opt.Author,
		Date:     opt.Date,
		Version:  meta.Version,
		Invented: opt.Invented,
		Command:  shellQuote(meta.Command),
	}
	if d.Title == "" {
		d.Title = "PCA audit of " + filepath.Base(t.File)
	}

	// Verdict and checks.
	d.Verdict, d.Checks = verdictBlock(results)
	if checks.Verdict(results) == checks.Pass {
		d.Verdict.Sentence = "Every check passed: the decomposition is correct and no diagnostic calls for attention."
	} else if checks.Verdict(results) == checks.Warn {
		d.Verdict.Sentence = "The decomposition is correct, but some diagnostics call for attention before the results are interpreted; see the warnings below."
	} else {
		d.Verdict.Sentence = "At least one check failed: the results should not be interpreted until the failing checks are understood."
	}

	d.Review = reviewBlock(audit.Review, results)
	d.Data = dataBlock(res)
	d.Missing = missingBlock(res.Table, imputedCells(res), false)
	d.Components = componentsBlock(res)
	d.Loadings = loadingsBlock(res)
	d.Scores = scoresBlock(res)
	d.Outliers = outliersBlock(res)
	d.Robust = robustBlock(res)
	d.Excluded, d.WhatIf = excludedBlock(res), whatIfBlock(res)
	d.Stability = stabilityBlock(res)
	d.Methods, d.References = methods(res, meta)
	d.Options = optionRows(meta.Options)
	d.Cautions = []string{
		"Statistical flags support expert judgement; they do not replace it. A flagged sample is a sample to look at, not a sample to delete.",
		"The thresholds are conventions, each cited beside the check that uses it; data near a threshold deserve the same care on either side of it.",
		regulationCaution,
	}

	// Figures in report order.
	d.figures = append(d.figures, figureJob{&d.Components.Scree, func() drawing { return screeFigure(res) }})
	if d.Components.Press != nil {
		d.figures = append(d.figures, figureJob{d.Components.Press, func() drawing { return pressFigure(res) }})
	}
	for a := range d.Loadings.Figures {
		d.figures = append(d.figures, figureJob{&d.Loadings.Figures[a], func() drawing { return loadingsFigure(res, a) }})
	}
	pairs := scorePairs(res.Retained)
	for i := range d.Scores.Figures {
		if res.Retained == 1 {
			d.figures = append(d.figures, figureJob{&d.Scores.Figures[i], func() drawing { return indexScoresFigure(res) }})
			break
		}
		pr := pairs[i]
		d.figures = append(d.figures, figureJob{&d.Scores.Figures[i], func() drawing { return scoresFigure(res, pr[0], pr[1]) }})
	}
	if d.Scores.Biplot != nil {
		d.figures = append(d.figures, figureJob{d.Scores.Biplot, func() drawing { return biplotFigure(res) }})
	}
	d.figures = append(d.figures, figureJob{&d.Outliers.Figure, func() drawing { return t2qFigure(res) }})
	if d.Outliers.Influence != nil {
		d.figures = append(d.figures, figureJob{d.Outliers.Influence, func() drawing { return influenceFigure(res) }})
	}
	d.figures = append(d.figures, contributionBlock(res, runContributions(res), &d.Outliers)...)
	if d.Robust.Enabled {
		d.figures = append(d.figures, figureJob{&d.Robust.Figure, func() drawing { return robustFigure(res) }})
	}
	if d.Stability.Enabled {
		d.figures = append(d.figures,
			figureJob{&d.Stability.Congruence, func() drawing { return congruenceFigure(res) }},
			figureJob{&d.Stability.Eigen, func() drawing { return eigenIntervalFigure(res) }})
	}
	prepareFigures(d.figures)
	return d
}

func optionText(v any) string {
	switch x := v.(type) {
	case []string:
		if len(x) == 0 {
			return "–"
		}
		return strings.Join(x, ", ")
	case string:
		if x == "" {
			return "–"
		}
		return x
	}
	return fmt.Sprint(v)
}

func dataBlock(res *analysis.Result) DataBlock {
	t := res.Table
	b := DataBlock{
		File: t.File, SHA256: t.SHA256, Sheet: t.Sheet,
		RowsRead: t.RowsRead, Rows: t.Rows(), RowsDropped: t.RowsDropped,
		VariablesUsed: len(t.Variables), Dropped: t.DroppedVariables,
		IDColumn: t.IDColumn, GroupColumn: t.GroupColumn,
	}
	if b.IDColumn == "" {
		b.IDColumn = "none (samples are numbered by data row)"
	}
	if b.GroupColumn == "" {
		b.GroupColumn = "none"
	}
	labels := make([]string, len(t.Variables))
	for j := range labels {
		labels[j] = varLabel(t, j)
	}
	if len(t.Variables) <= 40 {
		b.VariableList = strings.Join(labels, ", ")
	} else {
		b.VariableList = strings.Join(labels[:40], ", ") + fmt.Sprintf(" and %d more (all in loadings.csv)", len(t.Variables)-40)
	}
	b.Layout = layoutText(t)
	switch {
	case t.MissingCells == 0:
		b.Missing = "no missing cells"
	case t.Missing == intake.MissingDrop:
		b.Missing = fmt.Sprintf("%d missing cells; the %d rows holding them were dropped (--missing drop)", t.MissingCells, t.RowsDropped)
	case t.Missing == intake.MissingMean:
		b.Missing = fmt.Sprintf("%d missing cells replaced by the mean of their column's transformed values (--missing mean)", t.ImputedCells)
	case t.Missing == intake.MissingIterative:
		b.Missing = fmt.Sprintf("%d missing cells imputed by iterative PCA (--missing iterative)", t.ImputedCells)
	}
	b.Censored = censoredBlock(t)
	b.Transform = transformText(t.Transform)
	b.Scaling = scalingText(res.Prep.Scaling)
	b.Centring = fmt.Sprintf("always; verified: the largest |column mean| after preprocessing is %s of the largest column standard deviation", g4(res.Properties.CenteringError))
	return b
}

func transformText(t intake.Transform) string {
	switch t {
	case intake.TransformLog:
		return "natural logarithm of every value"
	case intake.TransformLog10:
		return "base-10 logarithm of every value"
	case intake.TransformLog1p:
		return "log(1 + x) of every value"
	}
	return "none"
}

func scalingText(s analysis.Scaling) string {
	switch s {
	case analysis.ScaleUnit:
		return "unit variance: each variable divided by its sample standard deviation (n−1)"
	case analysis.ScalePareto:
		return "Pareto: each variable divided by the square root of its standard deviation"
	case analysis.ScaleRange:
		return "range: each variable divided by its range (max − min)"
	}
	return "none: variables keep their units (covariance PCA)"
}

// eigenCI is the BCa interval of eigenvalue a, or the percentile interval
// marked "pct." where BCa is undefined.
func eigenCI(st analysis.Stability, a int) string {
	if a < len(st.EigenvaluesBCa) {
		if iv := st.EigenvaluesBCa[a]; !math.IsNaN(iv.Low) && !math.IsNaN(iv.High) {
			return g4(iv.Low) + " – " + g4(iv.High)
		}
	}
	return g4(st.Eigenvalues[a].Low) + " – " + g4(st.Eigenvalues[a].High) + " (pct.)"
}

func componentsBlock(res *analysis.Result) ComponentsBlock {
	d := res.Decomp
	pct := Percentages(d.Eigenvalues)
	st := res.Stability
	b := ComponentsBlock{Header: []string{"Component", "Eigenvalue", "Variance", "Cumulative", "Permuted 95th pct.", "Broken stick"}}
	if st.Used > 0 {
		b.Header = append(b.Header, "Eigenvalue 95 % CI (BCa)")
	}
	cum := 0.0
	m := d.Components()
	for a := 0; a < m; a++ {
		cum += pct[a]
		if a >= maxVarianceRows {
			continue
		}
		p95 := "–"
		if res.Counts.Parallel.Permutations > 0 {
			p95 = g4(res.Counts.Parallel.P95[a])
		}
		name := componentName(a)
		if a < res.Retained {
			name += " (retained)"
		}
		row := []string{name, g4(d.Eigenvalues[a]), pctText(pct[a]), pctText(cum), p95, pctText(100 * res.Counts.BrokenStickShares[a])}
		if st.Used > 0 {
			row = append(row, eigenCI(st, a))
		}
		b.Rows = append(b.Rows, row)
	}
	if m > maxVarianceRows {
		b.Truncated = fmt.Sprintf("The first %d of %d components are listed; variance.csv holds all of them.", maxVarianceRows, m)
	}
	for _, c := range res.Counts.Counts {
		count := strconv.Itoa(c.Count)
		note := c.Note
		if !c.Applies {
			count = "n/a"
		}
		inForce := ""
		if c.Rule == res.Rule.Kind {
			inForce = "yes"
		}
		b.Rules = append(b.Rules, []string{ruleName(c.Rule), count, note, inForce})
	}
	b.Used = fmt.Sprintf("%d component%s retained by %s.", res.Retained, plural(res.Retained), res.Rule.Describe())
	if res.NoStructure {
		b.Used = fmt.Sprintf("No component stands out by %s; PC1 is shown for reference only.", res.Rule.Describe())
	}
	b.Scree = Figure{Stem: "scree", Alt: "Scree plot",
		Caption: "Scree plot: observed eigenvalues (filled: retained), the 95th percentile of the eigenvalues of column-permuted data, the broken-stick expectation, and the cumulative share of variance on the right axis."}
	if cv := res.Counts.CV; cv.Folds > 0 {
		rows := fmt.Sprintf("all %d rows", cv.Rows)
		if cv.Rows < cv.RowsTotal {
			rows = fmt.Sprintf("a seeded random subset of %d of the %d rows", cv.Rows, cv.RowsTotal)
		}
		b.Press = &Figure{Stem: "press", Alt: "Cross-validation PRESS curve",
			Caption: fmt.Sprintf("Element-wise %d-fold cross-validation (Bro et al. 2008) on %s: PRESS, the summed squared error of predicting each left-out element from a model fitted without it, as a share of the total sum of squares, for 0 (mean only) to %d components; the ring marks the smallest PRESS and the filled dot the count chosen, the fewest components within one standard error of the smallest (press.csv holds the values).", cv.Folds, rows, len(cv.PRESS)-1)}
	}
	return b
}

// regulationCaution closes the cautions of every report.
const regulationCaution = "Where the results bear on health, safety or regulation, local rules and accredited practice decide, not this report."

// optionRows lists the options as name and value text, for the report.
func optionRows(opts Options) [][2]string {
	rows := make([][2]string, 0, len(opts))
	for _, o := range opts {
		rows = append(rows, [2]string{o.Name, optionText(o.Value)})
	}
	return rows
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

func ruleName(k analysis.RuleKind) string {
	switch k {
	case analysis.RuleParallel:
		return "Parallel analysis (Horn 1965)"
	case analysis.RuleBrokenStick:
		return "Broken stick (Frontier 1976)"
	case analysis.RuleCV:
		return "Element-wise cross-validation (Bro et al. 2008)"
	case analysis.RuleKaiser:
		return "Kaiser–Guttman λ > 1 (Kaiser 1960)"
	case analysis.RuleVariance:
		return "Cumulative share of variance"
	}
	return string(k)
}

func loadingsBlock(res *analysis.Result) LoadingsBlock {
	k := res.Retained
	p := res.Decomp.Vars
	v := res.Decomp.Loadings
	st := res.Stability
	b := LoadingsBlock{Header: []string{"Variable"}}
	units := hasUnits(res.Table)
	if units {
		b.Header = append(b.Header, "Unit")
	}
	for a := 0; a < k; a++ {
		b.Header = append(b.Header, componentName(a))
	}
	order := make([]int, p)
	for j := range order {
		order[j] = j
	}
	if p > maxLoadingRows {
		// Keep the variables with the largest loading on any retained component.
		score := func(j int) float64 {
			s := 0.0
			for a := 0; a < k; a++ {
				s = math.Max(s, math.Abs(v.At(j, a)))
			}
			return s
		}
		slices.SortStableFunc(order, func(i, j int) int {
			si, sj := score(i), score(j)
			switch {
			case si > sj:
				return -1
			case si < sj:
				return 1
			}
			return 0
		})
		order = order[:maxLoadingRows]
		slices.Sort(order)
		b.Truncated = fmt.Sprintf("The %d of %d variables with the largest loadings are listed, in input order; loadings.csv holds all of them.", maxLoadingRows, p)
	}
	for _, j := range order {
		row := []string{res.Table.Variables[j]}
		if units {
			row = append(row, unitOf(res.Table, j))
		}
		for a := 0; a < k; a++ {
			cell := f3(v.At(j, a))
			if st.Used > 0 && !st.Loadings[j][a].ExcludesZero() {
				cell += " °"
			}
			row = append(row, cell)
		}
		b.Rows = append(b.Rows, row)
	}
	if st.Used > 0 {
		b.Note = "° marks a loading whose 95 % bootstrap interval includes zero: its sign is not stable. stability.csv holds every interval."
	}
	for a := 0; a < k; a++ {
		b.Figures = append(b.Figures, Figure{
			Stem: fmt.Sprintf("loadings-pc%d", a+1), Alt: fmt.Sprintf("Loadings on PC%d", a+1),
			Caption: fmt.Sprintf("Loadings on PC%d, variables sorted by absolute loading%s.", a+1, map[bool]string{true: "; whiskers are 95 % bootstrap intervals, hollow bars have intervals that include zero", false: ""}[st.Used > 0]),
		})
	}
	return b
}

// scorePairs lists the component pairs drawn as score plots: (1,2), then
// (1,3) and (2,3) when three or more components are retained.
func scorePairs(k int) [][2]int {
	switch {
	case k <= 1:
		return nil
	case k == 2:
		return [][2]int{{0, 1}}
	}
	return [][2]int{{0, 1}, {0, 2}, {1, 2}}
}

func scoresBlock(res *analysis.Result) ScoresBlock {
	var b ScoresBlock
	group := "one colour"
	if res.Table.GroupColumn != "" {
		group = "coloured and shaped by " + res.Table.GroupColumn
		if groups, _ := groupsOf(res.Table); len(groups) > maxColouredGroups {
			group = fmt.Sprintf("drawn alike: the %d groups of %s are too many to tell apart", len(groups), res.Table.GroupColumn)
		}
	}
	if res.Retained == 1 {
		b.Figures = []Figure{{Stem: "scores-pc1", Alt: "PC1 scores in sample order",
			Caption: fmt.Sprintf("Scores on PC1 in input order (%s), with the 95 %% Hotelling T² limit for one component.", group)}}
		b.Note = "Only one component is retained, so its scores are shown against the sample order."
	}
	for _, pr := range scorePairs(res.Retained) {
		b.Figures = append(b.Figures, Figure{
			Stem: fmt.Sprintf("scores-pc%d-pc%d", pr[0]+1, pr[1]+1), Alt: fmt.Sprintf("Scores, PC%d against PC%d", pr[1]+1, pr[0]+1),
			Caption: fmt.Sprintf("Scores on PC%d and PC%d (%s) with the 95 %% Hotelling T² ellipse for these two components.", pr[0]+1, pr[1]+1, group),
		})
	}
	if res.Retained >= 2 && res.Decomp.Vars <= biplotVariables {
		b.Biplot = &Figure{Stem: "biplot", Alt: "Biplot of PC1 and PC2",
			Caption: "Biplot (Gabriel 1971), column-metric form: samples at their standardised scores, variables as arrows to loading × √eigenvalue, stretched by one common factor. Angles between arrows approximate correlations."}
	}
	noteExcluded(&b, res)
	return b
}

func outliersBlock(res *analysis.Result) OutliersBlock {
	s := res.Samples
	l := s.Limits
	b := OutliersBlock{Header: []string{IDHeader(res.Table)}}
	if res.Table.GroupColumn != "" {
		b.Header = append(b.Header, res.Table.GroupColumn)
	}
	b.Header = append(b.Header, "T²", "Q", "Leverage", "Limits passed")
	qText := "Q residual: not applicable (every component retained)"
	if l.QMethod != analysis.QNone {
		method := "Jackson & Mudholkar (1979)"
		if l.QMethod == analysis.QBox {
			method = "Box (1954) χ² approximation"
		}
		qText = fmt.Sprintf("Q residual %s (95 %%) and %s (99 %%) by %s", g4(l.Q95), g4(l.Q99), method)
	}
	b.Limits = fmt.Sprintf("Hotelling T² %s (95 %%) and %s (99 %%), beta form of Tracy, Young & Mason (1992) for the samples that built the model; %s; leverage %s = 3(k+1)/n.",
		g4(l.T2_95), g4(l.T2_99), qText, g4(l.Leverage))
	b.Figure = Figure{Stem: "t2-q", Alt: "Hotelling T² against Q residual",
		Caption: "Hotelling T² (distance within the model) against the Q residual (distance from it), with the 95 % (dashed) and 99 % (solid) limits."}
	if s.Influence.Angle != nil {
		yard := "no bootstrap line: the bootstrap was turned off"
		if !math.IsNaN(analysis.InfluenceLimit(res.Stability)) {
			yard = "dashed line: the 95th percentile of the bootstrap subspace angles; each sample's own yardstick is the 95th percentile of the angles of the resamples that drew it"
		}
		b.Influence = &Figure{Stem: "influence", Alt: "Influence of each sample on the retained subspace",
			Caption: "Influence: for each sample in input order, the largest principal angle (degrees) between the retained subspace and the one refitted without that sample, preprocessing included; " + yard + "."}
	}
	var flagged []int
	for i := range s.T2 {
		beyond := s.Beyond(i)
		for _, x := range beyond {
			if x == "t2-99" || x == "q-99" || x == "leverage" {
				flagged = append(flagged, i)
				break
			}
		}
	}
	if len(flagged) == 0 {
		b.None = "No sample passes a 99 % limit or the leverage rule."
		return b
	}
	for c, i := range flagged {
		if c >= maxOutlierRows {
			b.Truncated = fmt.Sprintf("The first %d of %d flagged samples are listed; samples.csv holds every sample.", maxOutlierRows, len(flagged))
			break
		}
		row := []string{res.Table.IDs[i]}
		if res.Table.GroupColumn != "" {
			row = append(row, res.Table.Groups[i])
		}
		row = append(row, g4(s.T2[i]), g4(s.Q[i]), g4(s.Leverage[i]), strings.Join(s.Beyond(i), " "))
		b.Rows = append(b.Rows, row)
	}
	return b
}

func stabilityBlock(res *analysis.Result) StabilityBlock {
	st := res.Stability
	if st.Used == 0 {
		reason := "The bootstrap was turned off (--bootstrap 0)."
		if st.Resamples > 0 {
			reason = "Every resample was degenerate (its decomposition failed)."
		}
		return StabilityBlock{Skipped: reason}
	}
	b := StabilityBlock{Enabled: true,
		Summary: fmt.Sprintf("%d bootstrap resamples of the whole pipeline (rows drawn with replacement, preprocessing redone in each)", st.Used),
		Header:  []string{"Component", "φ median", "φ 5th pct.", "Procrustes φ median", "Procrustes φ 5th pct."},
	}
	if st.ConstantResamples > 0 {
		b.Summary += fmt.Sprintf("; in %d of them a variable took a single value and entered with zero variance (its centred values are all zero)", st.ConstantResamples)
	}
	if st.Degenerate > 0 {
		b.Summary += fmt.Sprintf("; %d more were skipped because their decomposition failed", st.Degenerate)
	}
	b.Summary += "."
	for a, c := range st.Components {
		b.Rows = append(b.Rows, []string{componentName(a), f3(c.CongruenceMedian), f3(c.CongruenceP5), f3(c.ProcrustesMedian), f3(c.ProcrustesP5)})
	}
	// Percentile and BCa intervals side by side: BCa (Efron 1987) corrects
	// for the bias of sample eigenvalues, which leaves the estimate near an
	// edge of its percentile interval.
	b.EigHeader = []string{"Component", "Eigenvalue", "95 % percentile", "95 % BCa", "Variance", "95 % percentile", "95 % BCa"}
	pct := Percentages(res.Decomp.Eigenvalues)
	bca := func(ivs []analysis.Interval, a int, f func(float64) string) string {
		if a >= len(ivs) || math.IsNaN(ivs[a].Low) || math.IsNaN(ivs[a].High) {
			return "–"
		}
		return f(ivs[a].Low) + " – " + f(ivs[a].High)
	}
	for a := 0; a < min(len(st.Eigenvalues), intervalComponents); a++ {
		e, p := st.Eigenvalues[a], st.Percent[a]
		b.EigRows = append(b.EigRows, []string{componentName(a), g4(res.Decomp.Eigenvalues[a]), g4(e.Low) + " – " + g4(e.High), bca(st.EigenvaluesBCa, a, g4),
			pctText(pct[a]), pctText(p.Low) + " – " + pctText(p.High), bca(st.PercentBCa, a, pctText)})
	}
	b.Congruence = Figure{Stem: "stability-congruence", Alt: "Congruence over the bootstrap",
		Caption: "Tucker's congruence φ between each resample's sign-aligned loadings and the reference, per retained component (box: quartiles; line: median). 0.95 and above: equal; 0.85–0.95: fair (Lorenzo-Seva & ten Berge 2006)."}
	b.Eigen = Figure{Stem: "stability-eigenvalues", Alt: "Eigenvalues with bootstrap intervals",
		Caption: "Eigenvalues with 95 % bootstrap percentile intervals (filled: retained). Overlapping intervals of neighbours mean their components may exchange places from sample to sample."}
	return b
}

// shellQuote renders a command line so that it can be pasted into a POSIX
// shell, on one line. An argument holding a line break, another control
// character or a bidirectional control is written in dollar-single-quotes
// ($'…', POSIX.1-2024, bash, ksh and zsh) with those characters as \xHH
// escapes of their bytes, so that the report shows them and a paste
// reproduces them.
func shellQuote(args []string) string {
	out := make([]string, len(args))
	for i, a := range args {
		switch {
		case a != "" && strings.IndexFunc(a, func(r rune) bool {
			return !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || strings.ContainsRune("-_./=:,+@%", r))
		}) < 0:
			out[i] = a
		case strings.ContainsFunc(a, needsEscape) || !utf8.ValidString(a):
			var b strings.Builder
			b.WriteString("$'")
			for j, w := 0, 0; j < len(a); j += w {
				r, size := utf8.DecodeRuneInString(a[j:])
				w = size
				switch {
				case r == '\\' || r == '\'':
					b.WriteByte('\\')
					b.WriteRune(r)
				case r == utf8.RuneError && size == 1 || needsEscape(r):
					for k := j; k < j+size; k++ {
						fmt.Fprintf(&b, `\x%02x`, a[k])
					}
				default:
					b.WriteString(a[j : j+size])
				}
			}
			b.WriteString("'")
			out[i] = b.String()
		default:
			out[i] = "'" + strings.ReplaceAll(a, "'", `'\''`) + "'"
		}
	}
	return strings.Join(out, " ")
}
