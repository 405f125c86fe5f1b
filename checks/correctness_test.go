package checks

import (
	"fmt"
	"testing"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis"
	"pcqc/analysis/intake"
	"pcqc/internal/synth"
)

var correctnessIDs = []string{"centering", "orthonormal-loadings", "uncorrelated-scores", "variance-match"}

func resultByID(t *testing.T, results []Result, id string) Result {
	t.Helper()
	for _, r := range results {
		if r.ID == id {
			return r
		}
	}
	t.Fatalf("no check %q", id)
	return Result{}
}

// The four properties every correct PCA shows (facts of the trade) hold on
// random tall, wide (p = 50 n), square and rank-deficient data, under every
// scaling.
func TestCorrectnessChecksPassOnRandomData(t *testing.T) {
	shapes := []struct {
		name       string
		n, p, rank int
	}{
		{"tall", 400, 15, 15},
		{"wide", 10, 500, 10},
		{"square", 30, 30, 30},
		{"rank-deficient", 150, 30, 5},
		{"wide rank-deficient", 20, 1000, 3},
	}
	for _, sh := range shapes {
		for _, sc := range analysis.Scalings {
			for seed := uint64(1); seed <= 3; seed++ {
				name := fmt.Sprintf("%s/%s/%d", sh.name, sc, seed)
				rng := synth.RNG(seed, 2)
				var x *mat.Dense
				if sh.rank < min(sh.n, sh.p) {
					x, _ = synth.LowRank(rng, sh.n, sh.p, []float64{3, 2, 1, 1, 1}[:sh.rank], 0)
				} else {
					x = synth.Gaussian(rng, sh.n, sh.p)
				}
				synth.Stretch(rng, x)
				for _, rule := range []analysis.ComponentRule{{Kind: analysis.RuleVariance, Variance: 0.8}, {Kind: analysis.RuleParallel}, {Kind: analysis.RuleFixed, Fixed: min(sh.n-1, sh.p)}} {
					res, err := analysis.Analyze(intake.TableFromMatrix(name, x, nil, nil), analysis.Options{Scaling: sc, Components: rule, Permutations: 100, NoCrossValidation: true})
					if err != nil {
						t.Fatalf("%s: %v", name, err)
					}
					results := RunAll(Input{Run: res})
					for _, id := range correctnessIDs {
						if r := resultByID(t, results, id); r.Status != Pass {
							t.Errorf("%s, %s: %s is %s: %s", name, rule, id, r.Status, r.Message)
						}
					}
				}
			}
		}
	}
}

// Each correctness check must fail when its property is broken.
func TestCorrectnessChecksFailWhenBroken(t *testing.T) {
	rng := synth.RNG(5, 3)
	x, _ := synth.LowRank(rng, 200, 8, []float64{3, 2}, 0.5)
	res, err := analysis.Analyze(intake.TableFromMatrix("t", x, nil, nil), analysis.Options{Scaling: analysis.ScaleUnit, Components: analysis.ComponentRule{Kind: analysis.RuleFixed, Fixed: 3}})
	if err != nil {
		t.Fatal(err)
	}

	v := mat.DenseCopyOf(res.RetainedLoadings())

	// Uncentred data: measure the properties of the raw (uncentred) matrix.
	uncentred := mat.DenseCopyOf(res.Z)
	for i := 0; i < 200; i++ {
		uncentred.Set(i, 0, uncentred.At(i, 0)+5)
	}
	broken := *res
	broken.Properties = analysis.MeasureProperties(uncentred, v, res.Scores, res.Decomp.Eigenvalues)
	if r := centering.Run(Input{Run: &broken}); r.Status != Fail {
		t.Errorf("centering on uncentred data: %s", r.Status)
	}

	// Loadings that are not orthonormal: stretch one column.
	stretched := mat.DenseCopyOf(v)
	for j := 0; j < 8; j++ {
		stretched.Set(j, 0, 1.1*stretched.At(j, 0))
	}
	broken.Properties = analysis.MeasureProperties(res.Z, stretched, res.Scores, res.Decomp.Eigenvalues)
	if r := orthonormalLoadings.Run(Input{Run: &broken}); r.Status != Fail {
		t.Errorf("orthonormal-loadings on stretched loadings: %s", r.Status)
	}

	// Scores projected on a mix of components are correlated, and their
	// variances no longer equal the eigenvalues.
	mixed := mat.DenseCopyOf(v)
	for j := 0; j < 8; j++ {
		mixed.Set(j, 1, 0.8*v.At(j, 1)+0.6*v.At(j, 0))
	}
	var t2 mat.Dense
	t2.Mul(res.Z, mixed)
	broken.Properties = analysis.MeasureProperties(res.Z, mixed, &t2, res.Decomp.Eigenvalues)
	if r := uncorrelatedScores.Run(Input{Run: &broken}); r.Status != Fail {
		t.Errorf("uncorrelated-scores on mixed components: %s", r.Status)
	}
	if r := varianceMatch.Run(Input{Run: &broken}); r.Status != Fail {
		t.Errorf("variance-match on mixed components: %s", r.Status)
	}

}

func TestVerdictIsWorstStatus(t *testing.T) {
	cases := []struct {
		statuses []Status
		want     Status
	}{
		{[]Status{Pass, Pass}, Pass},
		{[]Status{Pass, Skip}, Pass},
		{[]Status{Pass, Warn, Skip}, Warn},
		{[]Status{Warn, Fail, Pass}, Fail},
		{nil, Pass},
	}
	for _, c := range cases {
		var rs []Result
		for _, s := range c.statuses {
			rs = append(rs, Result{Status: s})
		}
		if got := Verdict(rs); got != c.want {
			t.Errorf("Verdict(%v) = %s, want %s", c.statuses, got, c.want)
		}
	}
}
