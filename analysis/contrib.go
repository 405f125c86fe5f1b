package analysis

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
)

// ContributionConf is the confidence of the per-variable contribution
// limits: the 99 % of the T² and Q limits that samples.csv reports beside
// the family-wise ones (Westerhuis, Gurden & Smilde 2000 draw 95 % and
// 99 % limits on their contribution plots).
const ContributionConf = Conf99

// quantileCells bounds the T² contributions FlaggedContributions keeps for
// their quantiles (32 MB), and quantileRowsMin is the fewest reference
// samples it keeps however wide the table: 2000 samples leave 20 beyond
// their 99th percentile, enough to place it (common practice). Variables,
// not constants, so that a test can make the bound bite on a small table.
var (
	quantileCells   = 4_000_000
	quantileRowsMin = 2000
)

// RunContributions are, for the samples an audit's outlier checks flag,
// the per-variable contributions to their T² and Q, with per-variable
// limits that say which contributions are unusual for that variable.
type RunContributions struct {
	// Flagged lists the samples beyond a family-wise limit — those the
	// T² check sets aside (Limits.T2Flagged) and those whose Q passes
	// Limits.QFamily — worst first; Contributions follows its order.
	Flagged       []int
	Contributions []Contribution
	// T2Limit and QLimit are, per variable, the ContributionConf limits of
	// the contributions to T² and to Q, estimated from the samples that
	// are not flagged (Westerhuis, Gurden & Smilde 2000, Chemometr.
	// Intell. Lab. Syst. 51:95–114, who take them from the contributions
	// of the reference samples):
	//
	//	T²: the empirical conf quantile of the reference contributions
	//	    c_ij (predictionQuantile); a normal approximation, mean + z·sd, was
	//	    passed by about 4 % of clean contributions at a nominal 1 %
	//	    (TestContributionLimitRates), since c_ij = z_ij·w_ij is a
	//	    product of correlated normals and skewed;
	//	Q:  g_j · χ²_conf(h_j), g_j = v_j/(2m_j), h_j = 2m_j²/v_j, with
	//	    m_j and v_j the mean and variance of the reference squared
	//	    residuals e_ij² (Box's 1954 scaled χ², matched in two moments).
	//
	// A limit that cannot be estimated (fewer than two reference samples,
	// or a variable the model reconstructs exactly) is NaN.
	T2Limit, QLimit []float64
	// Reference is the number of samples the limits were estimated from.
	Reference int
}

// FlaggedContributions computes the contributions of the samples the
// outlier checks flag in r, and the per-variable limits. The T²
// contributions add up to the T² of samples.csv, so they leave out the
// null components that T² leaves out; the Q contributions are the squared
// residuals and add up to Q.
func FlaggedContributions(r *Result) RunContributions {
	s := r.Samples
	n, p := r.Z.Dims()
	k := r.Retained
	v := mat.DenseCopyOf(r.RetainedLoadings())
	eig := r.Decomp.Eigenvalues
	live := make([]bool, k)
	for a := range live {
		live[a] = eig[a] > NullRatio*eig[0]
	}
	flagged := familyFlagged(s)
	rc := RunContributions{Flagged: flagged}
	for _, i := range flagged {
		rc.Contributions = append(rc.Contributions, contributionOf(i, r.Z.RawRowView(i), r.Scores.RawRowView(i), v, eig, live))
	}
	skip := make([]bool, n)
	for _, i := range flagged {
		skip[i] = true
	}
	// Welford's running moments for Q, in one pass over every reference
	// sample. The T² contributions are kept for their quantiles, from
	// every stride-th reference sample when keeping all of them would pass
	// quantileCells values: the 99th percentile of tens of thousands is
	// as good as that of millions, and memory stays bounded.
	nRef := n - len(flagged)
	rowsCap := max(quantileRowsMin, quantileCells/max(p, 1))
	stride := (nRef + rowsCap - 1) / max(rowsCap, 1)
	stride = max(stride, 1)
	kept := (nRef + stride - 1) / stride
	t2Ref := make([]float64, p*kept)
	qMean, qM2 := make([]float64, p), make([]float64, p)
	c := Contribution{T2: make([]float64, p), Q: make([]float64, p), Residual: make([]float64, p)}
	for i := 0; i < n; i++ {
		if skip[i] {
			continue
		}
		contributionInto(&c, r.Z.RawRowView(i), r.Scores.RawRowView(i), v, eig, live)
		ordinal := rc.Reference
		rc.Reference++
		m := float64(rc.Reference)
		for j := 0; j < p; j++ {
			if ordinal%stride == 0 {
				t2Ref[j*kept+ordinal/stride] = c.T2[j]
			}
			d := c.Q[j] - qMean[j]
			qMean[j] += d / m
			qM2[j] += d * (c.Q[j] - qMean[j])
		}
	}
	rc.T2Limit, rc.QLimit = make([]float64, p), make([]float64, p)
	for j := 0; j < p; j++ {
		rc.T2Limit[j], rc.QLimit[j] = math.NaN(), math.NaN()
		if rc.Reference < 2 {
			continue
		}
		df := float64(rc.Reference - 1)
		ref := t2Ref[j*kept : (j+1)*kept]
		slices.Sort(ref)
		rc.T2Limit[j] = predictionQuantile(ref, ContributionConf)
		rc.QLimit[j] = QContributionLimit(qMean[j], qM2[j]/df, ContributionConf)
	}
	return rc
}

// predictionQuantile returns the q quantile of sorted values as a limit
// for a sample not among them: the order statistic of rank h = q(m+1),
// interpolated linearly (Hyndman & Fan 1996, Amer. Statist. 50:361–365,
// definition 6; numpy's method "weibull"). A new value from the same law
// passes the r-th of m order statistics with probability 1 − r/(m+1), so
// this rank makes that chance 1 − q; R's and numpy's default (definition
// 7) passes about 2 % for q = 0.99 and m = 100. Ranks beyond the data
// are clamped to the extreme values.
func predictionQuantile(sorted []float64, q float64) float64 {
	m := len(sorted)
	if m == 0 {
		return math.NaN()
	}
	h := q * float64(m+1)
	lo := int(math.Floor(h))
	switch {
	case lo < 1:
		return sorted[0]
	case lo >= m:
		return sorted[m-1]
	}
	return sorted[lo-1] + (h-float64(lo))*(sorted[lo]-sorted[lo-1])
}

// QContributionLimit is the conf quantile of the scaled χ² g·χ²(h) whose
// mean and variance are those of a variable's reference squared residuals:
// g = variance/(2·mean), h = 2·mean²/variance (Box 1954; used for
// contributions by Westerhuis, Gurden & Smilde 2000). It is NaN when the
// mean or variance is not positive: the variable is then reconstructed
// exactly and any residual in it is unusual.
func QContributionLimit(mean, variance, conf float64) float64 {
	if !(mean > 0) || !(variance > 0) || math.IsInf(mean, 0) || math.IsInf(variance, 0) {
		return math.NaN()
	}
	g, h := variance/(2*mean), 2*mean*mean/variance
	return g * distuv.ChiSquared{K: h}.Quantile(conf)
}

// familyFlagged returns the samples the outlier checks flag — set aside
// by the T² check, or with Q beyond the family-wise limit — worst first: a
// sample's severity is the larger of its ratios to the family-wise limits
// it passes (infinite for a statistic that is not a finite number), and
// ties keep the input order.
func familyFlagged(s SampleStats) []int {
	l := s.Limits
	t2Set := map[int]bool{}
	if l.T2Family > 0 {
		if l.T2Flagged == nil && l.T2Phase.T2 == nil {
			_, idx := CountAbove(s.T2, l.T2Family)
			for _, i := range idx {
				t2Set[i] = true
			}
		}
		for _, i := range l.T2Flagged {
			t2Set[i] = true
		}
	}
	hasQ := l.QMethod != QNone && l.QFamily > 0
	var out []ranked
	for i := range s.T2 {
		inT2, inQ := t2Set[i], hasQ && i < len(s.Q) && above(s.Q[i], l.QFamily)
		if !inT2 && !inQ {
			continue
		}
		score := 0.0
		if inT2 {
			score = s.T2[i] / l.T2Family
		}
		if inQ {
			score = math.Max(score, s.Q[i]/l.QFamily)
		}
		if math.IsNaN(s.T2[i]) || math.IsInf(s.T2[i], 0) || i < len(s.Q) && (math.IsNaN(s.Q[i]) || math.IsInf(s.Q[i], 0)) {
			score = math.Inf(1)
		}
		out = append(out, ranked{i, score})
	}
	return worstFirst(out)
}
