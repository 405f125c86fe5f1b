package checks

import (
	"fmt"
	"math"
	"strings"

	"pcqc/analysis"
)

// withoutFlagged answers the first question a reviewer asks about a PCA
// with outliers: do the conclusions hold without them? The refit comes from
// analysis (RefitWithoutFlagged); this check only judges it.
var withoutFlagged = Check{
	ID:     withoutFlaggedID,
	Title:  "The components hold without the flagged samples",
	Source: "refit without the samples the outlier and influence checks name; each retained component paired with the refit's by the optimal (Hungarian) assignment on |Tucker congruence|, which must stay ≥ 0.95 (Lorenzo-Seva & ten Berge 2006); the largest principal angle between the retained subspaces (Björck & Golub 1973) against the 95th percentile of the bootstrap subspace angles (common practice); and the retained count",
	judge: func(in Input) Result {
		w := in.Run.WhatIf
		switch {
		case w == nil:
			return Result{Status: Skip, Message: "Not computed for this analysis."}
		case len(w.Flagged) == 0:
			return Result{Status: Skip, Message: "No sample is flagged by the outlier or influence checks, so there is nothing to leave out."}
		case w.Refit == nil:
			return Result{Status: Skip, Message: fmt.Sprintf("Not refitted: %s.", w.Skipped)}
		}
		ids := in.Run.Table.IDs
		minPhi, worst := math.Inf(1), 0
		for a, phi := range w.Congruence {
			if phi < minPhi {
				minPhi, worst = phi, a
			}
		}
		r := Result{Value: minPhi, Limit: map[string]float64{"congruence": WithoutFlaggedCongruence, "angle_deg": w.AngleLimit}}
		var changes []string
		if minPhi < WithoutFlaggedCongruence {
			changes = append(changes, fmt.Sprintf("PC%d is no longer the same component (|congruence| %s with the refit's PC%d, below %s)",
				worst+1, f3(minPhi), w.Match[worst]+1, g3(WithoutFlaggedCongruence)))
		}
		if !math.IsNaN(w.AngleLimit) && w.Angle > w.AngleLimit {
			changes = append(changes, fmt.Sprintf("the retained subspace turns by %s°, more than the %s° resampling explains", g3(w.Angle), g3(w.AngleLimit)))
		}
		if w.Refit.Retained != in.Run.Retained {
			changes = append(changes, fmt.Sprintf("the %s rule keeps %d components instead of %d", w.Refit.Rule, w.Refit.Retained, in.Run.Retained))
		}
		var per []string
		for a := range w.Congruence {
			per = append(per, fmt.Sprintf("PC%d %s (λ %s → %s, %.1f %% → %.1f %%)", a+1, f3(w.Congruence[a]),
				g3(w.Eigenvalue[a]), g3(w.RefitEigenvalue[a]), w.Share[a], w.RefitShare[a]))
		}
		angle := fmt.Sprintf("the largest principal angle between the retained subspaces is %s°", g3(w.Angle))
		if math.IsNaN(w.AngleLimit) {
			angle += " (not judged: the yardstick needs the bootstrap)"
		} else {
			angle += fmt.Sprintf(" (resampling: up to %s°, 95th percentile)", g3(w.AngleLimit))
		}
		what := fmt.Sprintf("Refitted without the %s the outlier or influence checks flag: %s. Congruence per component: %s; %s.",
			countNoun(len(w.Flagged), "sample"), listIDs(idsOf(ids, w.Flagged)), strings.Join(per, ", "), angle)
		if moved := statusChanges(in, w.Refit); moved != "" {
			what += " Checks whose status changes without them: " + moved + "."
		}
		if len(changes) == 0 {
			r.Status = Pass
			r.Message = what + " The components are the same without them."
			return r
		}
		r.Status = Warn
		r.Message = fmt.Sprintf("Without the flagged samples %s. %s The conclusions depend on these samples: report both fits, or find out why the samples differ before keeping or dropping them.",
			strings.Join(changes, "; "), what)
		return r
	},
}

// f3 writes a congruence with three decimals, so that 0.9996 does not read
// as 1.
func f3(x float64) string { return fmt.Sprintf("%.3f", x) }

// rerun evaluates the registered checks; it is set in init because the
// registry lists withoutFlagged, whose judge needs the registry (a
// package-level initialiser would make a cycle).
var rerun func(Input, string) []Result

func init() {
	rerun = func(in Input, skip string) []Result {
		var out []Result
		for _, c := range Registry {
			if c.ID == skip || c.Mode != ModeAudit {
				continue
			}
			out = append(out, c.Run(in))
		}
		return out
	}
}

// statusChanges lists the audit checks whose status differs between the
// fit and the refit, as "id: warn → pass". Checks skipped on either side
// are left out: the refit draws no bootstrap, so its stability checks do
// not apply, which is no change in the data.
func statusChanges(in Input, refit *analysis.Result) string {
	before := rerun(Input{Run: in.Run}, withoutFlaggedID)
	after := map[string]Status{}
	for _, r := range rerun(Input{Run: refit}, withoutFlaggedID) {
		after[r.ID] = r.Status
	}
	var out []string
	for _, b := range before {
		a, ok := after[b.ID]
		if !ok || a == b.Status || a == Skip || b.Status == Skip {
			continue
		}
		out = append(out, fmt.Sprintf("%s: %s → %s", b.ID, b.Status, a))
	}
	return strings.Join(out, ", ")
}

const withoutFlaggedID = "without-flagged"
