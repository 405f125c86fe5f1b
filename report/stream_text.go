package report

import (
	"fmt"
	"strings"

	"pcqc/analysis"
)

// streamSummaryJSON is summary.json of a streamed audit.
type streamSummaryJSON struct {
	Tool         string             `json:"tool"`
	Version      string             `json:"version"`
	Mode         string             `json:"mode"`
	File         string             `json:"file"`
	SHA256       string             `json:"sha256"`
	Rows         int                `json:"rows"`
	RowsRead     int                `json:"rows_read"`
	RowsDropped  int                `json:"rows_dropped"`
	ImputedCells int                `json:"imputed_cells"`
	Variables    []string           `json:"variables"`
	Units        []string           `json:"units,omitempty"` // per variable, from --units-row
	Dropped      any                `json:"dropped_variables"`
	Method       string             `json:"method"`
	Eigenvalues  []float64          `json:"eigenvalues"`
	Retained     int                `json:"retained"`
	NoStructure  bool               `json:"no_structure"`
	Counts       map[string]any     `json:"component_counts"`
	Limits       map[string]float64 `json:"limits"`
	Flagged      int                `json:"flagged"`
	Reservoir    int                `json:"reservoir_rows"`
	Bootstrap    int                `json:"bootstrap_used"`
	NotRun       []string           `json:"not_run"`
	Options      Options            `json:"options"`
}

// streamNotRun names what a streamed audit leaves out, and why.
var streamNotRun = []string{
	"checks: the registry's checks read an in-memory analysis; a streamed audit reports its measurements without judging them",
	"cross-validation (PRESS): needs every row",
	"leave-one-out influence, robust fit, refit without flagged samples: need every row",
	"tail-adapted and Phase I control limits: need every sample's scores; the limits are normal theory",
	"the figures other than one score plot: they draw every sample or need the left-out analyses",
}

func streamSummary(res *analysis.StreamResult, meta Meta) streamSummaryJSON {
	counts := map[string]any{}
	for _, c := range res.Counts.Counts {
		if c.Applies {
			counts[string(c.Rule)] = c.Count
		} else {
			counts[string(c.Rule)] = nil
		}
	}
	l := res.Limits
	dropped := any(res.DroppedVariables)
	if res.DroppedVariables == nil {
		dropped = []string{}
	}
	return streamSummaryJSON{Tool: "pcqc", Version: meta.Version, Mode: "stream", File: res.Info.File, SHA256: res.Info.SHA256,
		Rows: res.Rows, RowsRead: res.Info.RowsRead, RowsDropped: res.RowsDropped, ImputedCells: res.ImputedCells,
		Variables: res.Variables, Units: res.Units, Dropped: dropped, Method: res.Decomp.Method, Eigenvalues: res.Decomp.Eigenvalues,
		Retained: res.Retained, NoStructure: res.NoStructure, Counts: counts,
		Limits: map[string]float64{"t2_95": l.T2_95, "t2_99": l.T2_99, "q_95": l.Q95, "q_99": l.Q99,
			"t2_family": l.T2Family, "q_family": l.QFamily, "leverage": l.Leverage},
		Flagged: res.FlaggedCount, Reservoir: len(res.SampleIDs), Bootstrap: res.Stability.Used,
		NotRun: streamNotRun, Options: meta.Options}
}

// streamMarkdown is the report of a streamed audit: what was streamed, the
// decomposition, the counts, the limits, the flagged samples, and what was
// computed on a subsample or left out.
func streamMarkdown(res *analysis.StreamResult, meta Meta, ropt ReportOptions) string {
	var b strings.Builder
	title := ropt.Title
	if title == "" {
		title = streamTitle(res)
	}
	fmt.Fprintf(&b, "# %s\n\n", escapeMarkdown(title))
	if ropt.Author != "" {
		fmt.Fprintf(&b, "%s · ", escapeMarkdown(ropt.Author))
	}
	fmt.Fprintf(&b, "%s · pcqc %s\n\n", escapeMarkdown(ropt.Date), escapeMarkdown(meta.Version))
	fmt.Fprintf(&b, "## Streamed audit\n\nThis audit was **streamed** (`--stream`): %s (SHA-256 %s) was read twice, row by row, and no table of all rows was held in memory. "+
		"The first pass accumulated the count, means and cross-product of the variables with the updates of Chan, Golub & LeVeque (1983); the components are the eigenvectors of the resulting %d×%d matrix. "+
		"The second pass computed each sample's scores, Hotelling T², Q residual and leverage and wrote samples.csv.\n\n",
		codeSpan(res.Info.File), res.Info.SHA256, len(res.Variables), len(res.Variables))
	fmt.Fprintf(&b, "%d rows read, %d used, %d dropped for missing cells, %d cells filled with column means; %d variables analysed (%s scaling).\n\n",
		res.Info.RowsRead, res.Rows, res.RowsDropped, res.ImputedCells, len(res.Variables), escapeMarkdown(string(res.Prep.Scaling)))
	if res.Units != nil {
		labels := make([]string, len(res.Variables))
		for j, v := range res.Variables {
			labels[j] = withUnit(v, res.Units[j])
		}
		fmt.Fprintf(&b, "Units, from the row under the header (--units-row): %s.\n\n", escapeMarkdown(strings.Join(labels, ", ")))
	}
	for _, d := range res.DroppedVariables {
		fmt.Fprintf(&b, "- left out: %s (%s)\n", escapeMarkdown(d.Name), escapeMarkdown(d.Reason))
	}
	b.WriteString("\n### Computed on a subsample or left out\n\n")
	fmt.Fprintf(&b, "- Parallel analysis (Horn 1965) ran on a uniform random sample of %d rows (reservoir sampling, Vitter 1985), with that sample's own eigenvalues.\n", len(res.SampleIDs))
	if res.Stability.Used > 0 {
		fmt.Fprintf(&b, "- The bootstrap weighted every row by an independent Poisson(1) count in the first pass (Hanley & MacGibbon 2006): %d resamples.\n", res.Stability.Used)
	} else {
		fmt.Fprintf(&b, "- Bootstrap: %s.\n", escapeMarkdown(res.BootstrapNote))
	}
	for _, s := range streamNotRun {
		fmt.Fprintf(&b, "- Left out: %s.\n", s)
	}
	b.WriteString("\n## Components\n\n| component | eigenvalue | % of variance | retained |\n|---|---|---|---|\n")
	pct := analysis.PercentOfTotal(res.Decomp.Eigenvalues)
	for a, e := range res.Decomp.Eigenvalues {
		fmt.Fprintf(&b, "| PC%d | %.4g | %.1f | %v |\n", a+1, e, pct[a], a < res.Retained)
	}
	b.WriteString("\n| rule | count |\n|---|---|\n")
	for _, c := range res.Counts.Counts {
		v := fmt.Sprint(c.Count)
		if !c.Applies {
			v = "– " + c.Note
		}
		fmt.Fprintf(&b, "| %s | %s |\n", c.Rule, escapeMarkdown(v))
	}
	l := res.Limits
	fmt.Fprintf(&b, "\n## Samples\n\nNormal-theory limits (Tracy, Young & Mason 1992; Jackson & Mudholkar 1979): T² 95 %% %.4g, 99 %% %.4g, family-wise %.4g; Q 95 %% %.4g, 99 %% %.4g, family-wise %.4g. "+
		"%d samples pass a family-wise limit", l.T2_95, l.T2_99, l.T2Family, l.Q95, l.Q99, l.QFamily, res.FlaggedCount)
	if len(res.Flagged) < res.FlaggedCount {
		fmt.Fprintf(&b, " (flagged.csv lists the first %d)", len(res.Flagged))
	}
	b.WriteString(".\n\n")
	for i, s := range res.Flagged {
		if i == 20 {
			b.WriteString("- …\n")
			break
		}
		fmt.Fprintf(&b, "- %s (line %d): T² %.4g, Q %.4g\n", escapeMarkdown(s.ID), s.Line, s.T2, s.Q)
	}
	b.WriteString("\n## Cautions\n\nA PCA describes the correlation structure of these samples; it does not show cause, and components are not guaranteed to mean anything physical. " +
		"Limits assume the samples are independent draws from one population. The cross-product route loses accuracy for components whose eigenvalue is below about 1e-8 of the largest. " +
		"A sample beyond a limit is a sample to look at, not a sample to delete; these measurements support expert judgement and do not replace it. " +
		regulationCaution + "\n")
	return b.String()
}
