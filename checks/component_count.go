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
	case analysis.RuleKaiser:
		return "Kaiser (λ > 1)"
	case analysis.RuleVariance:
		return "cumulative variance"
	}
	return string(k)
}

var componentCount = Check{
	ID:     "component-count",
	Title:  "How many components",
	Source: "Horn (1965) parallel analysis; Frontier (1976) broken stick; Kaiser (1960); cumulative share (common practice); agreement within one component (common practice)",
	judge: func(in Input) Result {
		res := in.Run
		var parts []string
		lo, hi, applied := 0, 0, 0
		for _, c := range res.Counts.Counts {
			if !c.Applies {
				parts = append(parts, fmt.Sprintf("%s: n/a (%s)", ruleLabel(c.Rule), c.Note))
				continue
			}
			label := ruleLabel(c.Rule)
			if c.Note != "" {
				label += " " + c.Note
			}
			parts = append(parts, fmt.Sprintf("%s: %d", label, c.Count))
			if applied == 0 || c.Count < lo {
				lo = c.Count
			}
			if applied == 0 || c.Count > hi {
				hi = c.Count
			}
			applied++
		}
		r := Result{Value: strings.Join(parts, "; "), Limit: fmt.Sprintf("rules agree within %d", RuleSpreadLimit)}
		used := fmt.Sprintf("Retained %s by %s.", countNoun(res.Retained, "component"), res.Rule.Describe())
		switch {
		case res.NoStructure:
			r.Status = Warn
			r.Message = fmt.Sprintf("The rule in force (%s) finds no component that stands out from what uncorrelated data would give, so the variables may share no structure; PC1 is kept for reference only. Counts: %s.", res.Rule.Describe(), strings.Join(parts, "; "))
		case hi-lo > RuleSpreadLimit:
			r.Status = Warn
			r.Message = fmt.Sprintf("%s The rules disagree by %d components (%s): the cut between signal and noise is unclear, so read the components beyond the smallest count with care.", used, hi-lo, strings.Join(parts, "; "))
		default:
			r.Status = Pass
			r.Message = fmt.Sprintf("%s The rules agree within %d (%s).", used, RuleSpreadLimit, strings.Join(parts, "; "))
		}
		return r
	},
}
