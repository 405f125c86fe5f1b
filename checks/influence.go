package checks

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"pcqc/analysis"
)

// influence replaces a leverage rule: leverage is an affine function of T²
// (h = 1/n + T²/(n−1)) and so repeated the T² alarm, whereas what matters
// about a single sample is whether the model depends on it.
var influence = Check{
	ID:     "influence",
	Title:  "No single sample turns the components",
	Source: "exact leave-one-out principal angles (Björck & Golub 1973) against the 95th percentile of the bootstrap subspace angles over the resamples that drew the sample (common practice: a sample matters when it alone moves the model more than resampling typically does)",
	judge: func(in Input) Result {
		s := in.Run.Samples
		inf := s.Influence
		if inf.Angle == nil {
			return Result{Status: Skip, Message: fmt.Sprintf("Not measured: %s.", inf.Skipped)}
		}
		limit := analysis.InfluenceLimit(in.Run.Stability)
		if math.IsNaN(limit) || len(inf.Limit) != len(inf.Angle) {
			return Result{Status: Skip, Message: "The yardstick, the bootstrap subspace angles, needs the bootstrap (--bootstrap > 0); samples.csv still holds each sample's influence_deg."}
		}
		var idx []int
		worst := 0
		for i, a := range inf.Angle {
			// A sample whose angle or limit is not a number could not be
			// judged; it is listed so that it is looked at.
			if !(a <= inf.Limit[i]) {
				idx = append(idx, i)
			}
			if a > inf.Angle[worst] {
				worst = i
			}
		}
		slices.SortStableFunc(idx, func(a, b int) int { return cmp.Compare(inf.Angle[b], inf.Angle[a]) })
		r := Result{Value: inf.Angle[worst], Limit: limit}
		used := 0
		for _, a := range in.Run.Stability.SubspaceAngles {
			if !math.IsNaN(a) {
				used++
			}
		}
		yard := fmt.Sprintf("Leaving out one sample at a time (preprocessing refitted, computed exactly), the retained subspace turns by at most %s° (sample %s, which changes the eigenvalues by %s); the %d bootstrap resamples of the whole table turn it by up to %s° (95th percentile), and each sample is held against the 95th percentile over the resamples that drew it (for %s: %s°).",
			g3(inf.Angle[worst]), in.Run.Table.IDs[worst], changeText(inf.EigenChange[worst]), used, g3(limit), in.Run.Table.IDs[worst], g3(inf.Limit[worst]))
		if len(idx) == 0 {
			r.Status = Pass
			r.Message = yard + " No sample alone moves the model more than resampling does."
			return r
		}
		r.Status = Warn
		r.Message = fmt.Sprintf("%s %s the retained components more than resampling typically does: %s. %s Components that depend on so few samples describe them rather than the rest; check them and refit without them.",
			countNoun(len(idx), "sample"), plural("turns", "turn", len(idx)), listIDs(idsOf(in.Run.Table.IDs, idx)), yard)
		return r
	},
}

// changeText writes the relative eigenvalue changes as "PC1 +3.1 %, PC2 −0.4 %".
func changeText(change []float64) string {
	out := ""
	for a, c := range change {
		if a > 0 {
			out += ", "
		}
		out += fmt.Sprintf("PC%d %+.1f %%", a+1, 100*c)
	}
	if out == "" {
		return "not at all"
	}
	return out
}
