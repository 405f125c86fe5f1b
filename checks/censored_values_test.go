package checks

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/internal/synth"
)

// censored-values passes on tables without limits and with few, and warns
// on the planted table, naming the variable, its share of censored cells
// and the share of its variance they carry: v2 of
// testdata/censored/planted.csv has 5 of 12 cells written as a limit
// (41.7 %) carrying 62.1 % of its centred sum of squares (numpy 1.24.2,
// testdata/censored/variance_share.py).
func TestCensoredValuesCheck(t *testing.T) {
	planted, err := os.ReadFile(filepath.Join("..", "testdata", "censored", "planted.csv"))
	if err != nil {
		t.Fatal(err)
	}
	few := string(planted)
	for _, s := range []string{"s03,1.7,<1", "s05,2.9,<1", "s09,3.1,<1"} {
		few = strings.Replace(few, s, strings.TrimSuffix(s, "<1")+"0.7", 1)
	}
	few = strings.Replace(few, ">4", "4.1", 1)
	rng := synth.RNG(5, 1)
	clean := table(60, 4, func(i, j int) float64 { return 5 + rng.NormFloat64() })
	half := intake.ReadOptions{Censored: intake.CensorHalf}
	cases := []struct {
		name   string
		text   string
		read   intake.ReadOptions
		status Status
		inMsg  []string
	}{
		{"no limits", clean, intake.ReadOptions{}, Pass, []string{"No cell"}},
		{"one limit", few, half, Pass, []string{"1 cell written as a limit", "v2 (8.3 % of its values"}},
		{"planted", string(planted), half, Warn, []string{"1 variable", "v2 (41.7 % of its values, 62.1 % of its variance)"}},
		{"planted, sqrt2", string(planted), intake.ReadOptions{Censored: intake.CensorSqrt2}, Warn, []string{"v2 (41.7 %", "square root of 2"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			res := analyzeText(t, c.text, c.read, analysis.Options{})
			r := censoredValues.Run(Input{Run: res})
			if r.Status != c.status {
				t.Errorf("status %s, want %s: %s", r.Status, c.status, r.Message)
			}
			for _, m := range c.inMsg {
				if !strings.Contains(r.Message, m) {
					t.Errorf("message lacks %q: %s", m, r.Message)
				}
			}
			if strings.Contains(r.Message, "v1") || strings.Contains(r.Message, "v3") {
				t.Errorf("names a variable without limits: %s", r.Message)
			}
		})
	}
}
