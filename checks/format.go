package checks

import (
	"fmt"
	"strings"
)

// sci formats a small measured quantity for messages.
func sci(x float64) string { return fmt.Sprintf("%.2g", x) }

// pvalue formats a p-value, with a floor below which double precision
// cannot resolve it.
func pvalue(p float64) string {
	if p < 1e-16 {
		return "p < 1e-16"
	}
	return "p = " + sci(p)
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
