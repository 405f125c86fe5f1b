package checks

import (
	"fmt"
	"strings"
)

var reviewCentering = Check{
	ID:     "review-centering",
	Title:  "Their data were mean-centred",
	Source: "principal angles (Björck & Golub 1973) between their loadings and centred and uncentred recomputations; score means (common practice: beyond 0.1 sd)",
	Mode:   ModeReview,
	judge: func(in Input) Result {
		rv := in.Review
		c, u := rv.Variants[rv.BestCentred], rv.Variants[rv.BestUncentred]
		r := Result{Value: c.MaxAngle, Limit: "a centred variant matches at least as well as any uncentred one"}
		loadings := u.MaxAngle < SubspaceWarn && u.MaxAngle < c.MaxAngle
		scores := rv.Scores != nil && rv.ScoreMeanShift > ScoreMeanShiftLimit
		var evidence []string
		if loadings {
			evidence = append(evidence, fmt.Sprintf("their loadings match an uncentred analysis (%s, largest principal angle %s°) better than any centred one (%s°)", u.Name(), deg(u.MaxAngle), deg(c.MaxAngle)))
		}
		if scores {
			evidence = append(evidence, fmt.Sprintf("their scores have means of up to %s standard deviations where centred data give zero", g3(rv.ScoreMeanShift)))
		}
		switch {
		case loadings || scores:
			r.Status = Fail
			r.Message = fmt.Sprintf("The reported PCA was probably computed on data that were not mean-centred before the decomposition: %s. Without centring, the first component points from the origin towards the mean of the data instead of along the main direction of variation around it, so PC1, its loadings and the stated shares of variance mostly describe how far the variables sit from zero. The analysis should be redone on mean-centred data.", strings.Join(evidence, ", and "))
		case c.MaxAngle >= SubspaceWarn && u.MaxAngle >= SubspaceWarn:
			r.Status = Warn
			r.Message = fmt.Sprintf("Whether the data were centred cannot be told: neither centred (%s°) nor uncentred (%s°) recomputations reproduce the reported loadings.", deg(c.MaxAngle), deg(u.MaxAngle))
		default:
			r.Status = Pass
			r.Message = fmt.Sprintf("The reported loadings follow from mean-centred data (%s, largest principal angle %s°, against %s° for the closest uncentred analysis).", c.Name(), deg(c.MaxAngle), deg(u.MaxAngle))
		}
		return r
	},
}

// FormatDegrees formats an angle in degrees for messages and reports.
func FormatDegrees(a float64) string { return deg(a) }

// deg formats an angle in degrees. An exact match (the principal angles
// snap sines at the rounding level to zero) reads 0, not 0.0e+00.
func deg(a float64) string {
	switch {
	case a == 0:
		return "0"
	case a < 0.001:
		return fmt.Sprintf("%.1e", a)
	case a < 10:
		return fmt.Sprintf("%.3g", a)
	}
	return fmt.Sprintf("%.1f", a)
}
