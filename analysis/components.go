package analysis

import (
	"fmt"
	"strconv"
	"strings"
)

// ComponentRule says how many components to retain: a fixed number, or the
// fewest components whose cumulative share of variance reaches a threshold.
type ComponentRule struct {
	Fixed    int     // > 0: retain exactly this many
	Variance float64 // in (0, 1]: retain the fewest reaching this cumulative share
}

// DefaultComponentRule is the 80 % cumulative-variance rule (common practice).
var DefaultComponentRule = ComponentRule{Variance: 0.8}

// ParseComponentRule reads "N" or "variance:F" (F a share in (0, 1], or a
// percentage in (1, 100]).
func ParseComponentRule(s string) (ComponentRule, error) {
	s = strings.TrimSpace(s)
	if v, ok := strings.CutPrefix(s, "variance:"); ok {
		f, err := strconv.ParseFloat(v, 64)
		if err != nil || f <= 0 || f > 100 {
			return ComponentRule{}, fmt.Errorf("invalid --components %q: variance:F needs a share in (0, 1] such as variance:0.8", s)
		}
		if f > 1 {
			f /= 100
		}
		return ComponentRule{Variance: f}, nil
	}
	n, err := strconv.Atoi(s)
	if err != nil || n < 1 {
		return ComponentRule{}, fmt.Errorf("invalid --components %q: use a positive number or variance:F", s)
	}
	return ComponentRule{Fixed: n}, nil
}

// String returns the rule in the form ParseComponentRule reads.
func (r ComponentRule) String() string {
	if r.Fixed > 0 {
		return strconv.Itoa(r.Fixed)
	}
	return "variance:" + strconv.FormatFloat(r.Variance, 'g', -1, 64)
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

// Count applies the rule to the eigenvalues. A fixed count larger than the
// number of components is an error, reported to the user.
func (r ComponentRule) Count(eigenvalues []float64) (int, error) {
	m := len(eigenvalues)
	if r.Fixed > 0 {
		if r.Fixed > m {
			return 0, fmt.Errorf("--components %d asks for more components than the data have (%d = min(n−1, p))", r.Fixed, m)
		}
		return r.Fixed, nil
	}
	return VarianceCount(eigenvalues, r.Variance), nil
}
