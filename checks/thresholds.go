package checks

import "pcqc/analysis"

// Every threshold the checks use, each beside its source.

// Correctness of the decomposition. These are facts of the trade: in exact
// arithmetic the preprocessed data have zero column means, loadings are
// orthonormal, scores are uncorrelated and each eigenvalue equals the variance
// of its scores. The limits allow for rounding in double precision
// (ε ≈ 2.2e-16) with a wide margin, following the common practice of
// accepting errors up to about √ε·scale, so that any failure means a real
// error in the method rather than rounding.
const (
	// CenteringLimit bounds max |column mean| / largest column scale.
	CenteringLimit = 1e-8
	// OrthonormalityLimit bounds max |VᵀV − I| (loadings are unit-free).
	OrthonormalityLimit = 1e-8
	// ScoreCorrelationLimit bounds the largest off-diagonal |correlation|
	// between retained score columns.
	ScoreCorrelationLimit = 1e-6
	// VarianceMatchLimit bounds max |var(t_a) − λ_a| / λ_a.
	VarianceMatchLimit = 1e-6
)

const sourceFactOfTrade = "fact of the trade (exact in theory); rounding allowance: common practice"

// Data adequacy.
const (
	// MissingShareLimit: dropping more than 5 % of the rows, or imputing
	// more than 5 % of the cells with means, changes the covariance
	// structure enough to mention (common practice).
	MissingShareLimit = 0.05
	// CensoredShareLimit: substituting a constant (L/2, L/√2) for cells
	// below a detection limit is acceptable only while they are fewer than
	// 15 % of a variable's values; from 15 % to 50 % the guidance is to
	// adjust the estimates (Cohen's method, trimmed or Winsorized mean), and
	// beyond 50 % substitution is inappropriate. US EPA (2000) Guidance for
	// Data Quality Assessment: Practical Methods for Data Analysis, EPA
	// QA/G-9 (QA00 update), EPA/600/R-96/084, section 4.7 (guidelines for
	// analysing data with nondetects; the 15/50 % bands as recalled from
	// that table, cross-checked against monitoring plans that apply them).
	CensoredShareLimit = 0.15
	// ImputationChangeLimit and ImputationIterationCap: the iterative
	// imputation (Josse & Husson 2012) has converged when the imputed
	// cells change by less than 1e-9 of the preprocessed data's norm; it
	// fails when the cap of 1000 iterations is reached first (common
	// practice).
	ImputationChangeLimit  = analysis.ImputeTolerance
	ImputationIterationCap = analysis.ImputeMaxIterations
	// VariableMissingShareLimit: a variable missing in more than 20 % of
	// the rows read is flagged, whatever the policy: the "80 % rule" keeps
	// a variable only when it is observed in at least 80 % of the samples
	// (Bijlsma et al. 2006, Anal. Chem. 78:567–574, after Smilde et al.
	// 2005, Anal. Chem. 77:6729–6736; from memory, not checked against the
	// paper's text). Imputing beyond that share invents most of what the
	// variable contributes to the components.
	VariableMissingShareLimit = 0.20
	// MinSamplesPerVariable: n ≥ 5p (common practice; e.g. Gorsuch 1983,
	// Factor Analysis, 2nd ed., recommends at least five subjects per
	// variable). Information only: sample-size never warns on it, since no
	// fixed ratio predicts stable components (MacCallum, Widaman, Zhang &
	// Hong 1999, Psychol. Methods 4:84–99).
	MinSamplesPerVariable = 5
	// VarianceRatioLimit: without scaling, a variable whose variance exceeds
	// another's by more than 100× dominates the first component (common
	// practice).
	VarianceRatioLimit = 100
	// SkewnessLimit: |skewness| > 2 marks substantial non-normality (West,
	// Finch & Curran 1995, in Hoyle (ed.) Structural Equation Modeling,
	// Sage, pp. 56–75).
	SkewnessLimit = 2
	// SphericityAlpha: Bartlett's test at the 5 % level (Bartlett 1951).
	SphericityAlpha = 0.05
	// KMOWarn and KMOFail: Kaiser (1974) calls values in the 0.60s mediocre,
	// the 0.50s miserable and below 0.50 unacceptable.
	KMOWarn = 0.6
	KMOFail = 0.5
)

// Samples.
const (
	// DominanceLimit: one sample holding more than a quarter of a
	// component's variance defines that component by itself (common
	// practice).
	DominanceLimit = 0.25
	// ListedSamples is how many sample ids a message names before it
	// counts the rest.
	ListedSamples = 20
	// BinomialAlpha: the outlier checks warn when the count of samples
	// beyond the 95 % limit has a binomial upper tail P(X ≥ count | n,
	// 0.05) below 0.001. The level is stricter than the usual 5 % because
	// it is a second test beside the family-wise limit (whose α is
	// analysis.FamilyAlpha = 0.01, Šidák 1967, JASA 62:626–633), on
	// statistics whose reference distributions are themselves
	// approximations (common practice: 0.001 is the conventional "highly
	// significant" level).
	BinomialAlpha = 0.001
	// analysis.TailFitCount (25; it lives there because the limits are
	// computed there): where T² or Q has a heavier tail than normal theory,
	// the family-wise and count limits are those of a scaled F fitted to
	// the statistic's median and its quantile with TailFitCount samples
	// beyond it (analysis.FitTail; robust quantile matching after Hubert,
	// Rousseeuw & Vanden Branden 2005, Technometrics 47:64–79; the F law
	// is exact for T² under a multivariate t). 25 exceedances: common
	// practice for a tail quantile good to about 1/√25, and well above
	// the few outliers a check names, which are left out of the fit. The
	// fit is used only when the count beyond the normal-theory quantile at
	// 99 % or at that level is significant at analysis.TailTestAlpha =
	// 0.05 (common practice) at either, so that Gaussian tables keep their
	// normal-theory limits.
)

// Components.
const (
	// RuleSpreadLimit: parallel analysis and cross-validation may differ by
	// one component before their disagreement is flagged (common practice:
	// both carry sampling error of about one component where the last
	// retained eigenvalue is near the noise). Broken stick is compared only
	// when it counts MORE than both: it is known to under-count whenever
	// the first eigenvalue takes a large share, since every later share is
	// then small (Jackson 1993, Ecology 74:2204–2214; Peres-Neto, Jackson &
	// Somers 2005, Comput. Stat. Data Anal. 49:974–997, who found it among
	// the most conservative rules), so a lower broken-stick count is no
	// evidence against the others. Kaiser and the cumulative share are
	// shown as information and never flag (Jackson 1993 found both
	// unreliable as stopping rules).
	RuleSpreadLimit = 1
)

// Stability. Tucker's congruence between reference and bootstrap loadings:
// 0.85–0.94 "fair similarity", ≥ 0.95 "equal" (Lorenzo-Seva & ten Berge
// 2006, Methodology 2:57–64). The 5th percentile over resamples is held
// against them.
const (
	CongruencePass = 0.95
	CongruenceFail = 0.85
)

// The retained subspace, judged by the Procrustes-aligned congruence
// (Schönemann 1966 rotation of the retained block; then Tucker's φ per
// component), against the lower end of "fair similarity", 0.85
// (Lorenzo-Seva & ten Berge 2006): warn when the 5th percentile over the
// resamples falls below it, fail when the median does (a typical resample
// is not even fairly similar). Holding the 5th percentile to 0.95 ("equal")
// instead alarmed on 15 % of clean simulated tables, nearly all at
// n ≤ 2–5p with a correctly retained count (φ₅ 0.85–0.95 there): sampling
// wobble of a component that is there, not instability.
const (
	StableSubspaceWarn = CongruenceFail
	StableSubspaceFail = CongruenceFail
	// AxisMixingLimit: within a stable subspace, a retained axis whose
	// sign-aligned φ₅ falls below the lower end of "fair similarity"
	// (0.85, Lorenzo-Seva & ten Berge 2006) mixes with its neighbours. At
	// 0.95 instead, well-separated axes (gaps four times North's δλ) of
	// clean p = 50 tables at n = 300 were called mixed in most tables:
	// φ₅ of 0.92–0.95 is sampling wobble of a distinct axis, not mixing.
	AxisMixingLimit = CongruenceFail
	// SeparationAlpha: eigenvalue-separation warns when Anderson's (1963,
	// Ann. Math. Statist. 34:122–148) likelihood-ratio test does not reject
	// the equality of two retained neighbouring eigenvalues at this level.
	// The check's detection rate on truly equal pairs is one minus the
	// test's actual size; on correlation matrices the χ²₂ reference is
	// conservative (measured on the calibration's equal-eigenvalue tables:
	// 95th percentile of the statistic 3.1–4.6 instead of 5.99), so 0.10
	// keeps detection at or above 95 % while demanding only weak evidence of
	// a gap before calling axes distinct. At 0.05 clean neighbours four
	// North errors apart at n = 300 were called equal on 6–30 % of tables
	// (2.7 % of the clean grid). North's overlap rule, the former
	// criterion, amounts to this test at a size near e⁻¹ ≈ 0.37 and let
	// many equal pairs pass (90 % detection with the bootstrap added).
	SeparationAlpha = 0.10
)

// RobustAgreementFactor times the median bootstrap subspace angle bounds
// the largest principal angle between the classical and robust retained
// subspaces (robust-agreement). Common practice, measured: on clean
// simulated tables the 95th percentile of the bootstrap angles is about
// twice their median, and the robust estimator, less efficient than the
// classical one, adds its own sampling noise to the difference; the
// calibration harness keeps its false alarms under 2 %.
const RobustAgreementFactor = 3.0

// Review mode.
const (
	// SubspacePass and SubspaceWarn bound the largest principal angle (in
	// degrees) between another person's retained loadings and the
	// recomputed ones: below 1° the subspaces agree to the printed
	// precision of loadings; beyond 5° they are different (common practice).
	SubspacePass = 1.0
	SubspaceWarn = 5.0
	// VarianceWarnPP and VarianceFailPP bound the difference, in percentage
	// points, between stated and recomputed shares of variance (common
	// practice: half a point is rounding, two points is a different
	// analysis).
	VarianceWarnPP = 0.5
	VarianceFailPP = 2.0
	// ScoreResidualPass and ScoreResidualFail bound the relative residual
	// between stated scores and the data projected on the stated loadings
	// (common practice: allows scores and loadings printed to three
	// significant digits).
	ScoreResidualPass = 0.01
	ScoreResidualFail = 0.05
	// ScoreCorrelationPass and ScoreCorrelationFail bound the correlation
	// between stated score columns, which is zero for a correct PCA; the
	// allowance covers printed precision (common practice).
	ReviewCorrelationPass = 0.02
	ReviewCorrelationFail = 0.1
	// ScoreMeanShiftLimit: scores of centred data have mean zero; a mean
	// beyond a tenth of their standard deviation shows the data were not
	// centred (common practice).
	ScoreMeanShiftLimit = 0.1
	// ReviewOrthonormalityFail: beyond this, loadings are not orthonormal
	// whatever their printed precision (common practice).
	ReviewOrthonormalityFail = 0.05
)

// Apply mode.
const (
	// ShiftLimit: a new batch whose mean lies more than 3 training standard
	// deviations from the training mean has drifted or changed units
	// (common practice: the 3-sigma rule of control charts, Shewhart 1931).
	ShiftLimit = 3.0
)

// Comparing two audits (pcqc compare).
const (
	// CompareCongruenceLimit is the congruence below which two paired
	// components are not taken for the same when an audit ran no
	// bootstrap: Lorenzo-Seva & ten Berge (2006, Methodology 2:57–64) call
	// 0.85–0.94 "fair similarity" and below 0.85 no similarity. With
	// bootstraps in both audits the limit is resampling's own: the angle
	// between two unit vectors (arccos φ) and the largest principal angle
	// between subspaces of one dimension are metrics, so by the triangle
	// inequality the distance between A and B is at most the sum of each
	// one's distance from the structure they estimate, bounded by its
	// bootstrap 95th percentile (5th of congruence). With both within
	// their percentiles the limit holds with probability ≥ 0.9 (common
	// practice). Adding the squared angles instead, as for independent
	// errors, warned on 2 of 15 clean halves of a 100 × 20 design: the
	// bootstrap underestimates the spread at small n/p.
	CompareCongruenceLimit = 0.85
)

// The refit without the flagged samples (without-flagged).
const (
	// WithoutFlaggedCongruence is the least |Tucker congruence| a
	// component may keep when the flagged samples are left out: 0.95 and
	// above means the components can be considered equal, 0.85–0.94 only
	// "fair similarity" (Lorenzo-Seva & ten Berge 2006, Methodology
	// 2:57–64). The subspace angle is held against the 95th percentile of
	// the bootstrap subspace angles (common practice, as for influence).
	WithoutFlaggedCongruence = 0.95
)
