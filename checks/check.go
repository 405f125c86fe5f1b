package checks

import (
	"fmt"
	"math"

	"pcqc/analysis"
)

// Status is the outcome of a check.
type Status string

const (
	Pass Status = "pass"
	Warn Status = "warn"
	Fail Status = "fail"
	Skip Status = "skip" // the check does not apply; the message says why
)

// severity orders statuses for the verdict: skip < pass < warn < fail.
func (s Status) severity() int {
	switch s {
	case Pass:
		return 1
	case Warn:
		return 2
	case Fail:
		return 3
	}
	return 0
}

// AtLeast reports whether s is at least as severe as level.
func (s Status) AtLeast(level Status) bool { return s.severity() >= level.severity() }

// Symbol is a plain-text mark for the status, so that a report never relies
// on colour alone.
func (s Status) Symbol() string {
	switch s {
	case Pass:
		return "+"
	case Warn:
		return "!"
	case Fail:
		return "×"
	}
	return "–"
}

// Result is the outcome of one check, as written to summary.json and the
// report. Value and Limit are numbers where the check measures one number,
// and text otherwise.
type Result struct {
	ID      string `json:"id"`
	Title   string `json:"title"`
	Status  Status `json:"status"`
	Value   any    `json:"value"`
	Limit   any    `json:"limit"`
	Message string `json:"message"`
	Source  string `json:"source"`
}

// Input is everything the checks may read.
type Input struct {
	Run    *analysis.Result      // the audit (run, demo, review)
	Review *analysis.Review      // set by review mode only
	Apply  *analysis.Application // set by apply mode only; Run is then nil
}

// Mode says which kind of run a check belongs to.
type Mode int

const (
	ModeAudit  Mode = iota // every audit of a table (run, demo, review)
	ModeReview             // review mode: another person's tables
	ModeApply              // apply mode: new samples against a saved model
)

// Check is one entry of the registry.
type Check struct {
	ID    string
	Title string
	// Source of the threshold: a publication, or "common practice".
	Source string
	// Mode says when the check runs: audit checks on every audit, review
	// checks when Input.Review is set, apply checks (and only they) when
	// Input.Apply is set.
	Mode  Mode
	judge func(in Input) Result
}

// Run evaluates the check, filling in its identity.
func (c Check) Run(in Input) Result {
	r := c.judge(in)
	r.ID, r.Title, r.Source = c.ID, c.Title, c.Source
	if r.Status == "" {
		panic(fmt.Sprintf("check %s returned no status", c.ID))
	}
	r.Value, r.Limit = finiteOrNil(r.Value), finiteOrNil(r.Limit)
	return r
}

// finiteOrNil keeps NaN and ±Inf out of summary.json (JSON has no such
// numbers) and out of the report: a measurement that is not a finite number
// is reported as absent.
func finiteOrNil(v any) any {
	switch x := v.(type) {
	case float64:
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return nil
		}
	case Probability:
		if math.IsNaN(float64(x)) || math.IsInf(float64(x), 0) {
			return nil
		}
	case map[string]float64:
		clean := map[string]float64{}
		for k, f := range x {
			if !math.IsNaN(f) && !math.IsInf(f, 0) {
				clean[k] = f
			}
		}
		return clean
	}
	return v
}

// Registry lists every check in report order.
var Registry = []Check{
	// Review mode: does another person's PCA follow from the data?
	reviewCentering,
	reviewScaling,
	reviewPreprocessing,
	reviewSubspace,
	reviewOrthonormality,
	reviewScores,
	reviewUncorrelated,
	reviewVariance,
	reviewOrder,
	// The data: do they suit a PCA?
	missingValues,
	censoredValues,
	imputationConvergence,
	constantVariables,
	duplicateRows,
	sampleIDs,
	sampleSize,
	scaling,
	skewness,
	sphericity,
	samplingAdequacy,
	// The decomposition: is it correct?
	centering,
	orthonormalLoadings,
	uncorrelatedScores,
	varianceMatch,
	// The components: how many, and are they distinct?
	componentCount,
	eigenvalueSeparation,
	// The samples: outliers and influence.
	outliersT2,
	outliersQ,
	influence,
	dominance,
	robustAgreement,
	withoutFlagged,
	// Stability: would the loadings come out the same on another sample?
	loadingStability,
	// Apply mode: new samples against a saved model.
	applyVariables,
	applyShift,
	applyOutliersT2,
	applyOutliersQ,
}

// RunAll evaluates every registered check.
func RunAll(in Input) []Result {
	out := make([]Result, 0, len(Registry))
	for _, c := range Registry {
		switch {
		case in.Apply != nil && c.Mode != ModeApply,
			in.Apply == nil && c.Mode == ModeApply,
			c.Mode == ModeReview && in.Review == nil:
			continue
		}
		out = append(out, c.Run(in))
	}
	return out
}

// Verdict is the worst status among the results (skips do not count); pass
// when there are none.
func Verdict(results []Result) Status {
	v := Pass
	for _, r := range results {
		if r.Status.severity() > v.severity() {
			v = r.Status
		}
	}
	return v
}

// Reached reports whether any result is at least as severe as level.
func Reached(results []Result, level Status) bool {
	for _, r := range results {
		if r.Status != Skip && r.Status.AtLeast(level) {
			return true
		}
	}
	return false
}
