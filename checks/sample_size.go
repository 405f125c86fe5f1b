package checks

import "fmt"

var sampleSize = Check{
	ID:     "sample-size",
	Title:  "Samples per variable",
	Source: "common practice (n ≥ 5p; e.g. Gorsuch 1983)",
	judge: func(in Input) Result {
		n, p := in.Run.Decomp.Rows, in.Run.Decomp.Vars
		ratio := float64(n) / float64(p)
		r := Result{Value: ratio, Limit: fmt.Sprintf("n/p ≥ %d", MinSamplesPerVariable)}
		base := fmt.Sprintf("n = %d samples, p = %d variables, n/p = %s.", n, p, g3(ratio))
		switch {
		case p > n:
			r.Status = Warn
			r.Message = base + " More variables than samples is fine for PCA itself (at most n−1 components exist), but the loadings and the control limits are less reliable; read them with the stability results."
		case n < MinSamplesPerVariable*p:
			r.Status = Warn
			r.Message = base + fmt.Sprintf(" Fewer than %d samples per variable: the smaller components and the loadings may not be reproducible.", MinSamplesPerVariable)
		default:
			r.Status = Pass
			r.Message = base + " Enough samples per variable for stable leading components."
		}
		return r
	},
}
