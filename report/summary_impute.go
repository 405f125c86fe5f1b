package report

import "pcqc/analysis"

// ImputationInfo is summary.json's account of --missing iterative: the
// method, S and how it was chosen, and how the iteration ended. The cells
// and their values are listed with the other imputed cells.
type ImputationInfo struct {
	Method        string   `json:"method"`
	Cells         int      `json:"cells"`
	Components    int      `json:"components"`
	ChosenBy      string   `json:"components_chosen_by"`
	CVError       []Number `json:"cv_mean_squared_error"` // per S = 1, 2, …; null when S was given
	Iterations    int      `json:"iterations"`
	MaxIterations int      `json:"max_iterations"`
	Tolerance     Number   `json:"tolerance"`
	Change        Number   `json:"last_change"`
	Converged     bool     `json:"converged"`
	ObservedShare Number   `json:"observed_share"`
}

func imputationInfo(res *analysis.Result) *ImputationInfo {
	imp := res.Imputation
	if imp == nil {
		return nil
	}
	var cv []Number
	if imp.CVError != nil {
		cv = numbers(imp.CVError)
	}
	return &ImputationInfo{
		Method: analysis.MethodImputation, Cells: len(imp.Cells), Components: imp.Components,
		ChosenBy: imp.ChosenBy, CVError: cv, Iterations: imp.Iterations, MaxIterations: imp.MaxIterations,
		Tolerance: Number(imp.Tolerance), Change: Number(imp.Change), Converged: imp.Converged,
		ObservedShare: Number(imp.ObservedShare),
	}
}
