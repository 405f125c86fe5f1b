package analysis

import (
	"math"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
)

// TestAdequacyDiscountsImputedCells: with 15 % of the wine cells imputed,
// Bartlett's χ² uses n_eff = ⌊178 × 0.85⌋ = 151 in Bartlett's (1951)
// factor n − 1 − (2p+5)/6, and so equals the χ² of the same completed
// table read as fully measured times (151 − 1 − 31/6)/(178 − 1 − 31/6).
func TestAdequacyDiscountsImputedCells(t *testing.T) {
	tab, err := intake.ReadTable(filepath.Join("..", "testdata", "impute", "wine_missing15.csv"), intake.ReadOptions{Missing: intake.MissingIterative})
	if err != nil {
		t.Fatal(err)
	}
	opt := Options{Scaling: ScaleUnit, Components: ComponentRule{Kind: RuleFixed, Fixed: 3}, ImputeComponents: 3, NoCrossValidation: true, Seed: 1}
	imputed, err := Analyze(tab, opt)
	if err != nil {
		t.Fatal(err)
	}
	measured, err := Analyze(intake.TableFromMatrix("completed", mat.DenseCopyOf(imputed.Table.X), nil, nil), opt)
	if err != nil {
		t.Fatal(err)
	}
	ad := imputed.Adequacy
	n, p := 178.0, 13.0
	neff := math.Floor(n * (1 - 347/(n*p))) // 347 cells removed (testdata/impute/reference.py)
	if ad.EffectiveN != int(neff) || neff != 151 {
		t.Fatalf("effective n %d, want %v", ad.EffectiveN, neff)
	}
	if math.Abs(ad.ImputedShare-347/(n*p)) > 1e-12 {
		t.Errorf("imputed share %g", ad.ImputedShare)
	}
	factor := (neff - 1 - (2*p+5)/6) / (n - 1 - (2*p+5)/6)
	if want := measured.Adequacy.Bartlett.Chi2 * factor; math.Abs(ad.Bartlett.Chi2-want) > 1e-9*want {
		t.Errorf("χ² = %.10g, want %.10g", ad.Bartlett.Chi2, want)
	}
	if measured.Adequacy.EffectiveN != 0 {
		t.Errorf("a fully measured table has effective n %d", measured.Adequacy.EffectiveN)
	}
	// KMO's noise terms use n_eff too: E r² = 1/(n−1) per ordered pair.
	if want := p * (p - 1) / (neff - 1); math.Abs(ad.KMO.NoiseR2-want) > 1e-12 {
		t.Errorf("KMO noise term %g, want %g", ad.KMO.NoiseR2, want)
	}
}
