package checks

import (
	"fmt"
	"strings"
)

// eigenvalueSeparation owns the finding "these retained components are not
// separate axes". It warns when Anderson's (1963) likelihood-ratio test does
// not reject the equality of two retained neighbouring eigenvalues at
// SeparationAlpha: the data then do not show the two apart, and only their
// plane is determined. The test is the calibrated form of the evidence; the
// bootstrap (sign-aligned congruence low while the retained subspace is
// stable) measures the same thing without a level and is quoted in support.
// North's δλ stays in the message and summary.json as the familiar scale of
// the sampling error. The pair formed by the last retained and the first
// discarded component is reported as information only: whether the
// retained subspace holds against the discarded ones is what
// loading-stability measures (Procrustes congruence) and where noise starts
// is the component-count rules' question.
var eigenvalueSeparation = Check{
	ID:     "eigenvalue-separation",
	Title:  "Retained components are separate axes",
	Source: "Anderson (1963) test of equal eigenvalues at the 10 % level; North, Bell, Cahalan & Moeng (1982) δλ ≈ λ·√(2/n); bootstrap congruence, Lorenzo-Seva & ten Berge (2006)",
	judge: func(in Input) Result {
		res := in.Run
		mix := findAxisMixing(res)
		r := Result{Value: len(mix.equalPairs), Limit: fmt.Sprintf("Anderson's test rejects equal eigenvalues for retained neighbours (p < %g)", SeparationAlpha)}
		if len(res.Separation) == 0 {
			r.Status = Skip
			r.Message = "Every component is retained, so there is no neighbouring eigenvalue to compare with."
			return r
		}
		var boundary string
		for _, s := range res.Separation {
			if !s.BothRetained && s.AndersonP >= SeparationAlpha {
				la, lb := res.Decomp.Eigenvalues[s.A], res.Decomp.Eigenvalues[s.A+1]
				boundary = fmt.Sprintf(" For information: the data do not show the last retained component PC%d apart from the first discarded one (%s vs %s, Anderson's χ² = %s, %s); loading-stability says whether the retained subspace holds.", s.A+1, g3(la), g3(lb), g3(s.AndersonChi2), pvalue(s.AndersonP))
			}
		}
		if res.Retained == 1 {
			r.Status = Pass
			r.Message = "One component is retained, so no retained axes can mix." + boundary
			return r
		}
		if !mix.any() {
			r.Status = Pass
			r.Message = fmt.Sprintf("Anderson's test rejects the equality of every pair of retained neighbouring eigenvalues (p < %g), so each retained component is a distinct axis.", SeparationAlpha)
			if len(mix.rotating) > 0 {
				r.Message += fmt.Sprintf(" For information: under the bootstrap %s %s within the stable subspace (sign-aligned φ₅ < %g); read %s loadings with care.", pcList(mix.rotating), plural("rotates", "rotate", len(mix.rotating)), AxisMixingLimit, plural("its", "their", len(mix.rotating)))
			}
			r.Message += boundary
			return r
		}
		r.Status = Warn
		var pairs []string
		for _, s := range mix.equalPairs {
			la, lb := res.Decomp.Eigenvalues[s.A], res.Decomp.Eigenvalues[s.A+1]
			pairs = append(pairs, fmt.Sprintf("PC%d and PC%d (%s vs %s, North's δλ %s and %s; Anderson's χ² = %s on 2 df, %s)", s.A+1, s.A+2, g3(la), g3(lb), g3(s.DeltaA), g3(s.DeltaB), g3(s.AndersonChi2), pvalue(s.AndersonP)))
		}
		r.Message = fmt.Sprintf("Nearly equal eigenvalues: the data do not show %s to differ (equality not rejected at the %g level)", strings.Join(pairs, "; "), SeparationAlpha)
		if len(mix.rotating) > 0 {
			r.Message += fmt.Sprintf(", and under the bootstrap %s %s within a stable subspace (sign-aligned φ₅ < %g, Procrustes φ₅ ≥ %g)", pcList(mix.rotating), plural("rotates", "rotate", len(mix.rotating)), AxisMixingLimit, CongruencePass)
		}
		r.Message += ". Those components are not separate axes: read them together as a plane (or space) and do not interpret their individual loadings." + boundary
		return r
	},
}
