package report

import (
	"strings"
	"testing"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/internal/synth"
)

// The report names the bootstrap scheme: the bag of little bootstraps with
// its switch point, subsets and resamples per subset, in the methods and
// in summary.json; the full bootstrap is named as such.
func TestMethodsAndSummaryNameTheBootstrapScheme(t *testing.T) {
	x, _ := synth.LowRank(synth.RNG(3, 4), 2000, 4, []float64{3, 1.5}, 1)
	cases := []struct {
		name       string
		switchRows int
		scheme     string
		subset     int
		sentence   string
	}{
		{"full", analysis.BLBMinRows, analysis.SchemeFull, 0, "with 40 bootstrap resamples (Efron 1979)"},
		{"little", 1000, analysis.SchemeBLB, 205, "bag of little bootstraps (Kleiner et al. 2014), used from 1000 rows: 10 subsets of 205 rows, each with 4 resamples"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			old := analysis.BLBMinRows
			analysis.BLBMinRows = c.switchRows
			defer func() { analysis.BLBMinRows = old }()
			res, err := analysis.Analyze(intake.TableFromMatrix("t", x, nil, nil), analysis.Options{Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 2}, Bootstrap: 40, Seed: 1})
			if err != nil {
				t.Fatal(err)
			}
			text := strings.Join(stabilitySentences(res), " ")
			if !strings.Contains(text, c.sentence) {
				t.Errorf("methods: %q lacks %q", text, c.sentence)
			}
			info := stabilityInfo(res)
			if info.Scheme != c.scheme || info.SubsetSize != c.subset {
				t.Errorf("summary: scheme %q, subset size %d; want %q, %d", info.Scheme, info.SubsetSize, c.scheme, c.subset)
			}
		})
	}
}
