package checks

import (
	"fmt"
	"strings"
)

var reviewSubspace = Check{
	ID:     "review-subspace",
	Title:  "Their components span the recomputed ones",
	Source: "largest principal angle (Björck & Golub 1973): pass < 1°, warn < 5°, fail otherwise (common practice); Tucker's congruence per component",
	Mode:   ModeReview,
	judge: func(in Input) Result {
		rv := in.Review
		best := rv.Variants[rv.Best]
		r := Result{Value: best.MaxAngle, Limit: fmt.Sprintf("< %g° (fail from %g°)", SubspacePass, SubspaceWarn)}
		var parts []string
		flips := 0
		for a, phi := range rv.Congruence {
			part := fmt.Sprintf("%s φ = %.3f", rv.Loadings.Components[a], phi)
			if rv.Flipped[a] {
				part += " (sign reversed)"
				flips++
			}
			parts = append(parts, part)
		}
		detail := fmt.Sprintf(" Against the recomputed components one by one: %s.", strings.Join(parts, "; "))
		if flips > 0 {
			detail += " A reversed sign is harmless: the sign of a component is arbitrary, so its loadings and scores may all be negated together."
		}
		k := len(rv.Congruence)
		switch {
		case best.MaxAngle < SubspacePass:
			r.Status = Pass
			r.Message = fmt.Sprintf("The %d reported components span the same subspace as the recomputed ones (%s; largest principal angle %s°).", k, best.Name(), deg(best.MaxAngle)) + detail
		case best.MaxAngle < SubspaceWarn:
			r.Status = Warn
			r.Message = fmt.Sprintf("The %d reported components span nearly, but not quite, the recomputed subspace (%s; largest principal angle %s°): more than rounding, less than a different analysis; ask how the data were selected or preprocessed.", k, best.Name(), deg(best.MaxAngle)) + detail
		default:
			r.Status = Fail
			r.Message = fmt.Sprintf("The %d reported components do not follow from the data under any standard preprocessing (closest: %s, largest principal angle %s°).", k, best.Name(), deg(best.MaxAngle)) + detail
		}
		return r
	},
}
