package checks

import (
	"fmt"
	"math"
	"strings"
)

var reviewScores = Check{
	ID:     "review-scores",
	Title:  "Their scores follow from their loadings",
	Source: "relative residual ‖t − c·Zv‖/‖t‖ per component: pass ≤ 0.01, fail > 0.05 (common practice)",
	Mode:   ModeReview,
	judge: func(in Input) Result {
		rv := in.Review
		limit := fmt.Sprintf("≤ %g (fail above %g)", ScoreResidualPass, ScoreResidualFail)
		if rv.Scores == nil {
			return Result{Status: Skip, Limit: limit, Message: "No scores were given (--scores)."}
		}
		worst := 0.0
		var scaled []string
		for a, res := range rv.ScoreResiduals {
			worst = math.Max(worst, res)
			if c := math.Abs(rv.ScoreFactors[a]); res < ScoreResidualFail && math.Abs(c-1) > 0.02 {
				scaled = append(scaled, fmt.Sprintf("%s ×%.3g", rv.Scores.Columns[a], rv.ScoreFactors[a]))
			}
		}
		best := rv.Variants[rv.Best]
		matched := fmt.Sprintf(" Rows were matched to samples %s.", rv.Scores.MatchedBy)
		// Score columns that follow from the loadings in another order:
		// the numbers are right and the labels are not, unless each column
		// carries the name of the loadings column it follows.
		if permuted := maxOf(rv.PermutedResiduals); rv.ScoreColumnOf != nil && worst > ScoreResidualPass && permuted <= ScoreResidualPass {
			var pairs []string
			for a, b := range rv.ScoreColumnOf {
				if a != b {
					pairs = append(pairs, fmt.Sprintf("score column %q holds the scores on %q", rv.Scores.Columns[a], rv.Loadings.Components[b]))
				}
			}
			r := Result{Value: permuted, Limit: limit}
			if rv.ScoreColumnsNamedAlike() {
				r.Status = Pass
				r.Message = fmt.Sprintf("The reported scores equal the %s data projected on the reported loadings once each score column is matched to the loadings column of its name (largest relative residual %s): they are only listed in another order, %s.", best.Name(), sci(permuted), strings.Join(quoted(rv.Scores.Columns), ", ")) + matched
				return r
			}
			r.Status = Warn
			r.Message = fmt.Sprintf("The score columns are permuted against the loadings: %s (so matched, largest relative residual %s). The numbers follow from the %s data, but the labels do not: score plots and biplots would name the wrong component. Label scores and loadings alike.", strings.Join(pairs, "; "), sci(permuted), best.Name()) + matched
			return r
		}
		r := Result{Value: worst, Limit: limit}
		switch {
		case worst <= ScoreResidualPass:
			r.Status = Pass
			r.Message = fmt.Sprintf("The reported scores equal the %s data projected on the reported loadings (largest relative residual %s).", best.Name(), sci(worst)) + matched
		case worst <= ScoreResidualFail:
			r.Status = Warn
			r.Message = fmt.Sprintf("The reported scores are close to, but not exactly, the %s data projected on the reported loadings (largest relative residual %s).", best.Name(), sci(worst)) + matched
		default:
			r.Status = Fail
			r.Message = fmt.Sprintf("The reported scores do not follow from the data and the reported loadings (largest relative residual %s): they were computed from other data, with other preprocessing, or their rows are in another order.", g3(worst)) + matched
			if strings.HasPrefix(rv.Scores.MatchedBy, "by row order") {
				r.Message += " Scores given with their sample ids would be matched whatever their order."
			}
			if sb := rv.Variants[rv.ScoreBest]; rv.ScoreBest != rv.Best && sb.ScoreResidual <= ScoreResidualPass {
				r.Message += fmt.Sprintf(" They do follow from %s data (residual %s).", sb.Name(), sci(sb.ScoreResidual))
			}
		}
		if len(scaled) > 0 {
			r.Message += fmt.Sprintf(" Some score columns are the projections times a constant (%s): standardised or otherwise rescaled scores, a convention to state.", strings.Join(scaled, ", "))
		}
		return r
	},
}

func maxOf(xs []float64) float64 {
	m := 0.0
	for _, x := range xs {
		m = math.Max(m, x)
	}
	return m
}

func quoted(names []string) []string {
	out := make([]string, len(names))
	for i, n := range names {
		out[i] = fmt.Sprintf("%q", n)
	}
	return out
}
