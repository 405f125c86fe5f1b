package report

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"pcqc/analysis"
)

// excludedColumns extends samples.csv when samples were excluded: a column
// "excluded" (true for the samples left out of the fit) and every sample's
// retained scores, so that the table shows where the excluded samples fall
// beside the others. Audits without exclusions keep the plain layout.
func excludedColumns(res *analysis.Result) []string {
	if res.Excluded == nil {
		return nil
	}
	out := []string{"excluded"}
	for a := 0; a < res.Retained; a++ {
		out = append(out, componentName(a))
	}
	return out
}

// samplesRowCount is the number of rows of samples.csv: the fitted
// samples, then the excluded ones.
func samplesRowCount(res *analysis.Result) int {
	return len(res.Table.IDs) + len(res.Excluded.IDs())
}

// excludedSampleRow appends the samples.csv row of excluded sample e,
// scored as apply scores a new sample: T² against the limit for new
// observations, Q against the model's, and no influence (it did not
// enter the fit).
func excludedSampleRow(res *analysis.Result, e int, dst []string) []string {
	app := res.Excluded.Application
	dst = append(dst, app.Table.IDs[e], num(app.T2[e]), num(app.Q[e]), num(app.Leverage[e]), strings.Join(app.Beyond(e), " "), "", "", "true")
	for a := 0; a < res.Retained; a++ {
		dst = append(dst, num(app.Scores.At(e, a)))
	}
	return dst
}

// fittedScoreCells appends, for a fitted sample of an audit with
// exclusions, "false" and its scores.
func fittedScoreCells(res *analysis.Result, i int, dst []string) []string {
	if res.Excluded == nil {
		return dst
	}
	dst = append(dst, strconv.FormatBool(false))
	for a := 0; a < res.Retained; a++ {
		dst = append(dst, num(res.Scores.At(i, a)))
	}
	return dst
}

// ExcludedInfo lists the samples left out of the fit (--exclude) in
// summary.json, each with its projection's T² (new-observation form) and Q.
type ExcludedInfo struct {
	Samples []ExcludedSample `json:"samples"`
}

// ExcludedSample is one excluded sample: its id, its line in the input,
// and where it falls on the model.
type ExcludedSample struct {
	ID     string   `json:"id"`
	Line   int      `json:"line,omitempty"`
	Scores []Number `json:"scores"`
	T2     Number   `json:"t2"`
	Q      Number   `json:"q"`
	Beyond []string `json:"beyond"`
}

func excludedInfo(res *analysis.Result) *ExcludedInfo {
	if res.Excluded == nil {
		return nil
	}
	app := res.Excluded.Application
	info := &ExcludedInfo{Samples: []ExcludedSample{}}
	for e, id := range app.Table.IDs {
		s := ExcludedSample{ID: id, T2: Number(app.T2[e]), Q: Number(app.Q[e]), Beyond: app.Beyond(e)}
		if e < len(app.Table.Lines) {
			s.Line = app.Table.Lines[e]
		}
		if s.Beyond == nil {
			s.Beyond = []string{}
		}
		s.Scores = numbers(app.Scores.RawRowView(e))
		info.Samples = append(info.Samples, s)
	}
	return info
}

// WhatIfInfo is the refit without the flagged samples in summary.json
// (analysis.WhatIf): null when nothing was flagged.
type WhatIfInfo struct {
	Flagged  []string   `json:"flagged"`
	Why      [][]string `json:"why"`
	Skipped  *string    `json:"skipped"`
	Retained *int       `json:"retained_refit"`
	// Per retained component of the full fit: its match in the refit,
	// |congruence|, and eigenvalue and share (percent) before and after.
	Match           []int    `json:"match"`
	Congruence      []Number `json:"congruence"`
	Eigenvalue      []Number `json:"eigenvalue"`
	RefitEigenvalue []Number `json:"eigenvalue_refit"`
	Percent         []Number `json:"percent"`
	RefitPercent    []Number `json:"percent_refit"`
	AngleDeg        Number   `json:"largest_angle_deg"`
	AngleLimitDeg   Number   `json:"angle_limit_deg"`
	AngleResamples  int      `json:"angle_limit_resamples"`
}

func whatIfInfo(res *analysis.Result) *WhatIfInfo {
	w := res.WhatIf
	if w == nil || len(w.Flagged) == 0 {
		return nil
	}
	info := &WhatIfInfo{Why: w.Why}
	for _, i := range w.Flagged {
		info.Flagged = append(info.Flagged, res.Table.IDs[i])
	}
	if w.Refit == nil {
		info.Skipped = &w.Skipped
		return info
	}
	k := w.Refit.Retained
	info.Retained = &k
	for _, m := range w.Match {
		info.Match = append(info.Match, m+1)
	}
	info.Congruence = numbers(w.Congruence)
	info.Eigenvalue, info.RefitEigenvalue = numbers(w.Eigenvalue), numbers(w.RefitEigenvalue)
	info.Percent, info.RefitPercent = numbers(w.Share), numbers(w.RefitShare)
	info.AngleDeg, info.AngleLimitDeg, info.AngleResamples = Number(w.Angle), Number(w.AngleLimit), w.AngleResamples
	return info
}

// ExcludedBlock is the report's section on the samples left out of the
// fit: who they are and where they fall when projected onto the model.
type ExcludedBlock struct {
	Text   string
	Header []string
	Rows   [][]string
}

// excludedBlock lists every excluded sample (in full: the list is part of
// what was done to the data), nil when none was.
func excludedBlock(res *analysis.Result) *ExcludedBlock {
	if res.Excluded == nil {
		return nil
	}
	app := res.Excluded.Application
	n := len(app.Table.IDs)
	b := &ExcludedBlock{
		Text: fmt.Sprintf("At the analyst's request, %s left out of the fit and projected onto the model as new samples are in apply: training means and scales, the retained loadings, T² against the limit for new observations (%s at 99 %%) and Q against the model's (%s at 99 %%). The score plots mark them with open squares.",
			countNoun(n, "sample")+" "+was(n), g4(app.Limits.T2_99), g4(app.Limits.Q99)),
		Header: []string{"Sample", "Line", "T²", "Q", "Beyond"},
	}
	if app.Table.Sheet != "" {
		b.Header[1] = "Row" // of the sheet
	}
	for a := 0; a < res.Retained; a++ {
		b.Header = append(b.Header, componentName(a))
	}
	for e, id := range app.Table.IDs {
		line := ""
		if e < len(app.Table.Lines) {
			line = strconv.Itoa(app.Table.Lines[e])
		}
		beyond := strings.Join(app.Beyond(e), " ")
		if beyond == "" {
			beyond = "none"
		}
		row := []string{id, line, g4(app.T2[e]), g4(app.Q[e]), beyond}
		for a := 0; a < res.Retained; a++ {
			row = append(row, g4(app.Scores.At(e, a)))
		}
		b.Rows = append(b.Rows, row)
	}
	return b
}

func was(n int) string {
	if n == 1 {
		return "was"
	}
	return "were"
}

// WhatIfBlock is the report's section on the refit without the flagged
// samples: a sentence and, per retained component, how it changes.
type WhatIfBlock struct {
	Text   string
	Header []string
	Rows   [][]string
}

// whatIfNamed is how many flagged samples the refit's sentence names; a
// sentence naming thousands helps no reader (and a long paragraph is slow
// to lay out in the PDF).
const whatIfNamed = 20

// whatIfBlock is nil when no sample is flagged.
func whatIfBlock(res *analysis.Result) *WhatIfBlock {
	w := res.WhatIf
	if w == nil || len(w.Flagged) == 0 {
		return nil
	}
	var ids []string
	for k, i := range w.Flagged[:min(len(w.Flagged), whatIfNamed)] {
		ids = append(ids, res.Table.IDs[i]+" ("+strings.Join(w.Why[k], ", ")+")")
	}
	list := strings.Join(ids, "; ")
	if more := len(w.Flagged) - len(ids); more > 0 {
		list += fmt.Sprintf("; and %d more (samples.csv marks every sample's flags)", more)
	}
	who := fmt.Sprintf("The outlier and influence checks flag %s: %s.", countNoun(len(w.Flagged), "sample"), list)
	if w.Refit == nil {
		return &WhatIfBlock{Text: who + " They were not refitted: " + w.Skipped + "."}
	}
	angle := fmt.Sprintf("The largest principal angle between the retained subspaces is %s°", g4(w.Angle))
	if math.IsNaN(w.AngleLimit) {
		angle += fmt.Sprintf("; it is not judged, since only %d bootstrap resamples drew every flagged sample (at least %d are needed).", w.AngleResamples, analysis.MinAngleResamples)
	} else {
		angle += fmt.Sprintf(", against %s° that resampling explains (95th percentile over the %d bootstrap resamples that drew every flagged sample).", g4(w.AngleLimit), w.AngleResamples)
	}
	count := fmt.Sprintf("Without them the %s rule keeps %s (with them, %d).", w.Refit.Rule, countNoun(w.Refit.Retained, "component"), res.Retained)
	b := &WhatIfBlock{
		Text: who + " The analysis was refitted without them, with the same options but no bootstrap; each retained component is paired with a refitted one by the optimal assignment on |Tucker's congruence| over the first " +
			countNoun(res.Retained, "component") + " of each. " + angle + " " + count + " The check without-flagged lists the other checks whose status changes.",
		Header: []string{"Component", "Refit component", "|Congruence|", "Eigenvalue", "Refit eigenvalue", "Share", "Refit share"},
	}
	for a := range w.Congruence {
		b.Rows = append(b.Rows, []string{componentName(a), componentName(w.Match[a]), fmt.Sprintf("%.3f", w.Congruence[a]),
			g4(w.Eigenvalue[a]), g4(w.RefitEigenvalue[a]), fmt.Sprintf("%.1f %%", w.Share[a]), fmt.Sprintf("%.1f %%", w.RefitShare[a])})
	}
	return b
}

// exclusionMethodSentence says which samples were excluded, in full.
func exclusionMethodSentence(res *analysis.Result) string {
	ids := res.Excluded.IDs()
	if len(ids) == 0 {
		return ""
	}
	if len(ids) == 1 {
		return fmt.Sprintf("Sample %s was excluded from the fit at the analyst's request and projected onto the model as a new sample.", ids[0])
	}
	return fmt.Sprintf("At the analyst's request, %d samples were excluded from the fit (%s) and projected onto the model as new samples.", len(ids), joinAnd(ids))
}

// whatIfMethodSentence describes the refit without the flagged samples.
func whatIfMethodSentence(res *analysis.Result) string {
	w := res.WhatIf
	if w == nil || w.Refit == nil {
		return ""
	}
	return fmt.Sprintf("The analysis was refitted without the %s the outlier and influence checks flagged; components were paired by the optimal assignment on the absolute Tucker congruence (Tucker 1951), judged against 0.95 (Lorenzo-Seva & ten Berge 2006), and the retained subspaces compared by their largest principal angle (Björck & Golub 1973).",
		countNoun(len(w.Flagged), "sample"))
}

// addExcludedScores draws the excluded samples on a score plot as open
// squares, a marker no fitted sample uses, at their projected scores on
// components a and b. With b < 0 (the one-component plot against sample
// order) they are placed after the fitted samples, in their input order.
func addExcludedScores(p *plot.Plot, ann *labeller, res *analysis.Result, a, b int) {
	if res.Excluded == nil {
		return
	}
	app := res.Excluded.Application
	m := len(app.Table.IDs)
	x, y := make([]float64, m), make([]float64, m)
	for e := 0; e < m; e++ {
		if b < 0 {
			x[e], y[e] = float64(res.Decomp.Rows+e+1), app.Scores.At(e, a)
		} else {
			x[e], y[e] = app.Scores.At(e, a), app.Scores.At(e, b)
		}
	}
	addScatter(p, x, y, draw.GlyphStyle{Color: accent99, Shape: draw.SquareGlyph{}, Radius: vg.Points(3.5)}, "excluded, projected")
	ann.addPoints(x, y, vg.Points(3))
}

// noteExcluded adds to the score plots' captions what the open squares are.
func noteExcluded(b *ScoresBlock, res *analysis.Result) {
	if res.Excluded == nil {
		return
	}
	note := " Open squares: the samples excluded from the fit at the analyst's request, projected onto the model."
	for i := range b.Figures {
		if b.Figures[i].Stem == "scores-pc1" {
			b.Figures[i].Caption += " The excluded samples (open squares) follow the fitted ones, at their projected PC1 scores."
			continue
		}
		b.Figures[i].Caption += note
	}
}
