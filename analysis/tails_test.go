package analysis

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestFitTailFindsHeavyTails draws T²-like statistics from laws whose
// family-wise quantile is known and checks that the fitted limit lands near
// it: a Student t₁₀ score squared is exactly F(1, 10), so the fit should
// recover the t₁₀ limit; a Gaussian score squared is χ²₁, where the fit
// must not widen the normal-theory limit by more than the fit's own
// sampling error (measured: up to 1.45× over ten seeds at n = 5000); three planted gross values
// beyond the normal-theory limit must not widen it either.
//
// Reference quantiles at the Šidák confidence (1 − 0.01)^(1/5000): SciPy
// 1.10.1, stats.f.isf(1 − conf, 1, 10) = 94.997 and stats.chi2.isf(1 −
// conf, 1) = 22.585.
func TestFitTailFindsHeavyTails(t *testing.T) {
	const n = 5000
	conf := SidakConfidence(FamilyAlpha, n)
	const f110, chi1 = 94.99685219061044, 22.585398285970616
	tScore := func(r *rand.Rand) float64 {
		w := 0.0
		for range 10 {
			z := r.NormFloat64()
			w += z * z
		}
		return r.NormFloat64() / math.Sqrt(w/10)
	}
	cases := []struct {
		name     string
		draw     func(r *rand.Rand) float64
		planted  int
		n        int
		fitted   bool
		min, max float64 // bounds on the fitted family-wise limit (or normal theory)
	}{
		{"t10 squared", func(r *rand.Rand) float64 { x := tScore(r); return x * x }, 0, n, true, 0.55 * f110, 1.6 * f110},
		{"t10 squared, 3 planted", func(r *rand.Rand) float64 { x := tScore(r); return x * x }, 3, n, true, 0.55 * f110, 1.6 * f110},
		{"normal squared", func(r *rand.Rand) float64 { x := r.NormFloat64(); return x * x }, 0, n, false, chi1, 1.5 * chi1},
		{"normal squared, 3 planted", func(r *rand.Rand) float64 { x := r.NormFloat64(); return x * x }, 3, n, false, chi1, 1.5 * chi1},
		{"too few rows", func(r *rand.Rand) float64 { x := tScore(r); return x * x }, 0, 200, false, 0, math.Inf(1)},
	}
	for _, c := range cases {
		fits := 0
		for seed := uint64(1); seed <= 10; seed++ {
			r := rand.New(rand.NewPCG(seed, 12))
			v := make([]float64, c.n)
			for i := range v {
				v[i] = c.draw(r)
			}
			for i := 0; i < c.planted; i++ {
				v[i] = 1e4 // gross: far beyond either limit
			}
			f := FitTail(v, 1, chi1, func(c float64) float64 { return ChiSquaredQuantile(c, 1) })
			lim := chi1
			if f.Fitted() {
				lim = math.Max(lim, f.Quantile(conf))
			}
			if f.Fitted() {
				fits++
			}
			if c.fitted && !f.Fitted() {
				t.Errorf("%s, seed %d: no tail fitted", c.name, seed)
			}
			if c.n < tailFitMinRows && f.Fitted() {
				t.Errorf("%s, seed %d: fitted %+v on %d rows", c.name, seed, f, c.n)
			}
			if lim < c.min || lim > c.max {
				t.Errorf("%s, seed %d: family-wise limit %.4g (fit %+v), want within [%.4g, %.4g]", c.name, seed, lim, f, c.min, c.max)
			}
		}
		// The test for a heavier tail rejects on about 5 % of Gaussian
		// tables; 3 of 10 would be far more than chance (binomial tail 1 %).
		if !c.fitted && fits > 2 {
			t.Errorf("%s: a tail was fitted on %d of 10 seeds", c.name, fits)
		}
	}
}
