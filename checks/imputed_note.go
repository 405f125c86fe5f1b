package checks

import "fmt"

// imputedNote is the sentence the adequacy checks add when cells were
// imputed by iterative PCA: their correlations include imputed values,
// which follow the model and so strengthen the apparent structure, and
// their n is the effective one (analysis.EffectiveSamples).
func imputedNote(in Input) string {
	a := in.Run.Adequacy
	if a.EffectiveN == 0 {
		return ""
	}
	return fmt.Sprintf(" %s of the cells were imputed by iterative PCA; the correlations include them, so the test counts only the observed information: n = %d (%d samples × the observed share %s), not %d.",
		pct(a.ImputedShare), a.EffectiveN, in.Run.Decomp.Rows, pct(1-a.ImputedShare), in.Run.Decomp.Rows)
}

// samplesForNoise is the n of the KMO noise terms: the effective n when
// cells were imputed.
func samplesForNoise(in Input) int {
	if n := in.Run.Adequacy.EffectiveN; n > 0 {
		return n
	}
	return in.Run.Decomp.Rows
}
