package checks

import (
	"fmt"

	"pcqc/analysis/intake"
)

var missingValues = Check{
	ID:     "missing-values",
	Title:  "Missing values",
	Source: "common practice (more than 5 % of rows dropped or cells imputed is reported)",
	judge: func(in Input) Result {
		t := in.Run.Table
		r := Result{Value: t.MissingCells, Limit: fmt.Sprintf("≤ %s of rows dropped or cells imputed", pct(MissingShareLimit))}
		if t.MissingCells == 0 {
			r.Status = Pass
			r.Message = "No cell of the analysed variables is missing."
			return r
		}
		cells := t.RowsRead * len(t.Variables)
		switch t.Missing {
		case intake.MissingDrop:
			share := float64(t.RowsDropped) / float64(t.RowsRead)
			r.Status = Pass
			if share > MissingShareLimit {
				r.Status = Warn
			}
			r.Message = fmt.Sprintf("%s missing; %s of %d (%s) dropped because of them. Dropping rows is safe only when values are missing at random; if they are missing for a reason (a sensor failing at high values, say) the remaining samples are biased.",
				countNoun(t.MissingCells, "cell"), countNoun(t.RowsDropped, "row"), t.RowsRead, pct(share))
		case intake.MissingMean:
			share := float64(t.ImputedCells) / float64(cells)
			r.Status = Pass
			if share > MissingShareLimit {
				r.Status = Warn
			}
			r.Message = fmt.Sprintf("%s of %d (%s) replaced by column means. Mean imputation shrinks variances and correlations towards zero; with more than a few percent imputed, consider a method that models the missing values.",
				countNoun(t.ImputedCells, "cell"), cells, pct(share))
		case intake.MissingIterative:
			share := float64(t.ImputedCells) / float64(cells)
			r.Status = Pass
			if share > MissingShareLimit {
				r.Status = Warn
			}
			r.Message = fmt.Sprintf("%s of %d (%s) imputed by regularised iterative PCA (see imputation-convergence). Imputation assumes cells are missing at random; the more are imputed, the more the results rest on the model rather than on measurements.",
				countNoun(t.ImputedCells, "cell"), cells, pct(share))
		default:
			r.Status = Fail
			r.Message = fmt.Sprintf("%s missing, but no policy handled them.", countNoun(t.MissingCells, "cell"))
		}
		return r
	},
}
