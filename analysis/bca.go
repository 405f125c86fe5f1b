package analysis

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/stat/distuv"
)

// BCaInterval returns the bias-corrected and accelerated bootstrap interval
// at the given level (0.95 for 95 %) of a statistic whose estimate on the
// data is estimate, whose bootstrap replicates are replicates and whose
// leave-one-out (jackknife) values are jackknife (Efron 1987, J. Amer.
// Statist. Assoc. 82:171–185; Efron & Tibshirani 1993, An Introduction to
// the Bootstrap, §14.3 and eq. 14.15):
//
//	z₀ = Φ⁻¹(share of replicates below the estimate, ties counting half)
//	a  = Σ(θ̄₍·₎ − θ₍ᵢ₎)³ / (6 [Σ(θ̄₍·₎ − θ₍ᵢ₎)²]^{3/2})
//	α₁ = Φ(z₀ + (z₀ + z_{α/2}) / (1 − a(z₀ + z_{α/2})))
//	α₂ = Φ(z₀ + (z₀ + z_{1−α/2}) / (1 − a(z₀ + z_{1−α/2})))
//
// and the interval is the α₁ and α₂ percentiles of the replicates, linearly
// interpolated (the conventions of scipy.stats.bootstrap, method 'BCa',
// which a test reproduces). The percentile interval is the case z₀ = a = 0.
// It returns NaN, NaN when the interval is undefined: no replicates, an
// estimate outside the range of every replicate (z₀ infinite), or
// jackknife values that are not finite.
func BCaInterval(estimate float64, replicates []float64, jackknife []float64, level float64) (lo, hi float64) {
	b := len(replicates)
	if b == 0 || !(level > 0 && level < 1) {
		return math.NaN(), math.NaN()
	}
	sorted := slices.Clone(replicates)
	slices.Sort(sorted)
	below := 0
	for _, v := range sorted {
		switch {
		case v < estimate:
			below += 2
		case v == estimate: // ties count half, as scipy's percentile of score
			below++
		}
	}
	n01 := distuv.UnitNormal
	z0 := n01.Quantile(float64(below) / float64(2*b))
	if math.IsInf(z0, 0) || math.IsNaN(z0) {
		return math.NaN(), math.NaN()
	}
	a := acceleration(jackknife)
	alpha := (1 - level) / 2
	adjust := func(z float64) float64 {
		num := z0 + z
		return n01.CDF(z0 + num/(1-a*num))
	}
	a1, a2 := adjust(n01.Quantile(alpha)), adjust(n01.Quantile(1-alpha))
	if math.IsNaN(a1) || math.IsNaN(a2) { // non-finite jackknife values
		return math.NaN(), math.NaN()
	}
	return percentile(sorted, 100*a1), percentile(sorted, 100*a2)
}

// acceleration is the jackknife estimate of BCa's acceleration a (Efron
// 1987, eq. 6.6); 0 when the jackknife values do not vary or are absent.
func acceleration(jackknife []float64) float64 {
	if len(jackknife) < 2 {
		return 0
	}
	mean := 0.0
	for _, v := range jackknife {
		mean += v
	}
	mean /= float64(len(jackknife))
	var s2, s3 float64
	for _, v := range jackknife {
		d := mean - v
		s2 += d * d
		s3 += d * d * d
	}
	if s2 == 0 {
		return 0
	}
	return s3 / (6 * math.Pow(s2, 1.5))
}
