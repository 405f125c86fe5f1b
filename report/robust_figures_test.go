package report

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/checks"
	"pcqc/internal/synth"
)

// TestRobustSection: the report describes the robust fit, draws its
// distance diagram with both cut-offs, and names the two planted gross
// outliers there (one planted component, two samples far off it).
func TestRobustSection(t *testing.T) {
	x, _ := synth.LowRank(synth.RNG(3, 5), 120, 6, []float64{4}, 1)
	for _, i := range []int{5, 50} {
		for j := 0; j < 6; j++ {
			x.Set(i, j, 0)
		}
		x.Set(i, 5, 200)
	}
	res, err := analysis.Analyze(intake.TableFromMatrix("planted.csv", x, nil, nil),
		analysis.Options{Scaling: analysis.ScaleNone, Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 1}, NoCrossValidation: true, Bootstrap: 30, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	res.Table.SHA256 = strings.Repeat("ab", 32)
	results := checks.RunAll(checks.Input{Run: res})
	dir := t.TempDir()
	if err := WriteReport(dir, Audit{Result: res, Checks: results}, testMeta, ReportOptions{Date: "2026-01-02"}, Formats{Markdown: true, HTML: true}); err != nil {
		t.Fatal(err)
	}
	md, _ := os.ReadFile(filepath.Join(dir, "report.md"))
	for _, want := range []string{"## Robust cross-check", "ROBPCA (Hubert, Rousseeuw & Vanden Branden 2005)", "figures/robust-distances.png"} {
		if !strings.Contains(string(md), want) {
			t.Errorf("report.md lacks %q", want)
		}
	}
	svg, err := os.ReadFile(filepath.Join(dir, "figures", "robust-distances.svg"))
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"SD cut-off", "OD cut-off", ">" + res.Table.IDs[5] + "<", ">" + res.Table.IDs[50] + "<"} {
		if !strings.Contains(string(svg), want) {
			t.Errorf("the distance diagram lacks %q", want)
		}
	}
}
