package checks

import "fmt"

// sampleSize reports n, p and n/p as information. A low ratio alone is no
// evidence that the components fail to hold: with strong structure a few
// samples per variable give stable components, and with weak structure many
// do not (MacCallum, Widaman, Zhang & Hong 1999, Psychol. Methods 4:84–99,
// found no minimum n/p that works across designs). Whether the components
// hold is judged by the evidence computed on these data — loading-stability
// (bootstrap) and the component-count rules — so this check never warns.
var sampleSize = Check{
	ID:     "sample-size",
	Title:  "Samples per variable",
	Source: "information only; n ≥ 5p is common practice (e.g. Gorsuch 1983), but no ratio suffices across designs (MacCallum et al. 1999)",
	judge: func(in Input) Result {
		n, p := in.Run.Decomp.Rows, in.Run.Decomp.Vars
		ratio := float64(n) / float64(p)
		r := Result{Value: ratio, Limit: fmt.Sprintf("information (n/p ≥ %d is common practice)", MinSamplesPerVariable), Status: Pass}
		base := fmt.Sprintf("n = %d samples, p = %d variables, n/p = %s.", n, p, g3(ratio))
		evidence := " Whether the components hold is judged by loading-stability (bootstrap) and the component-count rules, not by this ratio."
		switch {
		case p > n:
			r.Message = base + " More variables than samples is fine for PCA itself (at most n−1 components exist); the loadings and control limits rest on few samples." + evidence
		case n < MinSamplesPerVariable*p:
			r.Message = base + fmt.Sprintf(" Fewer than %d samples per variable, the common rule of thumb.", MinSamplesPerVariable) + evidence
		default:
			r.Message = base + " At least the common rule of thumb of five samples per variable." + evidence
		}
		return r
	},
}
