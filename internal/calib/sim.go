package calib

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"

	"pcqc/analysis"
	"pcqc/analysis/intake"
)

// Tail is the distribution family of a clean table.
type Tail int

const (
	Gaussian Tail = iota
	StudentT      // independent Student t scores with TDegrees degrees of freedom
)

// TDegrees is the degrees of freedom of the heavy-tailed variant.
const TDegrees = 10

func (t Tail) String() string {
	if t == StudentT {
		return fmt.Sprintf("t%d", TDegrees)
	}
	return "gauss"
}

// Cell is one point of the simulation grid.
type Cell struct {
	N, P, K int
	Tail    Tail
}

func (c Cell) String() string {
	return fmt.Sprintf("n=%d p=%d k=%d %s", c.N, c.P, c.K, c.Tail)
}

// Design constants of the clean tables (see the package doc for why).
const (
	edgeFactor    = 2.0  // smallest signal eigenvalue / Marchenko–Pastur edge
	minRatio      = 1.5  // least ratio of consecutive signal eigenvalues
	northMultiple = 4.0  // gap ≥ this many North sampling errors
	minNoise      = 0.25 // least noise eigenvalue
)

// excessKurtosis is the excess kurtosis of one latent score: 0 for the
// Gaussian, 6/(ν − 4) for Student's t with ν degrees of freedom.
func (t Tail) excessKurtosis() float64 {
	if t == StudentT {
		return 6 / float64(TDegrees-4)
	}
	return 0
}

// Spectrum returns the population correlation eigenvalues of a clean table
// of the cell, largest first, and whether the design is feasible there.
func Spectrum(n, p, k int, tail Tail) ([]float64, bool) {
	if k < 1 || k >= p || n < 2 {
		return nil, false
	}
	edge := math.Pow(1+math.Sqrt(float64(p)/float64(n)), 2)
	r := minRatio
	// The sampling error of λ_a is λ_a·√((2 + κ)/n) for independent scores
	// of excess kurtosis κ: λ̂_a is the mean of n values t_a², whose
	// variance is E t⁴ − λ² = λ²(2 + κ). North's √(2/n) is the Gaussian
	// case.
	if d := northMultiple * math.Sqrt((2+tail.excessKurtosis())/float64(n)); d < 1 {
		r = max(r, 1/(1-d))
	} else {
		return nil, false
	}
	lam := make([]float64, p)
	sum := 0.0
	for j := k - 1; j >= 0; j-- {
		lam[j] = edgeFactor * edge * math.Pow(r, float64(k-1-j))
		sum += lam[j]
	}
	noise := (float64(p) - sum) / float64(p-k)
	if noise < minNoise {
		return nil, false
	}
	for j := k; j < p; j++ {
		lam[j] = noise
	}
	return lam, true
}

// Grid returns the feasible cells of the clean grid, Gaussian then
// heavy-tailed, and the cells left out because the design cannot be met.
func Grid(ns, ps, ks []int) (cells, infeasible []Cell) {
	for _, tail := range []Tail{Gaussian, StudentT} {
		for _, n := range ns {
			for _, p := range ps {
				for _, k := range ks {
					if k >= p {
						continue
					}
					c := Cell{N: n, P: p, K: k, Tail: tail}
					if _, ok := Spectrum(n, p, k, tail); ok {
						cells = append(cells, c)
					} else {
						infeasible = append(infeasible, c)
					}
				}
			}
		}
	}
	return cells, infeasible
}

// FullGrid is the grid of the issue: n from 100 to 5000, p from 5 to 50,
// k from 1 to 4.
func FullGrid() (cells, infeasible []Cell) {
	return Grid([]int{100, 300, 1000, 5000}, []int{5, 10, 20, 50}, []int{1, 2, 3, 4})
}

// correlationWithSpectrum returns a correlation matrix (unit diagonal) with
// the given eigenvalues (summing to p), and its eigenvectors as columns, by
// Davies & Higham's (2000) Givens rotations applied to Q diag(λ) Qᵀ.
func correlationWithSpectrum(rng *rand.Rand, lam []float64) (*mat.Dense, *mat.Dense) {
	p := len(lam)
	g := mat.NewDense(p, p, nil)
	for i := range p {
		for j := range p {
			g.Set(i, j, rng.NormFloat64())
		}
	}
	var qr mat.QR
	qr.Factorize(g)
	q := new(mat.Dense)
	qr.QTo(q)
	a := mat.NewDense(p, p, nil)
	for i := range p {
		for j := range p {
			s := 0.0
			for m := range p {
				s += q.At(i, m) * lam[m] * q.At(j, m)
			}
			a.Set(i, j, s)
		}
	}
	const tol = 1e-12
	for {
		// Pick i with a_ii < 1 and j with a_jj > 1; a rotation in the
		// (i, j) plane sets a_ii to exactly 1 (Davies & Higham 2000, §3).
		i, j := -1, -1
		for m := range p {
			if a.At(m, m) < 1-tol && i < 0 {
				i = m
			}
			if a.At(m, m) > 1+tol && j < 0 {
				j = m
			}
		}
		if i < 0 || j < 0 {
			break
		}
		aii, ajj, aij := a.At(i, i), a.At(j, j), a.At(i, j)
		t := (aij + math.Sqrt(aij*aij-(aii-1)*(ajj-1))) / (ajj - 1)
		c := 1 / math.Sqrt(1+t*t)
		s := c * t
		// A ← Gᵀ A G and Q ← Gᵀ Q, with G the rotation whose columns i, j
		// are (c, s) and (−s, c) in rows i, j.
		rotRows := func(m *mat.Dense) {
			_, cols := m.Dims()
			for col := range cols {
				x, y := m.At(i, col), m.At(j, col)
				m.Set(i, col, c*x-s*y)
				m.Set(j, col, s*x+c*y)
			}
		}
		rotCols := func(m *mat.Dense) {
			rows, _ := m.Dims()
			for row := range rows {
				x, y := m.At(row, i), m.At(row, j)
				m.Set(row, i, c*x-s*y)
				m.Set(row, j, s*x+c*y)
			}
		}
		rotRows(a)
		rotCols(a)
		rotRows(q)
		a.Set(i, i, 1)
	}
	return a, q
}

// sample draws n rows with covariance V diag(λ) Vᵀ as x = V Λ^{1/2} z: z
// independent standard normal, or independent Student t with TDegrees
// degrees of freedom rescaled to unit variance.
func sample(rng *rand.Rand, n int, lam []float64, v *mat.Dense, tail Tail) *mat.Dense {
	p := len(lam)
	x := mat.NewDense(n, p, nil)
	z := make([]float64, p)
	for i := range n {
		for m := range p {
			z[m] = rng.NormFloat64()
			if tail == StudentT {
				w := 0.0
				for range TDegrees {
					e := rng.NormFloat64()
					w += e * e
				}
				z[m] *= math.Sqrt(float64(TDegrees-2) / w)
			}
			z[m] *= math.Sqrt(lam[m])
		}
		for j := range p {
			s := 0.0
			for m := range p {
				s += v.At(j, m) * z[m]
			}
			x.Set(i, j, s)
		}
	}
	return x
}

// Defect names a planted defect; Clean is none.
type Defect string

const (
	Clean            Defect = "clean"
	OffModel         Defect = "off-model"
	AlongModel       Defect = "along-model"
	NoStructure      Defect = "no-structure"
	SkewedVariable   Defect = "skewed-variable"
	MixedUnits       Defect = "mixed-units"
	EqualEigenvalues Defect = "equal-eigenvalues"
	DuplicateRows    Defect = "duplicate-rows"
	LoneComponent    Defect = "lone-component"
)

// Defects lists every planted defect in report order.
var Defects = []Defect{OffModel, AlongModel, NoStructure, SkewedVariable, MixedUnits, EqualEigenvalues, DuplicateRows, LoneComponent}

// defectCells are the clean cells the defects are planted in, cycled over
// seeds.
var defectCells = []Cell{{300, 10, 2, Gaussian}, {1000, 20, 2, Gaussian}, {300, 20, 2, Gaussian}, {1000, 10, 2, Gaussian}}

// DefectCell returns the cell defect table number i is planted in.
func DefectCell(i int) Cell { return defectCells[i%len(defectCells)] }

// Case is one simulated table with what was planted in it.
type Case struct {
	Index   int
	Cell    Cell
	Defect  Defect
	Seed    uint64
	Table   *intake.Table
	Scaling analysis.Scaling
	// Planted are the sample ids or variable names the defect's check
	// must name (none for defects without such a culprit).
	Planted []string
}

// golden is the 64-bit golden-ratio constant, a well-mixed odd number that
// separates the per-table audit seeds.
const golden = 0x9e3779b97f4a7c15

// NewCase simulates table index of a run with the given seed: a clean
// table of the cell, with the defect planted when it is not Clean. It
// refuses a cell outside the design (see Spectrum).
func NewCase(seed uint64, index int, cell Cell, defect Defect) (Case, error) {
	rng := rand.New(rand.NewPCG(seed, uint64(index)))
	n, p, k := cell.N, cell.P, cell.K
	lam, ok := Spectrum(n, p, k, cell.Tail)
	if !ok || (defect == EqualEigenvalues && k < 2) {
		return Case{}, fmt.Errorf("calib: no %s table can be planted in cell %v", defect, cell)
	}
	if defect == EqualEigenvalues {
		// Both leading eigenvalues at their mean: the plane is planted, its
		// axes are not.
		m := (lam[0] + lam[1]) / 2
		lam[0], lam[1] = m, m
	}
	_, v := correlationWithSpectrum(rng, lam)
	if defect == NoStructure {
		lam = make([]float64, p)
		for j := range lam {
			lam[j] = 1
		}
		v = mat.NewDense(p, p, nil)
		for j := range p {
			v.Set(j, j, 1)
		}
	}
	x := sample(rng, n, lam, v, cell.Tail)
	ids := make([]string, n)
	for i := range ids {
		ids[i] = fmt.Sprintf("s%04d", i+1)
	}
	c := Case{Index: index, Cell: cell, Defect: defect, Seed: seed ^ uint64(index+1)*golden, Scaling: analysis.ScaleUnit}
	// Planted samples: distinct rows chosen at random.
	pick := func(m int) []int { return rng.Perm(n)[:m] }
	switch defect {
	case OffModel:
		// Each planted sample keeps its place in the model plane, and its
		// residual is replaced by one of squared length twice the
		// Bonferroni limit of Q, σ²·χ²_{p−k}(1 − 0.05/n), along a random
		// unit direction of the noise space (eigenvectors k..p−1): gross at
		// the family-wise level, yet adding only d²/n to the variance along
		// its direction, too little to build a component of its own (a
		// larger push makes each such sample a component, and the defect
		// would be another one). Replacing rather than adding puts every
		// planted sample at the stated distance: added to the sample's own
		// residual, the push was partly cancelled on one table in twenty.
		limit := lam[k] * distuv.ChiSquared{K: float64(p - k)}.Quantile(1-0.05/float64(n))
		for _, i := range pick(3) {
			dir := make([]float64, p)
			norm := 0.0
			for m := k; m < p; m++ {
				w := rng.NormFloat64()
				coord := 0.0 // the sample's coordinate along eigenvector m
				for j := range p {
					dir[j] += w * v.At(j, m)
					coord += x.At(i, j) * v.At(j, m)
				}
				for j := range p {
					x.Set(i, j, x.At(i, j)-coord*v.At(j, m))
				}
			}
			for _, d := range dir {
				norm += d * d
			}
			f := math.Sqrt(2 * limit / norm)
			for j := range p {
				x.Set(i, j, x.At(i, j)+f*dir[j])
			}
			c.Planted = append(c.Planted, ids[i])
		}
	case AlongModel:
		// Each planted sample's coordinate along the first eigenvector is
		// set to ±7 standard deviations (replaced, not added to, so that
		// every one lies at that distance).
		for _, i := range pick(3) {
			sign := 1.0
			if rng.IntN(2) == 0 {
				sign = -1
			}
			coord := 0.0
			for j := range p {
				coord += x.At(i, j) * v.At(j, 0)
			}
			shift := sign*7*math.Sqrt(lam[0]) - coord
			for j := range p {
				x.Set(i, j, x.At(i, j)+shift*v.At(j, 0))
			}
			c.Planted = append(c.Planted, ids[i])
		}
	case SkewedVariable:
		for i := range n {
			x.Set(i, 0, math.Exp(x.At(i, 0)))
		}
		c.Planted = []string{"v1"}
	case MixedUnits:
		for i := range n {
			x.Set(i, 0, 1000*x.At(i, 0))
		}
		c.Scaling = analysis.ScaleNone
		c.Planted = []string{"v1"}
	case DuplicateRows:
		rows := pick(4)
		for d := 0; d < 4; d += 2 {
			src, dst := rows[d], rows[d+1]
			for j := range p {
				x.Set(dst, j, x.At(src, j))
			}
			c.Planted = append(c.Planted, ids[src], ids[dst])
		}
	case LoneComponent:
		const extra = 3
		wide := mat.NewDense(n, p+extra, nil)
		wide.Slice(0, n, 0, p).(*mat.Dense).Copy(x)
		lone := rng.IntN(n)
		for i := range n {
			for j := p; j < p+extra; j++ {
				if i == lone {
					wide.Set(i, j, 2*math.Sqrt(float64(n)))
				} else {
					wide.Set(i, j, rng.NormFloat64())
				}
			}
		}
		x = wide
		c.Planted = []string{ids[lone]}
	}
	c.Table = intake.TableFromMatrix(fmt.Sprintf("calib-%s-%d", defect, index), x, nil, ids)
	return c, nil
}
