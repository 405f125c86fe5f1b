package checks

import (
	"math"
)

// applyLimitCheck is limitCheck for a batch of new samples: family-wise
// over the batch (Šidák for its n samples, and the binomial tail of the
// count beyond the 95 % limit), with the limits for new observations.
func applyLimitCheck(in Input, values []float64, l familyLimits, what, remedy string) Result {
	app := in.Apply
	if len(app.Missing) > 0 {
		return Result{Status: Skip, Message: "Not measured: model variables are missing from the new data."}
	}
	return limitCheck(values, l, app.Table.IDs, what, remedy)
}

var applyOutliersT2 = Check{
	ID:     "apply-outliers-t2",
	Title:  "New samples within the model (Hotelling T²)",
	Source: "Hotelling T² with the F-distribution limits for new observations, k(n²−1)/(n(n−k))·F(k, n−k) (Tracy, Young & Mason 1992), judged family-wise over the batch: Šidák (1967) at α = 0.01, and a binomial tail test of the count beyond 95 % at α = 0.001",
	Mode:   ModeApply,
	judge: func(in Input) Result {
		app := in.Apply
		l := app.Limits
		if math.IsNaN(l.T2_99) || math.IsNaN(app.T2Family) {
			return Result{Status: Skip, Message: "The limit for new samples needs more training samples than components."}
		}
		return applyLimitCheck(in, app.T2, familyLimits{lim95: l.T2_95, lim99: l.T2_99, family: app.T2Family, conf: app.FamilyConf, count95: l.T2_95},
			"Hotelling T² for new samples",
			"They lie further from the training centre, within the model plane, than the training data allow: more extreme states of the same process.")
	},
}

var applyOutliersQ = Check{
	ID:     "apply-outliers-q",
	Title:  "New samples fit the model (Q residual)",
	Source: "Q residual against the training limits (Jackson & Mudholkar 1979), judged family-wise over the batch: Šidák (1967) at α = 0.01, and a binomial tail test of the count beyond 95 % at α = 0.001",
	Mode:   ModeApply,
	judge: func(in Input) Result {
		app := in.Apply
		l := app.Limits
		if l.QMethod == "none" {
			return Result{Status: Skip, Message: "The model retains every component, so nothing is left for a residual."}
		}
		return applyLimitCheck(in, app.Q, familyLimits{lim95: l.Q95, lim99: l.Q99, family: app.QFamily, conf: app.FamilyConf, count95: l.Q95},
			"Q for new samples",
			"Their correlation structure differs from the training data: see contributions.csv and the contribution figures for the variables to blame.")
	},
}
