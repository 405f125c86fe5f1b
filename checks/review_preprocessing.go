package checks

import (
	"fmt"
	"math"
	"strings"

	"pcqc/analysis"
)

// reviewPreprocessing carries the audit's verdict on the preprocessing into
// the review's findings: a PCA can be computed correctly and still be the
// wrong analysis, as scikit-learn's default (centred, unscaled) PCA of a
// table whose variables come in different units is.
var reviewPreprocessing = Check{
	ID:     "review-preprocessing",
	Title:  "Their preprocessing suits the data",
	Source: "variables' variances, as they entered their decomposition, within a factor of 100 of one another (common practice, as for the scaling check)",
	Mode:   ModeReview,
	judge: func(in Input) Result {
		rv := in.Review
		best := rv.Variants[rv.Best]
		r := Result{Limit: VarianceRatioLimit}
		if best.MaxAngle >= SubspaceWarn {
			r.Status = Skip
			r.Message = fmt.Sprintf("Their preprocessing could not be identified (the closest, %s, is %s° away), so it cannot be judged.", best.Name(), deg(best.MaxAngle))
			return r
		}
		hi, lo := -1, -1
		for j, v := range rv.PreprocessedVariance {
			if !(v > 0) {
				continue // a constant variable is the constant-variables check's
			}
			if hi < 0 || v > rv.PreprocessedVariance[hi] {
				hi = j
			}
			if lo < 0 || v < rv.PreprocessedVariance[lo] {
				lo = j
			}
		}
		if hi < 0 {
			r.Status = Skip
			r.Message = "No variable varies, so there is no weighting to judge."
			return r
		}
		ratio := rv.PreprocessedVariance[hi] / rv.PreprocessedVariance[lo]
		r.Value = ratio
		how := fmt.Sprintf("Their loadings match the %s recomputation", best.Name())
		switch {
		case best.Scaling != analysis.ScaleNone:
			// Scaled data: the choice of scaling is the audit's to judge
			// (its scaling check), as in a run with that --scale.
			r.Status = Pass
			r.Message = fmt.Sprintf("%s: the variables were scaled before the decomposition, so their units do not decide their weight (largest variance ratio after scaling %s).", how, g3(ratio))
			return r
		case ratio <= VarianceRatioLimit:
			r.Status = Pass
			r.Message = fmt.Sprintf("%s: unscaled, but the variables' variances stay within a factor of %s of one another, so no variable dominates by its units alone.", how, g3(ratio))
			return r
		}
		total := 0.0
		for _, e := range best.Eigenvalues {
			total += e
		}
		// The variable that carries PC1: its squared loading is its share
		// of the unit-length loading vector.
		top, share := 0, 0.0
		p, _ := best.Loadings.Dims()
		for j := 0; j < p; j++ {
			if v := best.Loadings.At(j, 0); v*v > share {
				top, share = j, v*v
			}
		}
		r.Status = Warn
		r.Message = fmt.Sprintf("Their PCA is computed correctly (%s%s), but without scaling it weighs the variables by their units: %s's variance is %s times %s's, PC1 holds %s of the variance, and PC1 is %s %s (squared loading %.4g). The components describe the variables' units rather than their relations. Unless the variables share one unit and their variances are meant to count, the analysis should be redone with unit-variance scaling.",
			strings.ToLower(how[:1]), how[1:], rv.Variables[hi], timesText(ratio), rv.Variables[lo], pct(best.Eigenvalues[0]/total), mostlyText(share), rv.Variables[top], share)
		return r
	},
}

// timesText writes a large ratio as a reader says it, "6.4 million"
// rather than "6.4e+06", in characters every report font has.
func timesText(x float64) string {
	switch {
	case x < 1e4:
		return g3(x)
	case x < 1e6:
		k := math.Round(x/100) * 100 // two or three significant digits
		return fmt.Sprintf("%d,%03d", int(k)/1000, int(k)%1000)
	case x < 1e9:
		return fmt.Sprintf("%.3g million", x/1e6)
	case x < 1e12:
		return fmt.Sprintf("%.3g billion", x/1e9)
	}
	return g3(x)
}

// mostlyText says how much of a unit loading vector one variable holds.
func mostlyText(share float64) string {
	switch {
	case share >= 0.95:
		return "almost entirely"
	case share >= 0.5:
		return "mostly"
	}
	return "led by"
}
