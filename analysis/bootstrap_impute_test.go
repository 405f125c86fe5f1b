package analysis

import (
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
)

// TestBootstrapRedoesImputation: the wine data with 15 % of the cells
// missing, imputed iteratively, against the same completed table read as if
// every cell had been measured. Redoing the imputation in every resample
// must widen the loading intervals on average: the imputed cells sit on
// the model, so treating them as observed makes the structure look
// firmer than the measurements support.
func TestBootstrapRedoesImputation(t *testing.T) {
	if testing.Short() {
		t.Skip("100 resamples, each with its own imputation")
	}
	tab, err := intake.ReadTable(filepath.Join("..", "testdata", "impute", "wine_missing15.csv"), intake.ReadOptions{Missing: intake.MissingIterative})
	if err != nil {
		t.Fatal(err)
	}
	opt := Options{Scaling: ScaleUnit, Components: ComponentRule{Kind: RuleFixed, Fixed: 3}, ImputeComponents: 3,
		NoCrossValidation: true, Bootstrap: 100, Seed: 3}
	imputed, err := Analyze(tab, opt)
	if err != nil {
		t.Fatal(err)
	}
	asMeasured := intake.TableFromMatrix("completed", mat.DenseCopyOf(imputed.Table.X), tab.Variables, tab.IDs)
	observed, err := Analyze(asMeasured, opt)
	if err != nil {
		t.Fatal(err)
	}
	wi, wo := meanLoadingWidth(imputed.Stability), meanLoadingWidth(observed.Stability)
	t.Logf("mean 95 %% loading interval width: imputation redone %.4f, cells treated as measured %.4f", wi, wo)
	if imputed.Stability.Used < 95 || observed.Stability.Used < 95 {
		t.Fatalf("used %d and %d resamples of 100", imputed.Stability.Used, observed.Stability.Used)
	}
	if !(wi > wo) {
		t.Errorf("intervals with the imputation redone (%.4f) are not wider than with the cells treated as measured (%.4f)", wi, wo)
	}
}

func meanLoadingWidth(st Stability) float64 {
	sum, n := 0.0, 0
	for _, row := range st.Loadings {
		for _, l := range row {
			sum += l.High - l.Low
			n++
		}
	}
	return sum / float64(n)
}

// TestImputedResampleMatchesTallPath: with no cell to impute, the imputed
// resample path (rows copied, preprocessed and decomposed directly) gives
// the eigenvalues and aligned loadings of the tall kernel, so the widening
// above comes from redoing the imputation and not from the path.
func TestImputedResampleMatchesTallPath(t *testing.T) {
	tab, err := intake.ReadTable(filepath.Join("..", "testdata", "datasets", "wine.csv"), intake.ReadOptions{GroupColumn: "cultivar"})
	if err != nil {
		t.Fatal(err)
	}
	r, err := Analyze(tab, Options{Scaling: ScaleUnit, Components: ComponentRule{Kind: RuleFixed, Fixed: 3}, NoCrossValidation: true, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	b := newBootstrapper(r)
	n, p := r.Z.Dims()
	direct := *b
	direct.imp = &bootImpute{x: r.Z, missing: make([][]int, n), s: 1, scaling: ScaleUnit}
	for i := 0; i < 5; i++ {
		counts := bootstrapDraw(7, i, n)
		want := b.resample(&bootWorkspace{}, counts)
		got := direct.resample(&bootWorkspace{}, counts)
		if !want.ok || !got.ok {
			t.Fatalf("resample %d failed: %v %v", i, want.ok, got.ok)
		}
		for a := range want.eigen {
			if d := got.eigen[a] - want.eigen[a]; d*d > 1e-18*want.eigen[0]*want.eigen[0] {
				t.Errorf("resample %d eigenvalue %d: %g, tall path %g", i, a, got.eigen[a], want.eigen[a])
			}
		}
		for x := range p * r.Retained {
			if d := got.loadings[x] - want.loadings[x]; d*d > 1e-16 {
				t.Errorf("resample %d loading %d: %g, tall path %g", i, x, got.loadings[x], want.loadings[x])
			}
		}
	}
}
