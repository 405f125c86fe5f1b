package checks

import (
	"fmt"
	"math"

	"pcqc/analysis"
)

// limitCheck judges per-sample statistics against their 95 % and 99 %
// limits: warn when any sample passes the 99 % limit, naming them, and in
// every case say how many pass the 95 % limit against the 5 % expected by
// chance.
func limitCheck(values []float64, lim95, lim99 float64, ids []string, what, remedy string) Result {
	n := len(values)
	n95, _ := analysis.CountAbove(values, lim95)
	n99, idx99 := analysis.CountAbove(values, lim99)
	r := Result{Value: n99, Limit: map[string]float64{"limit_95": lim95, "limit_99": lim99}}
	chance := fmt.Sprintf("%s beyond the 95 %% limit (%s expected by chance, 5 %% of %d) and %s beyond the 99 %% limit (%s expected).",
		countNoun(n95, "sample"), g3(0.05*float64(n)), n, countNoun(n99, "sample"), g3(0.01*float64(n)))
	if n99 == 0 {
		r.Status = Pass
		r.Message = fmt.Sprintf("No sample passes the 99 %% limit of %s. %s", what, chance)
		return r
	}
	r.Status = Warn
	r.Message = fmt.Sprintf("%s %s the 99 %% limit of %s, where chance gives %s. They are: %s. %s %s", countNoun(n99, "sample"), plural("passes", "pass", n99), what, g3(0.01*float64(n)), listIDs(idsOf(ids, idx99)), chance, remedy)
	return r
}

var outliersT2 = Check{
	ID:     "outliers-t2",
	Title:  "Outliers within the model (Hotelling T²)",
	Source: "Hotelling T² with the beta-distribution limits of Tracy, Young & Mason (1992) at 95 % and 99 %",
	judge: func(in Input) Result {
		s := in.Run.Samples
		if math.IsNaN(s.Limits.T2_99) {
			return Result{Status: Skip, Message: fmt.Sprintf("The T² limit needs n > k + 1 (n = %d, k = %d).", in.Run.Decomp.Rows, in.Run.Retained)}
		}
		return limitCheck(s.T2, s.Limits.T2_95, s.Limits.T2_99, in.Run.Table.IDs,
			fmt.Sprintf("Hotelling T² (%s)", g3(s.Limits.T2_99)),
			"These samples lie unusually far from the centre within the component plane: extreme but consistent with the correlation structure. Check them for real extremes or errors before they shape the components.")
	},
}

var outliersQ = Check{
	ID:     "outliers-q",
	Title:  "Outliers off the model (Q residual)",
	Source: "Q residual (squared prediction error) with Jackson & Mudholkar (1979) limits at 95 % and 99 %, Box (1954) χ² approximation where JM is undefined",
	judge: func(in Input) Result {
		s := in.Run.Samples
		if s.Limits.QMethod == analysis.QNone {
			return Result{Status: Skip, Message: "Every component is retained, so nothing is left for a residual."}
		}
		method := "Jackson–Mudholkar"
		if s.Limits.QMethod == analysis.QBox {
			method = "Box's χ² approximation, as the Jackson–Mudholkar formula is undefined for these eigenvalues"
		}
		r := limitCheck(s.Q, s.Limits.Q95, s.Limits.Q99, in.Run.Table.IDs,
			fmt.Sprintf("Q (%s, by %s)", g3(s.Limits.Q99), method),
			"These samples do not fit the correlation structure of the rest (a broken sensor, a unit error, a contamination, or a genuinely different kind of sample). Look at their residuals variable by variable.")
		return r
	},
}
