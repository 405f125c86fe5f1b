package checks

import (
	"fmt"

	"pcqc/analysis"
)

var leverage = Check{
	ID:     "leverage",
	Title:  "High-leverage samples",
	Source: "Hoaglin & Welsch (1978) 2p/n rule, in its conservative 3p/n form with p = k + 1",
	judge: func(in Input) Result {
		s := in.Run.Samples
		k := in.Run.Retained
		_, idx := analysis.CountAbove(s.Leverage, s.Limits.Leverage)
		r := Result{Value: len(idx), Limit: s.Limits.Leverage}
		c := analysis.LeverageFactor
		rule := fmt.Sprintf("The rule is h > %d(k+1)/n = %d·%d/%d, Hoaglin & Welsch's 2p/n rule made conservative, with p = k + 1 = %d parameters.", c, c, k+1, in.Run.Decomp.Rows, k+1)
		if len(idx) == 0 {
			r.Status = Pass
			r.Message = fmt.Sprintf("No sample has leverage above %s. %s", g3(s.Limits.Leverage), rule)
			return r
		}
		r.Status = Warn
		r.Message = fmt.Sprintf("%s %s leverage above %s. %s They are: %s. Each pulls the components towards itself; refit without them to see whether the conclusions change.",
			countNoun(len(idx), "sample"), plural("has", "have", len(idx)), g3(s.Limits.Leverage), rule, listIDs(idsOf(in.Run.Table.IDs, idx)))
		return r
	},
}
