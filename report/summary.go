package report

import (
	"bytes"
	"encoding/json"
	"math"
	"os"

	"pcqc/analysis"
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
		v, err := json.Marshal(opt.Value)
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
	Tool       ToolInfo        `json:"tool"`
	Input      InputInfo       `json:"input"`
	Options    Options         `json:"options"`
	Components ComponentsInfo  `json:"components"`
	Limits     LimitsInfo      `json:"limits"`
	Stability  *StabilityInfo  `json:"stability"`
	Review     *ReviewInfo     `json:"review,omitempty"`
	Checks     []checks.Result `json:"checks"`
	Verdict    checks.Status   `json:"verdict"`
}

type ToolInfo struct {
	Name    string `json:"name"`
	Version string `json:"version"`
}

type InputInfo struct {
	File             string                     `json:"file"`
	SHA256           string                     `json:"sha256"`
	Rows             int                        `json:"rows"`
	RowsRead         int                        `json:"rows_read"`
	RowsDropped      int                        `json:"rows_dropped"`
	MissingCells     int                        `json:"missing_cells"`
	ImputedCells     int                        `json:"imputed_cells"`
	Variables        []string                   `json:"variables"`
	VariablesDropped []analysis.DroppedVariable `json:"variables_dropped"`
	IDColumn         *string                    `json:"id_column"`
	GroupColumn      *string                    `json:"group_column"`
}

type ComponentsInfo struct {
	Retained           int                  `json:"retained"`
	Rule               string               `json:"rule"`
	NoStructure        bool                 `json:"no_structure"`
	Method             string               `json:"method"`
	Eigenvalues        []float64            `json:"eigenvalues"`
	Percent            []float64            `json:"percent"`
	Counts             []analysis.RuleCount `json:"counts"`
	Permutations       int                  `json:"permutations"`
	PermutationP95     []float64            `json:"permutation_p95"`
	BrokenStickPercent []float64            `json:"broken_stick_percent"`
}

// LimitsInfo holds the control limits; null where a limit is undefined.
type LimitsInfo struct {
	T2_95    *float64 `json:"t2_95"`
	T2_99    *float64 `json:"t2_99"`
	Q95      *float64 `json:"q_95"`
	Q99      *float64 `json:"q_99"`
	QMethod  string   `json:"q_method"`
	Leverage float64  `json:"leverage"`
}

// StabilityInfo summarises the bootstrap; null when it did not run.
type StabilityInfo struct {
	Resamples   int                  `json:"resamples"`
	Used        int                  `json:"used"`
	Degenerate  int                  `json:"degenerate"`
	Components  []ComponentStability `json:"components"`
	Eigenvalues []EigenInterval      `json:"eigenvalues"`
}

type ComponentStability struct {
	Component        string  `json:"component"`
	CongruenceMedian float64 `json:"congruence_median"`
	CongruenceP5     float64 `json:"congruence_p5"`
	ProcrustesMedian float64 `json:"procrustes_median"`
	ProcrustesP5     float64 `json:"procrustes_p5"`
}

type EigenInterval struct {
	Component     string  `json:"component"`
	Eigenvalue    float64 `json:"eigenvalue"`
	CILow         float64 `json:"ci_low"`
	CIHigh        float64 `json:"ci_high"`
	Percent       float64 `json:"percent"`
	PercentCILow  float64 `json:"percent_ci_low"`
	PercentCIHigh float64 `json:"percent_ci_high"`
}

func stabilityInfo(res *analysis.Result) *StabilityInfo {
	st := res.Stability
	if st.Used == 0 {
		return nil
	}
	info := &StabilityInfo{Resamples: st.Resamples, Used: st.Used, Degenerate: st.Degenerate}
	for a, c := range st.Components {
		info.Components = append(info.Components, ComponentStability{
			Component: componentName(a), CongruenceMedian: c.CongruenceMedian, CongruenceP5: c.CongruenceP5,
			ProcrustesMedian: c.ProcrustesMedian, ProcrustesP5: c.ProcrustesP5,
		})
	}
	pct := Percentages(res.Decomp.Eigenvalues)
	for a, l := range res.Decomp.Eigenvalues {
		info.Eigenvalues = append(info.Eigenvalues, EigenInterval{
			Component: componentName(a), Eigenvalue: l, CILow: st.Eigenvalues[a].Low, CIHigh: st.Eigenvalues[a].High,
			Percent: pct[a], PercentCILow: st.Percent[a].Low, PercentCIHigh: st.Percent[a].High,
		})
	}
	return info
}

// finite returns x, or nil when x is not a finite number (JSON has no NaN).
func finite(x float64) *float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return nil
	}
	return &x
}

func scaled(x []float64, f float64) []float64 {
	out := make([]float64, len(x))
	for i, v := range x {
		out[i] = f * v
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
		dropped = []analysis.DroppedVariable{}
	}
	return Summary{
		Tool: ToolInfo{Name: "pcqc", Version: meta.Version},
		Input: InputInfo{
			File:             t.File,
			SHA256:           t.SHA256,
			Rows:             t.Rows(),
			RowsRead:         t.RowsRead,
			RowsDropped:      t.RowsDropped,
			MissingCells:     t.MissingCells,
			ImputedCells:     t.ImputedCells,
			Variables:        t.Variables,
			VariablesDropped: dropped,
			IDColumn:         optional(t.IDColumn),
			GroupColumn:      optional(t.GroupColumn),
		},
		Options: meta.Options,
		Components: ComponentsInfo{
			Retained:           res.Retained,
			Rule:               res.Rule.String(),
			NoStructure:        res.NoStructure,
			Method:             res.Decomp.Method,
			Eigenvalues:        res.Decomp.Eigenvalues,
			Percent:            Percentages(res.Decomp.Eigenvalues),
			Counts:             res.Counts.Counts,
			Permutations:       res.Counts.Parallel.Permutations,
			PermutationP95:     res.Counts.Parallel.P95,
			BrokenStickPercent: scaled(res.Counts.BrokenStickShares, 100),
		},
		Limits: LimitsInfo{
			T2_95:    finite(lim.T2_95),
			T2_99:    finite(lim.T2_99),
			Q95:      finite(lim.Q95),
			Q99:      finite(lim.Q99),
			QMethod:  string(lim.QMethod),
			Leverage: lim.Leverage,
		},
		Stability: stabilityInfo(res),
		Review:    reviewInfo(audit.Review, results),
		Checks:    results,
		Verdict:   checks.Verdict(results),
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
	if err := writeScores(join("scores.csv"), res.Table, res.Scores); err != nil {
		return err
	}
	if err := writeSamples(join("samples.csv"), res); err != nil {
		return err
	}
	return writeJSON(join("summary.json"), BuildSummary(audit, meta))
}
