package report

import (
	"fmt"
	"strings"

	"pcqc/analysis"
	"pcqc/checks"
)

// ReviewInfo is the review part of summary.json.
type ReviewInfo struct {
	BestVariant     VariantInfo   `json:"best_variant"`
	Variants        []VariantInfo `json:"variants"`
	Findings        []string      `json:"findings"`
	LoadingsFile    string        `json:"loadings_file"`
	LoadingsLayout  string        `json:"loadings_layout"`
	Components      []string      `json:"components"`
	ScoresFile      *string       `json:"scores_file"`
	ScoresMatchedBy *string       `json:"scores_matched_by"`
	VarianceKind    *string       `json:"variance_kind"`
	VarianceFrom    *string       `json:"variance_from"`
	VarianceReading *string       `json:"variance_reading"`
	// VarianceAmbiguous is set when neither the header nor the content of
	// their variance file said what the values are and more than one
	// reading fitted; variance_reading then says which was taken and why.
	VarianceAmbiguous bool     `json:"variance_ambiguous"`
	ClaimedScale      *string  `json:"claimed_scale"`
	Notes             []string `json:"notes"`
}

type VariantInfo struct {
	Centered      bool    `json:"centered"`
	Scale         string  `json:"scale"`
	MaxAngleDeg   Number  `json:"max_angle_deg"`
	ScoreResidual *Number `json:"score_residual,omitempty"`
}

// reviewFindings are the first sentences of the review checks, each written
// to be pasted into a referee report, prefixed by the status.
// Failures come first, then warnings, then passes, each group in the
// checks' order, so that what needs saying is read first.
func reviewFindings(results []checks.Result) []string {
	var out []string
	for _, level := range []checks.Status{checks.Fail, checks.Warn, checks.Pass} {
		for _, r := range results {
			if strings.HasPrefix(r.ID, "review-") && r.Status == level {
				out = append(out, fmt.Sprintf("%s %s: %s", r.Status.Symbol(), r.Status, firstSentence(r.Message)))
			}
		}
	}
	return out
}

func variantInfo(rv *analysis.Review, v analysis.Variant) VariantInfo {
	info := VariantInfo{Centered: v.Centered, Scale: string(v.Scaling), MaxAngleDeg: Number(v.MaxAngle)}
	if rv.Scores != nil {
		res := Number(v.ScoreResidual)
		info.ScoreResidual = &res
	}
	return info
}

func reviewInfo(rv *analysis.Review, results []checks.Result) *ReviewInfo {
	if rv == nil {
		return nil
	}
	info := &ReviewInfo{
		BestVariant:    variantInfo(rv, rv.Variants[rv.Best]),
		Findings:       reviewFindings(results),
		LoadingsFile:   rv.Loadings.File,
		LoadingsLayout: string(rv.Loadings.Layout),
		Components:     rv.Loadings.Components,
		Notes:          reviewNotes(rv),
	}
	for _, v := range rv.Variants {
		info.Variants = append(info.Variants, variantInfo(rv, v))
	}
	if rv.Scores != nil {
		info.ScoresFile, info.ScoresMatchedBy = optional(rv.Scores.File), optional(rv.Scores.MatchedBy)
	}
	if rv.VarianceValues != nil {
		info.VarianceKind = optional(string(rv.VarianceKind))
		info.VarianceFrom = optional(rv.Variance.From)
		info.VarianceReading = optional(rv.VarianceReading.Why)
		info.VarianceAmbiguous = rv.VarianceReading.Ambiguous
	}
	if rv.ClaimedScale != "" {
		info.ClaimedScale = optional(string(rv.ClaimedScale))
	}
	return info
}

// reviewNotes say how their tables were read.
func reviewNotes(rv *analysis.Review) []string {
	notes := []string{fmt.Sprintf("Loadings (%s): %s; %d components (%s).", rv.Loadings.File, rv.Loadings.Layout, len(rv.Loadings.Components), strings.Join(rv.Loadings.Components, ", "))}
	for _, n := range rv.Loadings.Notes {
		notes = append(notes, "Loadings: "+n+".")
	}
	if rv.Scores != nil {
		notes = append(notes, fmt.Sprintf("Scores (%s): rows matched to samples %s.", rv.Scores.File, rv.Scores.MatchedBy))
		for _, n := range rv.Scores.Notes {
			notes = append(notes, "Scores: "+n+".")
		}
	}
	if rv.VarianceValues != nil {
		v := rv.Variance
		notes = append(notes, fmt.Sprintf("Variances (%s): %s, read as %s: %s.", v.File, v.From, rv.VarianceKind, rv.VarianceReading.Why))
		if rv.VarianceReading.Ambiguous {
			notes[len(notes)-1] = "Variances (ambiguous): " + notes[len(notes)-1][len("Variances "):]
		}
		for _, n := range v.Notes {
			notes = append(notes, "Variances: "+n+".")
		}
	}
	return notes
}

// VariantRows builds review-variants.csv: how well each preprocessing of
// the raw data reproduces their loadings (and scores).
func VariantRows(rv *analysis.Review) [][]string {
	rows := [][]string{{"centered", "scale", "max_angle_deg", "score_residual", "best"}}
	for i, v := range rv.Variants {
		res := ""
		if rv.Scores != nil {
			res = num(v.ScoreResidual)
		}
		rows = append(rows, []string{fmt.Sprint(v.Centered), string(v.Scaling), num(v.MaxAngle), res, fmt.Sprint(i == rv.Best)})
	}
	return rows
}

// ReviewBlock is the report's opening section in review mode.
type ReviewBlock struct {
	Findings []string
	Notes    []string
	Header   []string
	Rows     [][]string
}

func reviewBlock(rv *analysis.Review, results []checks.Result) *ReviewBlock {
	if rv == nil {
		return nil
	}
	b := &ReviewBlock{Findings: reviewFindings(results), Notes: reviewNotes(rv),
		Header: []string{"Preprocessing of the raw data", "Largest principal angle"}}
	if rv.Scores != nil {
		b.Header = append(b.Header, "Score residual")
	}
	for i, v := range rv.Variants {
		name := v.Name()
		if i == rv.Best {
			name += " (best match)"
		}
		row := []string{name, deg(v.MaxAngle) + "°"}
		if rv.Scores != nil {
			row = append(row, g4(v.ScoreResidual))
		}
		b.Rows = append(b.Rows, row)
	}
	return b
}

func deg(a float64) string { return checks.FormatDegrees(a) }
