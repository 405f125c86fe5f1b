package report

import (
	"encoding/json"
	"math"
	"os"
	"testing"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/checks"
)

// summary.json carries the numbers behind the adequacy and separation
// checks: per-variable KMO, Bartlett's χ², df and p, and North's δλ. The
// KMO and Bartlett values are those of numpy 1.24.2 / SciPy 1.10.1 on
// USArrests (as in analysis.TestBartlettAndKMOMatchReference).
func TestSummaryHoldsAdequacyNumbers(t *testing.T) {
	f, err := os.Open("../testdata/datasets/usarrests.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	tab, err := intake.ReadTableFrom("usarrests.csv", f, intake.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	res, err := analysis.Analyze(tab, analysis.Options{Scaling: analysis.ScaleUnit, Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 2}, Bootstrap: 50, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	raw, err := json.Marshal(BuildSummary(Audit{Result: res, Checks: checks.RunAll(checks.Input{Run: res})}, testMeta))
	if err != nil {
		t.Fatal(err)
	}
	var s struct {
		Adequacy struct {
			KMO struct {
				Overall     float64
				PerVariable []struct {
					Variable string
					KMO      float64
				} `json:"per_variable"`
			}
			Bartlett struct {
				Chi2, P float64
				DF      int
			}
			Separation []struct {
				Component    string
				Eigenvalue   float64
				Delta        float64
				NextDelta    float64 `json:"next_delta"`
				BothRetained bool    `json:"both_retained"`
			}
		}
		Stability struct {
			Eigenvalues []struct {
				Eigenvalue float64
				BCaLow     *float64 `json:"bca_low"`
				BCaHigh    *float64 `json:"bca_high"`
			}
		}
	}
	if err := json.Unmarshal(raw, &s); err != nil {
		t.Fatal(err)
	}
	a := s.Adequacy
	if math.Abs(a.KMO.Overall-0.6538150062740203) > 1e-9 || len(a.KMO.PerVariable) != 4 {
		t.Errorf("KMO %+v", a.KMO)
	}
	for j, w := range []float64{0.61715082, 0.64338319, 0.50238628, 0.77835578} {
		if j < len(a.KMO.PerVariable) && (math.Abs(a.KMO.PerVariable[j].KMO-w) > 1e-8 || a.KMO.PerVariable[j].Variable != tab.Variables[j]) {
			t.Errorf("KMO of %d: %+v, want %g", j, a.KMO.PerVariable[j], w)
		}
	}
	if math.Abs(a.Bartlett.Chi2-88.28814686595527) > 1e-9*88.3 || a.Bartlett.DF != 6 || math.Abs(a.Bartlett.P-6.868423073358567e-17) > 1e-6*6.9e-17 {
		t.Errorf("Bartlett %+v", a.Bartlett)
	}
	// North's δλ = λ·√(2/n), n = 50, for PC1–PC2 and PC2–PC3.
	if len(a.Separation) != 2 || !a.Separation[0].BothRetained || a.Separation[1].BothRetained {
		t.Fatalf("separation %+v", a.Separation)
	}
	for _, sep := range a.Separation {
		if want := sep.Eigenvalue * math.Sqrt(2.0/50); math.Abs(sep.Delta-want) > 1e-12 {
			t.Errorf("%s: δλ %g, want %g", sep.Component, sep.Delta, want)
		}
	}
	for i, e := range s.Stability.Eigenvalues {
		if e.BCaLow == nil || e.BCaHigh == nil || *e.BCaLow > *e.BCaHigh {
			t.Errorf("PC%d: BCa interval missing or reversed", i+1)
		}
	}
}
