package analysis

import (
	"encoding/json"
	"math"
	"os"
	"testing"

	"pcqc/analysis/intake"
	"pcqc/internal/synth"
)

// BCaInterval reproduces scipy 1.10.1's scipy.stats.bootstrap(method='BCa')
// on its own replicates (testdata/bca/reference.json, made by
// testdata/bca/make_reference.py with numpy 1.24.2).
func TestBCaIntervalMatchesScipy(t *testing.T) {
	raw, err := os.ReadFile("../testdata/bca/reference.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Cases []struct {
			Name                  string
			Level, Estimate       float64
			Replicates, Jackknife []float64
			Low, High             float64
		}
	}
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Cases) == 0 {
		t.Fatal("no reference cases")
	}
	for _, c := range ref.Cases {
		lo, hi := BCaInterval(c.Estimate, c.Replicates, c.Jackknife, c.Level)
		if math.Abs(lo-c.Low) > 1e-10*math.Abs(c.Low) || math.Abs(hi-c.High) > 1e-10*math.Abs(c.High) {
			t.Errorf("%s: BCa [%.12g, %.12g], scipy 1.10.1 [%.12g, %.12g]", c.Name, lo, hi, c.Low, c.High)
		}
		// The same replicates without correction give the percentile
		// interval, which differs on these skewed statistics: the test
		// can tell the corrections apart.
		pl, ph := BCaInterval(c.Estimate, c.Replicates, nil, c.Level)
		if math.Abs(pl-lo) < 1e-6*math.Abs(lo) && math.Abs(ph-hi) < 1e-6*math.Abs(hi) {
			t.Errorf("%s: acceleration made no difference", c.Name)
		}
	}
}

func TestBCaIntervalEdges(t *testing.T) {
	reps := []float64{1, 2, 3, 4, 5, 6, 7, 8, 9}
	cases := []struct {
		name     string
		estimate float64
		reps     []float64
		level    float64
		nan      bool
		lo, hi   float64
	}{
		// Estimate at the median, symmetric jackknife: z₀ = a = 0, the
		// percentile interval; 2.5th and 97.5th percentiles of 1..9 by
		// linear interpolation are 1.2 and 8.8 (numpy.percentile, from memory).
		{"percentile case", 5, reps, 0.95, false, 1.2, 8.8},
		{"no replicates", 5, nil, 0.95, true, 0, 0},
		{"estimate below every replicate", 0, reps, 0.95, true, 0, 0},
		{"level out of range", 5, reps, 1, true, 0, 0},
		{"NaN jackknife", 5, reps, 0.95, true, 0, 0},
	}
	for _, c := range cases {
		jack := []float64{-1, 0, 1}
		if c.name == "NaN jackknife" {
			jack = []float64{-1, math.NaN(), 1}
		}
		lo, hi := BCaInterval(c.estimate, c.reps, jack, c.level)
		if c.nan {
			if !math.IsNaN(lo) || !math.IsNaN(hi) {
				t.Errorf("%s: [%g, %g], want NaN", c.name, lo, hi)
			}
			continue
		}
		if math.Abs(lo-c.lo) > 1e-12 || math.Abs(hi-c.hi) > 1e-12 {
			t.Errorf("%s: [%g, %g], want [%g, %g]", c.name, lo, hi, c.lo, c.hi)
		}
	}
}

// Coverage on simulated Gaussian data with known population eigenvalues
// (covariance PCA, spectrum 8, 3, 1, 0.5, 0.3; n = 200): the 95 % BCa
// intervals of the top and the smallest eigenvalue cover the truth at close
// to the nominal rate over 100 seeds. The smallest sample eigenvalue is
// biased low, so its percentile interval (which inherits the bias) covers
// less often; the test records both so that a regression shows.
func TestBCaCoverageOfEigenvalues(t *testing.T) {
	skipSimulationWhenShort(t)
	if testing.Short() {
		t.Skip("coverage study")
	}
	spectrum := []float64{8, 3, 1, 0.5, 0.3}
	const n, seeds, B = 200, 100, 300
	cov, _ := synth.SpectrumCovariance(synth.RNG(3, 61), spectrum)
	last := len(spectrum) - 1
	var bcaTop, bcaLast, pctTop, pctLast int
	for s := 0; s < seeds; s++ {
		x := synth.WithCovariance(synth.RNG(uint64(s+1), 62), n, cov)
		res, err := Analyze(intake.TableFromMatrix("t", x, nil, nil), Options{Scaling: ScaleNone, Components: ComponentRule{Kind: RuleFixed, Fixed: 1}})
		if err != nil {
			t.Fatal(err)
		}
		st := Bootstrap(res, B, uint64(s+1), 0, nil)
		in := func(iv Interval, v float64) int {
			if iv.Low <= v && v <= iv.High {
				return 1
			}
			return 0
		}
		bcaTop += in(st.EigenvaluesBCa[0], spectrum[0])
		bcaLast += in(st.EigenvaluesBCa[last], spectrum[last])
		pctTop += in(st.Eigenvalues[0], spectrum[0])
		pctLast += in(st.Eigenvalues[last], spectrum[last])
	}
	t.Logf("coverage over %d seeds: top BCa %d, percentile %d; smallest BCa %d, percentile %d", seeds, bcaTop, pctTop, bcaLast, pctLast)
	// 95 of 100 expected; a binomial(100, 0.95) count falls below 89 with
	// probability 0.43 % and below 85 with 0.004 % (scipy 1.10.1
	// binom.cdf(88, 100, 0.95) and binom.cdf(84, …)): loose bounds that
	// still fail. Observed: top 92 (percentile 93), smallest 89 (percentile
	// 84).
	if bcaTop < 89 || bcaLast < 85 {
		t.Errorf("BCa coverage top %d, smallest %d of %d; nominal 95", bcaTop, bcaLast, seeds)
	}
}
