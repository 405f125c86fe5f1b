package checks

import (
	"fmt"
	"strings"
)

var constantVariables = Check{
	ID:     "constant-variables",
	Title:  "Constant variables",
	Source: "fact of the trade (a constant carries no variance and cannot be unit-scaled)",
	judge: func(in Input) Result {
		var names []string
		for _, d := range in.Run.Table.DroppedVariables {
			if strings.HasPrefix(d.Reason, "constant") {
				names = append(names, d.Name)
			}
		}
		r := Result{Value: len(names), Limit: 0}
		if len(names) == 0 {
			r.Status = Pass
			r.Message = "No variable is constant."
			return r
		}
		r.Status = Warn
		r.Message = fmt.Sprintf("%s had a single value and %s dropped. A constant can carry no component; check that it is not a stuck sensor or a failed export. Dropped: %s.",
			countNoun(len(names), "variable"), were(len(names)), strings.Join(names, ", "))
		return r
	},
}

func were(n int) string {
	if n == 1 {
		return "was"
	}
	return "were"
}
