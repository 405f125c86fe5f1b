package checks

import (
	"fmt"
	"strings"
)

// sci formats a small measured quantity for messages.
func sci(x float64) string { return fmt.Sprintf("%.2g", x) }

// PFloor is the smallest p-value pcqc states. A p-value computed as
// 1 − CDF cannot be resolved below double precision's machine epsilon
// (2.2e-16), and upper-tail functions often return 0 there, so a smaller p
// is written as "< 1e-16" rather than as a number, and never as 0.
const PFloor = 1e-16

// Probability marks a check's Value as a p-value, so that every rendering
// writes it as the message does (FormatP) instead of as a plain number that
// could round to 0. In summary.json it is the plain number.
type Probability float64

// FormatP writes a p-value without its "p": "< 1e-16" below PFloor, and
// otherwise to two significant digits, the precision of the messages.
func FormatP(p float64) string {
	if p < PFloor {
		return "< 1e-16"
	}
	return sci(p)
}

// pvalue formats a p-value for a message: "p < 1e-16" or "p = 0.54".
func pvalue(p float64) string {
	if p < PFloor {
		return "p " + FormatP(p)
	}
	return "p = " + FormatP(p)
}

// g3 formats a quantity to three significant digits.
func g3(x float64) string { return fmt.Sprintf("%.3g", x) }

// pct formats a share as a percentage.
func pct(x float64) string { return fmt.Sprintf("%.1f %%", 100*x) }

// listIDs names up to ListedSamples ids, then counts the rest.
func listIDs(ids []string) string {
	if len(ids) <= ListedSamples {
		return strings.Join(ids, ", ")
	}
	return fmt.Sprintf("%s and %d more", strings.Join(ids[:ListedSamples], ", "), len(ids)-ListedSamples)
}

// idsOf returns the sample ids at the given row indices.
func idsOf(all []string, idx []int) []string {
	out := make([]string, len(idx))
	for i, j := range idx {
		out[i] = all[j]
	}
	return out
}

// namesOf returns the variable names at the given indices.
func namesOf(all []string, idx []int) []string { return idsOf(all, idx) }

// countNoun writes "1 sample" or "3 samples".
func countNoun(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return fmt.Sprintf("%d %ss", n, noun)
}
