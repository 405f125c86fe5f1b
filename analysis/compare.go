package analysis

import (
	"math"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
)

// Variant is one plausible preprocessing of the raw data, recomputed to see
// whether another person's loadings follow from it.
type Variant struct {
	Centered bool
	Scaling  Scaling
	// Angles are the principal angles (degrees, ascending) between their
	// retained subspace and this variant's first k components (Björck &
	// Golub 1973, Math. Comp. 27:579–594); MaxAngle is the largest.
	Angles   []float64
	MaxAngle float64
	// ScoreResidual is, when scores were given, the largest relative
	// residual ‖t_a − c·Z v_a‖/‖t_a‖ over their components, with the best
	// per-component factor c (sign flips and a different scaling of scores
	// are conventions, not errors).
	ScoreResidual float64
	Eigenvalues   []float64
	Loadings      *mat.Dense // p × k, this variant's leading loadings
	z             *mat.Dense
}

// Name describes the variant, e.g. "centred, unit variance".
func (v Variant) Name() string {
	c := "not centred"
	if v.Centered {
		c = "centred"
	}
	return c + ", " + ScalingName(v.Scaling)
}

// ScalingName is a short name for a scaling.
func ScalingName(s Scaling) string {
	switch s {
	case ScaleUnit:
		return "unit variance"
	case ScalePareto:
		return "Pareto scaling"
	case ScaleRange:
		return "range scaling"
	}
	return "no scaling"
}

// Review compares another person's PCA with the raw data.
type Review struct {
	Loadings *TheirLoadings
	Scores   *TheirScores // nil when not given

	Variance        *TheirVariance  // nil when not given
	VarianceValues  []float64       // as stated, nil when not given
	VarianceKind    VarianceKind    // what the values were read as
	VarianceReading VarianceReading // how and why
	VariancePercent []float64       // theirs, as percentages of the total variance
	VarianceDiff    []float64       // theirs − recomputed, percentage points

	ClaimedScale  Scaling // "" when not claimed
	Variants      []Variant
	Best          int // the variant with the smallest largest angle
	BestCentred   int
	BestUncentred int

	// Under the best variant:
	Orthonormality float64   // max |VᵀV − I| of their loadings as given
	ColumnNorms    []float64 // ‖v_a‖ of their loadings
	ScaledBySD     bool      // columns orthogonal with ‖v_a‖² ≈ λ_a: loadings × component sd
	Congruence     []float64 // Tucker's φ between their component a and ours
	Flipped        []bool    // φ < 0: the sign is reversed (harmless)
	MatchOf        []int     // for each of their components, our component of largest |φ|

	ScoreResiduals   []float64 // per component, under the best variant
	ScoreFactors     []float64 // the fitted factor c per component
	ScoreCorrelation float64   // largest off-diagonal |r| among their scores
	ScoreMeanShift   float64   // largest |mean(t_a)| / sd(t_a)
	ScoreBest        int       // the variant whose data best reproduce their scores
	// ScoreColumnOf is set when their score columns follow from their
	// loadings only in another order: score column a holds the
	// projections on loadings column ScoreColumnOf[a]. PermutedResiduals
	// are the residuals so matched. Both nil when the columns are in the
	// loadings' order, or no other order fits better.
	ScoreColumnOf     []int
	PermutedResiduals []float64

	// Variables are the data variables their loadings cover, and
	// PreprocessedVariance the variance of each as it entered the best
	// variant's decomposition (after its centring and scaling): what
	// decides how much each variable weighs in their components.
	Variables            []string
	PreprocessedVariance []float64

	// ComponentVariance is the variance each of their components carries,
	// from the source named in OrderSource, for the order check.
	ComponentVariance []float64
	OrderSource       string
}

// reviewVariants are the preprocessings tried, centred first.
var reviewVariants = func() []Variant {
	var out []Variant
	for _, c := range []bool{true, false} {
		for _, s := range []Scaling{ScaleUnit, ScaleNone, ScalePareto, ScaleRange} {
			out = append(out, Variant{Centered: c, Scaling: s})
		}
	}
	return out
}()

// CompareReview recomputes the analysis of the table under every plausible
// preprocessing and measures how another person's tables relate to it. The
// table must hold exactly the variables their loadings cover, in data order.
func CompareReview(t *intake.Table, l *TheirLoadings, s *TheirScores, variance *TheirVariance, claimed Scaling) (*Review, error) {
	r := &Review{Loadings: l, Scores: s, Variance: variance, ClaimedScale: claimed}
	if variance != nil {
		r.VarianceValues = variance.Values
	}
	_, k := l.V.Dims()
	theirBasis := orthonormalBasis(l.V)
	for _, v := range reviewVariants {
		z, err := variantMatrix(t.X, v.Centered, v.Scaling)
		if err != nil {
			return nil, err
		}
		d, err := Decompose(z)
		if err != nil {
			return nil, err
		}
		if d.Components() < k {
			return nil, &intake.InputError{File: l.File, Reason: "more components in the loadings than the data can have"}
		}
		v.z = z
		v.Eigenvalues = d.Eigenvalues
		v.Loadings = mat.DenseCopyOf(d.Loadings.Slice(0, d.Vars, 0, k))
		v.Angles = PrincipalAngles(theirBasis, v.Loadings)
		v.MaxAngle = v.Angles[len(v.Angles)-1]
		if s != nil {
			v.ScoreResidual, _, _ = scoreFit(z, l.V, s.T)
		}
		r.Variants = append(r.Variants, v)
	}
	// The best variant: smallest largest angle; within 1e-6° prefer the
	// claimed scaling, then centring (the order of reviewVariants).
	pick := func(ok func(Variant) bool) int {
		best := -1
		for i, v := range r.Variants {
			if !ok(v) {
				continue
			}
			if best < 0 || v.MaxAngle < r.Variants[best].MaxAngle-1e-6 ||
				(math.Abs(v.MaxAngle-r.Variants[best].MaxAngle) <= 1e-6 && claimed != "" && v.Scaling == claimed && r.Variants[best].Scaling != claimed) {
				best = i
			}
		}
		return best
	}
	r.Best = pick(func(Variant) bool { return true })
	r.BestCentred = pick(func(v Variant) bool { return v.Centered })
	r.BestUncentred = pick(func(v Variant) bool { return !v.Centered })
	best := r.Variants[r.Best]
	_, p0 := best.z.Dims()

	r.Variables = t.Variables
	r.PreprocessedVariance = make([]float64, p0)
	for j := range r.PreprocessedVariance {
		_, sd := meanSD(best.z, j)
		r.PreprocessedVariance[j] = sd * sd
	}

	// Their loadings as given.
	r.Orthonormality = OrthonormalityError(l.V)
	r.ColumnNorms = make([]float64, k)
	for a := 0; a < k; a++ {
		r.ColumnNorms[a] = mat.Norm(l.V.ColView(a), 2)
	}
	r.ScaledBySD = scaledBySD(l.V, r.ColumnNorms, best.Eigenvalues)

	// Component by component against the best variant.
	p, _ := l.V.Dims()
	ours := best.Loadings
	r.Congruence = make([]float64, k)
	r.Flipped = make([]bool, k)
	r.MatchOf = make([]int, k)
	theirs := make([]float64, p)
	col := make([]float64, p)
	var all mat.Dense
	if d, err := Decompose(best.z); err == nil {
		all.CloneFrom(d.Loadings)
	}
	_, mAll := all.Dims()
	for a := 0; a < k; a++ {
		mat.Col(theirs, a, l.V)
		mat.Col(col, a, ours)
		phi := TuckerCongruence(theirs, col)
		r.Congruence[a], r.Flipped[a] = math.Abs(phi), phi < 0
		// A column congruent with none of ours (a zero column) keeps its
		// own place rather than being called our first component.
		bestPhi := 0.0
		r.MatchOf[a] = a
		for b := 0; b < min(mAll, k+2); b++ {
			mat.Col(col, b, &all)
			if f := math.Abs(TuckerCongruence(theirs, col)); f > bestPhi {
				bestPhi, r.MatchOf[a] = f, b
			}
		}
	}

	if s != nil {
		_, r.ScoreResiduals, r.ScoreFactors = scoreFit(best.z, l.V, s.T)
		r.ScoreColumnOf, r.PermutedResiduals = scorePermutation(best.z, l.V, s.T, r.ScoreResiduals)
		r.ScoreCorrelation = MaxOffDiagonalCorrelation(s.T, nil)
		_, ks := s.T.Dims()
		for a := 0; a < ks; a++ {
			m, sd := meanSD(s.T, a)
			if sd > 0 {
				r.ScoreMeanShift = math.Max(r.ScoreMeanShift, math.Abs(m)/sd)
			}
		}
		r.ScoreBest = 0
		for i, v := range r.Variants {
			if v.ScoreResidual < r.Variants[r.ScoreBest].ScoreResidual-1e-12 {
				r.ScoreBest = i
			}
		}
	}

	if variance != nil {
		r.VarianceReading = variance.Read(best.Eigenvalues)
		r.VarianceKind, r.VariancePercent = r.VarianceReading.Kind, r.VarianceReading.Percent
		total := 0.0
		for _, e := range best.Eigenvalues {
			total += e
		}
		for a, pct := range r.VariancePercent {
			if a < len(best.Eigenvalues) {
				r.VarianceDiff = append(r.VarianceDiff, pct-100*best.Eigenvalues[a]/total)
			}
		}
	}

	// The variance each of their components carries, best source first.
	switch {
	case r.VariancePercent != nil:
		r.ComponentVariance, r.OrderSource = r.VariancePercent[:min(k, len(r.VariancePercent))], "their stated variances"
	default:
		r.ComponentVariance = make([]float64, k)
		u := mat.NewVecDense(t.Rows(), nil)
		for a := 0; a < k; a++ {
			mat.Col(theirs, a, l.V)
			dir := mat.NewVecDense(p, theirs)
			norm := mat.Norm(dir, 2)
			if !(norm > NegligibleNorm) {
				// A zero (or denormal) column is no direction: the data
				// carry no variance along it, and dividing by its length
				// would give NaN.
				continue
			}
			dir.ScaleVec(1/norm, dir)
			u.MulVec(best.z, dir)
			_, sd := meanSD(u, 0)
			r.ComponentVariance[a] = sd * sd
		}
		r.OrderSource = "the variance of the data along each of their loading vectors"
	}
	return r, nil
}

// variantMatrix preprocesses x (n × p) with or without centring and with the
// given scaling; scales are computed around the mean either way.
func variantMatrix(x *mat.Dense, centred bool, scaling Scaling) (*mat.Dense, error) {
	pp, err := FitPreprocessing(x, intake.TransformNone, scaling)
	if err != nil {
		return nil, err
	}
	if !centred {
		pp.Means = make([]float64, len(pp.Means))
	}
	return pp.Apply(nil, x), nil
}

// NegligibleNorm is the length below which a column of loadings counts as
// zero: it cannot be a unit vector, nor one scaled by a component's
// standard deviation, at any printed precision (the same 1e-100 below which
// unscaled data are refused, see checkMagnitude). Denormal values such as
// 5e-324 fall far below it.
const NegligibleNorm = 1e-100

// orthonormalBasis returns an orthonormal basis of the columns of v (thin
// QR), so that loadings given with other column norms compare by subspace.
func orthonormalBasis(v *mat.Dense) *mat.Dense {
	p, k := v.Dims()
	var qr mat.QR
	qr.Factorize(v)
	var q mat.Dense
	qr.QTo(&q)
	return mat.DenseCopyOf(q.Slice(0, p, 0, k))
}

// PrincipalAngles returns the principal angles, in degrees and ascending,
// between the subspaces spanned by the orthonormal columns of a and b
// (Björck & Golub 1973, Math. Comp. 27:579–594).
//
// The cosines are the singular values of aᵀb, but an arccosine loses half
// the digits near 0°: cos θ = 1 − θ²/2 rounds to 1 for θ below about 1e-8
// rad, so a perfect match would read 1e-6° of noise and a tiny real angle
// would be lost. Angles up to 45° therefore come from their sines, the
// singular values of the part of one basis outside the other,
// b − a(aᵀb) (Björck & Golub §3; the same split as Knyazev & Argentati
// 2002, SIAM J. Sci. Comput. 23:2008–2040), and larger ones from their
// cosines, where the arccosine is well conditioned.
func PrincipalAngles(a, b mat.Matrix) []float64 {
	// The residual is taken of the basis with fewer columns, so that its
	// singular values are exactly the sines of the min(ka, kb) angles.
	_, ka := a.Dims()
	_, kb := b.Dims()
	if ka < kb {
		a, b = b, a
	}
	var m mat.Dense
	m.Mul(a.T(), b)
	var svd mat.SVD
	svd.Factorize(&m, mat.SVDNone)
	cos := svd.Values(nil) // descending, so the angles come out ascending
	var r mat.Dense
	r.Mul(a, &m)
	r.Sub(b, &r)
	svd.Factorize(&r, mat.SVDNone)
	sin := svd.Values(nil) // descending: the largest sine is the largest angle
	k := len(cos)
	out := make([]float64, k)
	for i, c := range cos {
		theta := math.Acos(math.Min(1, math.Max(-1, c)))
		if c*c >= 0.5 && k-1-i < len(sin) {
			s := sin[k-1-i]
			// Sines at the rounding level of the residual are an exact
			// match: a·(aᵀb) reproduces b to a few units of the last
			// place, and such sines carry no angle.
			if s <= sineResolution*float64(max(k, 1)) {
				s = 0
			}
			theta = math.Asin(math.Min(1, s))
		}
		out[i] = theta * 180 / math.Pi
	}
	return out
}

// sineResolution is the size of the rounding in b − a(aᵀb) per column of
// unit vectors: a few units of double precision (2.2e-16). A sine below it
// (times the number of columns) cannot be told from an exact match; it is
// 1e-15 rad, 6e-14°, far below any printed loading's precision.
const sineResolution = 8 * 2.220446049250313e-16

// scoreFit compares their scores t (n × k_s) with z·v (their loadings
// applied to the preprocessed data), fitting one factor per component. It
// returns the largest relative residual, the residuals and the factors.
func scoreFit(z, v, t *mat.Dense) (float64, []float64, []float64) {
	n, ks := t.Dims()
	var u mat.Dense
	u.Mul(z, v)
	worst := 0.0
	res := make([]float64, ks)
	fac := make([]float64, ks)
	for a := 0; a < ks; a++ {
		var tu, uu, tt float64
		for i := 0; i < n; i++ {
			ti, ui := t.At(i, a), u.At(i, a)
			tu += ti * ui
			uu += ui * ui
			tt += ti * ti
		}
		if uu == 0 || tt == 0 {
			res[a] = 1
			continue
		}
		c := tu / uu
		rr := 0.0
		for i := 0; i < n; i++ {
			d := t.At(i, a) - c*u.At(i, a)
			rr += d * d
		}
		res[a], fac[a] = math.Sqrt(rr/tt), c
		worst = math.Max(worst, res[a])
	}
	return worst, res, fac
}

// scorePermutation looks for the order of their loadings columns that their
// score columns follow: each score column is fitted against every loadings
// column, and matched to the one that leaves the smallest residual. It
// returns that matching when it is one-to-one, differs from the columns'
// own order and improves the fit of every column it moves; nil otherwise.
func scorePermutation(z, v, t *mat.Dense, own []float64) ([]int, []float64) {
	n, ks := t.Dims()
	_, k := v.Dims()
	if ks < 2 {
		return nil, nil
	}
	cols := make([]int, ks)
	res := make([]float64, ks)
	used := make([]bool, k)
	moved := false
	for a := 0; a < ks; a++ {
		ta := mat.DenseCopyOf(t.Slice(0, n, a, a+1))
		cols[a], res[a] = a, own[a]
		for b := 0; b < k; b++ {
			vb := mat.DenseCopyOf(v.Slice(0, v.RawMatrix().Rows, b, b+1))
			if _, rb, _ := scoreFit(z, vb, ta); rb[0] < res[a] {
				cols[a], res[a] = b, rb[0]
			}
		}
		if used[cols[a]] {
			return nil, nil
		}
		used[cols[a]] = true
		moved = moved || cols[a] != a
	}
	if !moved {
		return nil, nil
	}
	return cols, res
}

// ScoreColumnsNamedAlike reports whether, under ScoreColumnOf, every score
// column bears the name of the loadings column it follows (folded as
// variable names are): then the columns were only listed in another order.
func (r *Review) ScoreColumnsNamedAlike() bool {
	if r.ScoreColumnOf == nil {
		return false
	}
	for a, b := range r.ScoreColumnOf {
		if intake.NameKey(r.Scores.Columns[a]) != intake.NameKey(r.Loadings.Components[b]) {
			return false
		}
	}
	return true
}

// scaledBySD reports whether loadings with the given column norms are
// orthogonal eigenvectors multiplied by the component standard deviations
// (‖v_a‖² ≈ λ_a within 5 %), the "structure" or correlation convention.
func scaledBySD(v *mat.Dense, norms, eigenvalues []float64) bool {
	_, k := v.Dims()
	var g mat.Dense
	g.Mul(v.T(), v)
	unitLength := true
	for a := 0; a < k; a++ {
		// Written so that a zero eigenvalue or column, whose ratio is NaN,
		// answers no rather than slipping past a "> 0.05" test.
		if !(norms[a] > NegligibleNorm && eigenvalues[a] > 0 && math.Abs(norms[a]*norms[a]/eigenvalues[a]-1) <= 0.05) {
			return false
		}
		if math.Abs(norms[a]-1) > 0.05 {
			unitLength = false
		}
		for b := 0; b < a; b++ {
			if math.Abs(g.At(a, b)) > 0.02*norms[a]*norms[b] {
				return false
			}
		}
	}
	return !unitLength
}

func meanSD(t mat.Matrix, a int) (mean, sd float64) {
	n, _ := t.Dims()
	for i := 0; i < n; i++ {
		mean += t.At(i, a)
	}
	mean /= float64(n)
	ss := 0.0
	for i := 0; i < n; i++ {
		d := t.At(i, a) - mean
		ss += d * d
	}
	return mean, math.Sqrt(ss / float64(n-1))
}
