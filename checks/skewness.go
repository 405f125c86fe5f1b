package checks

import (
	"fmt"
	"math"
	"strings"

	"pcqc/analysis/intake"
)

var skewness = Check{
	ID:     "skewness",
	Title:  "Skewed variables",
	Source: "West, Finch & Curran (1995): |skewness| > 2",
	judge: func(in Input) Result {
		res := in.Run
		ad := res.Adequacy
		names := res.Table.Variables
		worst, worstVar, skewed, positive := 0.0, 0, []string{}, []string{}
		for j, s := range ad.Skewness {
			if math.Abs(s) > worst {
				worst, worstVar = math.Abs(s), j
			}
			if math.Abs(s) > SkewnessLimit {
				skewed = append(skewed, fmt.Sprintf("%s (%s)", names[j], g3(s)))
				if ad.Positive[j] {
					positive = append(positive, names[j])
				}
			}
		}
		r := Result{Value: worst, Limit: SkewnessLimit}
		if len(skewed) == 0 {
			r.Status = Pass
			r.Message = fmt.Sprintf("No variable is strongly skewed (largest |skewness| %s).", g3(worst))
			return r
		}
		r.Status = Warn
		verb := "is"
		if len(skewed) > 1 {
			verb = "are"
		}
		r.Message = fmt.Sprintf("%s %s strongly skewed (largest |skewness| %s, in %s). A long tail lets a few samples drive the variance and the components. Skewed: %s.",
			countNoun(len(skewed), "variable"), verb, g3(worst), names[worstVar], strings.Join(skewed, ", "))
		if len(positive) > 0 && res.Table.Transform == intake.TransformNone {
			r.Message += fmt.Sprintf(" All values are positive in %s; --transform log is the usual remedy for concentrations and counts.", strings.Join(positive, ", "))
		}
		return r
	},
}
