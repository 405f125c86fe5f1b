package checks

import (
	"fmt"
	"strings"
)

// imputationConvergence fails when the iterative imputation stopped at its
// iteration cap: the imputed cells then depend on where the iteration
// happened to stop, and everything computed from them is unsettled.
var imputationConvergence = Check{
	ID:     "imputation-convergence",
	Title:  "Iterative imputation converged",
	Source: "Josse & Husson (2012) regularised iterative PCA; tolerance: common practice",
	judge: func(in Input) Result {
		imp := in.Run.Imputation
		limit := fmt.Sprintf("change < %s within %d iterations", tolText(ImputationChangeLimit), ImputationIterationCap)
		if imp == nil {
			return Result{Status: Skip, Limit: limit, Message: "No cell was imputed by iterative PCA (--missing iterative not used, or nothing was missing)."}
		}
		r := Result{Value: imp.Change, Limit: limit}
		what := fmt.Sprintf("%s imputed with %s (S = %d)", countNoun(len(imp.Cells), "cell"), countNoun(imp.Components, "component"), imp.Components)
		if imp.Converged && imp.Change < ImputationChangeLimit {
			r.Status = Pass
			r.Message = fmt.Sprintf("%s; the iteration converged after %s (last relative change %.2g).", what, countNoun(imp.Iterations, "iteration"), imp.Change)
			return r
		}
		r.Status = Fail
		r.Message = fmt.Sprintf("%s; the iteration stopped at its cap of %d iterations with a relative change of %.2g, above %s: the imputed values, and every result computed from them, are not settled. Too many cells may be missing for the structure to pin them down; use --missing drop, or measure the missing values.",
			what, imp.Iterations, imp.Change, tolText(ImputationChangeLimit))
		return r
	},
}

// tolText writes a limit as 1e-9 rather than Go's 1e-09.
func tolText(x float64) string { return strings.Replace(fmt.Sprintf("%g", x), "e-0", "e-", 1) }
