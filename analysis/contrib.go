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
	//	    c_ij (linear interpolation between order statistics, as
	//	    numpy.percentile); a normal approximation, mean + z·sd, was
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
	// Welford's running moments for Q, one pass; the T² contributions are
	// kept, variable by variable, for their quantiles.
	nRef := n - len(flagged)
	t2Ref := make([]float64, p*nRef)
	qMean, qM2 := make([]float64, p), make([]float64, p)
	for i := 0; i < n; i++ {
		if skip[i] {
			continue
		}
		c := contributionOf(i, r.Z.RawRowView(i), r.Scores.RawRowView(i), v, eig, live)
		rc.Reference++
		m := float64(rc.Reference)
		for j := 0; j < p; j++ {
			t2Ref[j*nRef+rc.Reference-1] = c.T2[j]
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
		ref := t2Ref[j*nRef : (j+1)*nRef]
		slices.Sort(ref)
		rc.T2Limit[j] = percentile(ref, 100*ContributionConf)
		rc.QLimit[j] = QContributionLimit(qMean[j], qM2[j]/df, ContributionConf)
	}
	return rc
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
	type ranked struct {
		i     int
		score float64
	}
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
	slices.SortStableFunc(out, func(a, b ranked) int {
		switch {
		case a.score > b.score:
			return -1
		case a.score < b.score:
			return 1
		}
		return 0
	})
	idx := make([]int, len(out))
	for j, r := range out {
		idx[j] = r.i
	}
	return idx
}
