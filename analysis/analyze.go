package analysis

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
)

// Options are the analysis choices made after the table is read.
type Options struct {
	Scaling      Scaling
	Components   ComponentRule
	Permutations int // parallel analysis: the cap of the adaptive run; 0 turns it off
	Bootstrap    int // resamples for loading stability; 0 turns it off
	// NoCrossValidation leaves the cross-validation rule out (it is then
	// reported as not run); for callers that study other properties of
	// many analyses, where its cost buys nothing.
	NoCrossValidation bool
	Seed              uint64 // for every random stream
	Threads           int    // ≤ 0: all cores
	Progress          Progress
	// InPlace preprocesses the table's matrix in place, saving one copy of
	// the data: afterwards Table.X holds the preprocessed matrix (Result.Z).
	InPlace bool
	// Exclude lists rows of the table (ascending, see intake.ResolveExclusions)
	// left out of the fit and projected onto it afterwards
	// (Result.Excluded).
	Exclude []int
	// ImputeComponents fixes S, the components of the iterative imputation
	// (intake.MissingIterative); 0 chooses it by cross-validation.
	ImputeComponents int
	// ImputeMaxIterations caps the imputation's iterations; 0 means
	// ImputeMaxIterations (a smaller cap is for tests of non-convergence).
	ImputeMaxIterations int
	// noWhatIf leaves out the refit without the flagged samples: the
	// refit itself must not refit again.
	noWhatIf bool
}

// Defaults for Options.
const (
	DefaultPermutations = 2000
	DefaultSeed         = 1
)

// Result is a complete analysis of one table: what was done to the data, the
// decomposition, the retained components and their scores, and the measured
// properties and diagnostics of the result.
type Result struct {
	Table    *intake.Table
	Options  Options
	Prep     Preprocessing
	Z        *mat.Dense // n × p preprocessed matrix
	Decomp   *Decomposition
	Rule     ComponentRule
	Counts   ComponentCounts
	Retained int // k ≥ 1
	// NoStructure is set when the rule in force found no component that
	// stands out (count 0); one component is then kept for reference.
	NoStructure bool
	Scores      *mat.Dense // n × k
	Properties  Properties
	Samples     SampleStats
	Adequacy    Adequacy
	Separation  []Separation
	Stability   Stability
	Robust      RobustFit // outlier-resistant fit of the same k components
	// Excluded holds the samples Options.Exclude left out, projected onto
	// the model; nil when none were.
	Excluded *Exclusion
	// WhatIf is the refit without the samples the outlier and influence
	// checks flag (RefitWithoutFlagged).
	WhatIf *WhatIf
	// Imputation describes the iterative imputation of missing cells
	// (intake.MissingIterative); nil under every other policy.
	Imputation *Imputation
}

// Analyze preprocesses the table and computes its PCA and diagnostics. The
// table's matrix is not modified.
func Analyze(t *intake.Table, opt Options) (*Result, error) {
	if opt.Scaling == "" {
		opt.Scaling = ScaleUnit
	}
	if opt.Components.Kind == "" {
		opt.Components = DefaultComponentRule
	}
	var imp *Imputation
	if t.Missing == intake.MissingIterative && len(t.MissingAt) > 0 && !opt.noWhatIf {
		var err error
		if t, imp, err = imputeTable(t, opt); err != nil {
			return nil, err
		}
	}
	var excluded *intake.Table
	if len(opt.Exclude) > 0 {
		t, excluded = splitRows(t, opt.Exclude)
	}
	pp, err := FitPreprocessing(t.X, t.Transform, opt.Scaling)
	if err != nil {
		return nil, err
	}
	if err := checkPreprocessing(t, pp); err != nil {
		return nil, err
	}
	adequacy := MeasureAdequacy(t.X)
	var z *mat.Dense
	if opt.InPlace {
		z = pp.Apply(t.X, t.X)
	} else {
		z = pp.Apply(nil, t.X)
	}
	adequacy.Bartlett, adequacy.KMO = correlationTests(z)
	if imp != nil {
		adequacy.imputed(z, imp)
	}
	adequacy.DuplicateIDs = duplicateIDs(t.IDs)
	if err := checkMagnitude(t, pp, z); err != nil {
		return nil, err
	}
	d, err := Decompose(z)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", t.File, err)
	}
	n, _ := z.Dims()
	m := d.Components()
	r := &Result{Table: t, Options: opt, Prep: pp, Z: z, Decomp: d, Rule: opt.Components, Imputation: imp}

	if (opt.Components.Kind == RuleParallel) && opt.Permutations <= 0 {
		return nil, fmt.Errorf("--components %s needs permutations (--permutations > 0)", opt.Components)
	}
	pa := ParallelAnalysis(z, d.Eigenvalues, opt.Permutations, opt.Seed, opt.Threads, opt.Progress)
	share := DefaultVarianceShare
	if opt.Components.Kind == RuleVariance {
		share = opt.Components.Variance
	}
	var cv CrossValidation
	if _, p := z.Dims(); p >= 3 && n >= 4 && (!opt.NoCrossValidation || opt.Components.Kind == RuleCV) {
		cv = CrossValidate(z, pp, opt.Seed, opt.Threads, opt.Progress)
	}
	r.Counts = CountComponents(d.Eigenvalues, opt.Scaling, share, pa, cv)
	k, err := opt.Components.Choose(m, r.Counts)
	if err != nil {
		return nil, err
	}
	if k == 0 {
		k, r.NoStructure = 1, true
	}
	r.Retained = k
	r.Scores = d.Scores(z, k)
	v := r.RetainedLoadings()
	r.Properties = MeasureProperties(z, v, r.Scores, d.Eigenvalues)
	r.Samples = ComputeSampleStats(z, v, r.Scores, d.Eigenvalues)
	r.Samples.Influence = LeaveOneOut(z, pp, v, d.Eigenvalues, opt.Threads)
	r.Adequacy = adequacy
	r.Separation = EigenvalueSeparation(d.Eigenvalues, n, k)
	r.Stability = Bootstrap(r, opt.Bootstrap, opt.Seed, opt.Threads, opt.Progress)
	r.Samples.Influence.Limit = InfluenceLimits(r.Samples.Influence, r.Stability, opt.Seed)
	r.Robust = FitRobust(z, d, k, opt.Seed, opt.Threads)
	if excluded != nil {
		r.Excluded = projectExcluded(r, opt.Exclude, excluded)
	}
	if !opt.noWhatIf {
		r.WhatIf = RefitWithoutFlagged(r)
	}
	return r, nil
}

// checkMagnitude refuses data whose preprocessed values' squares leave the
// range of double precision (sums of squares of values near 1e150
// overflow; near 1e-150 they underflow). Unit and range scaling bring the
// data to order one, so mostly --scale none meets this, but Pareto scaling
// of values near 1e300 leaves them near 1e150. The error names the cell
// with the largest preprocessed value.
func checkMagnitude(t *intake.Table, pp Preprocessing, z *mat.Dense) error {
	n, p := z.Dims()
	big, bi, bj := 0.0, 0, 0
	for i := 0; i < n; i++ {
		for j, v := range z.RawRowView(i) {
			if a := math.Abs(v); a > big || math.IsNaN(a) {
				big, bi, bj = a, i, j
				if math.IsNaN(a) {
					break
				}
			}
		}
		if math.IsNaN(big) {
			break
		}
	}
	tooSmall := big < 1/MaxPreprocessed && pp.Scaling == ScaleNone
	if p == 0 || big <= MaxPreprocessed && !tooSmall { // NaN fails the first test
		return nil
	}
	value := rawValue(t.Transform, t.X.At(bi, bj), true)
	if z == t.X { // preprocessed in place: undo it, to six digits
		value = rawValue(t.Transform, z.At(bi, bj)*pp.Scales[bj]+pp.Means[bj], false)
	}
	reason := fmt.Sprintf("after centring and %s scaling the values reach %.1e, and their squares leave the range of double precision; ", pp.Scaling, big)
	if pp.Scaling == ScaleNone {
		reason = fmt.Sprintf("without scaling the centred values reach %.1e, and their squares leave the range of double precision; ", big)
	}
	if pp.Scaling == ScaleUnit {
		reason += "express the data in other units; largest value:"
	} else {
		reason += "use --scale unit (correlation PCA) or express the data in other units; largest value:"
	}
	return cellError(t, bi, bj, value, reason)
}

// checkPreprocessing refuses data whose column means, spreads or scales
// overflow: values near the largest double (1.8e308) are finite one by one,
// but their sum is not. The error names the largest value of the first
// such column.
func checkPreprocessing(t *intake.Table, pp Preprocessing) error {
	finite := func(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
	n, _ := t.X.Dims()
	for j := range pp.Means {
		if finite(pp.Means[j]) && finite(pp.SDs[j]) && finite(pp.Scales[j]) {
			continue
		}
		bi := 0
		for i := 1; i < n; i++ {
			if math.Abs(t.X.At(i, j)) > math.Abs(t.X.At(bi, j)) {
				bi = i
			}
		}
		return cellError(t, bi, j, rawValue(t.Transform, t.X.At(bi, j), true),
			"values this large overflow double precision when the column's mean and spread are computed; express the data in other units; largest value:")
	}
	return nil
}

// RetainedLoadings returns the p × k loadings of the retained components.
func (r *Result) RetainedLoadings() mat.Matrix {
	return r.Decomp.Loadings.Slice(0, r.Decomp.Vars, 0, r.Retained)
}
