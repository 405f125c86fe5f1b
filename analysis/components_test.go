package analysis

import (
	"math"
	"testing"

	"pcqc/analysis/intake"
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
		res, err := Analyze(intake.TableFromMatrix("noise", x, nil, nil), Options{Scaling: ScaleUnit, Permutations: 100, Seed: seed})
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
	skipSimulationWhenShort(t)
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
			res, err := Analyze(intake.TableFromMatrix("planted", x, nil, nil), Options{Scaling: ScaleUnit, Permutations: 100, Seed: seed})
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
		pp, _ := FitPreprocessing(x, intake.TransformNone, ScaleUnit)
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

// The adaptive stopping of parallel analysis: a strong component and clear
// noise settle in the first batch; noise alone settles as a drop; and the
// exceedance shares equal a direct count over the permutations run.
func TestAdaptiveParallelAnalysisSettles(t *testing.T) {
	x, _ := synth.LowRank(synth.RNG(4, 23), 300, 10, []float64{4, 3}, 1)
	pp, _ := FitPreprocessing(x, intake.TransformNone, ScaleUnit)
	z := pp.Apply(nil, x)
	d, _ := Decompose(z)
	pa := ParallelAnalysis(z, d.Eigenvalues, 2000, 1, 2, nil)
	if pa.Permutations != ParallelBatch || pa.Count != 2 || pa.Borderline != -1 {
		t.Errorf("strong signal: %d permutations, count %d, borderline %d; want %d, 2, −1", pa.Permutations, pa.Count, pa.Borderline, ParallelBatch)
	}
	if pa.Decision[0] != DecisionKeep || pa.Decision[1] != DecisionKeep || pa.Decision[2] != DecisionDrop || pa.Decision[3] != DecisionBeyond {
		t.Errorf("decisions %v", pa.Decision)
	}

	noise := synth.Gaussian(synth.RNG(5, 23), 200, 8)
	pp, _ = FitPreprocessing(noise, intake.TransformNone, ScaleUnit)
	zn := pp.Apply(nil, noise)
	dn, _ := Decompose(zn)
	// Direct count: the same permutations, one at a time (cap = batch).
	one := ParallelAnalysis(zn, dn.Eigenvalues, ParallelBatch, 2, 1, nil)
	if one.Permutations != ParallelBatch {
		t.Fatalf("ran %d permutations with cap %d", one.Permutations, ParallelBatch)
	}
	// The exceedance share of PC1 is the share of permuted first
	// eigenvalues at or above the observed one; with the P95 also known,
	// the two must be consistent: exceedance < 5 % exactly when the
	// observed eigenvalue is above (about) the 95th percentile.
	if (one.Exceedance[0] < 0.05) != (dn.Eigenvalues[0] > one.P95[0]) && math.Abs(one.Exceedance[0]-0.05) > 0.011 {
		t.Errorf("PC1 exceedance %.3f inconsistent with observed %.4f vs P95 %.4f", one.Exceedance[0], dn.Eigenvalues[0], one.P95[0])
	}
	if one.Decision[0] == DecisionKeep {
		t.Errorf("pure noise: PC1 kept (exceedance %.3f)", one.Exceedance[0])
	}
}

// exceedance and settle against a direct computation of Clopper–Pearson
// bounds: with 0 of 100 permutations reaching the observed eigenvalue the
// one-sided 99 % upper bound is 1 − 0.01^(1/100) = 0.0450 (closed form for
// c = 0), below 5 %: keep; with 5 of 100 (the point estimate at 5 %) the
// decision is borderline; with 30 of 100 the lower bound (scipy 1.10.1
// beta.ppf(0.01, 30, 71) = 0.198316) is above 5 %: drop.
func TestSettleDecisions(t *testing.T) {
	lo, hi := exceedanceBounds(0, 100)
	if lo != 0 || math.Abs(hi-(1-math.Pow(0.01, 0.01))) > 1e-9 {
		t.Errorf("bounds for 0/100: %g, %g", lo, hi)
	}
	lo, _ = exceedanceBounds(30, 100)
	if math.Abs(lo-0.1983159649421128) > 1e-9 {
		t.Errorf("lower bound for 30/100: %g, want 0.198316 (scipy 1.10.1)", lo)
	}
	cases := []struct {
		exceed    []int
		b         int
		count, bl int
		done      bool
		decisions []ParallelDecision
	}{
		{[]int{0, 0, 30, 90}, 100, 2, -1, true, []ParallelDecision{DecisionKeep, DecisionKeep, DecisionDrop, DecisionBeyond}},
		{[]int{0, 5, 30, 90}, 100, 1, 1, false, []ParallelDecision{DecisionKeep, DecisionBorderline, DecisionBeyond, DecisionBeyond}},
		{[]int{60, 0, 0, 0}, 100, 0, -1, true, []ParallelDecision{DecisionDrop, DecisionBeyond, DecisionBeyond, DecisionBeyond}},
		{[]int{0, 0, 0}, 100, 3, -1, true, []ParallelDecision{DecisionKeep, DecisionKeep, DecisionKeep}},
		{[]int{0, 0}, 50, 0, 0, false, []ParallelDecision{DecisionBorderline, DecisionBeyond}}, // 50 cannot settle a keep
	}
	for i, c := range cases {
		count, bl, dec, done := settle(c.exceed, c.b)
		if count != c.count || bl != c.bl || done != c.done {
			t.Errorf("case %d: count %d borderline %d done %v; want %d %d %v", i, count, bl, done, c.count, c.bl, c.done)
		}
		for a := range dec {
			if dec[a] != c.decisions[a] {
				t.Errorf("case %d: decisions %v, want %v", i, dec, c.decisions)
				break
			}
		}
	}
}

// An eigenvalue planted exactly at the permutation threshold stays
// borderline at a small cap and is not counted. The observed value given
// is the 95th percentile of a first run's permuted PC1 eigenvalues, so its
// exceedance share is about 5 %.
func TestParallelAnalysisBorderlineAtCap(t *testing.T) {
	noise := synth.Gaussian(synth.RNG(6, 23), 150, 8)
	pp, _ := FitPreprocessing(noise, intake.TransformNone, ScaleUnit)
	z := pp.Apply(nil, noise)
	d, _ := Decompose(z)
	first := ParallelAnalysis(z, d.Eigenvalues, 400, 7, 2, nil)
	obs := append([]float64{first.P95[0]}, d.Eigenvalues[1:]...)
	pa := ParallelAnalysis(z, obs, 400, 7, 2, nil)
	if pa.Borderline != 0 || pa.Count != 0 || pa.Permutations != 400 || pa.Decision[0] != DecisionBorderline {
		t.Errorf("at the threshold: borderline %d, count %d, %d permutations, decisions %v", pa.Borderline, pa.Count, pa.Permutations, pa.Decision)
	}
	counts := CountComponents(obs, ScaleUnit, 0.8, pa, CrossValidation{})
	if counts.Counts[0].Borderline != "PC1" {
		t.Errorf("rule count does not name the borderline component: %+v", counts.Counts[0])
	}
}
