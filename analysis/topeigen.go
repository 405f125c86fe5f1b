package analysis

import (
	"math"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/lapack/gonum"
	"gonum.org/v1/gonum/mat"
)

// topEigen holds the workspace of leadingEigen, reused across calls.
type topEigen struct {
	a, d, e, tau, work []float64
	dd, ee             []float64 // copies of the tridiagonal, for Dsterf
	dl, du, diag, x    []float64 // inverse iteration
	vals               []float64 // all eigenvalues, ascending
	vecs               mat.Dense // d × k: column a is the eigenvector of the a-th largest
}

// leadingEigen computes all eigenvalues of the symmetric d×d matrix whose
// upper triangle is in a (row-major, stride d; a is not modified) and the
// eigenvectors of the k largest.
//
// Why not mat.EigenSym with vectors: that accumulates every Givens rotation
// of the implicit QL iteration into d eigenvectors (Dsteqr), about three
// quarters of the work at d = 50, when the leave-one-out and bootstrap
// loops need only k of them. Here the matrix is reduced to tridiagonal form
// T = QᵀAQ once (Dsytrd, Dorgtr), all eigenvalues come from T without
// vectors (Dsterf, the root-free QR), and each of the k vectors by inverse
// iteration on T at its computed eigenvalue, O(d) per step, then Q y
// (Golub & Van Loan 2013, §8.2.2 and §8.3; LAPACK's Dstein does the same).
//
// ok is false when the shortcut cannot vouch for its vectors: a retained
// eigenvalue within 1e-8·‖A‖ of a neighbour (inverse iteration would not
// separate the two), or a residual ‖Ty − μy‖ above 1e-11·‖A‖ after
// iterating. Callers then fall back to the full decomposition, so the
// result is the same either way to rounding.
func (t *topEigen) leadingEigen(a []float64, d, k int) (ok bool) {
	impl := gonum.Implementation{}
	t.a = grow(t.a, d*d)
	copy(t.a, a[:d*d])
	t.d, t.e, t.tau = grow(t.d, d), grow(t.e, max(d-1, 1)), grow(t.tau, max(d-1, 1))
	t.dd, t.ee = grow(t.dd, d), grow(t.ee, max(d-1, 1))
	if d < 2 || k > d {
		return false
	}
	t.work = grow(t.work, 1)
	impl.Dsytrd(blas.Upper, d, t.a, d, t.d, t.e, t.tau, t.work, -1)
	lwork := max(int(t.work[0]), d)
	t.work = grow(t.work, lwork)
	impl.Dsytrd(blas.Upper, d, t.a, d, t.d, t.e, t.tau, t.work, lwork)
	copy(t.dd, t.d)
	copy(t.ee, t.e[:d-1])
	if !impl.Dsterf(d, t.dd, t.ee[:d-1]) {
		return false
	}
	t.vals = grow(t.vals, d)
	copy(t.vals, t.dd) // ascending
	scale := math.Max(math.Abs(t.vals[0]), math.Abs(t.vals[d-1]))
	if scale == 0 || math.IsNaN(scale) {
		return false
	}
	for a := 0; a < k; a++ {
		i := d - 1 - a
		if (i > 0 && t.vals[i]-t.vals[i-1] <= 1e-8*scale) || (i < d-1 && t.vals[i+1]-t.vals[i] <= 1e-8*scale) {
			return false
		}
	}
	impl.Dorgtr(blas.Upper, d, t.a, d, t.tau, t.work, lwork) // t.a = Q
	q := mat.NewDense(d, d, t.a)
	t.vecs.Reset()
	t.vecs.ReuseAs(d, k)
	y := make([]float64, d)
	for a := 0; a < k; a++ {
		mu := t.vals[d-1-a]
		if !t.inverseIteration(d, mu, scale, y) {
			return false
		}
		col := make([]float64, d)
		qy := mat.NewVecDense(d, col)
		qy.MulVec(q, mat.NewVecDense(d, y))
		t.vecs.SetCol(a, col)
	}
	return true
}

// inverseIteration fills y with the unit eigenvector of the tridiagonal
// (t.d, t.e) for its eigenvalue mu, and checks its residual.
func (t *topEigen) inverseIteration(d int, mu, scale float64, y []float64) bool {
	impl := gonum.Implementation{}
	t.dl, t.du, t.diag, t.x = grow(t.dl, d-1), grow(t.du, d-1), grow(t.diag, d), grow(t.x, d)
	// A fixed start with no special structure: an eigenvector orthogonal
	// to it is as unlikely as with a random one, and the result does not
	// depend on any random stream.
	for i := range y {
		y[i] = 1 + 0.5*math.Sin(float64(3*i+1))
	}
	// The shift sits a hair off the computed eigenvalue so that the
	// factorisation of T − σI has no exactly zero pivot; the vector
	// converges by a factor of about that hair over the gap per step.
	sigma := mu + 4e-16*scale
	for step := 0; step < 3; step++ {
		for i := 0; i < d; i++ {
			t.diag[i] = t.d[i] - sigma
		}
		copy(t.dl, t.e[:d-1])
		copy(t.du, t.e[:d-1])
		if !impl.Dgtsv(d, 1, t.dl, t.diag, t.du, y, 1) {
			return false
		}
		norm := 0.0
		for _, v := range y {
			norm += v * v
		}
		norm = math.Sqrt(norm)
		if norm == 0 || math.IsInf(norm, 0) || math.IsNaN(norm) {
			return false
		}
		for i := range y {
			y[i] /= norm
		}
	}
	res := 0.0
	for i := 0; i < d; i++ {
		r := (t.d[i] - mu) * y[i]
		if i > 0 {
			r += t.e[i-1] * y[i-1]
		}
		if i < d-1 {
			r += t.e[i] * y[i+1]
		}
		res += r * r
	}
	return math.Sqrt(res) <= 1e-11*scale
}
