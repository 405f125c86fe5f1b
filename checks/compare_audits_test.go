package checks

import (
	"math"
	"testing"

	"pcqc/analysis"
)

func comparison(ka, kb int, ia, ib []analysis.SavedInterval, changes []analysis.CheckChange) *analysis.AuditComparison {
	nan := math.NaN()
	return &analysis.AuditComparison{
		A:      &analysis.SavedAudit{Model: &analysis.Model{Retained: ka}, Intervals: ia, AngleP95: nan},
		B:      &analysis.SavedAudit{Model: &analysis.Model{Retained: kb}, Intervals: ib, AngleP95: nan},
		Common: []string{"x"}, Checks: changes,
	}
}

// TestCompareRetainedAndChecks: counts that differ where the split
// eigenvalue's bootstrap intervals overlap are sampling; where they do not,
// or an audit has no intervals, the difference is reported. A check that
// passes in one audit and fails in the other warns; a one-step change does
// not. (Planted cases: the rules themselves are the reference.)
func TestCompareRetainedAndChecks(t *testing.T) {
	iv := func(lo, hi float64) analysis.SavedInterval { return analysis.SavedInterval{Low: lo, High: hi} }
	cases := []struct {
		name   string
		c      *analysis.AuditComparison
		check  func(*analysis.AuditComparison) Result
		status Status
	}{
		{"same count", comparison(2, 2, nil, nil, nil), judgeCompareRetained, Pass},
		{"overlapping boundary", comparison(3, 2, []analysis.SavedInterval{iv(4, 5), iv(2, 3), iv(1.0, 1.2)}, []analysis.SavedInterval{iv(4, 5), iv(2, 3), iv(0.9, 1.1)}, nil), judgeCompareRetained, Pass},
		{"separate boundary", comparison(3, 2, []analysis.SavedInterval{iv(4, 5), iv(2, 3), iv(1.5, 1.8)}, []analysis.SavedInterval{iv(4, 5), iv(2, 3), iv(0.9, 1.1)}, nil), judgeCompareRetained, Warn},
		{"no bootstrap", comparison(3, 2, nil, nil, nil), judgeCompareRetained, Warn},
		{"same statuses", comparison(1, 1, nil, nil, []analysis.CheckChange{{ID: "a", A: "pass", B: "pass"}}), judgeCompareChecks, Pass},
		{"one step", comparison(1, 1, nil, nil, []analysis.CheckChange{{ID: "a", A: "pass", B: "warn", Changed: true}}), judgeCompareChecks, Pass},
		{"pass to fail", comparison(1, 1, nil, nil, []analysis.CheckChange{{ID: "a", A: "pass", B: "fail", Changed: true}}), judgeCompareChecks, Warn},
		{"no bootstrap angle", comparison(1, 1, nil, nil, nil), judgeCompareSubspace, Skip},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := c.check(c.c); got.Status != c.status {
				t.Errorf("status %s, want %s: %s", got.Status, c.status, got.Message)
			}
		})
	}
}

// TestPairLimitIsTheSumOfAngles: with bootstrap congruences φ5 = cos 10°
// and cos 20°, two estimates of one component are at most 30° apart
// (triangle inequality of the angle between unit vectors, a fact of the
// trade), so the limit is cos 30° = 0.8660.
func TestPairLimitIsTheSumOfAngles(t *testing.T) {
	deg := math.Pi / 180
	c := comparison(1, 1, nil, nil, nil)
	c.A.CongruenceP5 = []float64{math.Cos(10 * deg)}
	c.B.CongruenceP5 = []float64{math.Cos(20 * deg)}
	got, boot := pairLimit(c, analysis.ComponentPair{})
	if !boot || math.Abs(got-math.Sqrt(3)/2) > 1e-12 {
		t.Errorf("limit %g (bootstrap %v), want cos 30° = %g", got, boot, math.Sqrt(3)/2)
	}
}
