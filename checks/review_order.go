package checks

import (
	"fmt"
	"strings"
)

var reviewOrder = Check{
	ID:     "review-order",
	Title:  "Their components are in order of variance",
	Source: "fact of the trade (components are numbered by decreasing variance)",
	Mode:   ModeReview,
	judge: func(in Input) Result {
		rv := in.Review
		names := rv.Loadings.Components
		cv := rv.ComponentVariance
		var swapped []string
		for a := 0; a+1 < len(cv); a++ {
			if cv[a+1] > cv[a]*(1+1e-6) {
				swapped = append(swapped, fmt.Sprintf("%s carries more variance than %s (%s vs %s)", names[a+1], names[a], g3(cv[a+1]), g3(cv[a])))
			}
		}
		var moved []string
		for a, b := range rv.MatchOf {
			if a != b && rv.Congruence[a] < 0.99 {
				moved = append(moved, fmt.Sprintf("%s is the recomputed PC%d", names[a], b+1))
			}
		}
		r := Result{Value: len(swapped), Limit: "decreasing variance"}
		if len(swapped) == 0 && len(moved) == 0 {
			r.Status = Pass
			r.Message = fmt.Sprintf("The reported components are in decreasing order of variance (from %s).", rv.OrderSource)
			return r
		}
		r.Status = Warn
		var parts []string
		if len(swapped) > 0 {
			parts = append(parts, strings.Join(swapped, "; "))
		}
		if len(moved) > 0 {
			parts = append(parts, strings.Join(moved, "; "))
		}
		r.Message = fmt.Sprintf("The reported components are not in order of variance: %s. Components must be numbered by decreasing variance, or the labels PC1, PC2 … mislead (judged from %s).", strings.Join(parts, "; "), rv.OrderSource)
		return r
	},
}
