package checks

import (
	"fmt"
	"math"
	"slices"

	"pcqc/analysis"
)

// robustAgreement asks whether an outlier-resistant fit finds the same
// retained subspace. The yardstick is the median, not the 95th percentile,
// of the bootstrap subspace angles: when a few gross outliers drive the
// classical fit, the resamples that happen to leave them out swing the
// model round, which inflates the upper percentiles by exactly the effect
// the check looks for, while the median resample still holds them.
var robustAgreement = Check{
	ID:     "robust-agreement",
	Title:  "A robust fit finds the same components",
	Source: "largest principal angle (Björck & Golub 1973) between the classical and the ROBPCA (Hubert, Rousseeuw & Vanden Branden 2005) or spherical PCA (Locantore et al. 1999) retained subspaces, against 3 times the median bootstrap subspace angle (common practice, measured on clean simulated tables)",
	judge: func(in Input) Result {
		run := in.Run
		rf := run.Robust
		if rf.Method == "" {
			return Result{Status: Skip, Message: fmt.Sprintf("No robust fit: %s.", rf.Reason)}
		}
		var angles []float64
		for _, a := range run.Stability.SubspaceAngles {
			if !math.IsNaN(a) {
				angles = append(angles, a)
			}
		}
		if len(angles) == 0 {
			return Result{Status: Skip, Message: "The yardstick, the bootstrap subspace angles, needs the bootstrap (--bootstrap > 0)."}
		}
		slices.Sort(angles)
		median := angles[len(angles)/2]
		if len(angles)%2 == 0 {
			median = (angles[len(angles)/2-1] + median) / 2
		}
		limit := RobustAgreementFactor * median
		angle := analysis.LargestPrincipalAngle(run.RetainedLoadings(), rf.Loadings)
		method := rf.Method
		if rf.Reason != "" {
			method += " (" + rf.Reason + ")"
		}
		down := rf.DownWeighted()
		shown := down[:min(len(down), 5)]
		who := "it treats no sample as an outlier"
		if len(down) > 0 {
			who = fmt.Sprintf("it treats %s as %s beyond its score- or orthogonal-distance cut-off, the most outlying %s", countNoun(len(down), "sample"), plural("an outlier", "outliers", len(down)), listIDs(idsOf(run.Table.IDs, shown)))
		}
		text := fmt.Sprintf("The robust fit, %s, turns the retained subspace by %s° from the classical one; the bootstrap resamples turn it by %s° (median), so up to %s° is what resampling explains. %s.",
			method, g3(angle), g3(median), g3(limit), capitalise(who))
		r := Result{Value: angle, Limit: limit}
		if angle <= limit {
			r.Status = Pass
			r.Message = text + " The classical components are not an artefact of a few samples."
			return r
		}
		r.Status = Warn
		r.Message = text + " The classical components follow samples that a robust fit sets aside: refit without the samples named (--exclude) and compare, and report the robust fit beside the classical one."
		return r
	},
}

func capitalise(s string) string {
	if s == "" {
		return s
	}
	return string(s[0]-'a'+'A') + s[1:]
}
