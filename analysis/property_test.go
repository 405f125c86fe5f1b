package analysis

import (
	"fmt"
	"testing"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
	"pcqc/internal/synth"
)

// randomTable builds an n×p table of standard normal values with the given
// rank (rank ≥ min(n, p) means full rank), offset and stretched per column so
// that centring and scaling have real work to do.
func randomTable(seed uint64, n, p, rank int) *intake.Table {
	rng := synth.RNG(seed, 1)
	var x *mat.Dense
	if rank >= min(n, p) {
		x = synth.Gaussian(rng, n, p)
	} else {
		sd := make([]float64, rank)
		for a := range sd {
			sd[a] = 1
		}
		x, _ = synth.LowRank(rng, n, p, sd, 0)
	}
	synth.Stretch(rng, x)
	return intake.TableFromMatrix("random", x, nil, nil)
}

// Shapes exercised by the property tests: tall, wide (p = 50 n), square and
// rank-deficient.
var propertyShapes = []struct {
	name       string
	n, p, rank int
}{
	{"tall", 300, 12, 12},
	{"wide", 12, 600, 12},
	{"square", 40, 40, 40},
	{"rank-deficient", 120, 25, 6},
	{"wide rank-deficient", 20, 1000, 4},
}

func TestReconstructionWithAllComponents(t *testing.T) {
	for _, sh := range propertyShapes {
		for _, sc := range Scalings {
			for seed := uint64(1); seed <= 3; seed++ {
				name := fmt.Sprintf("%s/%s/seed%d", sh.name, sc, seed)
				tab := randomTable(seed, sh.n, sh.p, sh.rank)
				res, err := Analyze(tab, Options{Scaling: sc, Components: ComponentRule{Kind: RuleFixed, Fixed: min(sh.n-1, sh.p)}, NoCrossValidation: true})
				if err != nil {
					t.Fatalf("%s: %v", name, err)
				}
				var rec mat.Dense
				rec.Mul(res.Scores, res.RetainedLoadings().T())
				rec.Sub(&rec, res.Z)
				// Acceptance: relative Frobenius error ≤ 1e-10 (common practice
				// for a backward-stable SVD: a few hundred ε).
				if rel := mat.Norm(&rec, 2) / mat.Norm(res.Z, 2); rel > 1e-10 {
					t.Errorf("%s: reconstruction relative error %.3g", name, rel)
				}
				if e := OrthonormalityError(res.RetainedLoadings()); e > 1e-10 {
					t.Errorf("%s: loadings not orthonormal: %.3g", name, e)
				}
			}
		}
	}
}

func TestEigenvaluesEqualScoreVariances(t *testing.T) {
	for _, sh := range propertyShapes {
		tab := randomTable(7, sh.n, sh.p, sh.rank)
		res, err := Analyze(tab, Options{Scaling: ScaleUnit, Components: ComponentRule{Kind: RuleVariance, Variance: 0.8}})
		if err != nil {
			t.Fatal(err)
		}
		for a := 0; a < res.Retained; a++ {
			v := columnVariance(res.Scores, a)
			if d := v/res.Decomp.Eigenvalues[a] - 1; d > 1e-10 || d < -1e-10 {
				t.Errorf("%s: PC%d score variance %.12g, eigenvalue %.12g", sh.name, a+1, v, res.Decomp.Eigenvalues[a])
			}
		}
	}
}

func TestSignConvention(t *testing.T) {
	tab := randomTable(3, 50, 6, 6)
	res, err := Analyze(tab, Options{Scaling: ScaleUnit, Components: ComponentRule{Kind: RuleFixed, Fixed: 5}})
	if err != nil {
		t.Fatal(err)
	}
	v := res.Decomp.Loadings
	p, m := v.Dims()
	for a := 0; a < m; a++ {
		best := 0
		for j := 1; j < p; j++ {
			if abs(v.At(j, a)) > abs(v.At(best, a)) {
				best = j
			}
		}
		if v.At(best, a) <= 0 {
			t.Errorf("PC%d: largest |loading| %g is not positive", a+1, v.At(best, a))
		}
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

func TestTallAndWideRoutesAgree(t *testing.T) {
	// The same data decomposed as a tall matrix and, transposed in shape by
	// dropping rows, through the wide route must give the same spectrum as a
	// direct SVD: compare both routes against gonum's SVD of the full matrix.
	for _, sh := range []struct{ n, p int }{{60, 8}, {8, 60}} {
		tab := randomTable(11, sh.n, sh.p, min(sh.n, sh.p))
		res, err := Analyze(tab, Options{Scaling: ScaleUnit, Components: ComponentRule{Kind: RuleFixed, Fixed: 1}})
		if err != nil {
			t.Fatal(err)
		}
		var svd mat.SVD
		svd.Factorize(res.Z, mat.SVDNone)
		s := svd.Values(nil)
		for a, got := range res.Decomp.SingularValues {
			if d := abs(got-s[a]) / s[0]; d > 1e-13 {
				t.Errorf("%dx%d: singular value %d: %g vs direct %g", sh.n, sh.p, a+1, got, s[a])
			}
		}
	}
}
