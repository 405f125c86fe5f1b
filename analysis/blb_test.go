package analysis

import (
	"fmt"
	"math"
	"testing"

	"pcqc/analysis/intake"
	"pcqc/internal/synth"
)

func TestBLBPlan(t *testing.T) {
	cases := []struct {
		n, p, b, want int
		ok            bool
	}{
		{n: 99_999, p: 20, b: 500, ok: false},             // below the switch
		{n: 100_000, p: 20, b: 500, want: 3163, ok: true}, // ⌈100000^0.7⌉
		{n: 1_000_000, p: 20, b: 500, want: 15849, ok: true},
		{n: 200_000, p: 5_000, b: 500, want: 20_000, ok: true}, // 4 rows per variable
		{n: 100_000, p: 10_000, b: 500, ok: false},             // subsets not much smaller than the table
		{n: 200, p: 20_000, b: 500, ok: false},                 // wide
	}
	for _, c := range cases {
		b, s, r, ok := blbPlan(c.n, c.p, c.b)
		if ok != c.ok || (ok && (b != c.want || s != BLBSubsets || s*r < c.b)) {
			t.Errorf("%d × %d: b=%d s=%d r=%d ok=%v, want b=%d ok=%v", c.n, c.p, b, s, r, ok, c.want, c.ok)
		}
	}
}

func TestSubsetRowsAreDistinct(t *testing.T) {
	rows := subsetRows(3, 1, 1000, 400)
	for i := 1; i < len(rows); i++ {
		if rows[i] <= rows[i-1] || rows[i] >= 1000 {
			t.Fatalf("rows not distinct and increasing at %d: %d, %d", i, rows[i-1], rows[i])
		}
	}
	if len(rows) != 400 {
		t.Fatalf("%d rows, want 400", len(rows))
	}
}

// Acceptance: where both run, the bag of little bootstraps agrees with the
// full bootstrap within Monte Carlo error, on 20,000 × 6 (b = 1,025 rows,
// s = 10 subsets of r = 20 resamples, against 200 full resamples).
// Tolerances: each interval endpoint within a quarter of the full
// bootstrap's interval width (the Monte Carlo standard error of a 2.5 %
// quantile from 200 resamples is about 5 % of the width, and each little
// bootstrap adds its subset's own variation); the median of 1 − φ
// (Tucker's congruence) within a factor 1.6 (it scales like the variance
// of the loadings, whose relative Monte Carlo error here is about 10 %).
// Weights summing to b instead of n would widen every interval √(n/b) ≈
// 4.4 times and fail both. Seeds 5–8 were tried; all pass. At n = 5,000
// (b = 389) a loading near 0.94 failed: the subset's own estimate was too
// far from the full one for the curvature of the unit-norm constraint, one
// reason the scheme starts only at BLBMinRows.
var blbSeed uint64 = 5

func TestBLBAgreesWithFullBootstrap(t *testing.T) {
	skipSimulationWhenShort(t)
	for _, scaling := range []Scaling{ScaleUnit, ScaleNone} {
		t.Run(string(scaling), func(t *testing.T) {
			const n, p, k, B = 20000, 6, 2, 200
			x, _ := synth.LowRank(synth.RNG(11, blbSeed), n, p, []float64{3, 1.5}, 1)
			res, err := Analyze(intake.TableFromMatrix("t", x, nil, nil), Options{Scaling: scaling, Components: ComponentRule{Kind: RuleFixed, Fixed: k}})
			if err != nil {
				t.Fatal(err)
			}
			full := Bootstrap(res, B, blbSeed, 0, nil)
			old := BLBMinRows
			BLBMinRows = 10000
			blb := Bootstrap(res, B, blbSeed, 0, nil)
			BLBMinRows = old
			if full.Scheme != SchemeFull || blb.Scheme != SchemeBLB || blb.Used != B || blb.SubsetSize != 1025 {
				t.Fatalf("schemes %q / %q, used %d, b %d", full.Scheme, blb.Scheme, blb.Used, blb.SubsetSize)
			}
			near := func(what string, f, l Interval) {
				tol := 0.25 * (f.High - f.Low)
				if math.Abs(f.Low-l.Low) > tol || math.Abs(f.High-l.High) > tol {
					t.Errorf("%s: little bootstraps [%.5g, %.5g], full [%.5g, %.5g], tolerance %.3g", what, l.Low, l.High, f.Low, f.High, tol)
				}
			}
			// Retained components only: the trailing eigenvalues are tied
			// in the population (unit noise), where no bootstrap is
			// consistent (Beran & Srivastava 1985, Ann. Statist.
			// 13:95–115), and on b = 389 rows their spread differs.
			for a := 0; a < k; a++ {
				near(fmt.Sprintf("eigenvalue %d", a+1), full.Eigenvalues[a], blb.Eigenvalues[a])
				near(fmt.Sprintf("percent %d", a+1), full.Percent[a], blb.Percent[a])
			}
			for j := 0; j < p; j++ {
				for a := 0; a < k; a++ {
					fl, bl := full.Loadings[j][a], blb.Loadings[j][a]
					near(fmt.Sprintf("loading %d,%d", j+1, a+1), Interval{fl.Low, fl.High}, Interval{bl.Low, bl.High})
				}
			}
			for a := 0; a < k; a++ {
				f, l := 1-full.Components[a].CongruenceMedian, 1-blb.Components[a].CongruenceMedian
				if ratio := l / f; !(ratio > 1/1.6 && ratio < 1.6) {
					t.Errorf("PC%d: median 1 − φ %.3g (little) vs %.3g (full)", a+1, l, f)
				}
			}
		})
	}
}

// Under the little bootstraps every sample's influence yardstick is the
// 95th percentile of all resamples' angles (they do not draw from every
// sample): never zero, which would flag every sample whose leave-one-out
// angle is above zero (it once did, on every sample of a 100,000-row table).
func TestInfluenceLimitsUnderBLB(t *testing.T) {
	angles := make([]float64, 200)
	for r := range angles {
		angles[r] = float64(r + 1) // 1 … 200 degrees
	}
	st := Stability{Scheme: SchemeBLB, SubspaceAngles: angles}
	inf := Influence{Angle: []float64{0.5, 300, math.NaN()}}
	want := percentile(angles, 95) // numpy.percentile(range(1, 201), 95) = 190.05
	if math.Abs(want-190.05) > 1e-9 {
		t.Fatalf("95th percentile %v, want 190.05 (numpy 1.24.2)", want)
	}
	for i, l := range InfluenceLimits(inf, st, 1) {
		if l != want {
			t.Errorf("sample %d: yardstick %v, want %v", i, l, want)
		}
	}
}
