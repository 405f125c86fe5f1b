package checks

import (
	"fmt"
	"math"
	"strings"
)

var reviewVariance = Check{
	ID:     "review-variance",
	Title:  "Their shares of variance are right",
	Source: "difference in percentage points: warn above 0.5, fail above 2 (common practice)",
	Mode:   ModeReview,
	judge: func(in Input) Result {
		rv := in.Review
		limit := fmt.Sprintf("≤ %g points (fail above %g)", VarianceWarnPP, VarianceFailPP)
		if rv.VarianceValues == nil {
			return Result{Status: Skip, Limit: limit, Message: "No variances were given (--variance)."}
		}
		worst, worstAt := 0.0, 0
		var parts []string
		for a, d := range rv.VarianceDiff {
			if math.Abs(d) > worst {
				worst, worstAt = math.Abs(d), a
			}
			parts = append(parts, fmt.Sprintf("component %d stated %.1f %%, recomputed %.1f %%", a+1, rv.VariancePercent[a], rv.VariancePercent[a]-d))
		}
		r := Result{Value: worst, Limit: limit}
		read := fmt.Sprintf(" The values (%s of %s) were read as %s: %s.", rv.Variance.From, rv.Variance.File, rv.VarianceKind, rv.VarianceReading.Why)
		detail := " " + strings.Join(parts, "; ") + "."
		if len(parts) > 0 {
			// The list opens a sentence.
			detail = " C" + detail[2:]
		}
		best := rv.Variants[rv.Best]
		switch {
		case worst <= VarianceWarnPP:
			r.Status = Pass
			r.Message = fmt.Sprintf("The stated shares of variance agree with the recomputed %s analysis (largest difference %.2f percentage points).", best.Name(), worst) + read + detail
		case worst <= VarianceFailPP:
			r.Status = Warn
			r.Message = fmt.Sprintf("The stated share of variance of component %d differs from the recomputed one by %.2f percentage points, more than rounding.", worstAt+1, worst) + read + detail
		default:
			r.Status = Fail
			r.Message = fmt.Sprintf("The stated share of variance of component %d is %.1f percentage points off the recomputed %s analysis: the explained-variance figures in the text do not follow from the data.", worstAt+1, worst, best.Name()) + read + detail
		}
		return r
	},
}
