package checks

import (
	"fmt"

	"pcqc/analysis"
)

var reviewScaling = Check{
	ID:     "review-scaling",
	Title:  "Their scaling is the stated one",
	Source: "the preprocessing variant with the smallest largest principal angle; a match within 5° (common practice)",
	Mode:   ModeReview,
	judge: func(in Input) Result {
		rv := in.Review
		best := rv.Variants[rv.Best]
		r := Result{Value: analysis.ScalingName(best.Scaling)}
		r.Limit = "a variant within 5°"
		if rv.ClaimedScale != "" {
			r.Limit = "the claimed " + analysis.ScalingName(rv.ClaimedScale)
		}
		switch {
		case best.MaxAngle >= SubspaceWarn:
			r.Status = Warn
			r.Message = fmt.Sprintf("No preprocessing of the raw data reproduces the reported loadings (the closest, %s, is %s° away), so their scaling cannot be identified. The loadings may come from other data, a different selection of samples or variables, or a method other than PCA.", best.Name(), deg(best.MaxAngle))
		case rv.ClaimedScale != "" && rv.ClaimedScale != best.Scaling:
			claimed := 0.0
			for _, v := range rv.Variants {
				if v.Centered == best.Centered && v.Scaling == rv.ClaimedScale {
					claimed = v.MaxAngle
				}
			}
			r.Status = Warn
			r.Message = fmt.Sprintf("The reported loadings match %s (largest principal angle %s°), not the stated %s (%s°). The methods should state the scaling that was used: it decides how much each variable weighs.", analysis.ScalingName(best.Scaling), deg(best.MaxAngle), analysis.ScalingName(rv.ClaimedScale), deg(claimed))
		default:
			r.Status = Pass
			r.Message = fmt.Sprintf("The reported loadings were computed with %s (they match the %s recomputation, largest principal angle %s°)", analysis.ScalingName(best.Scaling), best.Name(), deg(best.MaxAngle))
			if rv.ClaimedScale != "" {
				r.Message += ", as stated"
			}
			r.Message += "."
		}
		return r
	},
}
