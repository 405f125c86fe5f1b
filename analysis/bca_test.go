package analysis

import (
	"encoding/json"
	"math"
	"os"
	"testing"
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
	}
	for _, c := range cases {
		lo, hi := BCaInterval(c.estimate, c.reps, []float64{-1, 0, 1}, c.level)
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
