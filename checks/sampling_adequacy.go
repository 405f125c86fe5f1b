package checks

import (
	"fmt"
	"strings"

	"pcqc/analysis"
)

var samplingAdequacy = Check{
	ID:     "sampling-adequacy",
	Title:  "Sampling adequacy (KMO)",
	Source: "Kaiser (1974): ≥ 0.9 marvellous … < 0.5 unacceptable; warn below 0.6, fail below 0.5",
	judge: func(in Input) Result {
		k := in.Run.Adequacy.KMO
		if !k.Computed {
			return Result{Status: Skip, Value: nil, Limit: KMOWarn, Message: "Not computed: " + k.SkipReason + "."}
		}
		r := Result{Value: k.Overall, Limit: fmt.Sprintf("≥ %g (fail below %g)", KMOWarn, KMOFail)}
		var low []string
		for j, v := range k.PerVariable {
			if v < KMOFail {
				low = append(low, fmt.Sprintf("%s (%.2f)", in.Run.Table.Variables[j], v))
			}
		}
		r.Message = fmt.Sprintf("Overall KMO %.2f, %s in Kaiser's words.", k.Overall, analysis.KMOLabel(k.Overall))
		switch {
		case k.Overall < KMOFail:
			r.Status = Fail
			r.Message += " The correlations are mostly between pairs of variables rather than shared by many, so components will not summarise the data well."
		case k.Overall < KMOWarn:
			r.Status = Warn
			r.Message += " Shared structure is weak; interpret the components with care."
		default:
			r.Status = Pass
			r.Message += " The correlations are largely shared among variables, as PCA assumes."
		}
		if len(low) > 0 {
			r.Message += fmt.Sprintf(" Variables below %g on their own: %s; dropping them usually raises the overall value.", KMOFail, strings.Join(low, ", "))
		}
		return r
	},
}
