package analysis

import (
	"math"
	"testing"

	"pcqc/internal/synth"
)

func TestBrokenStickShares(t *testing.T) {
	// Frontier (1976) broken stick for p = 4, to five decimals
	// (testdata/datasets/README.md).
	want := []float64{0.52083, 0.27083, 0.14583, 0.06250}
	got := BrokenStick(4)
	for i := range want {
		if math.Abs(got[i]-want[i]) > 0.5e-5 {
			t.Errorf("b_%d = %.6f, want %.5f", i+1, got[i], want[i])
		}
	}
	sum := 0.0
	for _, b := range BrokenStick(17) {
		sum += b
	}
	if math.Abs(sum-1) > 1e-12 {
		t.Errorf("broken-stick shares sum to %g, not 1", sum)
	}
}

func TestParseComponentRule(t *testing.T) {
	cases := map[string]ComponentRule{
		"3":            {Kind: RuleFixed, Fixed: 3},
		"auto":         {Kind: RuleParallel, Auto: true},
		"parallel":     {Kind: RuleParallel},
		"broken-stick": {Kind: RuleBrokenStick},
		"kaiser":       {Kind: RuleKaiser},
		"variance:0.9": {Kind: RuleVariance, Variance: 0.9},
		"variance:75":  {Kind: RuleVariance, Variance: 0.75},
	}
	for s, want := range cases {
		got, err := ParseComponentRule(s)
		if err != nil || got != want {
			t.Errorf("%q: %+v, %v", s, got, err)
		}
		if s != "variance:75" && got.String() != s {
			t.Errorf("%q prints as %q", s, got.String())
		}
	}
	for _, bad := range []string{"0", "-2", "variance:0", "variance:x", "many"} {
		if _, err := ParseComponentRule(bad); err == nil {
			t.Errorf("%q accepted", bad)
		}
	}
}

func TestKaiserOnUSArrests(t *testing.T) {
	// ISLR §10.4 eigenvalues 2.48, 0.99, 0.36, 0.17: one exceeds 1. Broken
	// stick for p = 4 expects 52.1 %, 27.1 %: PC1 has 62.0 % (keep), PC2
	// 24.7 % (stop), so 1.
	ev := []float64{2.48024158, 0.98976515, 0.35656318, 0.17343009}
	if k := KaiserCount(ev); k != 1 {
		t.Errorf("Kaiser count %d", k)
	}
	if k := BrokenStickCount(ev); k != 1 {
		t.Errorf("broken-stick count %d", k)
	}
	// ISLR: the first two components explain 86.8 % of the variance.
	if k := VarianceCount(ev, 0.8); k != 2 {
		t.Errorf("variance:0.8 count %d", k)
	}
}

// Parallel analysis retains no component of pure noise, apart from the 5 %
// of runs in which the first observed eigenvalue passes its 95th percentile
// by chance: of 10 seeded runs at least 8 must retain 0 (the binomial chance
// of fewer is below 1 %).
func TestParallelAnalysisOnNoise(t *testing.T) {
	zero := 0
	for seed := uint64(1); seed <= 10; seed++ {
		x := synth.Gaussian(synth.RNG(seed, 20), 200, 10)
		res, err := Analyze(TableFromMatrix("noise", x, nil, nil), Options{Scaling: ScaleUnit, Permutations: 100, Seed: seed})
		if err != nil {
			t.Fatal(err)
		}
		if res.Counts.Parallel.Count == 0 {
			zero++
			if !res.NoStructure || res.Retained != 1 {
				t.Errorf("seed %d: no structure should keep one component for reference, flagged", seed)
			}
		}
	}
	if zero < 8 {
		t.Errorf("parallel analysis retained components of pure noise in %d of 10 runs", 10-zero)
	}
}

func TestParallelAnalysisRecoversPlantedRank(t *testing.T) {
	cases := []struct {
		n, p int
		sd   []float64
	}{
		{300, 12, []float64{3, 2}},
		{300, 12, []float64{3, 2.5, 2}},
		{500, 20, []float64{4, 3, 2.5, 2}},
		{60, 400, []float64{3, 2, 1.5}}, // wide
	}
	for _, c := range cases {
		for seed := uint64(1); seed <= 3; seed++ {
			x, _ := synth.LowRank(synth.RNG(seed, 21), c.n, c.p, c.sd, 1)
			res, err := Analyze(TableFromMatrix("planted", x, nil, nil), Options{Scaling: ScaleUnit, Permutations: 100, Seed: seed})
			if err != nil {
				t.Fatal(err)
			}
			if got := res.Counts.Parallel.Count; got != len(c.sd) {
				t.Errorf("%dx%d rank %d seed %d: parallel analysis retained %d", c.n, c.p, len(c.sd), seed, got)
			}
		}
	}
}

func TestParallelAnalysisIndependentOfThreads(t *testing.T) {
	x, _ := synth.LowRank(synth.RNG(9, 22), 150, 30, []float64{3, 2}, 1)
	z := func(threads int) []float64 {
		pp, _ := FitPreprocessing(x, TransformNone, ScaleUnit)
		zz := pp.Apply(nil, x)
		d, _ := Decompose(zz)
		return ParallelAnalysis(zz, d.Eigenvalues, 40, 5, threads, nil).P95
	}
	a, b := z(1), z(2)
	for i := range a {
		if a[i] != b[i] { // same arithmetic in the same order: bit-identical
			t.Fatalf("component %d: %v (1 thread) vs %v (2 threads)", i+1, a[i], b[i])
		}
	}
}
