// Package synth generates seeded synthetic matrices for tests and
// benchmarks: Gaussian noise, planted low-rank structure, and known
// covariance. It is never used by the tool itself; invented data are for
// tests and the demo only.
package synth

import (
	"math/rand/v2"

	"gonum.org/v1/gonum/mat"
)

// RNG returns a seeded generator; stream separates independent uses of one seed.
func RNG(seed, stream uint64) *rand.Rand { return rand.New(rand.NewPCG(seed, stream)) }

// Gaussian returns an n×p matrix of independent standard normal values.
func Gaussian(rng *rand.Rand, n, p int) *mat.Dense {
	x := mat.NewDense(n, p, nil)
	raw := x.RawMatrix().Data
	for i := range raw {
		raw[i] = rng.NormFloat64()
	}
	return x
}

// LowRank returns X = F Lᵀ + noise·E: n samples of rank factors with
// standard deviations sd (one per factor), loadings L (p × rank) with
// independent standard normal entries, and independent standard normal
// noise E. It also returns L.
func LowRank(rng *rand.Rand, n, p int, sd []float64, noise float64) (x, loadings *mat.Dense) {
	rank := len(sd)
	f := Gaussian(rng, n, rank)
	for a := 0; a < rank; a++ {
		for i := 0; i < n; i++ {
			f.Set(i, a, f.At(i, a)*sd[a])
		}
	}
	loadings = Gaussian(rng, p, rank)
	x = mat.NewDense(n, p, nil)
	x.Mul(f, loadings.T())
	if noise > 0 {
		e := Gaussian(rng, n, p)
		e.Scale(noise, e)
		x.Add(x, e)
	}
	return x, loadings
}

// SpectrumCovariance returns Σ = Q diag(spectrum) Qᵀ with a random
// orthogonal Q (from the QR factorisation of a Gaussian matrix), and Q: its
// columns are the true principal axes, the spectrum the true eigenvalues.
func SpectrumCovariance(rng *rand.Rand, spectrum []float64) (cov *mat.SymDense, axes *mat.Dense) {
	p := len(spectrum)
	var qr mat.QR
	qr.Factorize(Gaussian(rng, p, p))
	axes = new(mat.Dense)
	qr.QTo(axes)
	cov = mat.NewSymDense(p, nil)
	for i := 0; i < p; i++ {
		for j := i; j < p; j++ {
			s := 0.0
			for a := 0; a < p; a++ {
				s += axes.At(i, a) * spectrum[a] * axes.At(j, a)
			}
			cov.SetSym(i, j, s)
		}
	}
	return cov, axes
}

// WithCovariance returns n samples from N(0, Σ) for the given covariance
// (symmetric positive definite), through its Cholesky factor.
func WithCovariance(rng *rand.Rand, n int, cov *mat.SymDense) *mat.Dense {
	var ch mat.Cholesky
	if !ch.Factorize(cov) {
		panic("synth: covariance is not positive definite")
	}
	var u mat.TriDense
	ch.UTo(&u)
	p := cov.SymmetricDim()
	x := Gaussian(rng, n, p)
	x.Mul(x, &u)
	return x
}

// Stretch offsets and rescales each column with random amounts, so that
// centring and scaling have real work to do.
func Stretch(rng *rand.Rand, x *mat.Dense) {
	n, p := x.Dims()
	for j := 0; j < p; j++ {
		scale, offset := 0.5+3*rng.Float64(), 100*rng.NormFloat64()
		for i := 0; i < n; i++ {
			x.Set(i, j, offset+scale*x.At(i, j))
		}
	}
}
