package checks

import (
	"fmt"
	"strings"

	"pcqc/analysis/intake"
)

// censoredValues warns when a variable has so many cells written as a limit
// that the constant put in their place shapes its variance. The share of
// such cells is judged against the published limit for substitution; the
// share of the variable's (preprocessed) sum of squares those cells carry
// is reported beside it, because that is how much of what PCA sees in the
// variable is the substituted constant rather than measurement.
var censoredValues = Check{
	ID:     "censored-values",
	Title:  "Values below or above limits",
	Source: "US EPA (2000), Guidance for Data Quality Assessment, EPA QA/G-9, section 4.7: substituting for non-detects is acceptable below 15 % of the values",
	judge: func(in Input) Result {
		res := in.Run
		t := res.Table
		r := Result{Value: 0.0, Limit: CensoredShareLimit}
		if len(t.Censored) == 0 {
			r.Status = Pass
			r.Message = "No cell of the analysed variables was written as a limit (such as <0.05)."
			return r
		}
		n, p := res.Z.Dims()
		count := make([]int, p)
		censoredSS := make([]float64, p)
		for _, c := range t.Censored {
			if c.Row < n && c.Var < p {
				count[c.Var]++
				z := res.Z.At(c.Row, c.Var)
				censoredSS[c.Var] += z * z
			}
		}
		var over, under []string
		largest := 0.0
		for j := 0; j < p; j++ {
			if count[j] == 0 {
				continue
			}
			share := float64(count[j]) / float64(n)
			largest = max(largest, share)
			total := 0.0
			for i := 0; i < n; i++ {
				z := res.Z.At(i, j)
				total += z * z
			}
			ss := 0.0
			if total > 0 {
				ss = censoredSS[j] / total
			}
			text := fmt.Sprintf("%s (%s of its values, %s of its variance)", t.Variables[j], pct(share), pct(ss))
			if share > CensoredShareLimit {
				over = append(over, text)
			} else {
				under = append(under, text)
			}
		}
		r.Value = largest
		rule := "half the limit"
		if t.Censoring == intake.CensorSqrt2 {
			rule = "the limit divided by the square root of 2"
		}
		if len(over) == 0 {
			r.Status = Pass
			r.Message = fmt.Sprintf("%s written as a limit and replaced (%s below, the limit above), at most %s of any variable: %s.",
				countNoun(len(t.Censored), "cell"), rule, pct(CensoredShareLimit), strings.Join(under, "; "))
			return r
		}
		r.Status = Warn
		r.Message = fmt.Sprintf("More than %s of the values of %s were written as a limit and replaced by a constant (%s below, the limit above): %s. A constant for that many cells shapes the variable's variance and its loadings; treat these variables' loadings with caution, or analyse them with a method for censored data.",
			pct(CensoredShareLimit), countNoun(len(over), "variable"), rule, strings.Join(over, "; "))
		return r
	},
}
