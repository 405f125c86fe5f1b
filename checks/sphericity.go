package checks

import "fmt"

var sphericity = Check{
	ID:     "sphericity",
	Title:  "Variables share structure (Bartlett)",
	Source: "Bartlett (1951) test of sphericity at the 5 % level",
	judge: func(in Input) Result {
		b := in.Run.Adequacy.Bartlett
		if !b.Computed {
			return Result{Status: Skip, Value: nil, Limit: SphericityAlpha, Message: "Not computed: " + b.SkipReason + "."}
		}
		r := Result{Value: Probability(b.P), Limit: fmt.Sprintf("p < %g", SphericityAlpha)}
		if b.Singular {
			r.Status = Pass
			r.Message = "The correlation matrix is singular: some variables are exact linear combinations of others, which is as much shared structure as there can be (check whether a variable is a sum or copy of others)."
			return r
		}
		stat := fmt.Sprintf("χ² = %s on %d degrees of freedom, %s", g3(b.Chi2), b.DF, pvalue(b.P))
		if b.P < SphericityAlpha {
			r.Status = Pass
			r.Message = stat + ": the correlation matrix differs from the identity, so the variables share structure that components can summarise."
		} else {
			r.Status = Warn
			r.Message = stat + ": the variables show no shared structure to reduce; components of such data mostly describe noise."
		}
		r.Message += imputedNote(in)
		return r
	},
}
