package analysis

import (
	"math"
	"testing"
)

// The family-wise limits sit far in the tail (1 − conf ≈ 1e-5 for n = 5000),
// where quantile routines lose accuracy first. Reference values: SciPy
// 1.10.1 (numpy 1.24.2), testdata/reference/familywise.py, which uses isf on
// the tail probability so that no digits are lost to 1 − conf.
func TestFamilyWiseLimitsMatchSciPy(t *testing.T) {
	discarded := []float64{0.9, 0.7, 0.5, 0.3, 0.2, 0.1}
	var t1, t2 float64
	for _, l := range discarded {
		t1 += l
		t2 += l * l
	}
	cases := []struct {
		n, k                int
		conf, t2, qBox, qJM float64
	}{
		{100, 2, 0.9994871985837377, 14.173277726734762, 12.904322408461681, 14.664635052463137},
		{500, 3, 0.999897418673049, 20.67651414643819, 15.13010398457029, 17.840796050667247},
		{5000, 4, 0.9999897413937423, 28.34927671138053, 18.26599710888927, 22.63254755128789},
		{40, 1, 0.9987184894771247, 9.182577473138783, 11.620211165828463, 12.91911324912555},
	}
	rel := func(got, want float64) float64 { return math.Abs(got-want) / want }
	for _, c := range cases {
		conf := SidakConfidence(0.05, c.n) // the level of the SciPy reference
		if d := math.Abs(conf - c.conf); d > 1e-15 {
			t.Errorf("n=%d: Šidák confidence %.17g, SciPy %.17g", c.n, conf, c.conf)
		}
		if got := T2LimitModel(c.n, c.k, conf); rel(got, c.t2) > 1e-8 {
			t.Errorf("n=%d k=%d: T² family limit %.12g, SciPy %.12g", c.n, c.k, got, c.t2)
		}
		q, method := QLimit(discarded, conf)
		if method != QJacksonMudholkar || rel(q, c.qJM) > 1e-8 {
			t.Errorf("n=%d: Q family limit %.12g by %s, SciPy-based JM %.12g", c.n, q, method, c.qJM)
		}
		// Box's form, as QLimit uses it when JM is undefined.
		g, h := t2/t1, t1*t1/t2
		if got := g * ChiSquaredQuantile(conf, h); rel(got, c.qBox) > 1e-8 {
			t.Errorf("n=%d: Box Q family limit %.12g, SciPy %.12g", c.n, got, c.qBox)
		}
		l := TrainingLimits(c.n, c.k, append([]float64{5, 4, 3, 2}[:c.k], discarded...))
		fc := SidakConfidence(FamilyAlpha, c.n)
		qf, _ := QLimit(discarded, fc)
		if l.FamilyConf != fc || l.T2Family != T2LimitModel(c.n, c.k, fc) || l.QFamily != qf {
			t.Errorf("n=%d: TrainingLimits family fields %+v", c.n, l)
		}
		if !(l.T2Family > l.T2_99 && l.QFamily > l.Q99) {
			t.Errorf("n=%d: family-wise limits must lie beyond the 99 %% limits: %+v", c.n, l)
		}
	}
}

func TestBinomialUpperTailMatchesSciPy(t *testing.T) {
	// SciPy 1.10.1 stats.binom.sf(x − 1, n, 0.05), testdata/reference/familywise.py.
	cases := []struct {
		x, n int
		want float64
	}{
		{10, 100, 0.028188294163416113},
		{13, 100, 0.0014643480080344616},
		{40, 500, 0.0027009571817049253},
		{50, 500, 3.575815040255072e-06},
		{0, 100, 1},
		{290, 5000, 0.005993033179766778},
		{101, 100, 0}, // more than n: impossible (fact of the trade)
	}
	for _, c := range cases {
		got := BinomialUpperTail(c.x, c.n, 0.05)
		if math.Abs(got-c.want) > 1e-10*math.Max(c.want, 1e-300) {
			t.Errorf("P(X ≥ %d | %d, 0.05) = %.17g, SciPy %.17g", c.x, c.n, got, c.want)
		}
	}
}

// Under independence, Šidák's per-test confidence makes the chance of no
// exceedance exactly 1 − α (Šidák 1967): conf^n = 1 − α.
func TestSidakIsExactUnderIndependence(t *testing.T) {
	for _, n := range []int{1, 7, 100, 5000, 1000000} {
		// conf carries one rounding error, which the n-th power multiplies
		// by n.
		if got := math.Pow(SidakConfidence(0.05, n), float64(n)); math.Abs(got-0.95) > 1e-12+1e-15*float64(n) {
			t.Errorf("n=%d: conf^n = %.15g", n, got)
		}
	}
	if SidakConfidence(0.05, 1) != 0.95 {
		t.Error("one test: the confidence is 1 − α")
	}
}
