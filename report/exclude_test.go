package report

import (
	"fmt"
	"strings"
	"testing"

	"pcqc/analysis"
	"pcqc/analysis/intake"
)

// The methods paragraph names every excluded sample, in full, with the
// right number; and says nothing when none was excluded.
func TestExclusionMethodSentence(t *testing.T) {
	cases := []struct {
		name string
		ids  []string
		want string
	}{
		{"none", nil, ""},
		{"one", []string{"Alaska"}, "Sample Alaska was excluded from the fit at the analyst's request and projected onto the model as a new sample."},
		{"three", []string{"Alaska", "Florida", "Vermont"}, "At the analyst's request, 3 samples were excluded from the fit (Alaska, Florida and Vermont) and projected onto the model as new samples."},
	}
	for _, c := range cases {
		res := &analysis.Result{}
		if c.ids != nil {
			res.Excluded = &analysis.Exclusion{Application: &analysis.Application{Table: &intake.Table{IDs: c.ids}}}
		}
		got := exclusionMethodSentence(res)
		if got != c.want {
			t.Errorf("%s:\n got %q\nwant %q", c.name, got, c.want)
		}
		if got != "" {
			if f := grammarFaults(got); f != nil {
				t.Errorf("%s: %v", c.name, f)
			}
		}
	}
}

// The refit's sentence appears only when a refit was made, and cites what
// it uses.
func TestWhatIfMethodSentence(t *testing.T) {
	cases := []struct {
		name string
		w    *analysis.WhatIf
		want string
	}{
		{"not computed", nil, ""},
		{"nothing flagged", &analysis.WhatIf{}, ""},
		{"not refitted", &analysis.WhatIf{Flagged: []int{1, 2}, Skipped: "too few"}, ""},
		{"refitted", &analysis.WhatIf{Flagged: []int{4}, Refit: &analysis.Result{}},
			"The analysis was refitted without the 1 sample the outlier and influence checks flagged; components were paired by the optimal assignment on the absolute Tucker congruence (Tucker 1951), judged against 0.95 (Lorenzo-Seva & ten Berge 2006), and the retained subspaces compared by their largest principal angle (Björck & Golub 1973)."},
	}
	for _, c := range cases {
		got := whatIfMethodSentence(&analysis.Result{WhatIf: c.w})
		if got != c.want {
			t.Errorf("%s:\n got %q\nwant %q", c.name, got, c.want)
		}
	}
}

// The refit's sentence names at most whatIfNamed flagged samples and counts
// the rest: a table where thousands are flagged must not put thousands of
// names in one paragraph.
func TestWhatIfSentenceNamesAFew(t *testing.T) {
	const n = 500
	ids := make([]string, n)
	flagged := make([]int, n)
	why := make([][]string, n)
	for i := range ids {
		ids[i], flagged[i], why[i] = fmt.Sprintf("s%d", i+1), i, []string{"q"}
	}
	res := &analysis.Result{Table: &intake.Table{IDs: ids}, WhatIf: &analysis.WhatIf{Flagged: flagged, Why: why, Skipped: "test"}}
	b := whatIfBlock(res)
	if got := strings.Count(b.Text, "(q)"); got != whatIfNamed {
		t.Errorf("%d samples named, want %d: %.200s", got, whatIfNamed, b.Text)
	}
	if !strings.Contains(b.Text, fmt.Sprintf("and %d more", n-whatIfNamed)) || !strings.Contains(b.Text, "s20 (q)") || strings.Contains(b.Text, "s21 (q)") {
		t.Errorf("sentence: %.300s", b.Text)
	}
}
