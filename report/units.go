package report

import (
	"fmt"
	"strings"

	"pcqc/analysis/intake"
)

// varLabel names variable j of t with its unit, "nitrate [mg/L]", where the
// file had a units row; a unit already in brackets or parentheses is not
// bracketed again. It is the label of a variable wherever it names an axis
// entry or a point.
func varLabel(t *intake.Table, j int) string { return withUnit(t.Variables[j], unitOf(t, j)) }

// withUnit is name labelled with unit u (see varLabel).
func withUnit(name, u string) string {
	if u == "" {
		return name
	}
	if strings.HasPrefix(u, "(") || strings.HasPrefix(u, "[") {
		return name + " " + u
	}
	return name + " [" + u + "]"
}

// unitOf returns the unit of variable j, or "".
func unitOf(t *intake.Table, j int) string {
	if j < len(t.Units) {
		return t.Units[j]
	}
	return ""
}

// hasUnits reports whether any variable has a unit.
func hasUnits(t *intake.Table) bool {
	for _, u := range t.Units {
		if u != "" {
			return true
		}
	}
	return false
}

// layoutText says how the text around the table was read: preamble lines
// skipped, comment lines ignored, a units row, thousands separators; ""
// when none of these applied.
func layoutText(t *intake.Table) string {
	var parts []string
	if t.SkippedLines > 0 {
		parts = append(parts, fmt.Sprintf("%s before the header skipped (--skip)", countNoun(t.SkippedLines, "line")))
	}
	if t.CommentLines > 0 {
		parts = append(parts, fmt.Sprintf("%s ignored (--comment)", countNoun(t.CommentLines, "comment line")))
	}
	if t.Units != nil {
		n := 0
		for _, u := range t.Units {
			if u != "" {
				n++
			}
		}
		parts = append(parts, fmt.Sprintf("units read from the row under the header for %d of %s (--units-row)", n, countNoun(len(t.Variables), "variable")))
	}
	if t.GroupedNumbers > 0 {
		parts = append(parts, fmt.Sprintf("thousands separators removed from %s (--thousands)", countNoun(t.GroupedNumbers, "value")))
	}
	return strings.Join(parts, "; ")
}
