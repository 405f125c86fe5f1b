package checks

import (
	"cmp"
	"fmt"
	"slices"
	"strings"

	"pcqc/analysis/intake"
)

var missingValues = Check{
	ID:    "missing-values",
	Title: "Missing values",
	Source: "Bijlsma et al. 2006 (the 80 % rule: a variable missing in more than 20 % of the samples is flagged); " +
		"common practice (more than 5 % of rows dropped or cells mean-imputed is reported)",
	judge: func(in Input) Result {
		t := in.Run.Table
		r := Result{Value: t.MissingCells, Limit: fmt.Sprintf("≤ %s missing per variable; ≤ %s of rows dropped or cells mean-imputed",
			pct(VariableMissingShareLimit), pct(MissingShareLimit))}
		if t.MissingCells == 0 {
			r.Status = Pass
			r.Message = "No cell of the analysed variables is missing."
			return r
		}
		cells := t.RowsRead * len(t.Variables)
		switch t.Missing {
		case intake.MissingDrop:
			share := float64(t.RowsDropped) / float64(t.RowsRead)
			r.Status = passUnless(share > MissingShareLimit)
			r.Message = fmt.Sprintf("%s missing; %s of %d (%s) dropped because of them. Dropping rows is safe only when values are missing at random; if they are missing for a reason (a sensor failing at high values, say) the remaining samples are biased.",
				countNoun(t.MissingCells, "cell"), countNoun(t.RowsDropped, "row"), t.RowsRead, pct(share))
		case intake.MissingMean:
			share := float64(t.ImputedCells) / float64(cells)
			r.Status = passUnless(share > MissingShareLimit)
			r.Message = fmt.Sprintf("%s of %d (%s) replaced by column means. Mean imputation shrinks variances and correlations towards zero; with more than a few percent imputed, consider --missing iterative, which models the missing values.",
				countNoun(t.ImputedCells, "cell"), cells, pct(share))
		case intake.MissingIterative:
			// Iterative imputation keeps the correlations, so only the
			// per-variable rule applies.
			r.Status = Pass
			r.Message = fmt.Sprintf("%s of %d (%s) imputed by regularised iterative PCA (see imputation-convergence). Imputation assumes cells are missing at random; the more are imputed, the more the results rest on the model rather than on measurements.",
				countNoun(t.ImputedCells, "cell"), cells, pct(float64(t.ImputedCells)/float64(cells)))
		default:
			r.Status = Fail
			r.Message = fmt.Sprintf("%s missing, but no policy handled them.", countNoun(t.MissingCells, "cell"))
			return r
		}
		if gappy := gappyVariables(t); gappy != "" {
			r.Status = Warn
			r.Message = fmt.Sprintf("Missing in more than %s of the %d rows read: %s. Beyond that share a variable is mostly imputed or decides which samples remain (the 80 %% rule, Bijlsma et al. 2006); consider leaving it out with --drop. ",
				pct(VariableMissingShareLimit), t.RowsRead, gappy) + r.Message
		}
		return r
	},
}

// gappyVariables names the variables missing in more than
// VariableMissingShareLimit of the rows read, worst first, with their
// shares; "" when there are none.
func gappyVariables(t *intake.Table) string {
	var over []intake.VariableMissing
	for _, v := range t.MissingByVariable() {
		if v.Share > VariableMissingShareLimit {
			over = append(over, v)
		}
	}
	slices.SortStableFunc(over, func(a, b intake.VariableMissing) int { return cmp.Compare(b.Share, a.Share) })
	const shown = 12
	parts := make([]string, 0, min(len(over), shown))
	for _, v := range over[:min(len(over), shown)] {
		parts = append(parts, fmt.Sprintf("%s (%s)", v.Variable, pct(v.Share)))
	}
	s := strings.Join(parts, ", ")
	if len(over) > shown {
		s += fmt.Sprintf(" and %d more (all in missing-by-variable.csv)", len(over)-shown)
	}
	return s
}

func passUnless(warn bool) Status {
	if warn {
		return Warn
	}
	return Pass
}
