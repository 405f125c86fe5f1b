package analysis

import (
	"math"
	"path/filepath"
	"slices"
	"testing"

	"gonum.org/v1/gonum/mat"

	"pcqc/internal/synth"
)

func analyzeFile(t *testing.T, file string, opt ReadOptions, scaling Scaling) *Result {
	t.Helper()
	tab, err := ReadTable(filepath.Join("..", "testdata", "datasets", file), opt)
	if err != nil {
		t.Fatal(err)
	}
	res, err := Analyze(tab, Options{Scaling: scaling, Components: ComponentRule{Kind: RuleFixed, Fixed: 2}})
	if err != nil {
		t.Fatal(err)
	}
	return res
}

func TestSkewnessMatchesPandas(t *testing.T) {
	// pandas 1.5.3 DataFrame.skew() (adjusted Fisher–Pearson, bias-corrected),
	// values also recalled from common tutorials (from memory) for iris.
	cases := []struct {
		file string
		opt  ReadOptions
		want []float64
	}{
		{"iris.csv", ReadOptions{GroupColumn: "species"}, []float64{0.314911, 0.318966, -0.274884, -0.102967}},
		{"usarrests.csv", ReadOptions{}, []float64{0.393956, 0.234410, -0.226009, 0.801200}},
	}
	for _, c := range cases {
		res := analyzeFile(t, c.file, c.opt, ScaleUnit)
		for j, w := range c.want {
			if got := res.Adequacy.Skewness[j]; math.Abs(got-w) > 1e-6 {
				t.Errorf("%s %s: skewness %.7f, pandas %.6f", c.file, res.Table.Variables[j], got, w)
			}
		}
	}
}

func TestBartlettAndKMOMatchReference(t *testing.T) {
	// Textbook formulas evaluated with numpy 1.24.2 / SciPy 1.10.1
	// (np.corrcoef, np.linalg.det, np.linalg.inv, scipy.stats.chi2.sf).
	cases := []struct {
		file        string
		opt         ReadOptions
		chi2, p     float64
		kmo         float64
		perVariable []float64
	}{
		{"usarrests.csv", ReadOptions{}, 88.28814686595527, 6.868423073358567e-17, 0.6538150062740203,
			[]float64{0.61715082, 0.64338319, 0.50238628, 0.77835578}},
		{"iris.csv", ReadOptions{GroupColumn: "species"}, 706.9592430234756, 1.9226796044143468e-149, 0.5400766750097211,
			[]float64{0.58406029, 0.26957462, 0.53074842, 0.63420655}},
	}
	for _, c := range cases {
		for _, sc := range []Scaling{ScaleUnit, ScaleNone} { // R does not depend on scaling
			res := analyzeFile(t, c.file, c.opt, sc)
			b, k := res.Adequacy.Bartlett, res.Adequacy.KMO
			if !b.Computed || b.DF != 6 || math.Abs(b.Chi2-c.chi2) > 1e-9*c.chi2 || math.Abs(b.P-c.p) > 1e-6*c.p {
				t.Errorf("%s/%s Bartlett: %+v, want χ² %.10g p %.6g", c.file, sc, b, c.chi2, c.p)
			}
			if !k.Computed || math.Abs(k.Overall-c.kmo) > 1e-9 {
				t.Errorf("%s/%s KMO %.10f, want %.10f", c.file, sc, k.Overall, c.kmo)
			}
			for j, w := range c.perVariable {
				if math.Abs(k.PerVariable[j]-w) > 1e-8 {
					t.Errorf("%s KMO[%d] %.8f, want %.8f", c.file, j, k.PerVariable[j], w)
				}
			}
		}
	}
}

// Under independence the p-values of Bartlett's test are uniform: their
// Kolmogorov–Smirnov distance from U(0,1) over 300 replicates must be below
// the 1 % critical value 1.63/√300 (Massey 1951, J. Amer. Statist. Assoc.
// 46:68–78, asymptotic table). On correlated data the p-value is ≈ 0.
func TestBartlettNullUniformity(t *testing.T) {
	const reps = 300
	ps := make([]float64, reps)
	for r := 0; r < reps; r++ {
		x := synth.Gaussian(synth.RNG(uint64(r+1), 30), 80, 6)
		z := centred(x)
		ps[r] = BartlettSphericity(CorrelationMatrix(z), 80).P
	}
	slices.Sort(ps)
	d := 0.0
	for i, p := range ps {
		d = math.Max(d, math.Max(math.Abs(float64(i+1)/reps-p), math.Abs(p-float64(i)/reps)))
	}
	if crit := 1.63 / math.Sqrt(reps); d > crit {
		t.Errorf("KS distance of Bartlett p-values from uniform: %.4f > %.4f", d, crit)
	}
	x, _ := synth.LowRank(synth.RNG(1, 31), 80, 6, []float64{2}, 1)
	if p := BartlettSphericity(CorrelationMatrix(centred(x)), 80).P; p > 1e-6 {
		t.Errorf("correlated data: Bartlett p = %g", p)
	}
}

func centred(x *mat.Dense) *mat.Dense {
	pp, _ := FitPreprocessing(x, TransformNone, ScaleNone)
	return pp.Apply(nil, x)
}

func TestKMORangeAndFactorData(t *testing.T) {
	for seed := uint64(1); seed <= 5; seed++ {
		noise := synth.Gaussian(synth.RNG(seed, 32), 200, 8)
		k := KaiserMeyerOlkin(CorrelationMatrix(centred(noise)))
		if k.Overall < 0 || k.Overall > 1 {
			t.Errorf("KMO of noise %g outside [0, 1]", k.Overall)
		}
		for _, v := range k.PerVariable {
			if v < 0 || v > 1 {
				t.Errorf("per-variable KMO %g outside [0, 1]", v)
			}
		}
		// One strong common factor behind 8 variables: KMO is high
		// (Kaiser's "meritorious" or better).
		x, _ := synth.LowRank(synth.RNG(seed, 33), 200, 8, []float64{3}, 1)
		if k := KaiserMeyerOlkin(CorrelationMatrix(centred(x))); k.Overall < 0.8 {
			t.Errorf("seed %d: KMO on one-factor data %.3f", seed, k.Overall)
		}
	}
}

func TestDuplicateAndNearConstantDetection(t *testing.T) {
	tab := read(t, "id,a,b,c\nw,1,2,5\nx,3,4,5\ny,1,2,5\nz,5,7,5\nv,3,4,5.1\nu,9,1,5\n", ReadOptions{})
	res, err := Analyze(tab, Options{Scaling: ScaleUnit, Components: ComponentRule{Kind: RuleFixed, Fixed: 1}})
	if err != nil {
		t.Fatal(err)
	}
	ad := res.Adequacy
	if len(ad.DuplicateRows) != 1 || !slices.Equal(ad.DuplicateRows[0], []int{0, 2}) {
		t.Errorf("duplicates %v", ad.DuplicateRows)
	}
	// c is 5 in 5 of 6 rows (83 % ≥ 80 %): near-constant.
	if !slices.Equal(ad.NearConstant, []int{2}) {
		t.Errorf("near-constant %v", ad.NearConstant)
	}
}

func TestEigenvalueSeparation(t *testing.T) {
	// n = 200: δλ = λ·0.1. 5 ± 0.5 and 4.8 ± 0.48 overlap; 4.8 and 2 do not.
	s := EigenvalueSeparation([]float64{5, 4.8, 2, 1}, 200, 2)
	if len(s) != 2 || !s[0].Overlap || s[1].Overlap || !s[0].BothRetained || s[1].BothRetained {
		t.Errorf("%+v", s)
	}
	if d := s[0].DeltaA - 0.5; math.Abs(d) > 1e-12 {
		t.Errorf("δλ = %g", s[0].DeltaA)
	}
}
