package analysis

import (
	"math"
	"math/rand/v2"
	"sort"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// unitT draws a Student t_ν rescaled to unit variance.
func unitT(rng *rand.Rand, nu int) float64 {
	w := 0.0
	for range nu {
		e := rng.NormFloat64()
		w += e * e
	}
	return rng.NormFloat64() * math.Sqrt(float64(nu-2)/w)
}

// TestSumLimitOneTermIsExact: with one term the big-jump law is exact,
// P(U² > x) = 2·P(T > √x/σ), so the limit is the square of a t quantile.
// Reference values from scipy.stats.t.ppf (scipy 1.10.1): t.ppf(1 − 0.5e-4,
// 10) = 6.211050891607064 and t.ppf(1 − 0.5e-5, 6) = 13.555316418718352.
func TestSumLimitOneTermIsExact(t *testing.T) {
	for _, c := range []struct {
		nu, conf, tq float64
	}{
		{10, 1 - 1e-4, 6.211050891607064},
		{6, 1 - 1e-5, 13.555316418718352},
	} {
		unit := ComponentTail{DF: c.nu}
		got := unit.FamilyLimit([]float64{1}, c.conf)
		want := c.tq * c.tq * (c.nu - 2) / c.nu
		if math.Abs(got-want) > 1e-9*want {
			t.Errorf("ν = %v: limit %v, want %v", c.nu, got, want)
		}
		// Homogeneous in the weight.
		if got3 := unit.FamilyLimit([]float64{3}, c.conf); math.Abs(got3-3*want) > 1e-9*want {
			t.Errorf("ν = %v: weight 3 gives %v, want %v", c.nu, got3, 3*want)
		}
	}
}

// TestSumLimitAgainstSimulation: for sums of independent unit-variance t₁₀
// squares the big-jump limit at a far level holds its level within a factor
// of two, measured by simulation (common practice for an asymptotic law).
func TestSumLimitAgainstSimulation(t *testing.T) {
	if testing.Short() {
		t.Skip("simulates 2·10⁶ sums")
	}
	rng := rand.New(rand.NewPCG(11, 12))
	for _, w := range [][]float64{{1, 1}, {1, 1, 1, 1, 1, 1, 1, 1}} {
		const draws = 1_000_000
		level := 1e-4
		lim := ComponentTail{DF: 10}.FamilyLimit(w, 1-level)
		beyond := 0
		for range draws {
			s := 0.0
			for _, wm := range w {
				u := unitT(rng, 10)
				s += wm * u * u
			}
			if s > lim {
				beyond++
			}
		}
		rate := float64(beyond) / draws
		if rate > 2*level || rate < level/2 {
			t.Errorf("%d terms: %v of sums beyond the 1e-4 limit %v", len(w), rate, lim)
		}
		// Normal theory, χ²_m at the same level, is passed far more often.
		chi := ChiSquaredQuantile(1-level, float64(len(w)))
		if !(lim > chi) {
			t.Errorf("%d terms: t limit %v not above the χ² limit %v", len(w), lim, chi)
		}
	}
}

// TestFitStudentT: the fit recovers ν of t₁₀ data (excess kurtosis 1, a
// fact of the t law) and, on Gaussian data, puts ν so far out that the
// limit it implies stays near normal theory: a one-term limit at the
// family-wise level of 300 samples is χ²₁'s on the median table and at
// most 1.6 times it on nine tables in ten (measured: median 1.02, 90th
// percentile 1.35; a fit that always found ν near 10 would double
// the limit).
func TestFitStudentT(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	u := make([]float64, 40000)
	for i := range u {
		u[i] = unitT(rng, 10)
	}
	f := fitStudentT(u)
	if !f.Fitted() || f.DF < 8 || f.DF > 12.5 || !(f.LR > 50) {
		t.Errorf("t₁₀ data: fitted ν = %v (LR %v)", f.DF, f.LR)
	}
	conf := SidakConfidence(FamilyAlpha, 300)
	chi := ChiSquaredQuantile(conf, 1)
	const reps = 200
	ratios := make([]float64, reps)
	for r := range ratios {
		g := make([]float64, 600)
		for i := range g {
			g[i] = rng.NormFloat64()
		}
		ratios[r] = 1
		if fit := fitStudentT(g); fit.Fitted() {
			ratios[r] = math.Max(1, (ComponentTail{DF: fit.DF}).FamilyLimit([]float64{1}, conf)/chi)
		}
	}
	sort.Float64s(ratios)
	t.Logf("Gaussian data, limit / χ² limit: median %.3f, 80th %.3f, 90th %.3f, max %.3f", ratios[reps/2], ratios[reps*8/10], ratios[reps*9/10], ratios[reps-1])
	if ratios[reps/2] > 1.05 || ratios[reps*9/10] > 1.6 {
		t.Errorf("Gaussian data: the fitted tail raises the limit too often")
	}
}

// TestFitSumKurtosis: Q = Σ w_m U_m² of t₁₀ terms gives κ near 1, its excess
// kurtosis 6/(ν − 4) (a textbook fact of the t law), and Gaussian terms κ
// near 0 with z rarely beyond the one-sided 5 % point.
func TestFitSumKurtosis(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	w := []float64{2, 1, 1, 0.5, 0.5, 0.5}
	sums := func(n int, heavy bool) []float64 {
		q := make([]float64, n)
		for i := range q {
			for _, wm := range w {
				u := rng.NormFloat64()
				if heavy {
					u = unitT(rng, 10)
				}
				q[i] += wm * u * u
			}
		}
		return q
	}
	if k, z := FitSumKurtosis(sums(200000, true), w, nil); math.Abs(k-1) > 0.3 || z < 10 {
		t.Errorf("t₁₀ terms: κ = %v, z = %v", k, z)
	}
	fired := 0
	for range 200 {
		if _, z := FitSumKurtosis(sums(500, false), w, nil); z > kurtosisZ {
			fired++
		}
	}
	if fired > 18 {
		t.Errorf("Gaussian terms: z beyond the 5 %% point %d times in 200", fired)
	}
}

// TestComponentTailUsesQForQOnly: heavy-tailed retained scores raise T²'s
// limits but not Q's.
func TestComponentTailUsesQForQOnly(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	n := 2000
	scores := mat.NewDense(n, 1, nil)
	q := make([]float64, n)
	for i := range n {
		scores.Set(i, 0, 3*unitT(rng, 6))
		for range 5 {
			e := rng.NormFloat64()
			q[i] += e * e
		}
	}
	c := FitComponentTail(scores, []float64{9}, q, []float64{1, 1, 1, 1, 1}, nil)
	if !c.Fitted() || !c.Scores.Fitted() {
		t.Fatalf("heavy scores not seen: %+v", c)
	}
	if c.ForQ().Fitted() {
		t.Errorf("Q's limits use the scores' tail: %+v", c.ForQ())
	}
}
