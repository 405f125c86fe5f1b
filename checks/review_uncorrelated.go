package checks

import "fmt"

var reviewUncorrelated = Check{
	ID:     "review-uncorrelated",
	Title:  "Their scores are uncorrelated",
	Source: "fact of the trade; allowance for printed precision: pass ≤ 0.02, fail > 0.1 (common practice)",
	Mode:   ModeReview,
	judge: func(in Input) Result {
		rv := in.Review
		limit := fmt.Sprintf("≤ %g (fail above %g)", ReviewCorrelationPass, ReviewCorrelationFail)
		if rv.Scores == nil {
			return Result{Status: Skip, Limit: limit, Message: "No scores were given (--scores)."}
		}
		e := rv.ScoreCorrelation
		r := Result{Value: e, Limit: limit}
		switch {
		case e <= ReviewCorrelationPass:
			r.Status = Pass
			r.Message = fmt.Sprintf("The reported score columns are uncorrelated (largest off-diagonal |r| = %s), as PCA scores of centred data are.", sci(e))
		case e <= ReviewCorrelationFail:
			r.Status = Warn
			r.Message = fmt.Sprintf("The reported score columns are slightly correlated (largest off-diagonal |r| = %.3f), more than rounding explains; check whether they come from the same analysis.", e)
		default:
			r.Status = Fail
			r.Message = fmt.Sprintf("The reported score columns are correlated (largest off-diagonal |r| = %.3f), which PCA scores of centred data never are: the data were not centred, the components were rotated, or the scores come from different analyses.", e)
		}
		return r
	},
}
