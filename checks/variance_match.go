package checks

import "fmt"

var varianceMatch = Check{
	ID:     "variance-match",
	Title:  "Eigenvalues equal score variances",
	Source: sourceFactOfTrade,
	judge: func(in Input) Result {
		pr := in.Run.Properties
		e := pr.VarianceMismatch
		r := Result{Value: e, Limit: VarianceMatchLimit}
		note := nullNote(pr.NullComponents)
		if e <= VarianceMatchLimit {
			r.Status = Pass
			r.Message = fmt.Sprintf("Each retained eigenvalue equals the variance of its scores (largest relative difference %s), so the stated shares of variance are the variance the components actually carry.%s", sci(e), note)
		} else {
			r.Status = Fail
			r.Message = fmt.Sprintf("An eigenvalue differs from the variance of its scores by %s (relative); the explained-variance figures do not describe the scores. Check the divisor (n−1) and the preprocessing.%s", sci(e), note)
		}
		return r
	},
}
