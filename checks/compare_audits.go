package checks

import (
	"fmt"
	"math"
	"strings"

	"pcqc/analysis"
)

// compareCheck judges a comparison of two audits (pcqc compare). These
// checks are not in Registry: they read two saved audits, not a table.
type compareCheck struct {
	ID, Title, Source string
	judge             func(c *analysis.AuditComparison) Result
}

// CompareChecks lists the checks of pcqc compare in report order.
var CompareChecks = []compareCheck{
	{"compare-variables", "Both audits hold the same variables", "common practice (components over different variables are not the same components)", judgeCompareVariables},
	{"compare-retained", "Both audits retain as many components", "common practice: a different count counts when the boundary eigenvalues' bootstrap intervals do not overlap", judgeCompareRetained},
	{"compare-components", "Paired components agree", "Lorenzo-Seva & ten Berge (2006) without bootstraps; with them, both audits' bootstrap congruence (common practice)", judgeCompareComponents},
	{"compare-subspace", "The retained subspaces agree", "both audits' bootstrap subspace angles, added (the largest principal angle is a metric; common practice)", judgeCompareSubspace},
	{"compare-checks", "No check passes in one audit and fails in the other", "common practice", judgeCompareChecks},
}

// RunCompare evaluates the compare checks.
func RunCompare(c *analysis.AuditComparison) []Result {
	out := make([]Result, 0, len(CompareChecks))
	for _, k := range CompareChecks {
		r := k.judge(c)
		r.ID, r.Title, r.Source = k.ID, k.Title, k.Source
		r.Value, r.Limit = finiteOrNil(r.Value), finiteOrNil(r.Limit)
		out = append(out, r)
	}
	return out
}

func judgeCompareVariables(c *analysis.AuditComparison) Result {
	n := len(c.OnlyA) + len(c.OnlyB)
	if len(c.Common) == 0 {
		return Result{Status: Fail, Value: n, Limit: 0, Message: "The audits share no variable: their components cannot be compared."}
	}
	if n == 0 {
		return Result{Status: Pass, Value: 0, Limit: 0, Message: fmt.Sprintf("Both audits hold the same %d variables.", len(c.Common))}
	}
	var parts []string
	if len(c.OnlyA) > 0 {
		parts = append(parts, "only in A: "+strings.Join(c.OnlyA, ", "))
	}
	if len(c.OnlyB) > 0 {
		parts = append(parts, "only in B: "+strings.Join(c.OnlyB, ", "))
	}
	return Result{Status: Warn, Value: n, Limit: 0, Message: fmt.Sprintf("%d variables are in one audit only (%s). The components are compared over the %d common variables, but each audit's components were fitted with its own variables.", n, strings.Join(parts, "; "), len(c.Common))}
}

// judgeCompareRetained warns when the audits retain different numbers of
// components, unless the components at the boundary are within sampling
// of each other: for every component that one audit keeps and the other
// drops, the two audits' bootstrap intervals for its eigenvalue overlap.
// A rule such as parallel analysis then merely fell on different sides of
// an eigenvalue both samples estimate alike.
func judgeCompareRetained(c *analysis.AuditComparison) Result {
	ka, kb := c.A.Model.Retained, c.B.Model.Retained
	if ka == kb {
		return Result{Status: Pass, Value: kb, Limit: ka, Message: fmt.Sprintf("Both audits retain %d components.", ka)}
	}
	var apart []string
	for a := min(ka, kb); a < max(ka, kb); a++ {
		if a >= len(c.A.Intervals) || a >= len(c.B.Intervals) {
			apart = append(apart, fmt.Sprintf("PC%d (no bootstrap interval in one audit)", a+1))
			continue
		}
		ia, ib := c.A.Intervals[a], c.B.Intervals[a]
		if !(ia.Low <= ib.High && ib.Low <= ia.High) {
			apart = append(apart, fmt.Sprintf("PC%d (eigenvalue intervals [%.3g, %.3g] and [%.3g, %.3g])", a+1, ia.Low, ia.High, ib.Low, ib.High))
		}
	}
	if len(apart) == 0 {
		return Result{Status: Pass, Value: kb, Limit: ka, Message: fmt.Sprintf("A retains %d components and B %d, but the bootstrap intervals of the eigenvalues the count rule split overlap: the counts differ within sampling. Compare the pairs that both retain.", ka, kb)}
	}
	return Result{Status: Warn, Value: kb, Limit: ka, Message: fmt.Sprintf("A retains %d components and B %d, and the eigenvalues of %s differ by more than the bootstraps explain: the structure found differs in size, and the larger model has %s without a partner.", ka, kb, strings.Join(apart, ", "), counted(max(ka, kb)-min(ka, kb), "component", "components"))}
}

// counted is n with the noun that fits it.
func counted(n int, one, many string) string {
	return fmt.Sprintf("%d %s", n, plural(one, many, n))
}

// pairLimit is the congruence below which a pair differs by more than the
// two audits' resampling explains (see CompareCongruenceLimit).
func pairLimit(c *analysis.AuditComparison, p analysis.ComponentPair) (float64, bool) {
	a, b := c.A.CongruenceP5, c.B.CongruenceP5
	if p.A < len(a) && p.B < len(b) && !math.IsNaN(a[p.A]) && !math.IsNaN(b[p.B]) {
		// The angle between two unit vectors is a metric, so the angle
		// between A's and B's estimates is at most the sum of each one's
		// sampling angle.
		angle := math.Acos(math.Min(1, a[p.A])) + math.Acos(math.Min(1, b[p.B]))
		return math.Cos(math.Min(angle, math.Pi/2)), true
	}
	return CompareCongruenceLimit, false
}

func judgeCompareComponents(c *analysis.AuditComparison) Result {
	if len(c.Pairs) == 0 {
		return Result{Status: Skip, Message: "No components could be paired (no common variables)."}
	}
	worst, worstLimit := math.Inf(1), 0.0
	var low []string
	resampled := true
	for _, p := range c.Pairs {
		lim, boot := pairLimit(c, p)
		resampled = resampled && boot
		if p.Congruence < lim {
			low = append(low, fmt.Sprintf("A's PC%d and B's PC%d (φ = %.3f, limit %.3f)", p.A+1, p.B+1, p.Congruence, lim))
		}
		if p.Congruence-lim < worst-worstLimit || math.IsInf(worst, 1) {
			worst, worstLimit = p.Congruence, lim
		}
	}
	basis := "the limit each pair's bootstraps allow"
	if !resampled {
		basis = fmt.Sprintf("a limit of %.2f where an audit has no bootstrap (Lorenzo-Seva & ten Berge 2006)", CompareCongruenceLimit)
	}
	if len(low) == 0 {
		return Result{Status: Pass, Value: worst, Limit: worstLimit, Message: fmt.Sprintf("Every pair of components has a congruence above %s; the lowest is %.3f.", basis, worst)}
	}
	return Result{Status: Warn, Value: worst, Limit: worstLimit, Message: fmt.Sprintf("%s below %s: %s. These components differ by more than sampling explains; compare their largest loading differences.", counted(len(low), "pair is", "pairs are"), basis, strings.Join(low, "; "))}
}

func judgeCompareSubspace(c *analysis.AuditComparison) Result {
	angle := c.LargestAngle()
	if math.IsNaN(angle) {
		return Result{Status: Skip, Message: "No principal angles: the audits share fewer variables than they retain components."}
	}
	if math.IsNaN(c.A.AngleP95) || math.IsNaN(c.B.AngleP95) {
		return Result{Status: Skip, Value: angle, Message: fmt.Sprintf("The largest principal angle is %.2f°, but an audit ran no bootstrap, so there is no yardstick for it.", angle)}
	}
	// The largest principal angle is a metric on subspaces of one
	// dimension (see CompareCongruenceLimit): each audit's sampling angle
	// bounds its share of the distance between them.
	limit := c.A.AngleP95 + c.B.AngleP95
	if c.A.Model.Retained != c.B.Model.Retained {
		return Result{Status: Skip, Value: angle, Message: fmt.Sprintf("The audits retain different numbers of components; the largest principal angle between the smaller subspace and the larger is %.2f°.", angle)}
	}
	if angle <= limit {
		return Result{Status: Pass, Value: angle, Limit: limit, Message: fmt.Sprintf("The largest principal angle between the retained subspaces is %.2f°, within the %.2f° both audits' bootstraps allow.", angle, limit)}
	}
	return Result{Status: Warn, Value: angle, Limit: limit, Message: fmt.Sprintf("The largest principal angle between the retained subspaces is %.2f°, beyond the %.2f° both audits' bootstraps allow (the sum of their 95th percentiles, %.2f° and %.2f°): the two audits span different structure.", angle, limit, c.A.AngleP95, c.B.AngleP95)}
}

func judgeCompareChecks(c *analysis.AuditComparison) Result {
	var flipped, changed []string
	for _, k := range c.Checks {
		if !k.Changed {
			continue
		}
		changed = append(changed, k.ID)
		if (k.A == "pass" && k.B == "fail") || (k.A == "fail" && k.B == "pass") {
			flipped = append(flipped, fmt.Sprintf("%s (%s in A, %s in B)", k.ID, k.A, k.B))
		}
	}
	if len(flipped) > 0 {
		return Result{Status: Warn, Value: len(flipped), Limit: 0, Message: "Checks that pass in one audit fail in the other: " + strings.Join(flipped, "; ") + "."}
	}
	if len(changed) == 0 {
		return Result{Status: Pass, Value: 0, Limit: 0, Message: "Every check has the same status in both audits."}
	}
	return Result{Status: Pass, Value: 0, Limit: 0, Message: fmt.Sprintf("No check passes in one audit and fails in the other; %s changed status less sharply (%s): see the side-by-side table.", counted(len(changed), "check", "checks"), strings.Join(changed, ", "))}
}
