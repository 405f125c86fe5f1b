package analysis

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// Properties are the facts every correct PCA must show, measured on the
// actual result rather than assumed: the preprocessed data are centred, the
// loadings are orthonormal, the scores are uncorrelated, and each eigenvalue
// equals the variance of the data projected on its component.
type Properties struct {
	// CenteringError is max_j |mean(z_j)| / max_j sd(z_j): the largest column
	// mean of the preprocessed matrix relative to its largest column scale.
	CenteringError float64
	// OrthonormalityError is max |VᵀV − I| over the retained loadings.
	OrthonormalityError float64
	// ScoreCorrelation is the largest off-diagonal |correlation| between
	// retained score columns, over the components that are not null.
	ScoreCorrelation float64
	// VarianceMismatch is max_a |var(t_a) − λ_a| / λ_a over the retained
	// components that are not null.
	VarianceMismatch float64
	// NullComponents lists (0-based) retained components whose eigenvalue is
	// numerically zero: below NullRatio × λ_1. Their scores are rounding
	// noise, so correlation and variance are not measured on them.
	NullComponents []int
}

// NullRatio is the eigenvalue ratio λ_a/λ_1 below which a component is taken
// as numerically zero. Rounding perturbs a score column by about ε·s_1, so a
// component with λ_a/λ_1 = 1e-8 has a relative score error near ε·1e4 ≈ 2e-12
// and correlation errors near ε·1e8 ≈ 2e-8; below that ratio the measured
// correlations say more about rounding than about the method.
const NullRatio = 1e-8

// MeasureProperties measures Properties for preprocessed data z, retained
// loadings v (p × k), scores t (n × k) and eigenvalues lambda (at least k).
func MeasureProperties(z *mat.Dense, v, t mat.Matrix, lambda []float64) Properties {
	var pr Properties
	pr.CenteringError = CenteringError(z)
	pr.OrthonormalityError = OrthonormalityError(v)
	_, k := t.Dims()
	var live []int
	for a := 0; a < k; a++ {
		if len(lambda) > 0 && lambda[a] <= NullRatio*lambda[0] {
			pr.NullComponents = append(pr.NullComponents, a)
			continue
		}
		live = append(live, a)
	}
	pr.ScoreCorrelation = MaxOffDiagonalCorrelation(t, live)
	for _, a := range live {
		va := columnVariance(t, a)
		if r := math.Abs(va-lambda[a]) / lambda[a]; r > pr.VarianceMismatch {
			pr.VarianceMismatch = r
		}
	}
	return pr
}

// CenteringError returns max_j |mean(z_j)| / max_j sd(z_j) (0 when every
// column is constant).
func CenteringError(z mat.Matrix) float64 {
	n, p := z.Dims()
	worstMean, worstScale := 0.0, 0.0
	for j := 0; j < p; j++ {
		sum := 0.0
		for i := 0; i < n; i++ {
			sum += z.At(i, j)
		}
		m := sum / float64(n)
		worstMean = math.Max(worstMean, math.Abs(m))
		ss := 0.0
		for i := 0; i < n; i++ {
			d := z.At(i, j) - m
			ss += d * d
		}
		worstScale = math.Max(worstScale, math.Sqrt(ss/float64(n-1)))
	}
	if worstScale == 0 {
		return 0
	}
	return worstMean / worstScale
}

// OrthonormalityError returns max |VᵀV − I| for v (p × k).
func OrthonormalityError(v mat.Matrix) float64 {
	var g mat.Dense
	g.Mul(v.T(), v)
	_, k := v.Dims()
	worst := 0.0
	for a := 0; a < k; a++ {
		for b := 0; b < k; b++ {
			want := 0.0
			if a == b {
				want = 1
			}
			worst = math.Max(worst, math.Abs(g.At(a, b)-want))
		}
	}
	return worst
}

// MaxOffDiagonalCorrelation returns the largest |Pearson correlation| between
// two different columns of t among cols (all columns when cols is nil).
func MaxOffDiagonalCorrelation(t mat.Matrix, cols []int) float64 {
	n, k := t.Dims()
	if cols == nil {
		for a := 0; a < k; a++ {
			cols = append(cols, a)
		}
	}
	centred := make([][]float64, len(cols))
	norms := make([]float64, len(cols))
	for c, a := range cols {
		col := make([]float64, n)
		sum := 0.0
		for i := 0; i < n; i++ {
			col[i] = t.At(i, a)
			sum += col[i]
		}
		m := sum / float64(n)
		ss := 0.0
		for i := range col {
			col[i] -= m
			ss += col[i] * col[i]
		}
		centred[c], norms[c] = col, math.Sqrt(ss)
	}
	worst := 0.0
	for x := 0; x < len(cols); x++ {
		for y := x + 1; y < len(cols); y++ {
			if norms[x] == 0 || norms[y] == 0 {
				continue
			}
			dot := 0.0
			for i := 0; i < n; i++ {
				dot += centred[x][i] * centred[y][i]
			}
			worst = math.Max(worst, math.Abs(dot/(norms[x]*norms[y])))
		}
	}
	return worst
}

// columnVariance returns the sample variance (n−1) of column a of t.
func columnVariance(t mat.Matrix, a int) float64 {
	n, _ := t.Dims()
	sum := 0.0
	for i := 0; i < n; i++ {
		sum += t.At(i, a)
	}
	m := sum / float64(n)
	ss := 0.0
	for i := 0; i < n; i++ {
		d := t.At(i, a) - m
		ss += d * d
	}
	return ss / float64(n-1)
}
