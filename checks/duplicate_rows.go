package checks

import (
	"fmt"
	"strings"
)

var duplicateRows = Check{
	ID:     "duplicate-rows",
	Title:  "Duplicate rows",
	Source: "common practice",
	judge: func(in Input) Result {
		groups := in.Run.Adequacy.DuplicateRows
		extra := 0
		var shown []string
		for _, g := range groups {
			extra += len(g) - 1
			if len(shown) < ListedSamples {
				shown = append(shown, strings.Join(idsOf(in.Run.Table.IDs, g), " = "))
			}
		}
		r := Result{Value: extra, Limit: 0}
		if extra == 0 {
			r.Status = Pass
			r.Message = "No two samples have identical values in every variable."
			return r
		}
		more := ""
		if len(groups) > len(shown) {
			more = fmt.Sprintf(" and %d more groups", len(groups)-len(shown))
		}
		r.Status = Warn
		r.Message = fmt.Sprintf("%s %s another sample exactly. Exact copies are usually a merge or export error; they count twice in every component. Identical samples: %s%s.",
			countNoun(extra, "sample"), plural("repeats", "repeat", extra), strings.Join(shown, "; "), more)
		return r
	},
}
