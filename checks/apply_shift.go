package checks

import (
	"fmt"
	"math"
	"strings"
)

var applyShift = Check{
	ID:     "apply-shift",
	Title:  "No variable has drifted",
	Source: "batch mean within 3 training standard deviations of the training mean (common practice: the 3-sigma rule, Shewhart 1931)",
	Mode:   ModeApply,
	judge: func(in Input) Result {
		app := in.Apply
		r := Result{Limit: ShiftLimit}
		if len(app.Missing) > 0 {
			r.Status = Skip
			r.Message = "Not measured: model variables are missing from the new data."
			return r
		}
		worst, at := 0.0, 0
		var drifted []string
		for j, s := range app.Shift {
			if math.Abs(s) > math.Abs(worst) {
				worst, at = s, j
			}
			if math.Abs(s) > ShiftLimit {
				drifted = append(drifted, fmt.Sprintf("%s (%+.1f sd)", app.Model.Variables[j], s))
			}
		}
		r.Value = math.Abs(worst)
		if len(drifted) == 0 {
			r.Status = Pass
			r.Message = fmt.Sprintf("Every variable's batch mean lies within %g training standard deviations of its training mean (largest: %s, %+.2f sd).", ShiftLimit, app.Model.Variables[at], worst)
			return r
		}
		r.Status = Warn
		r.Message = fmt.Sprintf("%s %s moved more than %g training standard deviations from %s training mean: %s. A shift of a whole batch points to drift, a recalibration, or a change of units, not to odd samples.",
			countNoun(len(drifted), "variable"), plural("has", "have", len(drifted)), ShiftLimit, plural("its", "their", len(drifted)), strings.Join(drifted, ", "))
		return r
	},
}
