package analysis

import (
	"math"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
)

// A table whose components each have a mildly heavy tail (every latent
// component a Student t with ten degrees of freedom, say) puts a clean
// sample beyond the normal-theory family-wise limits of T² or Q in one
// table of five or so, while the bulk of T² and Q still looks Gaussian to
// the quantile fit of FitTail: the heavy tail of such a sum comes from one
// term taking a large value, not from all of them growing together.
// ComponentTail measures that tail weight where it shows, in two places:
//
//   - the standardised retained scores t_ia/√λ_a, n·k values, fitted by
//     Student's t, σ·t_ν, by maximum likelihood (the scale profiled out by
//     the EM fixed point of Lange, Little & Taylor 1989, JASA 84:881–896).
//     The estimate is used as it is, without a pre-test: on Gaussian data
//     the likelihood peaks at the Gaussian end or at a large ν, whose limit
//     is normal theory's to within the sampling error of the limit itself;
//     the likelihood-ratio statistic against the Gaussian is reported as
//     the strength of the evidence;
//   - the variance of Q, which for Q = Σ_m λ_m U_m² with independent
//     unit-variance U_m is Σ λ_m² (2 + κ), κ the U_m's excess kurtosis:
//     a method-of-moments κ, used when it exceeds zero by more than
//     z₀.₉₅ normal-theory standard errors, at its upper 95 % bound, and
//     turned into the ν of a unit-variance t_ν by κ = 6/(ν − 4). The
//     discarded components' own scores cannot serve: where their
//     eigenvalues are equal, each estimated axis mixes many latent ones and
//     looks Gaussian by the central limit theorem, while Q, the sum of
//     squares, does not depend on the axes.
//
// The split between model and residual is the analysis's, not the data's:
// a latent component with a heavy tail may land in either space, and the
// retained scores alone are few on a small table, so T²'s limits use the
// heavier of the two. Q's use Q's own evidence to decide (see ForQ). The
// limits then follow from the tail of a sum of independent heavy-tailed
// terms, which is the tail of its largest term: P(Σ_m X_m > x) ~
// Σ_m P(X_m > x) as x → ∞ for subexponential X_m (the "single big jump";
// Embrechts, Klüppelberg & Mikosch 1997, Modelling Extremal Events, §1.3),
// smoothed by the spread of the other terms (ScoreTail.SumLimit). The
// outlier checks judge against the largest of this limit, the normal-theory
// one and FitTail's.

// scoreTailMaxValues caps the pooled values the fit reads: evenly spaced
// rows are taken beyond it, which keeps the fit's cost near a tenth of a
// second at any size while ν's standard error stays well below the
// difference between a t₁₀ and a t₃₀ tail.
const scoreTailMaxValues = 60000

// ScoreTail is the Student t law fitted to the pooled standardised scores.
type ScoreTail struct {
	// DF is the maximum-likelihood ν; +Inf when the likelihood is largest
	// at the Gaussian end (ν beyond 5000, where t and Gaussian agree to the
	// digits that matter), NaN when there was nothing to fit.
	DF float64
	// Scale is σ of σ·t_ν.
	Scale float64
	// LR is the likelihood-ratio statistic 2(ℓ_t − ℓ_Gauss), reported as
	// the strength of the evidence; Values the number of pooled values.
	LR     float64
	Values int
}

// Fitted reports whether the fit found a tail heavier than the Gaussian.
func (f ScoreTail) Fitted() bool { return f.DF > 0 && !math.IsInf(f.DF, 1) }

// FitScoreTail fits σ·t_ν to the standardised scores of the retained
// components (the columns of scores, eigenvalues λ_a) whose
// eigenvalue is not null, over the rows not marked in skip (the candidate
// outliers, which would otherwise widen the limits meant to catch them).
func FitScoreTail(scores mat.Matrix, eigenvalues []float64, skip []bool) ScoreTail {
	n, k := scores.Dims()
	var live []int
	for a := 0; a < k && a < len(eigenvalues); a++ {
		if eigenvalues[a] > NullRatio*eigenvalues[0] {
			live = append(live, a)
		}
	}
	rows := make([]int, 0, n)
	for i := range n {
		if i >= len(skip) || !skip[i] {
			rows = append(rows, i)
		}
	}
	if len(live) == 0 || len(rows) < 10 {
		return ScoreTail{DF: math.NaN()}
	}
	if step := (len(rows)*len(live) + scoreTailMaxValues - 1) / scoreTailMaxValues; step > 1 {
		kept := rows[:0]
		for j := 0; j < len(rows); j += step {
			kept = append(kept, rows[j])
		}
		rows = kept
	}
	// Each component is standardised by the root mean square of its
	// scores over the rows kept, not by its eigenvalue: samples left out
	// as candidate outliers inflate the eigenvalue of the component they
	// pull, and pooling components standardised to unequal scales would
	// make a scale mixture, a heavy tail of the fit's own making.
	scale := make([]float64, len(live))
	for c, a := range live {
		ss := 0.0
		for _, i := range rows {
			x := scores.At(i, a)
			ss += x * x
		}
		scale[c] = math.Sqrt(ss / float64(len(rows)))
	}
	u := make([]float64, 0, len(rows)*len(live))
	for _, i := range rows {
		for c, a := range live {
			if scale[c] > 0 {
				u = append(u, scores.At(i, a)/scale[c])
			}
		}
	}
	return fitStudentT(u)
}

// fitStudentT fits σ·t_ν (centre 0) to u by maximum likelihood and tests it
// against the centred Gaussian.
func fitStudentT(u []float64) ScoreTail {
	nf := float64(len(u))
	ss := 0.0
	for _, x := range u {
		ss += x * x
	}
	if !(ss > 0) {
		return ScoreTail{DF: math.NaN()}
	}
	v := ss / nf
	gauss := -nf / 2 * (math.Log(2*math.Pi*v) + 1)
	sigma2 := v
	profile := func(nu float64) float64 {
		sigma2 = profileScale(u, nu, sigma2)
		return studentLogLik(u, nu, sigma2)
	}
	// Golden-section search on log ν over [log tailDFMin, log tailDFMax].
	lo, hi := math.Log(tailDFMin), math.Log(tailDFMax)
	const g = 0.6180339887498949
	a, b := hi-g*(hi-lo), lo+g*(hi-lo)
	fa, fb := profile(math.Exp(a)), profile(math.Exp(b))
	for hi-lo > 1e-3 {
		if fa > fb {
			hi, b, fb = b, a, fa
			a = hi - g*(hi-lo)
			fa = profile(math.Exp(a))
		} else {
			lo, a, fa = a, b, fb
			b = lo + g*(hi-lo)
			fb = profile(math.Exp(b))
		}
	}
	nu := math.Exp((lo + hi) / 2)
	best := profile(nu)
	fit := ScoreTail{DF: math.Inf(1), Scale: math.Sqrt(v), LR: math.Max(0, 2*(best-gauss)), Values: len(u)}
	if nu < tailDFMax/2 {
		fit.DF, fit.Scale = nu, math.Sqrt(profileScale(u, nu, v))
	}
	return fit
}

// profileScale returns the maximum-likelihood σ² of σ·t_ν for fixed ν by
// the EM fixed point σ² = Σ w_i u_i² / N, w_i = (ν+1)/(ν + u_i²/σ²)
// (Lange, Little & Taylor 1989), started from start.
func profileScale(u []float64, nu, start float64) float64 {
	s2 := start
	for range 100 {
		sum := 0.0
		for _, x := range u {
			sum += (nu + 1) / (nu + x*x/s2) * x * x
		}
		next := sum / float64(len(u))
		if math.Abs(next-s2) <= 1e-10*s2 {
			return next
		}
		s2 = next
	}
	return s2
}

// studentLogLik is the log-likelihood of σ·t_ν, σ² = s2, at u.
func studentLogLik(u []float64, nu, s2 float64) float64 {
	lg1, _ := math.Lgamma((nu + 1) / 2)
	lg2, _ := math.Lgamma(nu / 2)
	c := lg1 - lg2 - 0.5*math.Log(nu*math.Pi*s2)
	sum := 0.0
	for _, x := range u {
		sum += math.Log1p(x * x / (s2 * nu))
	}
	return float64(len(u))*c - (nu+1)/2*sum
}

// SumLimit returns the x at which the tail of S = Σ_m w_m U_m², U_m
// independent σ·t_ν, equals 1 − conf, by the single big jump smoothed by
// the rest: each term takes its own tail while the sum of the others,
// S₋ₘ, is close to normal with its mean and variance,
//
//	P(S > x) ≈ Σ_m E[P(w_m U² > x − S₋ₘ)], S₋ₘ ~ N(Σ_{j≠m} w_j E U², Σ_{j≠m} w_j² Var U²),
//
// the expectation by 24-point Gauss–Hermite quadrature (Golub & Welsch
// 1969, Math. Comp. 23:221–230; gonum's quad.Hermite). Without the
// smoothing, the plain big jump puts the others at their means and
// understates the tail where they are many. It returns NaN without a fit;
// for ν ≤ 4, where Var U² is infinite, the others stay at their means.
func (f ScoreTail) SumLimit(weights []float64, conf float64) float64 {
	if !f.Fitted() || !(f.DF > 2) {
		return math.NaN()
	}
	t := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: f.DF}
	s2 := f.Scale * f.Scale
	mean := s2 * f.DF / (f.DF - 2) // E U²
	varU2 := 0.0                   // Var U² = E U⁴ − (E U²)²
	if f.DF > 4 {
		varU2 = s2*s2*3*f.DF*f.DF/((f.DF-2)*(f.DF-4)) - mean*mean
	}
	total, total2 := 0.0, 0.0
	var live []float64
	for _, w := range weights {
		if w > 0 {
			live = append(live, w)
			total += w * mean
			total2 += w * w * varU2
		}
	}
	if len(live) == 0 {
		return math.NaN()
	}
	nodes, hw := hermiteRule()
	term := func(w, y float64) float64 { // P(w U² > y)
		if y <= 0 {
			return 1
		}
		return 2 * t.Survival(math.Sqrt(y/w)/f.Scale)
	}
	tail := func(x float64) float64 {
		p := 0.0
		for _, w := range live {
			mu := total - w*mean
			sd := math.Sqrt(math.Max(0, total2-w*w*varU2))
			if sd == 0 {
				p += term(w, x-mu)
				continue
			}
			for i, z := range nodes {
				p += hw[i] * term(w, x-mu-math.Sqrt2*sd*z)
			}
		}
		return p
	}
	target := 1 - conf
	lo, hi := total, 2*total+1
	for tail(hi) > target {
		lo, hi = hi, 2*hi
		if math.IsInf(hi, 1) {
			return math.NaN()
		}
	}
	for range 100 {
		mid := (lo + hi) / 2
		if tail(mid) > target {
			lo = mid
		} else {
			hi = mid
		}
		if hi-lo <= 1e-10*hi {
			break
		}
	}
	return (lo + hi) / 2
}

// hermiteRule returns 24 Gauss–Hermite nodes and their weights divided by
// √π, so that Σ wᵢ f(√2 zᵢ) ≈ E f(Z) for a standard normal Z.
func hermiteRule() (nodes, weights []float64) {
	nodes, weights = make([]float64, 24), make([]float64, 24)
	quad.Hermite{}.FixedLocations(nodes, weights, math.Inf(-1), math.Inf(1))
	for i := range weights {
		weights[i] /= math.SqrtPi
	}
	return nodes, weights
}

// FitSumKurtosis estimates, from the values q of S = Σ_m w_m U_m² with
// independent unit-variance U_m, the excess kurtosis κ the U_m share, by
// the method of moments: Var S = Σ w_m² (2 + κ). It returns κ and the
// one-sided z statistic of κ > 0 against its normal-theory standard error,
// Var(s²) ≈ (κ₄ + 2κ₂²)/N with the cumulants κ₂ = 2Σw², κ₄ = 48Σw⁴ of
// Σ w_m χ²₁ (Kendall & Stuart 1977, §10.5). Values marked in skip are left
// out.
func FitSumKurtosis(q, w []float64, skip []bool) (kappa, z float64) {
	var s1, s2, n float64
	for i, x := range q {
		if (i < len(skip) && skip[i]) || math.IsNaN(x) {
			continue
		}
		s1 += x
		s2 += x * x
		n++
	}
	var w2, w4 float64
	for _, v := range w {
		if v > 0 {
			w2 += v * v
			w4 += v * v * v * v
		}
	}
	if n < 10 || !(w2 > 0) {
		return math.NaN(), math.NaN()
	}
	mean := s1 / n
	v := (s2 - n*mean*mean) / (n - 1)
	kappa = v/w2 - 2
	se := math.Sqrt((48*w4 + 8*w2*w2) / n)
	return kappa, (v - 2*w2) / se
}

// kurtosisZ is the one-sided 5 % point of the standard normal, the level
// at which Q's excess variance counts as a heavier tail (TailTestAlpha).
var kurtosisZ = distuv.UnitNormal.Quantile(1 - TailTestAlpha)

// ComponentTail is the tail weight of the components: the two fits and the
// unit-variance t_ν the limits use.
type ComponentTail struct {
	Scores ScoreTail // the retained scores' Student t fit
	// QKurtosis is the excess kurtosis κ Q's variance implies, and QZ its
	// z statistic against zero; QDF = 4 + 6/κ_U, κ_U κ's upper 95 % bound,
	// when z passes its one-sided 5 % point, else +Inf.
	QKurtosis, QZ, QDF float64
	// DF is the heavier accepted ν of the two, the one T²'s limits use
	// (+Inf: normal theory holds); Q's limits use ForQ.
	DF float64
}

// Fitted reports whether either fit found a tail heavier than the Gaussian.
func (c ComponentTail) Fitted() bool { return c.DF > 2 && !math.IsInf(c.DF, 1) }

// ForQ returns the fit Q's limits use. Q's own evidence decides whether
// its tail is heavier: the retained scores may be heavy-tailed for reasons
// of their own (a skewed or clustered process that the model describes),
// which says nothing about the residuals. Once Q's variance has shown a
// heavier tail, its ν is the heavier of Q's estimate and the scores' lower
// bound (whether or not the scores' own test rejected): the
// moment estimate from Q is biased towards light tails, because the
// samples left out as candidate outliers are the ones that carry most of a
// heavy tail's fourth moment.
func (c ComponentTail) ForQ() ComponentTail {
	q := c
	q.DF = c.QDF
	if !(q.DF > 4) || math.IsInf(q.DF, 1) {
		q.DF = math.Inf(1)
		return q
	}
	if c.Scores.Fitted() {
		q.DF = math.Min(q.DF, c.Scores.DF)
	}
	return q
}

// FitComponentTail measures the components' tail weight from the retained
// scores (columns of scores, eigenvalues retained) and from Q (values q,
// discarded eigenvalues discarded), leaving out the rows marked in skip.
func FitComponentTail(scores mat.Matrix, retained []float64, q, discarded []float64, skip []bool) ComponentTail {
	c := ComponentTail{Scores: FitScoreTail(scores, retained, skip), QDF: math.Inf(1), QZ: math.NaN()}
	if len(discarded) > 0 && q != nil {
		c.QKurtosis, c.QZ = FitSumKurtosis(q, discarded, skip)
		if c.QZ > kurtosisZ && c.QKurtosis > 0 {
			// The upper one-sided 95 % bound κ̂ + z₀.₉₅·SE = κ̂(1 + z₀.₉₅/z):
			// the moment estimate is biased towards light tails, since the
			// candidate outliers left out carry most of a heavy tail's
			// fourth moment.
			upper := c.QKurtosis * (1 + kurtosisZ/c.QZ)
			c.QDF = math.Min(tailDFMax, 4+6/upper)
		}
	}
	c.DF = math.Min(c.Scores.DF, c.QDF)
	if !(c.DF > 2) {
		c.DF = math.Inf(1)
	}
	return c
}

// unitT is the unit-variance Student t_ν law of one standardised term.
func (c ComponentTail) unitT() ScoreTail {
	return ScoreTail{DF: c.DF, Scale: math.Sqrt((c.DF - 2) / c.DF)}
}

// FamilyLimit returns the single-big-jump limit at per-sample confidence
// conf of S = Σ_m w_m U_m², U_m independent unit-variance t_ν (see
// ScoreTail.SumLimit); NaN without a fit.
func (c ComponentTail) FamilyLimit(weights []float64, conf float64) float64 {
	if !c.Fitted() {
		return math.NaN()
	}
	return c.unitT().SumLimit(weights, conf)
}

// CountLimit returns the conf quantile (a central one, 95 %) of
// S = Σ_m w_m U_m² under the fit by matching S's mean Σw and variance
// Σw²(2 + κ), κ = 6/(ν − 4), with a scaled χ², g·χ²_h (the moment
// matching of Box 1954, Ann. Math. Statist. 25:290–302). The big-jump law
// describes only the far tail, the binomial count test needs the 95 %
// point. NaN without a fit or when ν ≤ 4 (no fourth moment).
func (c ComponentTail) CountLimit(weights []float64, conf float64) float64 {
	if !c.Fitted() || !(c.DF > 4) {
		return math.NaN()
	}
	var w1, w2 float64
	for _, w := range weights {
		if w > 0 {
			w1 += w
			w2 += w * w
		}
	}
	if !(w1 > 0) {
		return math.NaN()
	}
	v := w2 * (2 + 6/(c.DF-4))
	g, h := v/(2*w1), 2*w1*w1/v
	return g * distuv.ChiSquared{K: h}.Quantile(conf)
}
