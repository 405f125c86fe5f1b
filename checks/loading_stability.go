package checks

import (
	"fmt"
	"strings"
)

// loadingStability judges whether the retained subspace would come out the
// same on another sample: the Procrustes-aligned congruence, which ignores
// how the variance is shared out among the retained axes. Axes that only
// rotate within a stable subspace have one cause, nearly equal eigenvalues,
// and eigenvalue-separation reports it; this check mentions it and does not
// warn for it, so that the finding is raised once.
var loadingStability = Check{
	ID:     "loading-stability",
	Title:  "The retained subspace is stable under resampling",
	Source: "Tucker's congruence after Procrustes rotation over the bootstrap; Lorenzo-Seva & ten Berge (2006): ≥ 0.95 equal, 0.85–0.94 fair; warn when the 5th percentile, fail when the median is below fair",
	judge: func(in Input) Result {
		st := in.Run.Stability
		limit := fmt.Sprintf("Procrustes φ₅ ≥ %g (fail when the median is below %g)", StableSubspaceWarn, StableSubspaceFail)
		if st.Resamples == 0 {
			return Result{Status: Skip, Limit: limit, Message: "Not computed: the bootstrap was turned off (--bootstrap 0)."}
		}
		if st.Used == 0 {
			return Result{Status: Skip, Limit: limit, Message: fmt.Sprintf("All %d resamples were degenerate (their decomposition failed), so stability cannot be judged.", st.Resamples)}
		}
		r := Result{Limit: limit, Status: Pass}
		worst, worstPC := 1.0, 0
		var parts, weak []string
		for a, c := range st.Components {
			if c.ProcrustesP5 < worst {
				worst, worstPC = c.ProcrustesP5, a
			}
			parts = append(parts, fmt.Sprintf("PC%d Procrustes φ₅ = %.3f (median %.3f), sign-aligned φ₅ = %.3f", a+1, c.ProcrustesP5, c.ProcrustesMedian, c.CongruenceP5))
			switch {
			case c.ProcrustesMedian < StableSubspaceFail:
				r.Status = Fail
				weak = append(weak, fmt.Sprintf("PC%d", a+1))
			case c.ProcrustesP5 < StableSubspaceWarn:
				if r.Status != Fail {
					r.Status = Warn
				}
				weak = append(weak, fmt.Sprintf("PC%d", a+1))
			}
		}
		r.Value = worst
		used := fmt.Sprintf("%d bootstrap resamples", st.Used)
		if st.ConstantResamples > 0 {
			used += fmt.Sprintf(" (in %d a variable was constant and entered with zero variance)", st.ConstantResamples)
		}
		if st.Degenerate > 0 {
			used += fmt.Sprintf(" (%d more skipped: their decomposition failed)", st.Degenerate)
		}
		r.Message = fmt.Sprintf("Lowest 5th-percentile congruence of the retained subspace with the reference, after Procrustes rotation, φ₅ = %.3f (PC%d) over %s. Per component: %s.", worst, worstPC+1, used, strings.Join(parts, "; "))
		switch r.Status {
		case Pass:
			r.Message += fmt.Sprintf(" The retained subspace comes out at least fairly similar (φ₅ ≥ %g) on resampled data.", StableSubspaceWarn)
		default:
			r.Message += fmt.Sprintf(" The retained subspace itself changes from resample to resample (%s): the retained components are not well determined by these data — fewer components, or more samples, may be needed; do not interpret their loadings.", strings.Join(weak, ", "))
		}
		mix := findAxisMixing(in.Run)
		if len(mix.rotating) > 0 {
			r.Message += fmt.Sprintf(" %s %s within the stable subspace (see eigenvalue-separation): read those components together, not as separate axes.", pcList(mix.rotating), plural("rotates", "rotate", len(mix.rotating)))
		} else if r.Status == Pass {
			lowest := 1.0
			for _, c := range st.Components {
				lowest = min(lowest, c.CongruenceP5)
			}
			if lowest >= CongruencePass {
				r.Message += fmt.Sprintf(" Each retained axis is stable on its own too (sign-aligned φ₅ ≥ %g), so its loadings can be interpreted.", CongruencePass)
			} else {
				r.Message += fmt.Sprintf(" Individual axes are at least fairly similar across resamples (sign-aligned φ₅ ≥ %g): interpret their larger loadings, with their intervals.", AxisMixingLimit)
			}
		}
		return r
	},
}
