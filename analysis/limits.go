package analysis

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// T2LimitModel returns the upper control limit at confidence conf (e.g.
// 0.95) for Hotelling's T² of the samples that built a model with k
// components from n samples, by the beta form of Tracy, Young & Mason (1992,
// J. Qual. Technol. 24:88–95):
//
//	UCL = (n−1)²/n · B_conf(k/2, (n−k−1)/2)
//
// where B_conf is the beta quantile. It needs n > k+1 and returns NaN
// otherwise. The samples' own data enter the mean and covariance, which is
// why this differs from the limit for new samples (T2LimitNew).
func T2LimitModel(n, k int, conf float64) float64 {
	if n-k-1 <= 0 || k < 1 {
		return math.NaN()
	}
	b := distuv.Beta{Alpha: float64(k) / 2, Beta: float64(n-k-1) / 2}
	nf := float64(n)
	return (nf - 1) * (nf - 1) / nf * b.Quantile(conf)
}

// T2LimitNew returns the upper control limit at confidence conf for
// Hotelling's T² of a new sample, independent of the n samples that built a
// model with k components (Tracy, Young & Mason 1992; Jackson 1991, A User's
// Guide to Principal Components, §1.7):
//
//	UCL = k(n²−1) / (n(n−k)) · F_conf(k, n−k)
//
// It needs n > k and returns NaN otherwise.
func T2LimitNew(n, k int, conf float64) float64 {
	if n-k <= 0 || k < 1 {
		return math.NaN()
	}
	f := distuv.F{D1: float64(k), D2: float64(n - k)}
	nf, kf := float64(n), float64(k)
	return kf * (nf*nf - 1) / (nf * (nf - kf)) * f.Quantile(conf)
}

// QMethod names the approximation behind a Q limit.
type QMethod string

const (
	QJacksonMudholkar QMethod = "jackson-mudholkar"
	QBox              QMethod = "box"
	QNone             QMethod = "none" // no discarded variance: Q is zero
)

// QLimit returns the upper limit at confidence conf for the Q residual
// (squared prediction error) of a model that discards the eigenvalues given.
//
// Jackson & Mudholkar (1979, Technometrics 21:341–349): with
// θ_i = Σ λ_j^i over the discarded eigenvalues (i = 1, 2, 3) and
// h₀ = 1 − 2θ₁θ₃/(3θ₂²),
//
//	Q_conf = θ₁ [ z_conf √(2θ₂h₀²)/θ₁ + 1 + θ₂h₀(h₀−1)/θ₁² ]^(1/h₀)
//
// where z_conf is the standard normal quantile. The formula is undefined
// when h₀ ≤ 0 or the bracket is not positive; then Box's (1954, Ann. Math.
// Statist. 25:290–302) scaled χ² approximation is used: g = θ₂/θ₁,
// h = θ₁²/θ₂, Q_conf = g·χ²_conf(h). The method used is returned.
func QLimit(discarded []float64, conf float64) (float64, QMethod) {
	// The limit is homogeneous of degree one in the eigenvalues: compute it
	// for eigenvalues scaled to a largest of 1, so that θ₂ and θ₃ neither
	// overflow nor underflow for data in extreme units.
	scale := 0.0
	for _, l := range discarded {
		scale = math.Max(scale, l)
	}
	if scale <= 0 {
		return 0, QNone
	}
	q, method := qLimitUnit(discarded, scale, conf)
	return q * scale, method
}

func qLimitUnit(discarded []float64, scale, conf float64) (float64, QMethod) {
	var t1, t2, t3 float64
	for _, l := range discarded {
		l = math.Max(l, 0) / scale
		t1 += l
		t2 += l * l
		t3 += l * l * l
	}
	if t1 <= 0 || t2 <= 0 {
		return 0, QNone
	}
	h0 := 1 - 2*t1*t3/(3*t2*t2)
	if h0 > 0 {
		z := distuv.UnitNormal.Quantile(conf)
		bracket := z*math.Sqrt(2*t2*h0*h0)/t1 + 1 + t2*h0*(h0-1)/(t1*t1)
		// For h₀ near 0 the power 1/h₀ is huge, and rounding in the
		// bracket could make it overflow; Box's form is then used, so that
		// a limit is never infinite.
		if q := t1 * math.Pow(bracket, 1/h0); bracket > 0 && !math.IsInf(q, 0) && !math.IsNaN(q) {
			return q, QJacksonMudholkar
		}
	}
	g, h := t2/t1, t1*t1/t2
	return g * distuv.ChiSquared{K: h}.Quantile(conf), QBox
}

// FQuantile returns the conf quantile of the F(d1, d2) distribution.
func FQuantile(conf, d1, d2 float64) float64 { return distuv.F{D1: d1, D2: d2}.Quantile(conf) }

// ChiSquaredQuantile returns the conf quantile of the χ²(k) distribution.
func ChiSquaredQuantile(conf, k float64) float64 { return distuv.ChiSquared{K: k}.Quantile(conf) }
