package analysis

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
)

// Scaling is the per-variable divisor applied after centring.
type Scaling string

const (
	// ScaleUnit divides by the sample standard deviation (n−1): correlation PCA.
	ScaleUnit Scaling = "unit"
	// ScalePareto divides by the square root of the standard deviation, a
	// compromise common in metabolomics (van den Berg et al. 2006, BMC
	// Genomics 7:142).
	ScalePareto Scaling = "pareto"
	// ScaleRange divides by the range (max − min) (van den Berg et al. 2006).
	ScaleRange Scaling = "range"
	// ScaleNone leaves the centred values as they are: covariance PCA.
	ScaleNone Scaling = "none"
)

// Scalings lists the accepted scalings.
var Scalings = []Scaling{ScaleUnit, ScalePareto, ScaleRange, ScaleNone}

// Preprocessing records exactly what was done to the transformed table before
// the decomposition: z = (x − Means) / Scales, column by column. Centring is
// not optional; Means always holds the column means.
type Preprocessing struct {
	Transform intake.Transform
	Scaling   Scaling
	Means     []float64 // per variable, of the transformed values
	Scales    []float64 // per variable divisor; 1 for ScaleNone
	SDs       []float64 // per variable sample standard deviation (n−1) of the transformed values
}

// ColumnMean returns the mean of column j of x, computed with a correction
// pass so that the error stays at rounding level even when the mean is large
// compared with the spread (Ling 1974, JASA 69:859–866).
func ColumnMean(x mat.RawMatrixer, j int) float64 {
	raw := x.RawMatrix()
	n := raw.Rows
	sum := 0.0
	for i := 0; i < n; i++ {
		sum += raw.Data[i*raw.Stride+j]
	}
	m := sum / float64(n)
	corr := 0.0
	for i := 0; i < n; i++ {
		corr += raw.Data[i*raw.Stride+j] - m
	}
	return m + corr/float64(n)
}

// centredNorm returns sqrt(Σ (x_ij − m)²) for column j, scaled to avoid
// overflow and underflow for values near 1e±150 and beyond (the method of
// LAPACK's dnrm2).
func centredNorm(raw []float64, stride, n, j int, m float64) float64 {
	scale, ssq := 0.0, 1.0
	for i := 0; i < n; i++ {
		d := raw[i*stride+j] - m
		if d == 0 {
			continue
		}
		a := math.Abs(d)
		if scale < a {
			ssq = 1 + ssq*(scale/a)*(scale/a)
			scale = a
		} else {
			ssq += (a / scale) * (a / scale)
		}
	}
	return scale * math.Sqrt(ssq)
}

// FitPreprocessing computes the column means and the divisors that the chosen
// scaling needs from the transformed table x (n × p, n ≥ 2).
func FitPreprocessing(x *mat.Dense, transform intake.Transform, scaling Scaling) (Preprocessing, error) {
	n, p := x.Dims()
	if n < 2 {
		return Preprocessing{}, fmt.Errorf("preprocessing needs at least 2 rows, have %d", n)
	}
	raw := x.RawMatrix()
	pp := Preprocessing{
		Transform: transform,
		Scaling:   scaling,
		Means:     make([]float64, p),
		Scales:    make([]float64, p),
		SDs:       make([]float64, p),
	}
	for j := 0; j < p; j++ {
		m := ColumnMean(x, j)
		sd := centredNorm(raw.Data, raw.Stride, n, j, m) / math.Sqrt(float64(n-1))
		pp.Means[j], pp.SDs[j] = m, sd
		s, err := scaleFor(scaling, sd, raw.Data, raw.Stride, n, j)
		if err != nil {
			return Preprocessing{}, err
		}
		pp.Scales[j] = s
	}
	return pp, nil
}

func scaleFor(scaling Scaling, sd float64, data []float64, stride, n, j int) (float64, error) {
	switch scaling {
	case ScaleUnit:
		return sd, nil
	case ScalePareto:
		return math.Sqrt(sd), nil
	case ScaleRange:
		lo, hi := data[j], data[j]
		for i := 1; i < n; i++ {
			v := data[i*stride+j]
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
		return hi - lo, nil
	case ScaleNone, "":
		return 1, nil
	}
	return 0, fmt.Errorf("unknown scaling %q", scaling)
}

// Apply writes the preprocessed matrix z = (x − Means)/Scales into dst, which
// may be x itself (in place) or nil (a new matrix is allocated).
func (pp Preprocessing) Apply(dst, x *mat.Dense) *mat.Dense {
	n, p := x.Dims()
	if dst == nil {
		dst = mat.NewDense(n, p, nil)
	}
	src, out := x.RawMatrix(), dst.RawMatrix()
	for i := 0; i < n; i++ {
		srow := src.Data[i*src.Stride : i*src.Stride+p]
		orow := out.Data[i*out.Stride : i*out.Stride+p]
		for j, v := range srow {
			orow[j] = (v - pp.Means[j]) / pp.Scales[j]
		}
	}
	return dst
}
