package analysis

import (
	"errors"
	"math"

	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/lapack/lapack64"
	"gonum.org/v1/gonum/mat"
)

// Decomposition is the principal component decomposition of a preprocessed
// (centred, possibly scaled) n × p matrix Z = U S Vᵀ.
//
// Only m = min(n−1, p) components are kept: centring removes one degree of
// freedom, so a centred matrix has rank at most n−1 and any further singular
// value is rounding noise.
type Decomposition struct {
	Rows, Vars     int
	SingularValues []float64  // s_1 ≥ … ≥ s_m
	Eigenvalues    []float64  // λ_a = s_a² / (n−1), the variance along each component
	Loadings       *mat.Dense // p × m, orthonormal columns (right singular vectors)
	Method         string     // how the SVD was computed, for the methods paragraph
}

// Components returns m, the number of components.
func (d *Decomposition) Components() int { return len(d.Eigenvalues) }

// TotalVariance returns Σ λ_a, the total variance of the preprocessed data.
func (d *Decomposition) TotalVariance() float64 {
	s := 0.0
	for _, l := range d.Eigenvalues {
		s += l
	}
	return s
}

// Method names used in Decomposition.Method.
const (
	MethodTallQR = "Householder QR of the preprocessed matrix in row blocks (TSQR), then SVD of the p×p triangular factor"
	MethodWide   = "SVD of the preprocessed matrix through its LQ factorisation (the n×n route for p > n)"
)

// Decompose computes the SVD of the preprocessed matrix z.
//
// Tall and square data (n ≥ p) are reduced by a blocked Householder QR (the
// "tall-skinny QR" of Demmel, Grigori, Hoemmen & Langou 2012, SIAM J. Sci.
// Comput. 34:A206) to a p×p triangular R with ZᵀZ = RᵀR, whose SVD gives the
// same singular values and right singular vectors as Z's, in memory
// proportional to p² rather than a second copy of Z. Wide data (p > n) go
// through LAPACK's dgesvd path, which works on the n×n factor of an LQ
// factorisation. Neither route forms ZᵀZ, so small eigenvalues keep their
// accuracy (forming the cross-product squares the condition number).
//
// Signs are made deterministic: in each component the loading with the
// largest absolute value is positive (ties: the first such variable).
func Decompose(z *mat.Dense) (*Decomposition, error) {
	n, p := z.Dims()
	if n < 2 || p < 1 {
		return nil, errors.New("decomposition needs at least 2 rows and 1 column")
	}
	m := min(n-1, p)
	d := &Decomposition{Rows: n, Vars: p}
	var svd mat.SVD
	if n >= p {
		r := tallR(z)
		if !svd.Factorize(r, mat.SVDThinV) {
			return nil, errors.New("SVD did not converge")
		}
		d.Method = MethodTallQR
	} else {
		if !svd.Factorize(z, mat.SVDThinV) {
			return nil, errors.New("SVD did not converge")
		}
		d.Method = MethodWide
	}
	s := svd.Values(nil)
	var v mat.Dense
	svd.VTo(&v)
	d.SingularValues = s[:m:m]
	d.Eigenvalues = make([]float64, m)
	for a := 0; a < m; a++ {
		d.Eigenvalues[a] = s[a] * s[a] / float64(n-1)
	}
	d.Loadings = mat.DenseCopyOf(v.Slice(0, p, 0, m))
	FixSigns(d.Loadings, nil)
	return d, nil
}

// FixSigns makes the sign of each column of loadings deterministic: the entry
// with the largest absolute value becomes positive (ties, within a relative
// 1e-12, go to the first such row). When scores is not nil its matching
// columns are flipped too, so that scores × loadingsᵀ is unchanged.
func FixSigns(loadings, scores *mat.Dense) {
	p, k := loadings.Dims()
	for a := 0; a < k; a++ {
		best, bestAbs := 0, -1.0
		for j := 0; j < p; j++ {
			if v := math.Abs(loadings.At(j, a)); v > bestAbs*(1+1e-12) {
				best, bestAbs = j, v
			}
		}
		if loadings.At(best, a) < 0 {
			for j := 0; j < p; j++ {
				loadings.Set(j, a, -loadings.At(j, a))
			}
			if scores != nil {
				r, _ := scores.Dims()
				for i := 0; i < r; i++ {
					scores.Set(i, a, -scores.At(i, a))
				}
			}
		}
	}
}

// tallR returns the p×p upper-triangular factor R of z (n ≥ p), computed by
// Householder QR over blocks of rows: each block is stacked under the current
// R and refactorised. Only one block is held at a time.
func tallR(z *mat.Dense) *mat.Dense {
	n, p := z.Dims()
	block := max(4*p, 4096)
	raw := z.RawMatrix()
	buf := make([]float64, (p+block)*p)
	tau := make([]float64, p)
	var work []float64
	have := 0 // rows of R at the top of buf
	for start := 0; start < n; {
		rows := min(block, n-start)
		for i := 0; i < rows; i++ {
			copy(buf[(have+i)*p:(have+i+1)*p], raw.Data[(start+i)*raw.Stride:(start+i)*raw.Stride+p])
		}
		start += rows
		a := blas64.General{Rows: have + rows, Cols: p, Stride: p, Data: buf[:(have+rows)*p]}
		if work == nil {
			q := make([]float64, 1)
			lapack64.Geqrf(blas64.General{Rows: p + block, Cols: p, Stride: p, Data: buf}, tau, q, -1)
			work = make([]float64, int(q[0]))
		}
		lapack64.Geqrf(a, tau[:min(a.Rows, p)], work, len(work))
		have = min(a.Rows, p)
		for i := 0; i < have; i++ {
			for j := 0; j < i; j++ {
				buf[i*p+j] = 0
			}
		}
	}
	r := mat.NewDense(p, p, nil)
	for i := 0; i < have; i++ {
		copy(r.RawRowView(i), buf[i*p:(i+1)*p])
	}
	return r
}

// Scores returns T = Z V_k, the n × k scores of the first k components.
func (d *Decomposition) Scores(z *mat.Dense, k int) *mat.Dense {
	n, _ := z.Dims()
	t := mat.NewDense(n, k, nil)
	t.Mul(z, d.Loadings.Slice(0, d.Vars, 0, k))
	return t
}
