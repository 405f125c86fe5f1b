package checks

import (
	"fmt"
	"strings"

	"pcqc/analysis"
)

// ruleLabel names a count rule in messages.
func ruleLabel(k analysis.RuleKind) string {
	switch k {
	case analysis.RuleParallel:
		return "parallel analysis"
	case analysis.RuleBrokenStick:
		return "broken stick"
	case analysis.RuleCV:
		return "cross-validation"
	case analysis.RuleKaiser:
		return "Kaiser (λ > 1)"
	case analysis.RuleVariance:
		return "cumulative variance"
	}
	return string(k)
}

// evidenceRule reports whether a rule's count rests on evidence of where
// noise starts (a null distribution or prediction error) and so takes part
// in the agreement test; Kaiser and the cumulative share are shown only.
func evidenceRule(k analysis.RuleKind) bool {
	return k == analysis.RuleParallel || k == analysis.RuleBrokenStick || k == analysis.RuleCV
}

var componentCount = Check{
	ID:     "component-count",
	Title:  "How many components",
	Source: "Horn (1965) parallel analysis with adaptive permutations; Bro et al. (2008) element-wise cross-validation; Frontier (1976) broken stick, compared only when it counts more (Peres-Neto et al. 2005); Kaiser and cumulative share shown as information",
	judge: func(in Input) Result {
		res := in.Run
		var evidence, info []string
		counts := map[analysis.RuleKind]int{}
		borderline := ""
		for _, c := range res.Counts.Counts {
			label := ruleLabel(c.Rule)
			var text string
			switch {
			case !c.Applies:
				text = fmt.Sprintf("%s: n/a (%s)", label, c.Note)
			case c.Note != "":
				text = fmt.Sprintf("%s %s: %d", label, c.Note, c.Count)
			default:
				text = fmt.Sprintf("%s: %d", label, c.Count)
			}
			if c.Borderline != "" {
				text += fmt.Sprintf(" (%s borderline)", c.Borderline)
				borderline = c.Borderline
			}
			if !evidenceRule(c.Rule) {
				info = append(info, text)
				continue
			}
			evidence = append(evidence, text)
			if c.Applies {
				counts[c.Rule] = c.Count
			}
		}
		all := strings.Join(evidence, "; ")
		if len(info) > 0 {
			all += "; for information " + strings.Join(info, "; ")
		}
		r := Result{Value: strings.Join(evidence, "; "), Limit: fmt.Sprintf("parallel analysis and cross-validation within %d; broken stick not above them by more than %d; no borderline decision", RuleSpreadLimit, RuleSpreadLimit)}
		used := fmt.Sprintf("Retained %s by %s.", countNoun(res.Retained, "component"), res.Rule.Describe())

		// The resampling-based rules: parallel analysis and cross-validation.
		lo, hi, n := 0, 0, 0
		for _, k := range []analysis.RuleKind{analysis.RuleParallel, analysis.RuleCV} {
			if c, ok := counts[k]; ok {
				if n == 0 || c < lo {
					lo = c
				}
				if n == 0 || c > hi {
					hi = c
				}
				n++
			}
		}
		bs, bsOK := counts[analysis.RuleBrokenStick]
		var problems []string
		if n == 2 && hi-lo > RuleSpreadLimit {
			problems = append(problems, fmt.Sprintf("parallel analysis and cross-validation disagree by %d components, so the cut between signal and noise is unclear: read the components beyond the smaller count with care", hi-lo))
		}
		if bsOK && n > 0 && bs > hi+RuleSpreadLimit {
			problems = append(problems, fmt.Sprintf("broken stick keeps %d, more than the resampling rules (at most %d); with few rows parallel analysis needs large eigenvalues, so components beyond %d may be real but not yet resolved by this sample", bs, hi, hi))
		}
		if borderline != "" {
			pa := res.Counts.Parallel
			a := pa.Borderline
			problems = append(problems, fmt.Sprintf("parallel analysis could not settle %s within its cap of %d permutations (%.1f %% of them reach the observed eigenvalue %.4g; the 99 %% bounds of that share still include 5 %%), so it is not counted; a larger --permutations may settle it", borderline, pa.Permutations, 100*pa.Exceedance[a], res.Decomp.Eigenvalues[a]))
		}
		switch {
		case res.NoStructure:
			r.Status = Warn
			r.Message = fmt.Sprintf("The rule in force (%s) finds no component that stands out from what uncorrelated data would give, so the variables may share no structure; PC1 is kept for reference only. Counts: %s.", res.Rule.Describe(), all)
			if len(problems) > 0 {
				r.Message += " Also: " + strings.Join(problems, "; ") + "."
			}
		case len(problems) > 0:
			r.Status = Warn
			r.Message = fmt.Sprintf("%s %s (%s).", used, capitalize(strings.Join(problems, "; also, ")), all)
		default:
			r.Status = Pass
			r.Message = fmt.Sprintf("%s The evidence-based rules agree (%s).", used, all)
		}
		return r
	},
}

// capitalize upper-cases the first letter of s.
func capitalize(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}
