package checks

import (
	"fmt"
	"math"
)

// applyLimitCheck is limitCheck for new samples, which states in addition
// how much worse than chance the batch is.
func applyLimitCheck(in Input, values []float64, lim95, lim99 float64, what, remedy string) Result {
	app := in.Apply
	if len(app.Missing) > 0 {
		return Result{Status: Skip, Message: "Not measured: model variables are missing from the new data."}
	}
	return limitCheck(values, lim95, lim99, app.Table.IDs, what, remedy)
}

var applyOutliersT2 = Check{
	ID:     "apply-outliers-t2",
	Title:  "New samples within the model (Hotelling T²)",
	Source: "Hotelling T² with the F-distribution limits for new observations, k(n²−1)/(n(n−k))·F(k, n−k) (Tracy, Young & Mason 1992), at 95 % and 99 %",
	Mode:   ModeApply,
	judge: func(in Input) Result {
		app := in.Apply
		l := app.Limits
		if math.IsNaN(l.T2_99) {
			return Result{Status: Skip, Message: "The limit for new samples needs more training samples than components."}
		}
		return applyLimitCheck(in, app.T2, l.T2_95, l.T2_99,
			fmt.Sprintf("Hotelling T² for new samples (%s)", g3(l.T2_99)),
			"They lie further from the training centre, within the model plane, than the training data allow: more extreme states of the same process.")
	},
}

var applyOutliersQ = Check{
	ID:     "apply-outliers-q",
	Title:  "New samples fit the model (Q residual)",
	Source: "Q residual against the training limits (Jackson & Mudholkar 1979), at 95 % and 99 %",
	Mode:   ModeApply,
	judge: func(in Input) Result {
		app := in.Apply
		l := app.Limits
		if l.QMethod == "none" {
			return Result{Status: Skip, Message: "The model retains every component, so nothing is left for a residual."}
		}
		return applyLimitCheck(in, app.Q, l.Q95, l.Q99,
			fmt.Sprintf("Q for new samples (%s)", g3(l.Q99)),
			"Their correlation structure differs from the training data: see contributions.csv and the contribution figures for the variables to blame.")
	},
}
