package report

import (
	"bytes"
	"encoding/json"
	"math"
	"os"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/checks"
)

// Meta describes the run itself: the tool and how it was invoked.
type Meta struct {
	Version string
	Command []string // the command line, for the Reproduce section
	Options Options  // every effective option, defaults included
}

// Option is one effective option and its value.
type Option struct {
	Name  string
	Value any
}

// Options keeps the options in the order they are documented; it is written
// to JSON as an object in that order.
type Options []Option

// MarshalJSON writes the options as one JSON object, keys in order.
func (o Options) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, opt := range o {
		if i > 0 {
			b.WriteByte(',')
		}
		k, err := json.Marshal(opt.Name)
		if err != nil {
			return nil, err
		}
		v, err := json.Marshal(jsonValue(opt.Value))
		if err != nil {
			return nil, err
		}
		b.Write(k)
		b.WriteByte(':')
		b.Write(v)
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

// Summary is the content of summary.json.
type Summary struct {
	Tool       ToolInfo       `json:"tool"`
	Input      InputInfo      `json:"input"`
	Options    Options        `json:"options"`
	Components ComponentsInfo `json:"components"`
	Limits     LimitsInfo     `json:"limits"`
	Stability  *StabilityInfo `json:"stability"`
	Adequacy   AdequacyInfo   `json:"adequacy"`
	Review     *ReviewInfo    `json:"review,omitempty"`
	// Excluded and WithoutFlagged: see exclude.go.
	Excluded       *ExcludedInfo `json:"excluded,omitempty"`
	WithoutFlagged *WhatIfInfo   `json:"without_flagged,omitempty"`
	// Imputation: see summary_impute.go.
	Imputation *ImputationInfo `json:"imputation,omitempty"`
	Missing    MissingInfo     `json:"missing"` // see missing.go
	Checks     []checks.Result `json:"checks"`
	Verdict    checks.Status   `json:"verdict"`
}

type ToolInfo struct {
	Name    string `json:"name"`
	Version string `json:"version"`
}

// TableSource is where a table came from and how many of its rows and
// cells were used: the head of the input section of an audit's and of an
// apply run's summary.json.
type TableSource struct {
	File         string `json:"file"`
	SHA256       string `json:"sha256"`
	Sheet        string `json:"sheet,omitempty"` // the worksheet read, for a workbook
	Rows         int    `json:"rows"`
	RowsRead     int    `json:"rows_read"`
	RowsDropped  int    `json:"rows_dropped"`
	MissingCells int    `json:"missing_cells"`
	ImputedCells int    `json:"imputed_cells"`
}

// tableSource is t's TableSource.
func tableSource(t *intake.Table) TableSource {
	return TableSource{File: t.File, SHA256: t.SHA256, Sheet: t.Sheet, Rows: t.Rows(), RowsRead: t.RowsRead,
		RowsDropped: t.RowsDropped, MissingCells: t.MissingCells, ImputedCells: t.ImputedCells}
}

type InputInfo struct {
	TableSource
	Variables        []string                 `json:"variables"`
	Units            []string                 `json:"units,omitempty"` // per variable, from --units-row
	SkippedLines     int                      `json:"skipped_lines,omitempty"`
	CommentLines     int                      `json:"comment_lines,omitempty"`
	GroupedNumbers   int                      `json:"grouped_numbers,omitempty"`
	VariablesDropped []intake.DroppedVariable `json:"variables_dropped"`
	Censored         *CensoredInfo            `json:"censored,omitempty"` // see censored.go
	IDColumn         *string                  `json:"id_column"`
	GroupColumn      *string                  `json:"group_column"`
}

type ComponentsInfo struct {
	Retained       int                  `json:"retained"`
	Rule           string               `json:"rule"`
	NoStructure    bool                 `json:"no_structure"`
	Method         string               `json:"method"`
	Eigenvalues    []Number             `json:"eigenvalues"`
	Percent        []Number             `json:"percent"`
	Counts         []analysis.RuleCount `json:"counts"`
	Permutations   int                  `json:"permutations"`
	PermutationCap int                  `json:"permutation_cap"`
	PermutationP95 []Number             `json:"permutation_p95"`
	// PermutationExceedance is each component's Monte Carlo p-value: the
	// share of permutations whose eigenvalue reaches the observed one.
	PermutationExceedance []Number `json:"permutation_exceedance"`
	// ParallelDecisions is keep, drop, borderline or "not tested" per
	// component; Borderline names the unsettled component, if any.
	ParallelDecisions  []analysis.ParallelDecision `json:"parallel_decisions"`
	Borderline         *string                     `json:"parallel_borderline"`
	BrokenStickPercent []Number                    `json:"broken_stick_percent"`
	CrossValidation    *CrossValidationInfo        `json:"cross_validation"`
}

// CrossValidationInfo summarises element-wise cross-validation; null when
// it did not run.
type CrossValidationInfo struct {
	Folds       int      `json:"folds"`
	Rows        int      `json:"rows_used"`
	RowsTotal   int      `json:"rows_total"`
	PRESS       []Number `json:"press"`
	PressShare  []Number `json:"press_share"`
	Smallest    int      `json:"smallest_press_at"`
	SE          Number   `json:"one_se"`
	Count       int      `json:"count"`
	Iterations  int      `json:"max_iterations_used"`
	Unconverged int      `json:"unconverged_fits"`
}

func crossValidationInfo(res *analysis.Result) *CrossValidationInfo {
	cv := res.Counts.CV
	if cv.Folds == 0 {
		return nil
	}
	return &CrossValidationInfo{Folds: cv.Folds, Rows: cv.Rows, RowsTotal: cv.RowsTotal,
		PRESS: numbers(cv.PRESS), PressShare: scaled(cv.PRESS, 1/cv.SS), Smallest: cv.Min,
		SE: Number(cv.SE), Count: cv.Count, Iterations: cv.Iterations, Unconverged: cv.Unconverged}
}

func parallelBorderline(res *analysis.Result) *string {
	if b := res.Counts.Parallel.Borderline; b >= 0 && res.Counts.Parallel.Permutations > 0 {
		s := componentName(b)
		return &s
	}
	return nil
}

// LimitsInfo holds the control limits; null where a limit is undefined.
type LimitsInfo struct {
	T2_95    Number `json:"t2_95"`
	T2_99    Number `json:"t2_99"`
	Q95      Number `json:"q_95"`
	Q99      Number `json:"q_99"`
	QMethod  string `json:"q_method"`
	Leverage Number `json:"leverage"`
	// The family-wise limits of the outlier checks: Šidák's per-sample
	// confidence (1 − α)^(1/n) for the family-wise α, and T² and Q there.
	FamilyAlpha      Number `json:"family_alpha"`
	FamilyConfidence Number `json:"family_confidence"`
	T2Family         Number `json:"t2_family"`
	QFamily          Number `json:"q_family"`
	// Influence95 is the 95th percentile of the bootstrap subspace angles
	// (degrees), the influence check's yardstick; null without bootstrap.
	Influence95 Number `json:"influence_p95_deg"`
}

// AdequacyInfo holds the numbers behind the adequacy and separation checks.
type AdequacyInfo struct {
	KMO        KMOInfo          `json:"kmo"`
	Bartlett   BartlettInfo     `json:"bartlett"`
	Separation []SeparationInfo `json:"separation"`
}

// KMOInfo is the Kaiser–Meyer–Olkin measure; numbers are null when it was
// not computed (SkipReason says why).
type KMOInfo struct {
	Overall     Number        `json:"overall"`
	PerVariable []VariableKMO `json:"per_variable"`
	// NoiseCorrected is the overall value with what sampling noise alone
	// adds to both sums taken out (see the sampling-adequacy check).
	NoiseCorrected Number `json:"noise_corrected"`
	SkipReason     string `json:"skip_reason,omitempty"`
}

type VariableKMO struct {
	Variable string `json:"variable"`
	KMO      Number `json:"kmo"`
}

// BartlettInfo is Bartlett's test of sphericity.
type BartlettInfo struct {
	Chi2       Number `json:"chi2"`
	DF         int    `json:"df"`
	P          Number `json:"p"`
	Singular   bool   `json:"singular"`
	SkipReason string `json:"skip_reason,omitempty"`
}

// SeparationInfo is North's rule for one retained component and its next
// neighbour: δλ = λ·√(2/n) for each, and whether λ ± δλ overlap; and
// Anderson's (1963) test that the two eigenvalues are equal (χ² on 2 df).
type SeparationInfo struct {
	Component    string `json:"component"`
	Eigenvalue   Number `json:"eigenvalue"`
	Delta        Number `json:"delta"`
	Next         string `json:"next"`
	NextDelta    Number `json:"next_delta"`
	Overlap      bool   `json:"overlap"`
	BothRetained bool   `json:"both_retained"`
	AndersonChi2 Number `json:"anderson_chi2"`
	AndersonP    Number `json:"anderson_p"`
}

func adequacyInfo(res *analysis.Result) AdequacyInfo {
	a := res.Adequacy
	nan := Number(math.NaN())
	info := AdequacyInfo{
		KMO:        KMOInfo{Overall: nan, NoiseCorrected: nan, PerVariable: []VariableKMO{}, SkipReason: a.KMO.SkipReason},
		Bartlett:   BartlettInfo{Chi2: nan, P: nan, SkipReason: a.Bartlett.SkipReason},
		Separation: []SeparationInfo{},
	}
	if a.KMO.Computed {
		info.KMO.Overall = Number(a.KMO.Overall)
		if a.KMO.NoiseQ2 > 0 {
			info.KMO.NoiseCorrected = Number(a.KMO.NoiseCorrected)
		}
		for j, v := range a.KMO.PerVariable {
			info.KMO.PerVariable = append(info.KMO.PerVariable, VariableKMO{Variable: res.Table.Variables[j], KMO: Number(v)})
		}
	}
	if a.Bartlett.Computed {
		b := a.Bartlett
		info.Bartlett = BartlettInfo{Chi2: Number(b.Chi2), DF: b.DF, P: Number(b.P), Singular: b.Singular}
	}
	for _, s := range res.Separation {
		info.Separation = append(info.Separation, SeparationInfo{
			Component: componentName(s.A), Eigenvalue: Number(res.Decomp.Eigenvalues[s.A]), Delta: Number(s.DeltaA),
			Next: componentName(s.A + 1), NextDelta: Number(s.DeltaB), Overlap: s.Overlap, BothRetained: s.BothRetained,
			AndersonChi2: Number(s.AndersonChi2), AndersonP: Number(s.AndersonP),
		})
	}
	return info
}

// StabilityInfo summarises the bootstrap; null when it did not run.
type StabilityInfo struct {
	Resamples  int `json:"resamples"`
	Used       int `json:"used"`
	Degenerate int `json:"degenerate"`
	// ConstantResamples counts used resamples in which a variable was
	// constant (kept, with that variable at zero variance).
	ConstantResamples int `json:"constant_resamples"`
	// Scheme is "full bootstrap" or "bag of little bootstraps"; for the
	// latter, subset_size (b), subsets (s), per_subset (r) and the rows from
	// which it is used (switch_rows); all four are 0 for the full bootstrap.
	Scheme      string               `json:"scheme"`
	SubsetSize  int                  `json:"subset_size"`
	Subsets     int                  `json:"subsets"`
	PerSubset   int                  `json:"per_subset"`
	SwitchRows  int                  `json:"switch_rows"`
	Components  []ComponentStability `json:"components"`
	Eigenvalues []EigenInterval      `json:"eigenvalues"`
}

type ComponentStability struct {
	Component        string `json:"component"`
	CongruenceMedian Number `json:"congruence_median"`
	CongruenceP5     Number `json:"congruence_p5"`
	ProcrustesMedian Number `json:"procrustes_median"`
	ProcrustesP5     Number `json:"procrustes_p5"`
}

type EigenInterval struct {
	Component     string `json:"component"`
	Eigenvalue    Number `json:"eigenvalue"`
	CILow         Number `json:"ci_low"`
	CIHigh        Number `json:"ci_high"`
	Percent       Number `json:"percent"`
	PercentCILow  Number `json:"percent_ci_low"`
	PercentCIHigh Number `json:"percent_ci_high"`
	// BCa intervals (Efron 1987) beside the percentile ones above; null
	// where undefined.
	BCaLow         Number `json:"bca_low"`
	BCaHigh        Number `json:"bca_high"`
	PercentBCaLow  Number `json:"percent_bca_low"`
	PercentBCaHigh Number `json:"percent_bca_high"`
}

func stabilityInfo(res *analysis.Result) *StabilityInfo {
	st := res.Stability
	if st.Used == 0 {
		return nil
	}
	info := &StabilityInfo{Resamples: st.Resamples, Used: st.Used, Degenerate: st.Degenerate, ConstantResamples: st.ConstantResamples,
		Scheme: st.Scheme, SubsetSize: st.SubsetSize, Subsets: st.Subsets, PerSubset: st.PerSubset, SwitchRows: st.SwitchRows}
	for a, c := range st.Components {
		info.Components = append(info.Components, ComponentStability{
			Component: componentName(a), CongruenceMedian: Number(c.CongruenceMedian), CongruenceP5: Number(c.CongruenceP5),
			ProcrustesMedian: Number(c.ProcrustesMedian), ProcrustesP5: Number(c.ProcrustesP5),
		})
	}
	pct := Percentages(res.Decomp.Eigenvalues)
	for a, l := range res.Decomp.Eigenvalues {
		info.Eigenvalues = append(info.Eigenvalues, EigenInterval{
			Component: componentName(a), Eigenvalue: Number(l), CILow: Number(st.Eigenvalues[a].Low), CIHigh: Number(st.Eigenvalues[a].High),
			Percent: Number(pct[a]), PercentCILow: Number(st.Percent[a].Low), PercentCIHigh: Number(st.Percent[a].High),
			BCaLow: intervalEnd(st.EigenvaluesBCa, a, false), BCaHigh: intervalEnd(st.EigenvaluesBCa, a, true),
			PercentBCaLow: intervalEnd(st.PercentBCa, a, false), PercentBCaHigh: intervalEnd(st.PercentBCa, a, true),
		})
	}
	return info
}

// intervalEnd returns one end of ivs[a], or NaN (null) when absent.
func intervalEnd(ivs []analysis.Interval, a int, high bool) Number {
	if a >= len(ivs) {
		return Number(math.NaN())
	}
	if high {
		return Number(ivs[a].High)
	}
	return Number(ivs[a].Low)
}

// Number is a float64 in summary.json. JSON has no NaN or infinity, so a
// value that is not a finite number is written as null instead of failing
// the whole file ("json: unsupported value"); finite values are written
// exactly as encoding/json writes a float64.
type Number float64

// MarshalJSON writes the number, or null when it is not finite.
func (x Number) MarshalJSON() ([]byte, error) {
	f := float64(x)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	return json.Marshal(f)
}

// numbers converts a slice for summary.json; nil stays nil (null).
func numbers(x []float64) []Number {
	if x == nil {
		return nil
	}
	out := make([]Number, len(x))
	for i, v := range x {
		out[i] = Number(v)
	}
	return out
}

func scaled(x []float64, f float64) []Number {
	out := make([]Number, len(x))
	for i, v := range x {
		out[i] = Number(f * v)
	}
	return out
}

// jsonValue makes a value of any type that a check result or an option may
// hold safe for JSON: floats, and floats in maps and slices, become Numbers.
func jsonValue(v any) any {
	switch x := v.(type) {
	case float64:
		return Number(x)
	case checks.Probability:
		return Number(x)
	case float32:
		return Number(x)
	case []float64:
		return numbers(x)
	case map[string]float64:
		out := make(map[string]Number, len(x))
		for k, f := range x {
			out[k] = Number(f)
		}
		return out
	}
	return v
}

// jsonChecks returns the check results with their values and limits made
// safe for JSON.
func jsonChecks(results []checks.Result) []checks.Result {
	if results == nil {
		return nil
	}
	out := make([]checks.Result, len(results))
	for i, r := range results {
		r.Value, r.Limit = jsonValue(r.Value), jsonValue(r.Limit)
		out[i] = r
	}
	return out
}

func optional(s string) *string {
	if s == "" {
		return nil
	}
	return &s
}

// Audit is everything one audit produced: the analysis, the review of
// another person's tables when in review mode, and the check results.
type Audit struct {
	Result *analysis.Result
	Review *analysis.Review // nil outside review mode
	Checks []checks.Result
}

// BuildSummary assembles summary.json's content.
func BuildSummary(audit Audit, meta Meta) Summary {
	res, results := audit.Result, audit.Checks
	t := res.Table
	lim := res.Samples.Limits
	dropped := t.DroppedVariables
	if dropped == nil {
		dropped = []intake.DroppedVariable{}
	}
	return Summary{
		Tool: ToolInfo{Name: "pcqc", Version: meta.Version},
		Input: InputInfo{
			TableSource:      tableSource(t),
			Variables:        t.Variables,
			Units:            t.Units,
			SkippedLines:     t.SkippedLines,
			CommentLines:     t.CommentLines,
			GroupedNumbers:   t.GroupedNumbers,
			VariablesDropped: dropped,
			Censored:         censoredSummary(t),
			IDColumn:         optional(t.IDColumn),
			GroupColumn:      optional(t.GroupColumn),
		},
		Options: meta.Options,
		Components: ComponentsInfo{
			Retained:              res.Retained,
			Rule:                  res.Rule.String(),
			NoStructure:           res.NoStructure,
			Method:                res.Decomp.Method,
			Eigenvalues:           numbers(res.Decomp.Eigenvalues),
			Percent:               numbers(Percentages(res.Decomp.Eigenvalues)),
			Counts:                res.Counts.Counts,
			Permutations:          res.Counts.Parallel.Permutations,
			PermutationCap:        res.Counts.Parallel.Cap,
			PermutationP95:        numbers(res.Counts.Parallel.P95),
			PermutationExceedance: numbers(res.Counts.Parallel.Exceedance),
			ParallelDecisions:     res.Counts.Parallel.Decision,
			Borderline:            parallelBorderline(res),
			BrokenStickPercent:    scaled(res.Counts.BrokenStickShares, 100),
			CrossValidation:       crossValidationInfo(res),
		},
		Limits: LimitsInfo{
			T2_95:    Number(lim.T2_95),
			T2_99:    Number(lim.T2_99),
			Q95:      Number(lim.Q95),
			Q99:      Number(lim.Q99),
			QMethod:  string(lim.QMethod),
			Leverage: Number(lim.Leverage),

			FamilyAlpha:      Number(analysis.FamilyAlpha),
			FamilyConfidence: Number(lim.FamilyConf),
			T2Family:         Number(lim.T2Family),
			QFamily:          Number(lim.QFamily),
			Influence95:      Number(analysis.InfluenceLimit(res.Stability)),
		},
		Stability:      stabilityInfo(res),
		Adequacy:       adequacyInfo(res),
		Review:         reviewInfo(audit.Review, results),
		Excluded:       excludedInfo(res),
		WithoutFlagged: whatIfInfo(res),
		Imputation:     imputationInfo(res),
		Missing:        missingInfo(t, imputedCells(res)),
		Checks:         jsonChecks(results),
		Verdict:        checks.Verdict(results),
	}
}

func writeJSON(path string, v any) error {
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		return err
	}
	return os.WriteFile(path, append(b, '\n'), 0o644)
}

// WriteTables writes the machine-readable outputs of an audit into dir.
func WriteTables(dir string, audit Audit, meta Meta) error {
	res := audit.Result
	join := func(name string) string { return dir + string(os.PathSeparator) + name }
	files := []struct {
		name string
		rows [][]string
	}{
		{"variance.csv", VarianceRows(res)},
		{"loadings.csv", LoadingsRows(res)},
	}
	if audit.Review != nil {
		files = append(files, struct {
			name string
			rows [][]string
		}{"review-variants.csv", VariantRows(audit.Review)})
	}
	if rows := CensoredRows(res.Table); rows != nil {
		files = append(files, struct {
			name string
			rows [][]string
		}{"censored.csv", rows})
	}
	if rows := PressRows(res); rows != nil {
		files = append(files, struct {
			name string
			rows [][]string
		}{"press.csv", rows})
	}
	if rows := StabilityRows(res); rows != nil {
		files = append(files, struct {
			name string
			rows [][]string
		}{"stability.csv", rows})
	}
	for _, f := range files {
		if err := writeCSV(join(f.name), f.rows); err != nil {
			return err
		}
	}
	if err := writeMissingTables(join, res.Table, imputedCells(res)); err != nil {
		return err
	}
	if err := writeScores(join("scores.csv"), res.Table, res.Scores); err != nil {
		return err
	}
	if err := writeSamples(join("samples.csv"), res); err != nil {
		return err
	}
	if err := writeContributions(join("contributions.csv"), res, runContributions(res)); err != nil {
		return err
	}
	return writeJSON(join("summary.json"), BuildSummary(audit, meta))
}
