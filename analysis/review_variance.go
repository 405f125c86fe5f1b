package analysis

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"pcqc/analysis/intake"
)

// Their variance table: the size of each component as another person wrote
// it, in whichever shape their software writes. The shapes met in practice:
//
//   - R write.csv(pca$sdev): a "" row-name column of 1..k, then "x";
//   - R write.csv(summary(pca)$importance): rows "Standard deviation",
//     "Proportion of Variance", "Cumulative Proportion", columns PC1..PCk;
//   - pandas to_csv: an index column (0..k-1, or names) before the values,
//     whose header may be "0" for a Series;
//   - numpy savetxt of explained_variance_ or explained_variance_ratio_: one
//     bare column of numbers, no header (or a "# name" header line);
//   - a table of eigenvalue, percentage and cumulative percentage columns.
//
// The column (or row) is chosen from the header; what the numbers are —
// standard deviations, variances, fractions or percentages of the total — is
// read from the header, then from the content (fractions sum to 1,
// percentages to 100), and only when both are silent from the recomputed
// analysis, saying so.

// VarianceKind is how a variance table states the size of each component.
type VarianceKind string

const (
	VarianceEigenvalues VarianceKind = "eigenvalues"
	VarianceSD          VarianceKind = "standard deviations"
	VarianceProportions VarianceKind = "proportions of the total variance"
	VariancePercentages VarianceKind = "percentages of the total variance"
)

// varianceCumulative marks a label naming cumulative shares, which are
// never the per-component values.
const varianceCumulative VarianceKind = "cumulative"

// TheirVariance is another person's variance table, as read.
type TheirVariance struct {
	File   string
	Values []float64
	// From says where the values were read, e.g. `column "x"` or `row
	// "Proportion of Variance"`.
	From string
	// Label is the header or row name of the values; LabelKind what it
	// says they are ("" when it does not say).
	Label     string
	LabelKind VarianceKind
	// SumTolerance is the rounding the printed values allow in their sum:
	// half a unit of each value's last printed decimal.
	SumTolerance float64
	Notes        []string
}

// varianceLabelKind reads what a header or row name says the values are.
// Cumulative is tested first ("Cumulative Proportion"), then shares before
// variance, because "Proportion of Variance", "percentage of variance" and
// "explained_variance_ratio" name shares of a variance.
func varianceLabelKind(label string) VarianceKind {
	l := strings.ToLower(label)
	words := strings.FieldsFunc(l, func(r rune) bool {
		return !(r >= 'a' && r <= 'z' || r >= '0' && r <= '9')
	})
	has := func(ws ...string) bool {
		for _, w := range ws {
			if slices.Contains(words, w) {
				return true
			}
		}
		return false
	}
	switch {
	case strings.Contains(l, "cum"):
		return varianceCumulative
	case strings.Contains(l, "percent") || strings.Contains(l, "%") || has("pct", "perc"):
		return VariancePercentages
	case strings.Contains(l, "proportion") || strings.Contains(l, "ratio") || strings.Contains(l, "fraction") || has("prop", "share"):
		return VarianceProportions
	case strings.Contains(l, "standard deviation") || strings.Contains(l, "sdev") || strings.Contains(l, "stdev") || has("sd", "std", "stddev"):
		return VarianceSD
	case strings.Contains(l, "eigen") || strings.Contains(l, "variance") || has("var", "lambda", "inertia"):
		return VarianceEigenvalues
	}
	return ""
}

// varianceLabelRank orders the labelled columns or rows to prefer: the
// shares a text quotes first (what the review checks), then variances,
// then standard deviations.
func varianceLabelRank(k VarianceKind) int {
	switch k {
	case VariancePercentages:
		return 0
	case VarianceProportions:
		return 1
	case VarianceEigenvalues:
		return 2
	case VarianceSD:
		return 3
	}
	return 4
}

// ParseVariance reads another person's variance table in any of the shapes
// above. A value used that is not a finite number within ±MaxMagnitude is an
// InputError naming its cell.
func ParseVariance(t *intake.LooseTable) (*TheirVariance, error) {
	v := &TheirVariance{File: t.Name}
	noHeader := headerless(t)
	// A file whose first line is all numbers has no header (numpy's
	// savetxt): that line is the first value.
	if noHeader {
		u := *t
		u.Header = make([]string, len(t.Header))
		for j := range u.Header {
			u.Header[j] = fmt.Sprintf("column %d", j+1)
		}
		u.Rows = append([][]string{t.Header}, t.Rows...)
		u.Lines = append([]int{1}, t.Lines...)
		t = &u
		v.Notes = append(v.Notes, "the file has no header: its first line is the first value")
	}
	var numeric, text []int
	for j := range t.Header {
		if t.NumericColumn(j) {
			numeric = append(numeric, j)
		} else {
			text = append(text, j)
		}
	}
	if len(numeric) == 0 {
		return nil, &intake.InputError{File: t.Name, Line: 1, Reason: "no numeric column of variances"}
	}
	// Components across the columns: one row of values (components in the
	// header), or rows named by what they hold (R's summary importance).
	if row, ok := labelledRow(t, text); ok || len(t.Rows) == 1 && len(numeric) > 1 {
		if !ok {
			row = 0
		}
		for _, j := range numeric {
			x, err := t.Value(row, j, "variance")
			if err != nil {
				return nil, err
			}
			v.Values = append(v.Values, x)
		}
		if len(text) > 0 {
			v.Label = t.Rows[row][text[0]]
			v.LabelKind = varianceLabelKind(v.Label)
			v.From = fmt.Sprintf("row %s (line %d)", intake.QuoteText(v.Label), t.Lines[row])
			if others := len(t.Rows) - 1; others > 0 {
				v.Notes = append(v.Notes, fmt.Sprintf("the other %s not used", countRows(others)))
			}
		} else {
			v.From = fmt.Sprintf("the one row (line %d)", t.Lines[row])
		}
		v.SumTolerance = sumTolerance(t.Rows[row], numeric)
		return v, nil
	}
	// Components down the rows. A leading numeric column counting 0, 1, 2 …
	// or 1, 2, 3 … is a row index (pandas, R's row names), not variances,
	// which never increase one by one.
	values := numeric
	if len(numeric) > 1 && isRowIndex(t, numeric[0]) {
		values = numeric[1:]
		name := t.Header[numeric[0]]
		if name == "" {
			name = "(unnamed)"
		}
		v.Notes = append(v.Notes, fmt.Sprintf("column %s counts the rows and was read as an index", intake.QuoteText(name)))
	}
	col, rank := -1, 5
	for _, j := range values {
		k := varianceLabelKind(t.Header[j])
		if k == varianceCumulative {
			continue
		}
		if r := varianceLabelRank(k); r < rank {
			col, rank = j, r
		}
	}
	if col < 0 {
		return nil, &intake.InputError{File: t.Name, Line: 1, Column: values[0] + 1, Name: t.Header[values[0]],
			Reason: "every numeric column holds cumulative shares; give the share of each component"}
	}
	if len(values) > 1 {
		used := 0
		for _, j := range values {
			if varianceLabelKind(t.Header[j]) != varianceCumulative {
				used++
			}
		}
		if used > 1 && rank == 4 {
			v.Notes = append(v.Notes, fmt.Sprintf("%d numeric columns and no header naming what they hold: the first, %s, was used", used, intake.QuoteText(t.Header[col])))
		}
	}
	for i := range t.Rows {
		x, err := t.Value(i, col, "variance")
		if err != nil {
			return nil, err
		}
		v.Values = append(v.Values, x)
	}
	switch {
	case noHeader && len(values) == 1:
		v.From = "the one column"
	case noHeader:
		v.From = t.Header[col]
	default:
		// numpy's savetxt writes its header after "# ".
		v.Label = strings.TrimSpace(strings.TrimLeft(t.Header[col], "#"))
		v.LabelKind = varianceLabelKind(v.Label)
		v.From = "column " + intake.QuoteText(v.Label)
	}
	v.SumTolerance = sumTolerance(columnCells(t, col), nil)
	return v, nil
}

func countRows(n int) string {
	if n == 1 {
		return "row was"
	}
	return fmt.Sprintf("%d rows were", n)
}

// headerless reports whether every cell of the header is a number.
func headerless(t *intake.LooseTable) bool {
	for _, h := range t.Header {
		if !t.NumberLike(h) {
			return false
		}
	}
	return len(t.Header) > 0
}

// labelledRow finds, in the first text column, the row whose name says what
// the values are, preferring shares (see varianceLabelRank) and never a
// cumulative row; ok is false when no row is so named.
func labelledRow(t *intake.LooseTable, text []int) (int, bool) {
	if len(text) == 0 {
		return 0, false
	}
	best, rank := -1, 4
	for i, r := range t.Rows {
		k := varianceLabelKind(r[text[0]])
		if k == "" || k == varianceCumulative {
			continue
		}
		if rk := varianceLabelRank(k); rk < rank {
			best, rank = i, rk
		}
	}
	return best, best >= 0
}

// isRowIndex reports whether column j holds the integers 0, 1, 2 … or
// 1, 2, 3 … in order.
func isRowIndex(t *intake.LooseTable, j int) bool {
	start := -1.0
	for i, r := range t.Rows {
		x, ok := t.Number(r[j])
		if !ok {
			return false
		}
		if i == 0 {
			start = x
			if start != 0 && start != 1 {
				return false
			}
		}
		if x != start+float64(i) {
			return false
		}
	}
	return true
}

func columnCells(t *intake.LooseTable, j int) []string {
	out := make([]string, len(t.Rows))
	for i, r := range t.Rows {
		out[i] = r[j]
	}
	return out
}

// sumTolerance is the most the sum of the printed values can differ from
// the sum of the exact ones: half a unit of each value's last decimal, plus
// a few units of double precision for the addition itself. cols, when
// given, picks the cells of a row.
func sumTolerance(cells []string, cols []int) float64 {
	if cols != nil {
		picked := make([]string, len(cols))
		for c, j := range cols {
			picked[c] = cells[j]
		}
		cells = picked
	}
	tol := 0.0
	for _, c := range cells {
		tol += 0.5 * math.Pow(10, -float64(intake.PrintedDecimals(c)))
	}
	return tol + 1e-12*float64(len(cells))
}

// VarianceReading is how their values were understood.
type VarianceReading struct {
	Kind    VarianceKind
	Percent []float64 // their values as percentages of the total variance
	// Why says in a clause why that reading was taken, for the report.
	Why string
	// Ambiguous is set when neither the header nor the content told the
	// kind, and more than one reading would agree with the recomputed
	// analysis to within AmbiguousReadingPP.
	Ambiguous bool
}

// AmbiguousReadingPP is how close, in percentage points, a second reading of
// the values must come to the recomputed shares for the choice between them
// to be called ambiguous: the review-variance check's fail limit
// (checks.VarianceFailPP, common practice), so that a reading not taken
// would have passed or merely warned.
const AmbiguousReadingPP = 2.0

// Read decides what the values are against the recomputed eigenvalues (all
// of them, so that their sum is the total variance). The header decides
// when it names a kind the content allows; then the content (a sum of 1 or
// of 100, within the printed rounding); then, among the kinds the content
// allows, the one closest to the recomputation — saying so.
func (v *TheirVariance) Read(eigenvalues []float64) VarianceReading {
	total := 0.0
	for _, l := range eigenvalues {
		total += l
	}
	sum, most, negative := 0.0, 0.0, false
	for _, x := range v.Values {
		sum += x
		most = math.Max(most, x)
		negative = negative || x < 0
	}
	tol := v.SumTolerance
	allowed := map[VarianceKind]bool{
		VarianceEigenvalues: true,
		VarianceSD:          !negative,
		VarianceProportions: most <= 1+tol && sum <= 1+tol,
		VariancePercentages: most <= 100+tol && sum <= 100+tol,
	}
	percent := func(kind VarianceKind) []float64 {
		out := make([]float64, len(v.Values))
		for a, x := range v.Values {
			switch kind {
			case VarianceEigenvalues:
				out[a] = 100 * x / total
			case VarianceSD:
				out[a] = 100 * x * x / total
			case VarianceProportions:
				out[a] = 100 * x
			default:
				out[a] = x
			}
		}
		return out
	}
	// How far a reading is from the recomputed shares: the largest
	// |log ratio| to choose (small components count as much as large
	// ones), the largest difference in points to report.
	distance := func(kind VarianceKind) (logRatio, points float64) {
		pct := percent(kind)
		for a, theirs := range pct {
			if a >= len(eigenvalues) {
				break
			}
			ours := 100 * eigenvalues[a] / total
			points = math.Max(points, math.Abs(theirs-ours))
			switch {
			case theirs < 0:
				logRatio = math.Inf(1)
				continue
			case theirs == 0 || ours <= 0:
				// A share printed as 0, or a component the data do not
				// have, says nothing about the kind.
				continue
			}
			logRatio = math.Max(logRatio, math.Abs(math.Log(theirs/ours)))
		}
		return logRatio, points
	}
	label := intake.QuoteText(v.Label)
	done := func(kind VarianceKind, why string) VarianceReading {
		return VarianceReading{Kind: kind, Percent: percent(kind), Why: why}
	}
	kinds := []VarianceKind{VarianceEigenvalues, VarianceSD, VarianceProportions, VariancePercentages}
	if v.LabelKind != "" && v.LabelKind != varianceCumulative && allowed[v.LabelKind] {
		r := done(v.LabelKind, fmt.Sprintf("the label %s says so", label))
		// What they claim is what is checked; but values that fit another
		// reading and not the claimed one are likely mislabelled, and the
		// reader should hear it.
		if _, pts := distance(v.LabelKind); pts > AmbiguousReadingPP {
			for _, k := range kinds {
				if _, other := distance(k); k != v.LabelKind && allowed[k] && other <= AmbiguousReadingPP {
					r.Why += fmt.Sprintf(", though as %s they would agree with the recomputed analysis to %.2f points: the label may be wrong", k, other)
					break
				}
			}
		}
		return r
	}
	complete := func(target float64) bool { return math.Abs(sum-target) <= tol }
	contradicts := ""
	if v.LabelKind != "" && v.LabelKind != varianceCumulative {
		contradicts = fmt.Sprintf("; the label %s says %s, but %s", label, v.LabelKind, impossible(v.LabelKind, most, sum))
	}
	switch {
	case len(v.Values) > 1 && complete(1) && allowed[VarianceProportions]:
		return done(VarianceProportions, "they sum to 1 to the printed rounding"+contradicts)
	case len(v.Values) > 1 && complete(100) && allowed[VariancePercentages]:
		return done(VariancePercentages, "they sum to 100 to the printed rounding"+contradicts)
	}
	// Neither the label nor the sums tell: the closest allowed reading.
	best, bestLog := VarianceKind(""), math.Inf(1)
	for _, k := range kinds {
		if !allowed[k] {
			continue
		}
		if d, _ := distance(k); best == "" || d < bestLog {
			best, bestLog = k, d
		}
	}
	_, bestPoints := distance(best)
	var close, far []string
	for _, k := range kinds {
		if k == best || !allowed[k] {
			continue
		}
		_, pts := distance(k)
		if pts <= AmbiguousReadingPP {
			close = append(close, fmt.Sprintf("as %s %.2f points", k, pts))
		} else {
			far = append(far, fmt.Sprintf("as %s %.3g", k, pts))
		}
	}
	silent := "the label does not say what they are"
	if v.Label == "" {
		silent = "no header says what they are"
	} else if v.LabelKind == "" {
		silent = fmt.Sprintf("the label %s does not say what they are", label)
	}
	r := done(best, "")
	if len(close) > 0 {
		r.Ambiguous = true
		r.Why = fmt.Sprintf("%s%s, and more than one reading fits: they were read as %s, the reading closest to the recomputed analysis (largest difference %.2f points; %s)", silent, contradicts, best, bestPoints, strings.Join(close, ", "))
		return r
	}
	r.Why = fmt.Sprintf("%s%s; of the readings the values allow, only this one agrees with the recomputed analysis (largest difference %.2f points; %s points)", silent, contradicts, bestPoints, strings.Join(far, ", "))
	if len(far) == 0 {
		r.Why = fmt.Sprintf("%s%s; it is the only reading the values allow (largest difference from the recomputed analysis %.2f points)", silent, contradicts, bestPoints)
	}
	return r
}

// impossible says why values cannot be of a kind.
func impossible(kind VarianceKind, most, sum float64) string {
	switch kind {
	case VarianceProportions:
		if most > 1 {
			return fmt.Sprintf("a value of %.4g exceeds 1", most)
		}
		return fmt.Sprintf("they sum to %.4g, more than 1", sum)
	case VariancePercentages:
		if most > 100 {
			return fmt.Sprintf("a value of %.4g exceeds 100", most)
		}
		return fmt.Sprintf("they sum to %.4g, more than 100", sum)
	}
	return "a value is negative"
}
