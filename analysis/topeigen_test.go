package analysis

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"

	"pcqc/internal/synth"
)

// leadingEigen must give what the full symmetric eigendecomposition
// (gonum's Dsyev through mat.EigenSym) gives: every eigenvalue, and the k
// leading eigenvectors up to sign, to rounding.
func TestLeadingEigenMatchesFullDecomposition(t *testing.T) {
	cases := []struct {
		name    string
		n, p, k int
		sd      []float64
	}{
		{"tall covariance, strong structure", 200, 12, 3, []float64{3, 2, 1.5}},
		{"tall covariance, weak structure", 60, 50, 3, []float64{1.2, 1.1, 1.05}},
		{"one component", 40, 8, 1, []float64{2}},
		{"Gram of a wide table", 30, 400, 4, []float64{3, 2, 1.5, 1.2}},
		{"all components", 30, 5, 5, []float64{3, 2}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			x, _ := synth.LowRank(synth.RNG(7, uint64(c.n)), c.n, c.p, c.sd, 1)
			var a mat.SymDense
			if c.n >= c.p {
				a.SymOuterK(1, x.T())
			} else {
				a.SymOuterK(1, x)
			}
			d := a.SymmetricDim()
			var te topEigen
			if !te.leadingEigen(a.RawSymmetric().Data, d, c.k) {
				t.Fatal("shortcut refused a matrix with distinct leading eigenvalues")
			}
			var eig mat.EigenSym
			if !eig.Factorize(&a, true) {
				t.Fatal("full decomposition failed")
			}
			vals := eig.Values(nil)
			var vecs mat.Dense
			eig.VectorsTo(&vecs)
			for i := range vals {
				if diff := math.Abs(vals[i] - te.vals[i]); diff > 1e-12*vals[d-1] {
					t.Errorf("eigenvalue %d: %g, full %g", i, te.vals[i], vals[i])
				}
			}
			for a := 0; a < c.k; a++ {
				dot := 0.0
				for j := 0; j < d; j++ {
					dot += te.vecs.At(j, a) * vecs.At(j, d-1-a)
				}
				for j := 0; j < d; j++ {
					if diff := math.Abs(te.vecs.At(j, a) - math.Copysign(1, dot)*vecs.At(j, d-1-a)); diff > 1e-9 {
						t.Fatalf("vector %d, entry %d: %g, full %g", a, j, te.vecs.At(j, a), vecs.At(j, d-1-a))
					}
				}
			}
		})
	}
}

// A retained eigenvalue tied with its neighbour cannot be separated by
// inverse iteration: the shortcut must refuse, so the caller falls back.
func TestLeadingEigenRefusesTies(t *testing.T) {
	d := 6
	a := make([]float64, d*d)
	for i, v := range []float64{5, 3, 3, 1, 0.5, 0.2} {
		a[i*d+i] = v
	}
	var te topEigen
	if te.leadingEigen(a, d, 2) {
		t.Error("accepted a tie between the 2nd and 3rd eigenvalues")
	}
	if !te.leadingEigen(a, d, 1) {
		t.Error("refused the first eigenvector, which is separated")
	}
}
