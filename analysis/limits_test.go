package analysis

import (
	"math"
	"slices"
	"testing"

	"pcqc/analysis/intake"
	"pcqc/internal/synth"
)

func TestQuantilesMatchTables(t *testing.T) {
	// NIST/SEMATECH e-Handbook of Statistical Methods §1.3.6.7 tables, four
	// decimals; confirmed with SciPy 1.10 stats.f.ppf / stats.chi2.ppf.
	cases := []struct {
		name string
		got  float64
		want float64
	}{
		{"F(0.95; 2, 20)", FQuantile(0.95, 2, 20), 3.4928},
		{"F(0.99; 3, 30)", FQuantile(0.99, 3, 30), 4.5097},
		{"F(0.95; 4, 40)", FQuantile(0.95, 4, 40), 2.6060},
		{"χ²(0.95; 2)", ChiSquaredQuantile(0.95, 2), 5.9915},
		{"χ²(0.99; 4)", ChiSquaredQuantile(0.99, 4), 13.2767},
		{"χ²(0.95; 1)", ChiSquaredQuantile(0.95, 1), 3.8415},
	}
	for _, c := range cases {
		if math.Abs(c.got-c.want) > 0.5e-4 {
			t.Errorf("%s = %.6f, table %.4f", c.name, c.got, c.want)
		}
	}
}

func TestT2LimitsFromTables(t *testing.T) {
	// If F ~ F(d1, d2) then d1·F/(d1·F + d2) ~ Beta(d1/2, d2/2), so the beta
	// form's quantile follows from the F table: with k = 2 and n − k − 1 = 20
	// (n = 23), B_0.95(1, 10) = 2·3.4928/(2·3.4928 + 20) (NIST F table).
	f := 3.4928
	beta := 2 * f / (2*f + 20)
	want := 22.0 * 22.0 / 23.0 * beta
	if got := T2LimitModel(23, 2, 0.95); math.Abs(got-want) > 1e-4*want {
		t.Errorf("T2LimitModel(23, 2, 0.95) = %.6f, want %.6f", got, want)
	}
	// New observations, k = 2, n = 22 (n − k = 20): k(n²−1)/(n(n−k))·F(0.95; 2, 20).
	want = 2.0 * (22*22 - 1) / (22.0 * 20.0) * f
	if got := T2LimitNew(22, 2, 0.95); math.Abs(got-want) > 1e-4*want {
		t.Errorf("T2LimitNew(22, 2, 0.95) = %.6f, want %.6f", got, want)
	}
	if !math.IsNaN(T2LimitModel(3, 2, 0.95)) {
		t.Error("T2LimitModel must be undefined for n ≤ k + 1")
	}
}

func TestQLimitEqualEigenvalues(t *testing.T) {
	// With r equal discarded eigenvalues λ, Q/λ is exactly χ²(r), so Box's
	// approximation is exact and Jackson–Mudholkar is close. Table values:
	// NIST χ²(0.95; 1) = 3.8415, χ²(0.95; 2) = 5.9915, χ²(0.99; 4) = 13.2767.
	cases := []struct {
		r     int
		conf  float64
		table float64
	}{
		{1, 0.95, 3.8415},
		{2, 0.95, 5.9915},
		{4, 0.99, 13.2767},
	}
	for _, c := range cases {
		lambda := 0.37
		disc := make([]float64, c.r)
		for i := range disc {
			disc[i] = lambda
		}
		got, method := QLimit(disc, c.conf)
		if method != QJacksonMudholkar {
			t.Errorf("r=%d: method %s", c.r, method)
		}
		// Jackson & Mudholkar's normal approximation is within a few percent
		// for so few degrees of freedom (Jackson 1991, §2.7).
		if rel := math.Abs(got/lambda-c.table) / c.table; rel > 0.03 {
			t.Errorf("r=%d conf=%g: JM Q/λ = %.4f, exact %.4f", c.r, c.conf, got/lambda, c.table)
		}
		g, h := lambda, float64(c.r) // Box: g = θ2/θ1 = λ, h = θ1²/θ2 = r
		if box := g * ChiSquaredQuantile(c.conf, h); math.Abs(box/lambda-c.table) > 0.5e-4 {
			t.Errorf("Box form: %.5f", box/lambda)
		}
	}
	if q, m := QLimit(nil, 0.95); q != 0 || m != QNone {
		t.Errorf("no discarded variance: %g %s", q, m)
	}
	// One large and many tiny eigenvalues make h0 ≤ 0, so Box is used.
	disc := []float64{1}
	for i := 0; i < 200; i++ {
		disc = append(disc, 0.01)
	}
	if _, m := QLimit(disc, 0.95); m != QBox {
		t.Errorf("h0 ≤ 0 should fall back to Box, got %s", m)
	}
}

// On Gaussian data from a known covariance, about 5 % of the samples lie
// beyond each 95 % limit: the share must be within three binomial standard
// errors of 0.05 (seeded simulation, several thousand samples).
func TestLimitsCalibratedOnGaussianData(t *testing.T) {
	skipSimulationWhenShort(t)
	const n, k = 4000, 3
	spectrum := []float64{9, 5, 3, 1, 0.8, 0.6, 0.5, 0.4, 0.3, 0.2}
	for seed := uint64(1); seed <= 3; seed++ {
		rng := synth.RNG(seed, 10)
		cov, _ := synth.SpectrumCovariance(rng, spectrum)
		x := synth.WithCovariance(rng, n, cov)
		res, err := Analyze(intake.TableFromMatrix("gauss", x, nil, nil), Options{Scaling: ScaleNone, Components: ComponentRule{Kind: RuleFixed, Fixed: k}})
		if err != nil {
			t.Fatal(err)
		}
		s := res.Samples
		se := math.Sqrt(0.05 * 0.95 / n)
		for _, c := range []struct {
			name   string
			values []float64
			limit  float64
		}{{"T²", s.T2, s.Limits.T2_95}, {"Q", s.Q, s.Limits.Q95}} {
			beyond, _ := CountAbove(c.values, c.limit)
			share := float64(beyond) / n
			if math.Abs(share-0.05) > 3*se {
				t.Errorf("seed %d: %s share beyond 95 %% limit = %.4f, want 0.05 ± %.4f", seed, c.name, share, 3*se)
			}
		}
		// And about 1 % beyond the 99 % limits: clean data flag no more
		// than chance allows.
		se99 := math.Sqrt(0.01 * 0.99 / n)
		for _, c := range []struct {
			name   string
			values []float64
			limit  float64
		}{{"T²", s.T2, s.Limits.T2_99}, {"Q", s.Q, s.Limits.Q99}} {
			beyond, _ := CountAbove(c.values, c.limit)
			if share := float64(beyond) / n; share > 0.01+3*se99 {
				t.Errorf("seed %d: %s share beyond 99 %% limit = %.4f > %.4f", seed, c.name, share, 0.01+3*se99)
			}
		}
	}
}

func TestSampleStatsDefinitions(t *testing.T) {
	// Facts of the trade: Σ_i T²_i = (n−1)k for the model's own samples,
	// Σ_i Q_i = (n−1) Σ_{a>k} λ_a, and leverage = 1/n + T²/(n−1).
	x, _ := synth.LowRank(synth.RNG(4, 4), 300, 9, []float64{4, 2, 1}, 0.7)
	res, err := Analyze(intake.TableFromMatrix("t", x, nil, nil), Options{Scaling: ScaleUnit, Components: ComponentRule{Kind: RuleFixed, Fixed: 3}})
	if err != nil {
		t.Fatal(err)
	}
	s := res.Samples
	var sumT2, sumQ float64
	for i := range s.T2 {
		sumT2 += s.T2[i]
		sumQ += s.Q[i]
		if d := s.Leverage[i] - (1/300.0 + s.T2[i]/299); math.Abs(d) > 1e-12 {
			t.Fatalf("leverage %d: %g", i, d)
		}
	}
	if math.Abs(sumT2-299*3) > 1e-8*299*3 {
		t.Errorf("Σ T² = %.10g, want %d", sumT2, 299*3)
	}
	disc := 0.0
	for _, l := range res.Decomp.Eigenvalues[3:] {
		disc += l
	}
	if math.Abs(sumQ-299*disc) > 1e-8*299*disc {
		t.Errorf("Σ Q = %.10g, want %.10g", sumQ, 299*disc)
	}
	// Dominance shares are at most 1 and at least 1/n.
	for a, d := range s.Dominance {
		if d > 1 || d < 1.0/300 {
			t.Errorf("dominance PC%d = %g", a+1, d)
		}
	}
}

func TestBeyondNamesTheHighestLimitPassed(t *testing.T) {
	s := SampleStats{
		T2:       []float64{1, 6, 12, 12},
		Q:        []float64{1, 3, 1, 9},
		Leverage: []float64{0.01, 0.01, 0.2, 0.01},
		Limits:   Limits{T2_95: 5, T2_99: 10, Q95: 2, Q99: 8, QMethod: QJacksonMudholkar, Leverage: 0.1},
	}
	want := [][]string{nil, {"t2-95", "q-95"}, {"t2-99", "leverage"}, {"t2-99", "q-99"}}
	for i, w := range want {
		if got := s.Beyond(i); !slices.Equal(got, w) {
			t.Errorf("sample %d: %v, want %v", i, got, w)
		}
	}
}
