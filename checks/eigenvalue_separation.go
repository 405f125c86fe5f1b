package checks

import (
	"fmt"
	"strings"
)

// eigenvalueSeparation owns the finding "these retained components are not
// separate axes". It rests on two pieces of evidence: North's rule on the
// eigenvalues of retained neighbours, and the bootstrap (sign-aligned
// congruence low while the retained subspace is stable). The pair formed by
// the last retained and the first discarded component is reported as
// information only: whether the retained subspace holds against the
// discarded ones is what loading-stability measures (Procrustes congruence)
// and where noise starts is the component-count rules' question.
var eigenvalueSeparation = Check{
	ID:     "eigenvalue-separation",
	Title:  "Retained components are separate axes",
	Source: "North, Bell, Cahalan & Moeng (1982) rule of thumb δλ ≈ λ·√(2/n); bootstrap congruence, Lorenzo-Seva & ten Berge (2006)",
	judge: func(in Input) Result {
		res := in.Run
		mix := findAxisMixing(res)
		r := Result{Value: len(mix.northPairs) + len(mix.rotating), Limit: fmt.Sprintf("gap > δλ₁ + δλ₂ for retained neighbours; sign-aligned φ₅ ≥ %g where the subspace is stable", AxisMixingLimit)}
		if len(res.Separation) == 0 {
			r.Status = Skip
			r.Message = "Every component is retained, so there is no neighbouring eigenvalue to compare with."
			return r
		}
		var boundary string
		for _, s := range res.Separation {
			if !s.BothRetained && s.Overlap {
				la, lb := res.Decomp.Eigenvalues[s.A], res.Decomp.Eigenvalues[s.A+1]
				boundary = fmt.Sprintf(" For information: the last retained component PC%d overlaps the first discarded one (%s ± %s vs %s ± %s); loading-stability says whether the retained subspace holds.", s.A+1, g3(la), g3(s.DeltaA), g3(lb), g3(s.DeltaB))
			}
		}
		if res.Retained == 1 {
			r.Status = Pass
			r.Message = "One component is retained, so no retained axes can mix." + boundary
			return r
		}
		if !mix.any() {
			r.Status = Pass
			r.Message = fmt.Sprintf("Each retained eigenvalue is separated from its retained neighbours by more than their combined sampling errors (δλ = λ·√(2/%d)), and no retained axis rotates under resampling, so each retained component is a distinct axis.", res.Decomp.Rows) + boundary
			return r
		}
		r.Status = Warn
		var parts []string
		if len(mix.northPairs) > 0 {
			var pairs []string
			for _, s := range mix.northPairs {
				la, lb := res.Decomp.Eigenvalues[s.A], res.Decomp.Eigenvalues[s.A+1]
				pairs = append(pairs, fmt.Sprintf("PC%d and PC%d (%s ± %s vs %s ± %s)", s.A+1, s.A+2, g3(la), g3(s.DeltaA), g3(lb), g3(s.DeltaB)))
			}
			parts = append(parts, "sampling-error intervals overlap for "+strings.Join(pairs, "; "))
		}
		if len(mix.rotating) > 0 {
			parts = append(parts, fmt.Sprintf("under the bootstrap %s %s within a stable subspace (sign-aligned φ₅ < %g, Procrustes φ₅ ≥ %g)", pcList(mix.rotating), plural("rotates", "rotate", len(mix.rotating)), AxisMixingLimit, CongruencePass))
		}
		r.Message = "Nearly equal eigenvalues: " + strings.Join(parts, "; and ") + ". Those components are not separate axes: read them together as a plane (or space) and do not interpret their individual loadings." + boundary
		return r
	},
}
