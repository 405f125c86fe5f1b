package analysis

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/mathext"
)

// Confidence levels of the control limits.
const (
	Conf95 = 0.95
	Conf99 = 0.99
)

// FamilyAlpha is the family-wise error rate of the outlier checks: the
// chance, on clean data, that any of the n samples passes its family-wise
// limit. Šidák's correction makes that chance exactly α for independent
// samples, so α is each check's false-alarm rate on clean tables; the
// calibration target of at most 2 % per check (issue 12) rules out the
// 5 % level, and 1 % is the conventional stricter one (common practice).
const FamilyAlpha = 0.01

// Limits are the control limits for the per-sample statistics.
type Limits struct {
	T2_95, T2_99 float64 // Hotelling T², beta form for the model's own samples
	Q95, Q99     float64 // Q residual
	QMethod      QMethod
	Leverage     float64 // 3(k+1)/n
	// FamilyConf is the per-sample confidence (1 − α)^(1/n) that makes
	// the chance of any of n independent samples passing its limit
	// exactly α = FamilyAlpha (Šidák 1967, JASA 62:626–633); T2Family and
	// QFamily are the T² and Q limits at that confidence.
	FamilyConf        float64
	T2Family, QFamily float64
	// The outlier checks judge against the larger of the normal-theory
	// limit and the limit of a scaled-F law fitted to the statistic's own
	// bulk (FitTail), so that a clean table with a mildly heavy tail does
	// not alarm. T2Family and QFamily above are those larger limits;
	// T2FamilyNormal and QFamilyNormal the normal-theory ones; T2Count95
	// and QCount95 the larger 95 % limits the binomial count test uses.
	// T2_95 … Q99 stay normal theory: samples.csv and the plots show them.
	T2Tail, QTail                 TailFit
	T2FamilyNormal, QFamilyNormal float64
	T2Count95, QCount95           float64
	// Components is the tail weight of the components themselves
	// (FitComponentTail); T2FamilyComponent and QFamilyComponent are the
	// family-wise limits under its t_ν law, NaN without a fit.
	Components                          ComponentTail
	T2FamilyComponent, QFamilyComponent float64
	// T2Phase is the Phase I re-estimation (ReestimateT2) the T² check
	// judges by; T2Flagged the samples it sets aside beyond T2Family.
	T2Phase   ReestimatedT2
	T2Flagged []int
}

// SidakConfidence returns (1 − α)^(1/n), the per-test confidence at which n
// independent tests together keep a family-wise error rate of α (Šidák
// 1967, JASA 62:626–633). It is computed as exp(log1p(−α)/n) so that
// 1 − conf keeps its digits for large n.
func SidakConfidence(alpha float64, n int) float64 {
	if n < 1 {
		return math.NaN()
	}
	return math.Exp(math.Log1p(-alpha) / float64(n))
}

// BinomialUpperTail returns P(X ≥ x) for X ~ Binomial(n, p): the chance of
// at least x of n samples passing a limit each passes with probability p.
// It is the regularised incomplete beta function I_p(x, n − x + 1)
// (Abramowitz & Stegun 1964, 26.5.24), which keeps its relative accuracy
// far into the tail where 1 − CDF would cancel.
func BinomialUpperTail(x, n int, p float64) float64 {
	switch {
	case x <= 0:
		return 1
	case x > n:
		return 0
	}
	return mathext.RegIncBeta(float64(x), float64(n-x+1), p)
}

// SampleStats are the per-sample diagnostics of a model with k components.
type SampleStats struct {
	T2       []float64 // Σ_a t_ia²/λ_a over the retained, non-null components
	Q        []float64 // ‖z_i − ẑ_i‖², the squared residual off the retained components
	Leverage []float64 // 1/n + T²_i/(n−1)
	Limits   Limits
	// Dominance is, per retained component, the largest share one sample
	// has of the component's variance, t_ia²/Σ_j t_ja², and that sample.
	Dominance       []float64
	DominanceSample []int
	// Influence is each sample's exact leave-one-out effect on the
	// retained components (LeaveOneOut).
	Influence Influence
}

// LeverageFactor is the multiplier in the leverage rule h > c(k+1)/n: the
// conservative 3p/n form of Hoaglin & Welsch's (1978, Amer. Statist.
// 32:17–22) 2p/n rule, with p = k+1 parameters (k components and the mean).
const LeverageFactor = 3

// ComputeSampleStats computes T², Q, leverage and dominance for the
// preprocessed data z, the retained loadings v (p × k), their scores t
// (n × k) and all eigenvalues (the discarded ones set the Q limits).
//
// Hotelling's T² (Hotelling 1931; Jackson 1991 §1.7) is the squared
// Mahalanobis distance of a sample within the model plane. Q, also called the
// squared prediction error, is its squared distance from that plane (Jackson
// & Mudholkar 1979). Leverage is the diagonal of the hat matrix of a
// regression on the scores with intercept: h_i = 1/n + Σ_a t_ia²/((n−1)λ_a).
func ComputeSampleStats(z *mat.Dense, v, t mat.Matrix, eigenvalues []float64) SampleStats {
	n, p := z.Dims()
	_, k := t.Dims()
	s := SampleStats{
		T2:              make([]float64, n),
		Q:               make([]float64, n),
		Leverage:        make([]float64, n),
		Dominance:       make([]float64, k),
		DominanceSample: make([]int, k),
	}
	live := make([]bool, k)
	for a := 0; a < k; a++ {
		live[a] = eigenvalues[a] > NullRatio*eigenvalues[0]
	}
	vk := mat.DenseCopyOf(v)
	row := make([]float64, p)
	sumSq := make([]float64, k)
	for i := 0; i < n; i++ {
		t2 := 0.0
		for a := 0; a < k; a++ {
			ta := t.At(i, a)
			sumSq[a] += ta * ta
			if live[a] {
				t2 += ta * ta / eigenvalues[a]
			}
		}
		s.T2[i] = t2
		s.Leverage[i] = 1/float64(n) + t2/float64(n-1)
		copy(row, z.RawRowView(i))
		for a := 0; a < k; a++ {
			ta := t.At(i, a)
			for j := 0; j < p; j++ {
				row[j] -= ta * vk.At(j, a)
			}
		}
		q := 0.0
		for _, r := range row {
			q += r * r
		}
		s.Q[i] = q
	}
	for a := 0; a < k; a++ {
		for i := 0; i < n; i++ {
			ta := t.At(i, a)
			if sumSq[a] > 0 {
				if share := ta * ta / sumSq[a]; share > s.Dominance[a] {
					s.Dominance[a], s.DominanceSample[a] = share, i
				}
			}
		}
	}
	s.Limits = TrainingLimits(n, k, eigenvalues)
	var discarded []float64
	if k < len(eigenvalues) {
		discarded = eigenvalues[k:]
	}
	s.Limits.AdaptTails(t, s.T2, s.Q, eigenvalues[:k], discarded)
	return s
}

// AdaptTails raises the family-wise and count limits of T² and Q where the
// data's own tails are heavier than normal theory allows, in two ways, and
// keeps the largest limit:
//
//   - FitTail fits a scaled F to the bulk of T² (d₁ = k) and of Q (d₁ =
//     Box's h = θ₁²/θ₂ of the discarded eigenvalues): a tail in which all
//     terms grow together, as under a multivariate t;
//   - FitComponentTail fits the tail weight of the components themselves
//     from the retained scores (columns of scores, eigenvalues retained)
//     and from Q's variance: a tail in which one term at a time is large.
//
// Samples beyond a normal-theory family-wise limit are left out of both
// fits. Without a heavier tail the limits stay normal theory.
func (l *Limits) AdaptTails(scores mat.Matrix, t2, q, retained, discarded []float64) {
	k := len(retained)
	l.T2FamilyNormal, l.QFamilyNormal = l.T2Family, l.QFamily
	l.T2Count95, l.QCount95 = l.T2_95, l.Q95
	l.T2FamilyComponent, l.QFamilyComponent = math.NaN(), math.NaN()
	l.T2Tail = FitTail(t2, float64(k), l.T2FamilyNormal, func(c float64) float64 { return T2LimitModel(len(t2), k, c) })
	if l.T2Tail.Fitted() {
		l.T2Family = math.Max(l.T2Family, l.T2Tail.Quantile(l.FamilyConf))
		l.T2Count95 = math.Max(l.T2_95, l.T2Tail.Quantile(Conf95))
	}
	var t1, t2s float64
	for _, d := range discarded {
		d = math.Max(d, 0)
		t1 += d
		t2s += d * d
	}
	l.QTail = TailFit{DF: math.Inf(1)}
	hasQ := l.QMethod != QNone && t2s > 0
	if hasQ {
		l.QTail = FitTail(q, t1*t1/t2s, l.QFamilyNormal, func(c float64) float64 { q, _ := QLimit(discarded, c); return q })
		if l.QTail.Fitted() {
			l.QFamily = math.Max(l.QFamily, l.QTail.Quantile(l.FamilyConf))
			l.QCount95 = math.Max(l.Q95, l.QTail.Quantile(Conf95))
		}
	}
	live := make([]bool, k)
	ones := make([]float64, 0, k)
	for a, e := range retained {
		if live[a] = e > NullRatio*retained[0]; live[a] {
			ones = append(ones, 1)
		}
	}
	_, startT2 := CountAbove(t2, l.T2FamilyNormal)
	phase := ReestimateT2(scores, live, l.FamilyConf, 0, startT2)
	skip := make([]bool, len(t2))
	for _, i := range phase.SetAside {
		skip[i] = true
	}
	for i := range skip {
		skip[i] = skip[i] || (phase.T2 == nil && above(t2[i], l.T2FamilyNormal)) || (hasQ && above(q[i], l.QFamilyNormal))
	}
	qValues := q
	if !hasQ {
		qValues, discarded = nil, nil
	}
	l.Components = FitComponentTail(scores, retained, qValues, discarded, skip)
	raise := func(limit *float64, candidate float64) {
		if candidate > *limit {
			*limit = candidate
		}
	}
	if l.Components.Fitted() {
		l.T2FamilyComponent = l.Components.FamilyLimit(ones, l.FamilyConf)
		raise(&l.T2Family, l.T2FamilyComponent)
		raise(&l.T2Count95, l.Components.CountLimit(ones, Conf95))
		if cq := l.Components.ForQ(); hasQ && cq.Fitted() {
			l.QFamilyComponent = cq.FamilyLimit(discarded, l.FamilyConf)
			raise(&l.QFamily, l.QFamilyComponent)
			raise(&l.QCount95, cq.CountLimit(discarded, Conf95))
		}
	}
	l.judgeT2(scores, live, t2, phase)
}

// judgeT2 settles which samples the T² check flags. Without a heavier
// tail the normal-theory Phase I set stands; with one, the iteration runs
// again with its limits raised to the tail's, since the first run's
// normal-theory limits would set aside the tail itself. T2Family becomes
// the limit the flagged samples passed: the new-sample one when some are
// set aside, else the in-sample one (each raised to the tail's).
func (l *Limits) judgeT2(scores mat.Matrix, live []bool, t2 []float64, phase ReestimatedT2) {
	if phase.T2 == nil {
		_, l.T2Flagged = CountAbove(t2, l.T2Family)
		return
	}
	floor := math.NaN()
	if l.T2Family > l.T2FamilyNormal {
		floor = l.T2Family
		// Start from the first run's set as well as from the samples
		// beyond the raised limit: samples that pull a component of their
		// own have an in-sample T² near n/2 at most, below a raised limit,
		// and only the re-estimation shows how far out they are.
		_, start := CountAbove(t2, l.T2Family)
		for _, i := range phase.SetAside {
			if !slices.Contains(start, i) {
				start = append(start, i)
			}
		}
		phase = ReestimateT2(scores, live, l.FamilyConf, floor, start)
	}
	l.T2Phase = phase
	l.T2Flagged = phase.SetAside
	if len(phase.SetAside) > 0 {
		l.T2Family = phase.LimitNew
	} else {
		l.T2Family = math.Max(l.T2Family, phase.LimitKept)
	}
}

// TrainingLimits returns the control limits for the samples of a model with k
// components built from n samples with the given eigenvalues (all of them).
func TrainingLimits(n, k int, eigenvalues []float64) Limits {
	var l Limits
	l.T2_95, l.T2_99 = T2LimitModel(n, k, Conf95), T2LimitModel(n, k, Conf99)
	var discarded []float64
	if k < len(eigenvalues) {
		discarded = eigenvalues[k:]
	}
	l.Q95, l.QMethod = QLimit(discarded, Conf95)
	l.Q99, _ = QLimit(discarded, Conf99)
	l.Leverage = LeverageFactor * float64(k+1) / float64(n)
	l.FamilyConf = SidakConfidence(FamilyAlpha, n)
	l.T2Family = T2LimitModel(n, k, l.FamilyConf)
	l.QFamily, _ = QLimit(discarded, l.FamilyConf)
	return l
}

// Beyond lists, for sample i, the limits it passes: "t2-99" (which implies
// t2-95) or "t2-95", likewise "q-99" or "q-95", then "t2-family" and
// "q-family" for the family-wise limits, "leverage", and "influence" when
// leaving the sample out turns the retained subspace beyond its bootstrap
// yardstick.
func (s SampleStats) Beyond(i int) []string {
	var out []string
	l := s.Limits
	switch {
	case above(s.T2[i], l.T2_99):
		out = append(out, "t2-99")
	case above(s.T2[i], l.T2_95):
		out = append(out, "t2-95")
	}
	if l.QMethod != QNone {
		switch {
		case above(s.Q[i], l.Q99):
			out = append(out, "q-99")
		case above(s.Q[i], l.Q95):
			out = append(out, "q-95")
		}
	}
	// A limit of zero is no limit (a Limits value built without the
	// family-wise fields).
	if l.T2Family > 0 && l.flaggedT2(s.T2, i) {
		out = append(out, "t2-family")
	}
	if l.QMethod != QNone && l.QFamily > 0 && above(s.Q[i], l.QFamily) {
		out = append(out, "q-family")
	}
	if above(s.Leverage[i], l.Leverage) {
		out = append(out, "leverage")
	}
	if inf := s.Influence; i < len(inf.Angle) && i < len(inf.Limit) && above(inf.Angle[i], inf.Limit[i]) {
		out = append(out, "influence")
	}
	return out
}

// flaggedT2 reports whether the T² check flags sample i: one of
// T2Flagged when the limits were adapted (AdaptTails), else beyond
// T2Family.
func (l Limits) flaggedT2(t2 []float64, i int) bool {
	if l.T2Flagged == nil && l.T2Phase.T2 == nil {
		return above(t2[i], l.T2Family)
	}
	for _, j := range l.T2Flagged {
		if j == i {
			return true
		}
	}
	return false
}

func above(x, limit float64) bool { return !math.IsNaN(limit) && x > limit }

// CountAbove returns how many values exceed limit, and their indices.
func CountAbove(values []float64, limit float64) (int, []int) {
	var idx []int
	for i, v := range values {
		if above(v, limit) {
			idx = append(idx, i)
		}
	}
	return len(idx), idx
}
