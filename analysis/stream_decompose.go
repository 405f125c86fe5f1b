package analysis

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"

	"pcqc/analysis/intake"
)

// MethodSums names the decomposition of a streamed table.
const MethodSums = "eigen-decomposition of the p×p cross-product of the preprocessed data, accumulated row by row (Chan, Golub & LeVeque 1983 updates)"

// PreprocessingFromSums is FitPreprocessing for a table seen only through
// its Sums: the means, the sample standard deviations (n−1), and the
// divisor the scaling asks for (the range comes from the kept minimum and
// maximum).
func PreprocessingFromSums(s *Sums, transform intake.Transform, scaling Scaling) (Preprocessing, error) {
	if s.N < 2 {
		return Preprocessing{}, fmt.Errorf("preprocessing needs at least 2 rows, have %g", s.N)
	}
	pp := Preprocessing{Transform: transform, Scaling: scaling,
		Means: s.Mean(), Scales: make([]float64, s.P), SDs: make([]float64, s.P)}
	for j := range pp.Means {
		sd := s.SD(j)
		pp.SDs[j] = sd
		switch scaling {
		case ScaleUnit:
			pp.Scales[j] = sd
		case ScalePareto:
			pp.Scales[j] = math.Sqrt(sd)
		case ScaleRange:
			pp.Scales[j] = s.Max[j] - s.Min[j]
		case ScaleNone, "":
			pp.Scales[j] = 1
		default:
			return Preprocessing{}, fmt.Errorf("unknown scaling %q", scaling)
		}
	}
	return pp, nil
}

// DecomposeSums returns the decomposition of the preprocessed table whose
// raw Sums are s and whose preprocessing is pp: the eigen-decomposition of
// ZᵀZ = D⁻¹ C D⁻¹ (D the diagonal of divisors, C the co-moment matrix).
//
// In memory pcqc never forms ZᵀZ, because doing so squares the condition
// number: an eigenvalue λ_a is then known only to about ε·λ_1 absolutely,
// not to ε·λ_a as by the SVD of Z. Here it is acceptable because a
// streamed table is tall with few variables (p is small, so the p×p
// matrix is cheap and exact eigen-solvers are backward stable on it), and
// because C is accumulated from deviations about the running mean, not as
// Σxxᵀ − n x̄x̄ᵀ, so the cancellation that makes the textbook formula fail
// does not arise. The caveat stays: components whose eigenvalue is below
// about 1e-8 of the largest have loadings and eigenvalues with fewer
// correct digits than the in-memory audit gives them.
func DecomposeSums(s *Sums, pp Preprocessing) (*Decomposition, error) {
	p, n := s.P, int(math.Round(s.N))
	if n < 2 || p < 1 {
		return nil, errors.New("decomposition needs at least 2 rows and 1 column")
	}
	zz := mat.NewSymDense(p, nil)
	for j := 0; j < p; j++ {
		for l := j; l < p; l++ {
			zz.SetSym(j, l, s.Co[packed(p, j, l)]/(pp.Scales[j]*pp.Scales[l]))
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(zz, true) {
		return nil, errors.New("eigen-decomposition did not converge")
	}
	values := eig.Values(nil)
	var vecs mat.Dense
	eig.VectorsTo(&vecs)
	order := make([]int, p)
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return values[order[a]] > values[order[b]] })
	m := min(n-1, p)
	d := &Decomposition{Rows: n, Vars: p, Method: MethodSums,
		SingularValues: make([]float64, m), Eigenvalues: make([]float64, m), Loadings: mat.NewDense(p, m, nil)}
	for a := 0; a < m; a++ {
		v := math.Max(values[order[a]], 0)
		d.SingularValues[a] = math.Sqrt(v)
		d.Eigenvalues[a] = v / float64(n-1)
		for j := 0; j < p; j++ {
			d.Loadings.Set(j, a, vecs.At(j, order[a]))
		}
	}
	FixSigns(d.Loadings, nil)
	return d, nil
}
