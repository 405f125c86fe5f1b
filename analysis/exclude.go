package analysis

import (
	"pcqc/analysis/intake"
)

// splitRows returns the table without the given rows (ascending indices)
// and a table of those rows alone; both share t's provenance.
func splitRows(t *intake.Table, rows []int) (kept, out *intake.Table) {
	drop := map[int]bool{}
	for _, i := range rows {
		drop[i] = true
	}
	var keep []int
	for i := 0; i < t.Rows(); i++ {
		if !drop[i] {
			keep = append(keep, i)
		}
	}
	return t.SelectRows(keep), t.SelectRows(rows)
}

// Exclusion is the samples left out of the fit (Options.Exclude), projected
// onto the model as apply projects new samples: the training means and
// scales, the retained loadings, T² against the limit for new observations
// and Q against the model's limits. Rows are their indices in the table as
// read, Application their scores and statistics in the same order.
type Exclusion struct {
	Rows        []int
	Application *Application
}

// IDs returns the excluded samples' ids.
func (e *Exclusion) IDs() []string {
	if e == nil {
		return nil
	}
	return e.Application.Table.IDs
}

// projectExcluded scores the excluded rows against the fitted model.
func projectExcluded(r *Result, rows []int, ex *intake.Table) *Exclusion {
	return &Exclusion{Rows: rows, Application: Apply(NewModel(r, ""), ex)}
}
