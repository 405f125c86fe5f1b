package checks

import (
	"fmt"
	"strings"

	"pcqc/analysis/intake"
)

var sampleIDs = Check{
	ID:     "sample-ids",
	Title:  "Sample ids are unique and present",
	Source: "common practice",
	judge: func(in Input) Result {
		t := in.Run.Table
		groups := in.Run.Adequacy.DuplicateIDs
		dup := 0
		var shown []string
		for _, g := range groups {
			dup += len(g) - 1
			if len(shown) < ListedSamples {
				shown = append(shown, fmt.Sprintf("%q ×%d", t.IDs[g[0]], len(g)))
			}
		}
		r := Result{Value: dup + t.MissingIDs, Limit: 0}
		if t.IDColumn == "" {
			r.Status = Pass
			r.Message = "Samples have no id column; they are numbered by data row, which is unique."
			return r
		}
		var problems []string
		if dup > 0 {
			problems = append(problems, fmt.Sprintf("%s %s another's id (%s)", countNoun(dup, "sample"), plural("shares", "share", dup), strings.Join(shown, ", ")))
		}
		if t.MissingIDs > 0 {
			var named []string
			for _, id := range t.IDs {
				if strings.HasPrefix(id, intake.MissingIDPrefix) && len(named) < ListedSamples {
					named = append(named, id)
				}
			}
			problems = append(problems, fmt.Sprintf("%s %s no id and %s named by %s line instead (%s)", countNoun(t.MissingIDs, "sample"), plural("has", "have", t.MissingIDs), plural("is", "are", t.MissingIDs), plural("its", "their", t.MissingIDs), strings.Join(named, ", ")))
		}
		if len(problems) == 0 {
			r.Status = Pass
			r.Message = fmt.Sprintf("Every sample has its own id in column %s.", t.IDColumn)
			return r
		}
		r.Status = Warn
		r.Message = fmt.Sprintf("Sample ids are not a reliable key: %s. Outliers named by id may then be ambiguous, and tables matched by id to other files may pair the wrong rows.", strings.Join(problems, "; "))
		return r
	},
}
