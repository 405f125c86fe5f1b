package checks

import (
	"fmt"
	"strings"
)

var eigenvalueSeparation = Check{
	ID:     "eigenvalue-separation",
	Title:  "Eigenvalues are separated",
	Source: "North, Bell, Cahalan & Moeng (1982) rule of thumb δλ ≈ λ·√(2/n)",
	judge: func(in Input) Result {
		res := in.Run
		var mixed []string
		for _, s := range res.Separation {
			la, lb := res.Decomp.Eigenvalues[s.A], res.Decomp.Eigenvalues[s.A+1]
			if s.Overlap {
				mixed = append(mixed, fmt.Sprintf("PC%d and PC%d (%s ± %s vs %s ± %s)", s.A+1, s.A+2, g3(la), g3(s.DeltaA), g3(lb), g3(s.DeltaB)))
			}
		}
		r := Result{Value: len(mixed), Limit: "gap > δλ₁ + δλ₂ for every retained neighbour"}
		if len(res.Separation) == 0 {
			r.Status = Skip
			r.Message = "Every component is retained, so there is no neighbouring eigenvalue to compare with."
			return r
		}
		if len(mixed) == 0 {
			r.Status = Pass
			r.Message = fmt.Sprintf("Each retained eigenvalue is separated from its neighbours by more than their combined sampling errors (δλ = λ·√(2/%d)), so each retained component is a distinct axis.", res.Decomp.Rows)
			return r
		}
		r.Status = Warn
		r.Message = fmt.Sprintf("Sampling-error intervals overlap for %s. Those components may mix: read each such pair as a plane, not as separate axes, and do not interpret either one's loadings alone.", strings.Join(mixed, "; "))
		return r
	},
}
