package report

import (
	"fmt"
	"strings"

	"pcqc/analysis"
)

// Residual contributions of an audit: for the samples the outlier checks
// flag, which variables push them out, in contributions.csv and as bar
// plots in the report's Outliers section.

// runContributions computes the flagged samples' contributions, or none
// when the result holds no preprocessed data or scores to compute them from.
func runContributions(res *analysis.Result) analysis.RunContributions {
	if res.Z == nil || res.Scores == nil || res.Decomp == nil {
		return analysis.RunContributions{}
	}
	return analysis.FlaggedContributions(res)
}

// contributionsHeader is contributions.csv's header: apply's columns, then
// each variable's 99 % contribution limits, which an audit can estimate
// from its own unflagged samples.
var contributionsHeader = []string{"sample", "variable", "t2_contribution", "q_contribution", "residual", "t2_contribution_limit", "q_contribution_limit"}

// writeContributions writes contributions.csv: one row per flagged sample
// (worst first) and variable (in input order). The file is written, header
// only, when no sample is flagged, so that its absence never has to be
// interpreted.
func writeContributions(path string, res *analysis.Result, rc analysis.RunContributions) error {
	vars := res.Table.Variables
	p := len(vars)
	return streamCSV(path, contributionsHeader, len(rc.Contributions)*p, func(r int, dst []string) []string {
		c := rc.Contributions[r/p]
		j := r % p
		return append(dst, res.Table.IDs[c.Sample], vars[j], num(c.T2[j]), num(c.Q[j]), num(c.Residual[j]), num(rc.T2Limit[j]), num(rc.QLimit[j]))
	})
}

// contributionBlock fills the Outliers section's contribution figures:
// for each of the contributionFigures most extreme flagged samples, its
// contributions and then its signed residuals, and the figure jobs that
// draw them (pointing into b.Contributions, which must not grow after).
func contributionBlock(res *analysis.Result, rc analysis.RunContributions, b *OutliersBlock) []figureJob {
	flagged := len(rc.Contributions)
	if flagged == 0 {
		return nil
	}
	t := res.Table
	shown := min(contributionFigures, flagged)
	for c := 0; c < shown; c++ {
		con := rc.Contributions[c]
		id := t.IDs[con.Sample]
		which := runExtremeText(c+1, shown, flagged)
		b.Contributions = append(b.Contributions,
			Figure{Stem: fmt.Sprintf("contributions-%d", c+1), Alt: "Contributions of " + id,
				Caption: fmt.Sprintf("Contributions of each variable to the Hotelling T² and the Q residual of sample %s, as shares of each (T² shares may be negative; Westerhuis, Gurden & Smilde 2000). %s %s", id, which, beyondLimitsText(res.Table.Variables, con, rc))},
			Figure{Stem: fmt.Sprintf("residuals-%d", c+1), Alt: "Signed residuals of " + id,
				Caption: fmt.Sprintf("Signed residuals of sample %s: in each variable, its value less what the retained components reconstruct, in %s; a bar to the right means the sample is higher than the model expects. The squares of the bars sum to its Q residual.", id, runResidualUnit(res.Prep.Scaling))})
	}
	b.ContributionsNote = fmt.Sprintf("For the samples beyond a family-wise limit (%d), contributions.csv gives each variable's contribution to the sample's Hotelling T² (Westerhuis, Gurden & Smilde 2000; the contributions sum to T² and may be negative) and to its Q residual (the squared residual; Miller, Swanson & Heckler 1998), the signed residual, and each variable's 99 %% limits of both contributions, estimated from the %d samples not flagged. The figures below show the %s.",
		flagged, rc.Reference, shownText(shown, flagged))
	var jobs []figureJob
	for f := range b.Contributions {
		con := rc.Contributions[f/2]
		i := con.Sample
		draw := func() drawing {
			return contributionBars(t.Variables, t.IDs[i], res.Samples.T2[i], res.Samples.Q[i], con)
		}
		if f%2 == 1 {
			draw = func() drawing {
				return residualBars(t.Variables, t.IDs[i], "signed residual ("+runResidualUnit(res.Prep.Scaling)+")", con.Residual)
			}
		}
		jobs = append(jobs, figureJob{&b.Contributions[f], draw})
	}
	return jobs
}

// shownText says which flagged samples have figures: "only flagged
// sample", "all 2 flagged samples", or "3 most extreme of 7 flagged
// samples".
func shownText(shown, flagged int) string {
	switch {
	case flagged == 1:
		return "only flagged sample"
	case shown == flagged:
		return fmt.Sprintf("all %d flagged samples", flagged)
	}
	return fmt.Sprintf("%d most extreme of the %d flagged samples", shown, flagged)
}

// runExtremeText says where a sample with figures ranks among the flagged.
func runExtremeText(rank, shown, flagged int) string {
	if flagged == 1 {
		return "It is the only sample beyond a family-wise limit."
	}
	r := "the most extreme"
	if rank > 1 {
		r = "the " + ordinal(rank) + " most extreme"
	}
	return fmt.Sprintf("It is %s of the %d samples beyond a family-wise limit (figures for %d of %d).", r, flagged, shown, flagged)
}

// beyondLimitsText names the variables whose contribution passes its 99 %
// limit, the ones to look at first.
func beyondLimitsText(vars []string, c analysis.Contribution, rc analysis.RunContributions) string {
	var t2, q []string
	for j, v := range vars {
		if c.T2[j] > rc.T2Limit[j] {
			t2 = append(t2, v)
		}
		if c.Q[j] > rc.QLimit[j] {
			q = append(q, v)
		}
	}
	list := func(names []string) string {
		if len(names) == 0 {
			return "none"
		}
		const most = 8
		if len(names) > most {
			return strings.Join(names[:most], ", ") + fmt.Sprintf(" and %d more", len(names)-most)
		}
		return strings.Join(names, ", ")
	}
	return fmt.Sprintf("Beyond their 99 %% contribution limits: to T², %s; to Q, %s.", list(t2), list(q))
}

// runResidualUnit names the unit of an audit's residuals.
func runResidualUnit(s analysis.Scaling) string {
	switch s {
	case analysis.ScaleUnit:
		return "standard deviations of the variable"
	case analysis.ScaleNone:
		return "units of the data (after any transform)"
	}
	return "preprocessed units"
}
