package analysis

import (
	"math"
	"math/rand/v2"
	"path/filepath"
	"slices"
	"testing"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
	"pcqc/internal/synth"
)

func analyzeFile(t *testing.T, file string, opt intake.ReadOptions, scaling Scaling) *Result {
	t.Helper()
	tab, err := intake.ReadTable(filepath.Join("..", "testdata", "datasets", file), opt)
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
		opt  intake.ReadOptions
		want []float64
	}{
		{"iris.csv", intake.ReadOptions{GroupColumn: "species"}, []float64{0.314911, 0.318966, -0.274884, -0.102967}},
		{"usarrests.csv", intake.ReadOptions{}, []float64{0.393956, 0.234410, -0.226009, 0.801200}},
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
		opt         intake.ReadOptions
		chi2, p     float64
		kmo         float64
		perVariable []float64
	}{
		{"usarrests.csv", intake.ReadOptions{}, 88.28814686595527, 6.868423073358567e-17, 0.6538150062740203,
			[]float64{0.61715082, 0.64338319, 0.50238628, 0.77835578}},
		{"iris.csv", intake.ReadOptions{GroupColumn: "species"}, 706.9592430234756, 1.9226796044143468e-149, 0.5400766750097211,
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
	pp, _ := FitPreprocessing(x, intake.TransformNone, ScaleNone)
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
	tab := read(t, "id,a,b,c\nw,1,2,5\nx,3,4,5\ny,1,2,5\nz,5,7,5\nv,3,4,5.1\nu,9,1,5\n", intake.ReadOptions{})
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

// TestAndersonEqualPair checks Anderson's (1963) statistic for two equal
// eigenvalues and its χ²₂ p-value against scipy 1.10.1
// (scipy.stats.chi2.sf(x, 2) with x computed by numpy 1.24.2 from the
// formula), and that the p-value moves the right way.
// Reference values: testdata/reference/anderson.py (numpy 1.24.2, scipy 1.10.1).
func TestAndersonEqualPair(t *testing.T) {
	for _, c := range []struct {
		la, lb   float64
		n        int
		chi2, pv float64
	}{
		{3.2, 2.9, 300, 0.7240686977187709, 0.696258451747373},
		{4.8, 3.2, 300, 12.205776361556255, 0.002236399257590592},
		{2.0, 1.0, 100, 11.660520529981964, 0.0029373124011456853},
	} {
		x, p := AndersonEqualPair(c.la, c.lb, c.n)
		if math.Abs(x-c.chi2) > 1e-9*c.chi2 || math.Abs(p-c.pv) > 1e-12 {
			t.Errorf("Anderson(%g, %g, %d) = %g, %g; want %g, %g", c.la, c.lb, c.n, x, p, c.chi2, c.pv)
		}
	}
	if x, p := AndersonEqualPair(2, 2, 50); x != 0 || p != 1 {
		t.Errorf("equal roots: %g, %g; want 0, 1", x, p)
	}
	if _, p := AndersonEqualPair(2, 0, 50); p != 0 {
		t.Errorf("zero second root: p %g, want 0", p)
	}
}

// TestKMONoiseCorrection: on independent normal variables (no structure)
// the sums of r² and q² are about their noise expectations p(p−1)/(n−1)
// and p(p−1)/(n−p+1) (Fisher 1915, 1924); with one weak shared factor (loadings 0.35) at
// p = 40, n = 80 the raw KMO is pulled far below the corrected one. The
// fixed seed is ours.
func TestKMONoiseCorrection(t *testing.T) {
	rng := rand.New(rand.NewPCG(12, 34))
	for _, c := range []struct {
		name    string
		loading float64
	}{{"independent", 0}, {"one factor", 0.35}} {
		n, p := 80, 40
		x := mat.NewDense(n, p, nil)
		for i := 0; i < n; i++ {
			f := rng.NormFloat64()
			for j := 0; j < p; j++ {
				x.Set(i, j, c.loading*f+math.Sqrt(1-c.loading*c.loading)*rng.NormFloat64())
			}
		}
		for j := 0; j < p; j++ {
			m := 0.0
			for i := 0; i < n; i++ {
				m += x.At(i, j) / float64(n)
			}
			for i := 0; i < n; i++ {
				x.Set(i, j, x.At(i, j)-m)
			}
		}
		_, k := correlationTests(x)
		wantR, wantQ := float64(p*(p-1))/float64(n-1), float64(p*(p-1))/float64(n-p+1)
		if k.NoiseR2 != wantR || k.NoiseQ2 != wantQ {
			t.Errorf("%s: noise %g, %g; want %g, %g", c.name, k.NoiseR2, k.NoiseQ2, wantR, wantQ)
		}
		switch c.loading {
		case 0:
			if math.Abs(k.SumR2/wantR-1) > 0.15 || math.Abs(k.SumQ2/wantQ-1) > 0.15 {
				t.Errorf("independent: sums %g, %g far from noise %g, %g", k.SumR2, k.SumQ2, wantR, wantQ)
			}
		default:
			if !(k.Overall < 0.6 && k.NoiseCorrected > 0.9) {
				t.Errorf("one factor: raw %g, corrected %g; want raw < 0.6 < 0.9 < corrected", k.Overall, k.NoiseCorrected)
			}
		}
	}
}
