package report

import (
	"fmt"
	"strings"

	"pcqc/analysis"
)

// iterativeImputationSentence describes the imputation under --missing
// iterative: method, S and how it was chosen, tolerance, cap, and whether it
// converged, so that the paragraph alone lets a reader redo it.
func iterativeImputationSentence(res *analysis.Result) string {
	imp := res.Imputation
	if imp == nil {
		return ""
	}
	how := "given"
	if imp.ChosenBy == analysis.ChosenOnly {
		how = "the only value that leaves an eigenvalue to estimate the noise from"
	}
	if imp.ChosenBy == analysis.ChosenByCV {
		how = fmt.Sprintf("chosen by cross-validation of the imputation (%d times, %.0f %% of the observed cells hidden, imputed with 1 to %d components, and the smallest mean squared error kept)",
			analysis.ImputeCVRepeats, 100*analysis.ImputeCVShare, len(imp.CVError))
	}
	outcome := fmt.Sprintf("it converged after %s", countNoun(imp.Iterations, "iteration"))
	if !imp.Converged {
		outcome = fmt.Sprintf("it did not converge within the cap (last change %.2g)", imp.Change)
	}
	boot := ""
	if res.Stability.Used > 0 {
		boot = " The bootstrap redid the imputation in every resample."
	}
	adequacy := ""
	if n := res.Adequacy.EffectiveN; n > 0 {
		adequacy = fmt.Sprintf(" Bartlett's test and the sampling noise of the Kaiser–Meyer–Olkin measure counted the observed information only: n = %d, the %d samples times the share of cells observed.", n, res.Decomp.Rows)
	}
	return fmt.Sprintf("The %s missing values were imputed by regularised iterative PCA (Josse & Husson 2012): starting from column means, the centring and scaling were refitted to the completed data at every iteration, the data reconstructed from %s with singular values shrunk by the share of noise, and only the missing cells replaced, until their change fell below %s of the data's norm (cap %d iterations); S was %s; %s.%s%s",
		fmt.Sprint(len(imp.Cells)), countNoun(imp.Components, "component"), tolText(imp.Tolerance), imp.MaxIterations, how, outcome, boot, adequacy)
}

// tolText writes a tolerance as 1e-9 rather than Go's 1e-09.
func tolText(x float64) string { return strings.Replace(fmt.Sprintf("%g", x), "e-0", "e-", 1) }
