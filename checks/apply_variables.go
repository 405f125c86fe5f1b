package checks

import (
	"fmt"
	"strings"
)

var applyVariables = Check{
	ID:     "apply-variables",
	Title:  "The new data hold the model's variables",
	Source: "fact of the trade (a model scores only the variables it was built on)",
	Mode:   ModeApply,
	judge: func(in Input) Result {
		app := in.Apply
		m := app.Model
		r := Result{Value: len(m.Variables) - len(app.Missing), Limit: len(m.Variables)}
		if len(app.Missing) > 0 {
			r.Status = Fail
			r.Message = fmt.Sprintf("The new data lack %s of the model's %d variables: %s. Without them no sample can be scored; check the column names against the training data (%s).",
				countNoun(len(app.Missing), "variable"), len(m.Variables), strings.Join(app.Missing, ", "), m.Input.File)
			return r
		}
		r.Status = Pass
		r.Message = fmt.Sprintf("All %d model variables are present in the new data.", len(m.Variables))
		if len(app.Extra) > 0 {
			r.Message += fmt.Sprintf(" Other columns were ignored: %s.", listIDs(app.Extra))
		}
		return r
	},
}
