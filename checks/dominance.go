package checks

import (
	"fmt"
	"strings"
)

var dominance = Check{
	ID:     "dominance",
	Title:  "No single sample dominates a component",
	Source: "common practice (one sample holding more than 25 % of a component's variance)",
	judge: func(in Input) Result {
		s := in.Run.Samples
		worst := 0.0
		var flagged []string
		for a, share := range s.Dominance {
			worst = max(worst, share)
			if share > DominanceLimit {
				flagged = append(flagged, fmt.Sprintf("PC%d by %s (%s)", a+1, in.Run.Table.IDs[s.DominanceSample[a]], pct(share)))
			}
		}
		r := Result{Value: worst, Limit: DominanceLimit}
		if len(flagged) == 0 {
			r.Status = Pass
			r.Message = fmt.Sprintf("No sample holds more than %s of a retained component's variance (largest share %s).", pct(DominanceLimit), pct(worst))
			return r
		}
		r.Status = Warn
		r.Message = fmt.Sprintf("A single sample defines %s: %s. Such a component describes that sample rather than a pattern shared by many; check it and refit without it.",
			plural("this component", "these components", len(flagged)), strings.Join(flagged, "; "))
		return r
	},
}

func plural(one, many string, n int) string {
	if n == 1 {
		return one
	}
	return many
}
