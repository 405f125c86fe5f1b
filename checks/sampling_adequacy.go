package checks

import (
	"fmt"
	"strings"

	"pcqc/analysis"
)

// samplingAdequacy judges Kaiser's KMO on his bands, after taking out of
// both of its sums what sampling noise alone puts there (analysis.KMO
// NoiseR2, NoiseQ2). KMO has no sampling theory of its own, and at large
// p/n the noise in the partial correlations drags the sample value toward
// (n−p+1)/(2n−p) (0.34 at p = 50, n = 100) however strong the shared
// structure: on the calibration grid the raw value alarmed on 4 % of clean
// tables, all at p = 50, n ≤ 300. The correction is negligible when n ≫ p.
// When Bartlett's test does not reject sphericity the correlations are
// themselves within noise, the correction has nothing to stand on, and the
// raw value is judged (it sits near 0.5 there, so the check still warns on
// data without shared structure).
var samplingAdequacy = Check{
	ID:     "sampling-adequacy",
	Title:  "Sampling adequacy (KMO)",
	Source: "Kaiser (1974): ≥ 0.9 marvellous … < 0.5 unacceptable; warn below 0.6, fail below 0.5; judged with the sampling noise of r and partial r (Fisher 1915, 1924) taken out",
	judge: func(in Input) Result {
		k := in.Run.Adequacy.KMO
		if !k.Computed {
			return Result{Status: Skip, Value: nil, Limit: KMOWarn, Message: "Not computed: " + k.SkipReason + "."}
		}
		b := in.Run.Adequacy.Bartlett
		judged, corrected := k.Overall, false
		if b.Computed && b.P < SphericityAlpha && k.NoiseQ2 > 0 {
			judged, corrected = k.NoiseCorrected, true
		}
		r := Result{Value: judged, Limit: fmt.Sprintf("≥ %g (fail below %g)", KMOWarn, KMOFail)}
		var low []string
		for j, v := range k.PerVariable {
			if v < KMOFail {
				low = append(low, fmt.Sprintf("%s (%.2f)", in.Run.Table.Variables[j], v))
			}
		}
		r.Message = fmt.Sprintf("Overall KMO %.2f, %s in Kaiser's words.", k.Overall, analysis.KMOLabel(k.Overall))
		if corrected {
			n, p := samplesForNoise(in), len(k.PerVariable)
			r.Message += fmt.Sprintf(" With the share that sampling noise alone adds at n = %d and p = %d taken out of both sums (%.3g of %.3g for the correlations, %.3g of %.3g for the partial correlations), it is %.2f, %s; that value is judged.", n, p, k.NoiseR2, k.SumR2, k.NoiseQ2, k.SumQ2, k.NoiseCorrected, analysis.KMOLabel(k.NoiseCorrected))
		}
		switch {
		case judged < KMOFail:
			r.Status = Fail
			r.Message += " The correlations are mostly between pairs of variables rather than shared by many, so components will not summarise the data well."
		case judged < KMOWarn:
			r.Status = Warn
			r.Message += " Shared structure is weak; interpret the components with care."
		default:
			r.Status = Pass
			r.Message += " The correlations are largely shared among variables, as PCA assumes."
		}
		if len(low) > 0 {
			r.Message += fmt.Sprintf(" Variables below %g on their own: %s; dropping them usually raises the overall value.", KMOFail, strings.Join(low, ", "))
		}
		r.Message += imputedNote(in)
		return r
	},
}
