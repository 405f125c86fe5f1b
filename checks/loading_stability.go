package checks

import (
	"fmt"
	"strings"
)

var loadingStability = Check{
	ID:     "loading-stability",
	Title:  "Loadings are stable under resampling",
	Source: "Tucker's congruence, bootstrap 5th percentile; Lorenzo-Seva & ten Berge (2006): ≥ 0.95 equal, 0.85–0.94 fair",
	judge: func(in Input) Result {
		st := in.Run.Stability
		limit := fmt.Sprintf("φ₅ ≥ %g (fail below %g)", CongruencePass, CongruenceFail)
		if st.Resamples == 0 {
			return Result{Status: Skip, Limit: limit, Message: "Not computed: the bootstrap was turned off (--bootstrap 0)."}
		}
		if st.Used == 0 {
			return Result{Status: Skip, Limit: limit, Message: fmt.Sprintf("All %d resamples were degenerate (their decomposition failed), so stability cannot be judged.", st.Resamples)}
		}
		r := Result{Limit: limit, Status: Pass}
		worst, worstPC := 1.0, 0
		var parts, mixing []string
		for a, c := range st.Components {
			if c.CongruenceP5 < worst {
				worst, worstPC = c.CongruenceP5, a
			}
			parts = append(parts, fmt.Sprintf("PC%d φ₅ = %.3f (median %.3f)", a+1, c.CongruenceP5, c.CongruenceMedian))
			switch {
			case c.CongruenceP5 < CongruenceFail:
				r.Status = Fail
			case c.CongruenceP5 < CongruencePass && r.Status != Fail:
				r.Status = Warn
			}
			if c.CongruenceP5 < CongruencePass && c.ProcrustesP5 >= CongruencePass {
				mixing = append(mixing, fmt.Sprintf("PC%d", a+1))
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
		r.Message = fmt.Sprintf("Lowest 5th-percentile congruence with the reference loadings φ₅ = %.3f (PC%d) over %s. Per component: %s.", worst, worstPC+1, used, strings.Join(parts, "; "))
		switch r.Status {
		case Pass:
			r.Message += " Every retained component comes out essentially the same on resampled data, so its loadings can be interpreted."
		default:
			r.Message += " Components below 0.95 change noticeably from resample to resample: do not interpret their individual loadings."
		}
		if len(mixing) > 0 {
			r.Message += fmt.Sprintf(" After a Procrustes rotation of the retained block, %s %s φ₅ ≥ %g: the components mix within a stable subspace, so read the retained components together as a plane (or space), not as separate axes.", strings.Join(mixing, ", "), plural("reaches", "reach", len(mixing)), CongruencePass)
		}
		return r
	},
}
