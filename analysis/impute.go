package analysis

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
)

// Settings of the regularised iterative PCA imputation.
const (
	// ImputeTolerance stops the iteration when the change of the imputed
	// cells, measured on the preprocessed scale, is below this share of the
	// preprocessed data's norm: √(Σ_missing (Δx_ij/c_j)²) / ‖Z‖_F, with c_j
	// the iteration's divisors. The iteration converges linearly, so a
	// tolerance well below the 1e-6 the reference test asks for is needed.
	ImputeTolerance = 1e-9
	// ImputeMaxIterations caps the iteration (common practice).
	ImputeMaxIterations = 1000
	// ImputeMaxComponents is the largest number of components the
	// cross-validation of the imputation tries (Josse & Husson 2012 try
	// 0–5 by default).
	ImputeMaxComponents = 5
	// ImputeCVRepeats and ImputeCVShare: the cross-validation hides this
	// share of the observed cells at random, this many times (Josse &
	// Husson 2012, section 4: leave out cells, impute, compare).
	ImputeCVRepeats = 10
	ImputeCVShare   = 0.05
)

// streamImputeCV is the random stream of the cross-validation's hidden cells.
const streamImputeCV = 5 << 40

// Imputation records how the missing cells of a table were imputed under
// intake.MissingIterative.
type Imputation struct {
	Cells      []intake.CellRef // the imputed cells (Table.MissingAt)
	Values     []float64        // their final values, transformed scale, same order
	Components int              // S, the components of the reconstruction
	// ChosenBy says how S was chosen (ChosenByCV, ChosenGiven or
	// ChosenOnly); CVError holds, for S = 1, 2, …, the mean squared
	// prediction error of the hidden cells on the preprocessed scale (nil
	// unless S was cross-validated).
	ChosenBy      string
	CVError       []float64
	Iterations    int
	Change        float64 // the last relative change (see ImputeTolerance)
	Tolerance     float64
	MaxIterations int
	Converged     bool
	ObservedShare float64 // observed cells / all cells
}

// How the number of components of the imputation was chosen.
const (
	ChosenByCV  = "cross-validation"
	ChosenGiven = "given"
	// ChosenOnly: with min(n−1, p) = 2, S = 1 is the only value that leaves
	// an eigenvalue to estimate the noise from.
	ChosenOnly = "only possible value"
)

// MethodImputation names the imputation in the report and summary.json.
const MethodImputation = "regularised iterative PCA (Josse & Husson 2012)"

// imputeRun is one run of the iteration.
type imputeRun struct {
	iterations int
	change     float64
	converged  bool
}

// ImputeRegularised fills the cells of x (n × p) by the regularised
// iterative PCA of Josse & Husson (2012, J. Soc. Fr. Statistique
// 153(2):79–99, section 2), starting from the values x holds there (column
// means, as intake leaves them). Each iteration
//
//  1. refits the preprocessing (means and the divisors of scaling) to the
//     completed data, z = (x − m)/c;
//  2. takes the SVD z = U D Vᵀ, with eigenvalues λ_s ∝ d_s², and estimates
//     the noise variance σ² as the mean of the eigenvalues beyond the first
//     S (of the min(n−1, p) a centred matrix has), the simple form of the
//     paper's estimate (from memory: the authors also describe a version
//     with a degrees-of-freedom correction of the denominator, which pcqc
//     does not use; the numpy reference in testdata/impute uses the same
//     simple form, so the agreement tested is with this form);
//  3. reconstructs ẑ = Σ_{s≤S} d_s·(λ_s − σ²)/λ_s · u_s v_sᵀ, the
//     singular values shrunk towards zero by the noise share, which keeps
//     the imputation from overfitting the observed cells;
//  4. replaces only the missing cells by m_j + c_j·ẑ_ij;
//
// until the change (see ImputeTolerance) is below tol or maxIter
// iterations have run. S must satisfy 1 ≤ S < min(n−1, p).
func ImputeRegularised(x *mat.Dense, cells []intake.CellRef, s int, scaling Scaling, tol float64, maxIter int) (imputeRun, error) {
	n, p := x.Dims()
	m := min(n-1, p)
	if s < 1 || s >= m {
		return imputeRun{}, fmt.Errorf("imputation needs 1 ≤ S < %d components, have %d", m, s)
	}
	var run imputeRun
	z := mat.NewDense(n, p, nil)
	var svd mat.SVD
	var u, v mat.Dense
	for run.iterations < maxIter {
		run.iterations++
		pp, err := FitPreprocessing(x, intake.TransformNone, scaling)
		if err != nil {
			return run, err
		}
		for j, c := range pp.Scales {
			if !(c > 0) || math.IsInf(c, 0) {
				return run, noSpreadError(j)
			}
		}
		pp.Apply(z, x)
		if !svd.Factorize(z, mat.SVDThin) {
			return run, fmt.Errorf("imputation: the SVD did not converge")
		}
		d := svd.Values(nil)
		svd.UTo(&u)
		svd.VTo(&v)
		total, rest := 0.0, 0.0
		for a := 0; a < len(d); a++ {
			total += d[a] * d[a]
			if a >= s && a < m {
				rest += d[a] * d[a]
			}
		}
		sigma2 := rest / float64(m-s)
		shrunk := make([]float64, s)
		for a := 0; a < s; a++ {
			if l := d[a] * d[a]; l > 0 {
				shrunk[a] = d[a] * max(l-sigma2, 0) / l
			}
		}
		change := 0.0
		for _, c := range cells {
			fit := 0.0
			for a := 0; a < s; a++ {
				fit += shrunk[a] * u.At(c.Row, a) * v.At(c.Var, a)
			}
			val := pp.Means[c.Var] + pp.Scales[c.Var]*fit
			delta := (val - x.At(c.Row, c.Var)) / pp.Scales[c.Var]
			change += delta * delta
			x.Set(c.Row, c.Var, val)
		}
		run.change = 0
		if total > 0 {
			run.change = math.Sqrt(change / total)
		}
		if run.change < tol {
			run.converged = true
			break
		}
	}
	return run, nil
}

// Impute imputes the table's missing cells (t.MissingAt) in x, a matrix
// holding the table's values, and describes what it did. components ≤ 0
// chooses S by cross-validation (ChooseImputeComponents); maxIter ≤ 0 means
// ImputeMaxIterations.
func Impute(x *mat.Dense, t *intake.Table, scaling Scaling, components int, seed uint64, threads, maxIter int) (*Imputation, error) {
	n, p := x.Dims()
	if maxIter <= 0 {
		maxIter = ImputeMaxIterations
	}
	imp := &Imputation{Cells: t.MissingAt, Tolerance: ImputeTolerance, MaxIterations: maxIter}
	imp.ObservedShare = 1 - float64(len(t.MissingAt))/float64(n*p)
	if m := min(n-1, p); m < 2 {
		return nil, fmt.Errorf("%s: iterative imputation needs at least 3 samples and 2 variables", t.File)
	}
	switch {
	case components > 0:
		imp.Components = min(components, min(n-1, p)-1)
		imp.ChosenBy = ChosenGiven
	case min(n-1, p) == 2:
		imp.Components, imp.ChosenBy = 1, ChosenOnly
	default:
		imp.Components, imp.CVError = ChooseImputeComponents(x, t.MissingAt, scaling, seed, threads)
		imp.ChosenBy = ChosenByCV
	}
	run, err := ImputeRegularised(x, t.MissingAt, imp.Components, scaling, imp.Tolerance, imp.MaxIterations)
	if j, ok := err.(noSpreadError); ok {
		e := &intake.InputError{File: t.File, Name: t.Variables[j],
			Reason: "the variable takes a single value once its missing cells are imputed, so it cannot be scaled; leave it out with --drop"}
		if int(j) < len(t.Columns) {
			e.Column = t.Columns[j]
		}
		return nil, e
	}
	if err != nil {
		return nil, fmt.Errorf("%s: %w", t.File, err)
	}
	imp.Iterations, imp.Change, imp.Converged = run.iterations, run.change, run.converged
	imp.Values = make([]float64, len(t.MissingAt))
	for i, c := range t.MissingAt {
		imp.Values[i] = x.At(c.Row, c.Var)
	}
	return imp, nil
}

// imputeTable imputes the missing cells of t before anything else is
// fitted. Without Options.InPlace it works on a copy of the matrix and
// returns a copy of the table holding it, so the caller's table is left as
// it was read; with InPlace it writes into t.X, which Analyze overwrites
// with the preprocessed matrix anyway. Excluded samples (Options.Exclude)
// take part in the imputation: their observed cells inform it, and their
// own missing cells are imputed before they are projected.
func imputeTable(t *intake.Table, opt Options) (*intake.Table, *Imputation, error) {
	x := t.X
	if !opt.InPlace {
		x = mat.DenseCopyOf(t.X)
		c := *t
		c.X = x
		t = &c
	}
	imp, err := Impute(x, t, opt.Scaling, opt.ImputeComponents, opt.Seed, opt.Threads, opt.ImputeMaxIterations)
	return t, imp, err
}

// noSpreadError is the index of a variable whose completed values do not
// vary.
type noSpreadError int

func (e noSpreadError) Error() string {
	return fmt.Sprintf("imputation: variable %d has no spread in the completed data", int(e)+1)
}
