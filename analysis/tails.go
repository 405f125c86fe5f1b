package analysis

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/stat/distuv"
)

// The normal-theory limits of T² and Q hold for Gaussian data. Their
// family-wise limits sit at a per-sample confidence near 1 − 1e-5, where a
// mildly heavier tail than the Gaussian (Student t with 10 degrees of
// freedom, say) already puts several clean samples of a large table beyond
// them. The outlier checks therefore also fit the tail weight of each
// statistic to the bulk of its own values and judge against the larger of
// the two limits.
//
// The fitted law is a scaled F, S ≈ c·F(d₁, ν). It is the exact law of
// Hotelling's T² (d₁ = k) under a multivariate t with ν degrees of freedom,
// and it tends to the normal-theory scaled χ² of T² and of Box's (1954)
// approximation of Q (d₁ = h) as ν → ∞, so ν measures how much heavier
// than normal theory the tail is. c and ν are found by matching two sample
// quantiles, the median and the quantile at 1 − TailFitCount/n. Quantiles,
// not moments: a handful of gross outliers — the very samples the check is
// to name — move neither quantile much, whereas they dominate the sample
// kurtosis. This is the robust quantile matching of the ROBPCA cut-offs
// (Hubert, Rousseeuw & Vanden Branden 2005, Technometrics 47:64–79), which
// fit the bulk of the orthogonal distances by their median and MAD; here
// the second point lies further out so that it sees the tail weight.

// TailFitCount is the number of samples expected beyond the upper matching
// quantile. It must be well above the few outliers a check names, so that
// they cannot widen the limit that is to catch them, and as small as
// possible so that the quantile lies in the tail (common practice: about
// 25 exceedances give a tail quantile with a relative error near 1/√25).
const TailFitCount = 25

// TailTestAlpha is the level of the test for a tail heavier than normal
// theory that must reject before a fitted tail raises the limits (common
// practice: the conventional 5 %).
const TailTestAlpha = 0.05

// tailFitMinRows is the smallest table whose tail is fitted: the upper
// quantile must be at least the 90th percentile, n ≥ 10·TailFitCount.
const tailFitMinRows = 10 * TailFitCount

// tailDFMin and tailDFMax bound the fitted degrees of freedom: below 3 the
// variance of the scores is barely finite and no limit means much; beyond
// 10⁴ the law is normal theory to the digits that matter.
const (
	tailDFMin = 3
	tailDFMax = 1e4
)

// TailFit is a scaled-F law c·F(D1, DF) fitted to a statistic. DF = +Inf
// means the tail is no heavier than normal theory, and no fit is used.
type TailFit struct {
	D1, DF, Scale float64
}

// Fitted reports whether the fit found a tail heavier than normal theory.
func (f TailFit) Fitted() bool { return f.DF > 0 && !math.IsInf(f.DF, 1) }

// Quantile returns the conf quantile of the fitted law, or NaN when there
// is no fit.
func (f TailFit) Quantile(conf float64) float64 {
	if !f.Fitted() {
		return math.NaN()
	}
	return f.Scale * FQuantile(conf, f.D1, f.DF)
}

// FitTail fits c·F(d1, ν) to values by their median and their quantile at
// 1 − TailFitCount/n. It returns DF = +Inf (no fit) when the table is too
// small to see its tail (n < 250), when the statistic is degenerate, or
// when the quantile ratio is no larger than the χ² limit's: the tail is
// then no heavier than normal theory.
//
// Values beyond exclude (the normal-theory family-wise limit) are left out
// and the levels taken among the rest: those are the candidate outliers,
// and kept in they would each push the upper quantile one rank outwards,
// widening the limit that is to catch them.
//
// normalQuantile, when not nil, is the normal-theory quantile function of
// the statistic. The fit is then used only when the count of values beyond
// the normal-theory quantile at the upper matching level or at 99 % is
// significantly high (binomial upper tail below TailTestAlpha at either): on Gaussian data the
// fit's own sampling error would otherwise widen the limit of most tables
// a little and of some by nearly half, and cost the check its planted
// outliers.
func FitTail(values []float64, d1, exclude float64, normalQuantile func(conf float64) float64) TailFit {
	none := TailFit{D1: d1, DF: math.Inf(1)}
	n := len(values)
	if n < tailFitMinRows || !(d1 > 0) {
		return none
	}
	s := make([]float64, 0, n)
	for _, v := range values {
		if !math.IsNaN(v) && !(v > exclude) {
			s = append(s, v)
		}
	}
	if len(s) < tailFitMinRows {
		return none
	}
	sort.Float64s(s)
	hiLevel := 1 - TailFitCount/float64(len(s))
	med, hi := sampleQuantile(s, 0.5), sampleQuantile(s, hiLevel)
	if !(med > 0) || !(hi > med) {
		return none
	}
	if normalQuantile != nil {
		// Two levels: the upper matching level, and the 99 % level, where
		// a table of a thousand rows already has the power to see a t₁₀
		// tail that the higher level, with its few exceedances, misses.
		heavier := false
		for _, level := range []float64{hiLevel, Conf99} {
			beyond, qn := 0, normalQuantile(level)
			for _, v := range s {
				if v > qn {
					beyond++
				}
			}
			heavier = heavier || BinomialUpperTail(beyond, len(s), 1-level) < TailTestAlpha
		}
		if !heavier {
			return none
		}
	}
	ratio := func(nu float64) float64 {
		return FQuantile(hiLevel, d1, nu) / FQuantile(0.5, d1, nu)
	}
	want := hi / med
	chi := distuv.ChiSquared{K: d1}
	if want <= chi.Quantile(hiLevel)/chi.Quantile(0.5) || want <= ratio(tailDFMax) {
		return none
	}
	// The ratio falls as ν grows: bisect on log ν.
	lo, up := math.Log(tailDFMin), math.Log(tailDFMax)
	if want < ratio(tailDFMin) {
		for range 60 {
			mid := (lo + up) / 2
			if ratio(math.Exp(mid)) > want {
				lo = mid
			} else {
				up = mid
			}
		}
	} else {
		up = lo
	}
	nu := math.Exp((lo + up) / 2)
	return TailFit{D1: d1, DF: nu, Scale: med / FQuantile(0.5, d1, nu)}
}

// sampleQuantile is the linear-interpolation quantile (type 7 of Hyndman &
// Fan 1996, the default of R and numpy) of sorted values.
func sampleQuantile(sorted []float64, level float64) float64 {
	h := level * float64(len(sorted)-1)
	i := int(math.Floor(h))
	if i >= len(sorted)-1 {
		return sorted[len(sorted)-1]
	}
	return sorted[i] + (h-float64(i))*(sorted[i+1]-sorted[i])
}
