package checks

import "fmt"

var uncorrelatedScores = Check{
	ID:     "uncorrelated-scores",
	Title:  "Scores are uncorrelated",
	Source: sourceFactOfTrade,
	judge: func(in Input) Result {
		pr := in.Run.Properties
		e := pr.ScoreCorrelation
		r := Result{Value: e, Limit: ScoreCorrelationLimit}
		note := nullNote(pr.NullComponents)
		if in.Run.Retained-len(pr.NullComponents) < 2 {
			r.Status = Pass
			r.Message = "Only one retained component carries variance, so there is no pair of score columns to correlate." + note
			return r
		}
		if e <= ScoreCorrelationLimit {
			r.Status = Pass
			r.Message = fmt.Sprintf("The retained score columns are uncorrelated (largest off-diagonal |r| = %s), so each component adds information the others lack.%s", sci(e), note)
		} else {
			r.Status = Fail
			r.Message = fmt.Sprintf("Retained score columns are correlated (largest off-diagonal |r| = %s), which cannot happen for a correct PCA of centred data; check the preprocessing and the decomposition.%s", sci(e), note)
		}
		return r
	},
}

// nullNote explains which retained components were left out of the
// correlation and variance measurements because they carry no variance.
func nullNote(null []int) string {
	if len(null) == 0 {
		return ""
	}
	s := " Left out as numerically zero (rank-deficient data):"
	for i, a := range null {
		if i > 0 {
			s += ","
		}
		s += fmt.Sprintf(" PC%d", a+1)
	}
	return s + "."
}
