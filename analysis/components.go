package analysis

import (
	"fmt"
	"strconv"
	"strings"
)

// RuleKind names a rule for the number of components to retain.
type RuleKind string

const (
	RuleFixed       RuleKind = "fixed"        // a number given by the user
	RuleParallel    RuleKind = "parallel"     // Horn's parallel analysis
	RuleBrokenStick RuleKind = "broken-stick" // Frontier 1976; Jackson 1993
	RuleKaiser      RuleKind = "kaiser"       // λ > 1 with unit scaling; Kaiser 1960
	RuleVariance    RuleKind = "variance"     // cumulative share threshold
	RuleCV          RuleKind = "cv"           // element-wise k-fold cross-validation; Bro et al. 2008
)

// ComponentRule says how many components to retain.
type ComponentRule struct {
	Kind     RuleKind
	Fixed    int     // RuleFixed: retain exactly this many
	Variance float64 // RuleVariance: the cumulative share to reach, in (0, 1]
	Auto     bool    // chosen as "auto" (parallel analysis)
}

// DefaultComponentRule is "auto": parallel analysis.
var DefaultComponentRule = ComponentRule{Kind: RuleParallel, Auto: true}

// DefaultVarianceShare is the cumulative share reported for the variance
// rule when another rule is in use (80 %, common practice).
const DefaultVarianceShare = 0.8

// ParseComponentRule reads N | auto | parallel | broken-stick | cv | kaiser |
// variance:F (F a share in (0, 1], or a percentage in (1, 100]).
func ParseComponentRule(s string) (ComponentRule, error) {
	s = strings.TrimSpace(s)
	switch s {
	case "auto":
		return DefaultComponentRule, nil
	case string(RuleParallel):
		return ComponentRule{Kind: RuleParallel}, nil
	case string(RuleBrokenStick):
		return ComponentRule{Kind: RuleBrokenStick}, nil
	case string(RuleKaiser):
		return ComponentRule{Kind: RuleKaiser}, nil
	case string(RuleCV):
		return ComponentRule{Kind: RuleCV}, nil
	}
	if v, ok := strings.CutPrefix(s, "variance:"); ok {
		f, err := strconv.ParseFloat(v, 64)
		if err != nil || f <= 0 || f > 100 {
			return ComponentRule{}, fmt.Errorf("invalid --components %q: variance:F needs a share in (0, 1] such as variance:0.8", s)
		}
		if f > 1 {
			f /= 100
		}
		return ComponentRule{Kind: RuleVariance, Variance: f}, nil
	}
	n, err := strconv.Atoi(s)
	if err != nil || n < 1 {
		return ComponentRule{}, fmt.Errorf("invalid --components %q: use a positive number, auto, parallel, broken-stick, cv, kaiser or variance:F", s)
	}
	return ComponentRule{Kind: RuleFixed, Fixed: n}, nil
}

// String returns the rule in the form ParseComponentRule reads.
func (r ComponentRule) String() string {
	switch r.Kind {
	case RuleFixed:
		return strconv.Itoa(r.Fixed)
	case RuleVariance:
		return "variance:" + strconv.FormatFloat(r.Variance, 'g', -1, 64)
	case RuleParallel:
		if r.Auto {
			return "auto"
		}
	}
	return string(r.Kind)
}

// Describe names the rule for people.
func (r ComponentRule) Describe() string {
	switch r.Kind {
	case RuleFixed:
		return fmt.Sprintf("fixed by the user (%d)", r.Fixed)
	case RuleParallel:
		return "parallel analysis (Horn 1965)"
	case RuleBrokenStick:
		return "broken stick (Frontier 1976)"
	case RuleKaiser:
		return "Kaiser–Guttman, λ > 1 (Kaiser 1960)"
	case RuleVariance:
		return fmt.Sprintf("cumulative variance ≥ %s %%", strconv.FormatFloat(100*r.Variance, 'g', -1, 64))
	case RuleCV:
		return "element-wise cross-validation (Bro et al. 2008)"
	}
	return string(r.Kind)
}

// RuleCount is one rule's verdict on the number of components.
type RuleCount struct {
	Rule    RuleKind `json:"rule"`
	Count   int      `json:"count"`
	Applies bool     `json:"applies"`
	Note    string   `json:"note,omitempty"`
	// Borderline names the component (PC1, …) whose decision parallel
	// analysis could not settle within its permutation cap; it is not
	// counted.
	Borderline string `json:"borderline,omitempty"`
}

// ComponentCounts gathers every rule's count, side by side.
type ComponentCounts struct {
	Parallel          Parallel
	CV                CrossValidation // Folds 0 when it did not run
	BrokenStickShares []float64       // expected share of each component under the broken stick
	Counts            []RuleCount
}

// Count returns the count of the named rule, and whether it applies.
func (c ComponentCounts) Count(kind RuleKind) (int, bool) {
	for _, rc := range c.Counts {
		if rc.Rule == kind {
			return rc.Count, rc.Applies
		}
	}
	return 0, false
}

// BrokenStick returns the expected shares of m components when the total
// variance is broken at random into m pieces (Frontier 1976, J. Exp. Mar.
// Biol. Ecol. 25:67–75; Jackson 1993, Ecology 74:2204–2214):
// b_k = (1/m) Σ_{i=k..m} 1/i.
func BrokenStick(m int) []float64 {
	out := make([]float64, m)
	sum := 0.0
	for i := m; i >= 1; i-- {
		sum += 1 / float64(i)
		out[i-1] = sum / float64(m)
	}
	return out
}

// BrokenStickCount is the number of leading components whose share of the
// variance exceeds the broken-stick expectation.
func BrokenStickCount(eigenvalues []float64) int {
	b := BrokenStick(len(eigenvalues))
	total := 0.0
	for _, l := range eigenvalues {
		total += l
	}
	k := 0
	for k < len(eigenvalues) && eigenvalues[k]/total > b[k] {
		k++
	}
	return k
}

// KaiserCount is the number of eigenvalues greater than 1 (Kaiser 1960,
// Educ. Psychol. Meas. 20:141–151; Guttman 1954). It is meaningful only for
// unit-scaled data, where 1 is the variance of a single variable.
func KaiserCount(eigenvalues []float64) int {
	k := 0
	for k < len(eigenvalues) && eigenvalues[k] > 1 {
		k++
	}
	return k
}

// VarianceCount returns the fewest components whose cumulative share of the
// total variance reaches share (with a relative slack of 1e-12, so that a
// share reached exactly is not missed by rounding).
func VarianceCount(eigenvalues []float64, share float64) int {
	total := 0.0
	for _, l := range eigenvalues {
		total += l
	}
	cum := 0.0
	for a, l := range eigenvalues {
		cum += l
		if cum >= share*total*(1-1e-12) {
			return a + 1
		}
	}
	return len(eigenvalues)
}

// CountComponents applies every rule. parallel is the result of
// ParallelAnalysis (Permutations 0 when it was not run), cv that of
// CrossValidate (Folds 0 when it was not run).
func CountComponents(eigenvalues []float64, scaling Scaling, varianceShare float64, parallel Parallel, cv CrossValidation) ComponentCounts {
	c := ComponentCounts{Parallel: parallel, CV: cv, BrokenStickShares: BrokenStick(len(eigenvalues))}
	pa := RuleCount{Rule: RuleParallel, Count: parallel.Count, Applies: parallel.Permutations > 0}
	if !pa.Applies {
		pa.Note = "not run (--permutations 0)"
	}
	if parallel.Borderline >= 0 && pa.Applies {
		pa.Borderline = fmt.Sprintf("PC%d", parallel.Borderline+1)
	}
	cvc := RuleCount{Rule: RuleCV, Count: cv.Count, Applies: cv.Folds > 0}
	if !cvc.Applies {
		cvc.Note = "needs at least 3 variables and 4 rows"
	}
	kaiser := RuleCount{Rule: RuleKaiser, Count: KaiserCount(eigenvalues), Applies: scaling == ScaleUnit}
	if !kaiser.Applies {
		kaiser.Note = "applies only with --scale unit"
	}
	c.Counts = []RuleCount{
		pa,
		{Rule: RuleBrokenStick, Count: BrokenStickCount(eigenvalues), Applies: true},
		cvc,
		kaiser,
		{Rule: RuleVariance, Count: VarianceCount(eigenvalues, varianceShare), Applies: true,
			Note: fmt.Sprintf("≥ %s %%", strconv.FormatFloat(100*varianceShare, 'g', -1, 64))},
	}
	return c
}

// Choose returns the number of components the rule retains, given every
// rule's count. A fixed count larger than the number of components is an
// error. A count of 0 (no component stands out) is returned as such; the
// caller decides what to show.
func (r ComponentRule) Choose(m int, counts ComponentCounts) (int, error) {
	switch r.Kind {
	case RuleFixed:
		if r.Fixed > m {
			return 0, fmt.Errorf("--components %d asks for more components than the data have (%d = min(n−1, p))", r.Fixed, m)
		}
		return r.Fixed, nil
	case RuleKaiser:
		if _, ok := counts.Count(RuleKaiser); !ok {
			return 0, fmt.Errorf("--components kaiser needs --scale unit: the λ > 1 rule compares each eigenvalue with the variance of one unit-scaled variable")
		}
	case RuleParallel:
		if _, ok := counts.Count(RuleParallel); !ok {
			return 0, fmt.Errorf("--components %s needs permutations (--permutations > 0)", r)
		}
	case RuleCV:
		if _, ok := counts.Count(RuleCV); !ok {
			return 0, fmt.Errorf("--components cv needs at least 3 variables and 4 rows")
		}
	}
	k, _ := counts.Count(r.Kind)
	return k, nil
}
