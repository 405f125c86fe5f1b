package analysis

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"
)

// Influence is the exact leave-one-out sensitivity of the retained
// components: for every sample, what the PCA would have found without it,
// with the whole preprocessing (means and scales) refitted. It replaces a
// leverage rule, which is an affine function of T² (h = 1/n + T²/(n−1))
// and so says nothing T² does not: a sample far along the model need not
// turn the model, and one that alone makes a component does.
type Influence struct {
	// Angle[i] is the largest principal angle, in degrees, between the
	// retained subspace of the full data and that of the data without
	// sample i.
	Angle []float64
	// EigenChange[i][a] is (λ_a⁽⁻ⁱ⁾ − λ_a)/λ_a for each retained
	// component a: the relative change of its eigenvalue without sample i.
	EigenChange [][]float64
	// Limit[i] is the yardstick for sample i, set after the bootstrap
	// (InfluenceLimits); NaN without it.
	Limit []float64
	// Eigenvalues[i] are all the eigenvalues of the pipeline applied to the
	// data without sample i (min(n−2, p) of them, largest first), and
	// Total[i] their sum: the jackknife values behind the acceleration of
	// the BCa intervals. nil when the computation was skipped.
	Eigenvalues [][]float64
	Total       []float64
	// Method says how it was computed; Skipped, when Angle is nil, why not
	// (the eigenvalues may still be there).
	Method, Skipped string
}

// Methods of the leave-one-out computation.
const (
	InfluenceTall = "rank-one downdate of the p×p cross-product per sample, preprocessing refitted in closed form, then its symmetric eigendecomposition"
	InfluenceWide = "the (n−1)×(n−1) Gram matrix of the remaining rows, re-centred and rescaled, per sample, then its symmetric eigendecomposition"
)

// InfluenceBudget bounds the estimated floating-point work of the
// leave-one-out computation; beyond it Influence is skipped with the
// reason. The estimate is n·(9p³ + 2p²) for tall data and n·(9n³ + n²p)
// for wide data (one symmetric eigendecomposition costs about 9d³ for a
// d×d matrix, Golub & Van Loan 2013, §8.3). 2e10 is some seconds on one
// core: a 5,000 × 50 table costs 6e9.
var InfluenceBudget = 2e10

// influenceCost is the estimate InfluenceBudget is compared with.
func influenceCost(n, p int) float64 {
	nf, pf := float64(n), float64(p)
	if n >= p {
		return nf * (9*pf*pf*pf + 2*pf*pf)
	}
	return nf * (9*nf*nf*nf + nf*nf*pf)
}

// LeaveOneOut computes the Influence of every sample of the preprocessed
// data z (n × p, centred and scaled by pp) on the retained loadings v
// (p × k, orthonormal) and their eigenvalues (at least k of them).
//
// It is exact, without refitting n PCAs from the rows:
//
//   - Tall data (n ≥ p). With C = ZᵀZ, the covariance of the data without
//     row i, in the units of z, is S₋ᵢ = (C − n/(n−1)·zᵢzᵢᵀ)/(n−2): the
//     mean without i is −zᵢ/(n−1), and removing it downdates C by one
//     rank-one term. The refitted scales follow from S₋ᵢ's diagonal (range
//     scaling from the second-largest and second-smallest values of a
//     column when i holds its extreme), and rescale S₋ᵢ to G S₋ᵢ G; its
//     leading eigenvectors are the loadings without i. O(p³) per sample.
//   - Wide data (p > n). The nonzero spectrum is that of the Gram matrix
//     of the n−1 remaining rows, centred on their own mean: without
//     scaling it is a re-centred submatrix of ZZᵀ, K_rs + (K_ri + K_si)/(n−1)
//   - K_ii/(n−1)², at O(n²) per sample; with scaling the rows are
//     rescaled first, G changing every product, at O(n²p) per sample.
//     Loadings are V = Wᵀ U Σ⁻¹ from the rescaled rows W.
//
// A variable that is constant once sample i is left out is zero after
// centring whatever its scale; it keeps its reference scale.
//
// The angle is from sines, sin θ_max = ‖(I − VVᵀ)V₋ᵢ‖₂, which keep their
// accuracy for small angles where cosines lose it (Björck & Golub 1973,
// Math. Comp. 27:579–594). Samples are spread over threads; each result is
// written by index, so the output does not depend on threads.
func LeaveOneOut(z *mat.Dense, pp Preprocessing, v mat.Matrix, eigenvalues []float64, threads int) Influence {
	n, p := z.Dims()
	_, k := v.Dims()
	var inf Influence
	switch {
	case n < 3:
		inf.Skipped = fmt.Sprintf("leaving one sample out needs at least 3 samples (n = %d)", n)
		return inf
	case influenceCost(n, p) > InfluenceBudget:
		inf.Skipped = fmt.Sprintf("the exact computation for %d × %d data (about %.1g operations) exceeds the budget of %.1g", n, p, influenceCost(n, p), InfluenceBudget)
		return inf
	}
	l := &looSetup{n: n, p: p, k: k, z: z, scaling: pp.Scaling, scales: pp.Scales, v: mat.DenseCopyOf(v), eigen: eigenvalues[:k]}
	switch {
	case k > min(n-2, p):
		inf.Skipped = fmt.Sprintf("without one sample at most %d components remain, fewer than the %d retained", min(n-2, p), k)
	case k == p:
		inf.Skipped = "every component is retained, so the retained subspace is the whole space and cannot turn"
	default:
		l.angles = true
		inf.Angle = make([]float64, n)
		inf.EigenChange = make([][]float64, n)
	}
	l.prepare()
	inf.Eigenvalues = make([][]float64, n)
	inf.Total = make([]float64, n)
	task := l.tallSample
	inf.Method = InfluenceTall
	perWorker := int64(8 * 4 * p * p)
	if n < p {
		task = l.wideSample
		inf.Method = InfluenceWide
		perWorker = int64(8 * (n*p + 3*n*n))
	}
	parallelFor(n, workersFor(threads, perWorker), func() *looWorkspace { return &looWorkspace{} }, func(w *looWorkspace, i int) {
		res := task(w, i)
		inf.Eigenvalues[i], inf.Total[i] = res.eigenvalues, res.total
		if l.angles {
			inf.Angle[i], inf.EigenChange[i] = res.angle, res.change
		}
	}, "", nil)
	return inf
}

// looResult is what one sample's leave-one-out computation gives.
type looResult struct {
	eigenvalues []float64 // all, largest first
	total       float64
	angle       float64   // NaN unless angles are computed
	change      []float64 // of the retained eigenvalues
}

// looSetup holds what every sample's computation reads.
type looSetup struct {
	n, p, k int
	z       *mat.Dense
	scaling Scaling
	scales  []float64  // reference divisors c_j
	v       *mat.Dense // p × k reference loadings
	eigen   []float64  // k reference eigenvalues
	angles  bool       // whether the retained subspace's angle is computed
	cross   []float64  // tall: ZᵀZ, p×p full; wide without scaling: ZZᵀ, n×n full
	colSS   []float64  // Σ_r z_rj², the centred sum of squares of each column
	refSD   []float64  // sd of each preprocessed column
	ranges  looRanges  // each column's range without one row
}

type looWorkspace struct {
	a, rows []float64
	g       []float64
	eig     mat.EigenSym
	vecs    mat.Dense
	vals    []float64
	top     topEigen
	lead    *mat.Dense // d × k: column a is the eigenvector of the a-th largest eigenvalue
}

func (l *looSetup) prepare() {
	n, p := l.n, l.p
	raw := l.z.RawMatrix()
	zg := blas64.General{Rows: n, Cols: p, Stride: raw.Stride, Data: raw.Data}
	if n >= p {
		l.cross = make([]float64, p*p)
		blas64.Syrk(blas.Trans, 1, zg, 0, blas64.Symmetric{N: p, Stride: p, Uplo: blas.Upper, Data: l.cross})
		mirror(l.cross, p)
	} else if l.scaling == ScaleNone {
		l.cross = make([]float64, n*n)
		gramUpper(blas64.Symmetric{N: n, Stride: n, Uplo: blas.Upper, Data: l.cross}, zg)
		mirror(l.cross, n)
	}
	l.colSS = make([]float64, p)
	l.refSD = make([]float64, p)
	for i := 0; i < n; i++ {
		for j, x := range l.z.RawRowView(i) {
			l.colSS[j] += x * x
		}
	}
	for j := range l.colSS {
		l.refSD[j] = math.Sqrt(l.colSS[j] / float64(n-1))
	}
	l.ranges = newLOORanges(l.z)
}

// mirror copies the upper triangle of a d×d row-major matrix to the lower.
func mirror(a []float64, d int) {
	for r := 0; r < d; r++ {
		for c := 0; c < r; c++ {
			a[r*d+c] = a[c*d+r]
		}
	}
}

// scaleFactors fills g with the factor that turns column j of z, centred
// without sample i, into the refitted preprocessing: 1/sd for unit
// scaling, √(c_j/sd) for Pareto, 1/range for range, 1 without scaling
// (sd and range of z without i; see bootstrapper.scaleFactor for the
// algebra). A column constant without i gets factor 0: it is zero once
// centred, whatever its scale. Constancy is judged on the exact range
// without i, never on the sd, which the downdate obtains by cancellation
// (Σz² − n/(n−1)·z_i²) and so carries rounding of about 1e-8 even when
// every remaining value is equal.
func (l *looSetup) scaleFactors(i int, g []float64) {
	n := float64(l.n)
	zi := l.z.RawRowView(i)
	for j := range g {
		g[j] = 1
		if l.scaling == ScaleNone {
			continue
		}
		rng := l.ranges.without(j, i)
		if rng <= 1e-10*l.refSD[j] {
			g[j] = 0
			continue
		}
		sd := math.Sqrt(math.Max(l.colSS[j]-n/(n-1)*zi[j]*zi[j], 0) / (n - 2))
		switch l.scaling {
		case ScaleUnit:
			g[j] = 1 / sd
		case ScalePareto:
			g[j] = math.Sqrt(l.scales[j] / sd)
		case ScaleRange:
			g[j] = 1 / rng
		}
	}
}

// looRanges gives the range of each column without one row, from the two
// smallest and two largest values of the column.
type looRanges struct {
	lo1, lo2, hi1, hi2 []float64
	loAt, hiAt         []int
}

func newLOORanges(z *mat.Dense) looRanges {
	n, p := z.Dims()
	r := looRanges{lo1: make([]float64, p), lo2: make([]float64, p), hi1: make([]float64, p), hi2: make([]float64, p), loAt: make([]int, p), hiAt: make([]int, p)}
	for j := 0; j < p; j++ {
		lo1, lo2, hi1, hi2 := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
		for i := 0; i < n; i++ {
			v := z.At(i, j)
			if v < lo1 {
				lo1, lo2, r.loAt[j] = v, lo1, i
			} else if v < lo2 {
				lo2 = v
			}
			if v > hi1 {
				hi1, hi2, r.hiAt[j] = v, hi1, i
			} else if v > hi2 {
				hi2 = v
			}
		}
		r.lo1[j], r.lo2[j], r.hi1[j], r.hi2[j] = lo1, lo2, hi1, hi2
	}
	return r
}

// without returns the range of column j without row i.
func (r looRanges) without(j, i int) float64 {
	lo, hi := r.lo1[j], r.hi1[j]
	if i == r.loAt[j] {
		lo = r.lo2[j]
	}
	if i == r.hiAt[j] {
		hi = r.hi2[j]
	}
	return hi - lo
}

// tallSample computes sample i's leave-one-out result through the p×p
// downdate.
func (l *looSetup) tallSample(w *looWorkspace, i int) looResult {
	p := l.p
	nf := float64(l.n)
	w.g = grow(w.g, p)
	w.a = grow(w.a, p*p)
	l.scaleFactors(i, w.g)
	zi := l.z.RawRowView(i)
	beta := nf / (nf - 1)
	total := 0.0
	for r := 0; r < p; r++ {
		for c := r; c < p; c++ {
			w.a[r*p+c] = w.g[r] * w.g[c] * (l.cross[r*p+c] - beta*zi[r]*zi[c]) / (nf - 2)
		}
		total += w.a[r*p+r]
	}
	return l.decompose(w, mat.NewSymDense(p, w.a), 1, total, func(a int) []float64 {
		col := make([]float64, p)
		for j := range col {
			col[j] = w.lead.At(j, a)
		}
		return col
	})
}

// decompose finishes a sample: the eigenvalues of sym divided by div (all
// the data without one sample can carry, min(n−2, p)), and, when angles are
// computed, the retained loadings (loading(a) gives column a from w.vecs)
// and their angle to the reference.
func (l *looSetup) decompose(w *looWorkspace, sym *mat.SymDense, div, total float64, loading func(a int) []float64) looResult {
	d := sym.SymmetricDim()
	res := looResult{total: total / div, angle: math.NaN()}
	if l.angles && w.top.leadingEigen(sym.RawSymmetric().Data, d, l.k) {
		return l.finish(w, res, w.top.vals, &w.top.vecs, div, loading)
	}
	if !w.eig.Factorize(sym, l.angles) {
		res.eigenvalues = make([]float64, min(l.n-2, l.p))
		for a := range res.eigenvalues {
			res.eigenvalues[a] = math.NaN()
		}
		return res
	}
	w.vals = w.eig.Values(grow(w.vals, d))
	if !l.angles {
		return l.finish(w, res, w.vals, nil, div, loading)
	}
	w.eig.VectorsTo(&w.vecs)
	lead := mat.NewDense(d, l.k, nil)
	for a := 0; a < l.k; a++ {
		for j := 0; j < d; j++ {
			lead.Set(j, a, w.vecs.At(j, d-1-a))
		}
	}
	return l.finish(w, res, w.vals, lead, div, loading)
}

// finish fills res from all the eigenvalues vals (ascending) and, when
// angles are computed, the leading eigenvectors lead (d × k, largest first).
func (l *looSetup) finish(w *looWorkspace, res looResult, vals []float64, lead *mat.Dense, div float64, loading func(a int) []float64) looResult {
	d := len(vals)
	w.vals = vals
	res.eigenvalues = make([]float64, min(l.n-2, l.p))
	for a := range res.eigenvalues {
		res.eigenvalues[a] = math.Max(vals[d-1-a], 0) / div
	}
	if !l.angles {
		return res
	}
	w.lead = lead
	res.change = make([]float64, l.k)
	vi := mat.NewDense(l.p, l.k, nil)
	for a := 0; a < l.k; a++ {
		res.change[a] = (res.eigenvalues[a] - l.eigen[a]) / l.eigen[a]
		col := loading(a)
		if col == nil {
			return res
		}
		vi.SetCol(a, col)
	}
	res.angle = LargestPrincipalAngle(l.v, vi)
	return res
}

// wideSample computes sample i's leave-one-out result through the Gram
// matrix of the other rows.
func (l *looSetup) wideSample(w *looWorkspace, i int) looResult {
	n, p := l.n, l.p
	d := n - 1
	nf := float64(n)
	w.a = grow(w.a, d*d)
	w.g = grow(w.g, p)
	l.scaleFactors(i, w.g)
	zi := l.z.RawRowView(i)
	// W: the remaining rows, centred on their own mean −zᵢ/(n−1), rescaled.
	w.rows = grow(w.rows, d*p)
	for r, src := 0, 0; src < n; src++ {
		if src == i {
			continue
		}
		row := w.rows[r*p : (r+1)*p]
		for j, x := range l.z.RawRowView(src) {
			row[j] = (x + zi[j]/(nf-1)) * w.g[j]
		}
		r++
	}
	if l.cross != nil {
		// Without scaling: the re-centred submatrix of ZZᵀ.
		kii := l.cross[i*n+i]
		for r, rs := 0, 0; rs < n; rs++ {
			if rs == i {
				continue
			}
			for c, cs := 0, 0; cs < n; cs++ {
				if cs == i {
					continue
				}
				if c >= r {
					w.a[r*d+c] = l.cross[rs*n+cs] + (l.cross[rs*n+i]+l.cross[cs*n+i])/(nf-1) + kii/((nf-1)*(nf-1))
				}
				c++
			}
			r++
		}
	} else {
		rows := blas64.General{Rows: d, Cols: p, Stride: p, Data: w.rows}
		gramUpper(blas64.Symmetric{N: d, Stride: d, Uplo: blas.Upper, Data: w.a}, rows)
	}
	total := 0.0
	for r := 0; r < d; r++ {
		total += w.a[r*d+r]
	}
	col := make([]float64, d)
	wm := blas64.General{Rows: d, Cols: p, Stride: p, Data: w.rows}
	return l.decompose(w, mat.NewSymDense(d, w.a), nf-2, total, func(a int) []float64 {
		// Loadings are V = Wᵀ U Σ⁻¹ from the rescaled rows W.
		mu := w.vals[d-1-a]
		if mu <= 0 {
			return nil
		}
		for r := 0; r < d; r++ {
			col[r] = w.lead.At(r, a) / math.Sqrt(mu)
		}
		out := make([]float64, p)
		blas64.Gemv(blas.Trans, 1, wm, blas64.Vector{N: d, Inc: 1, Data: col}, 0, blas64.Vector{N: p, Inc: 1, Data: out})
		return out
	})
}

// LargestPrincipalAngle returns, in degrees, the largest principal angle
// between the subspaces spanned by the orthonormal columns of a and b
// (both p × k). Its sine is the largest singular value of (I − aaᵀ)b and
// its cosine the smallest of aᵀb (Björck & Golub 1973, Math. Comp.
// 27:579–594); the angle is taken from both by atan2, so that small angles
// keep their accuracy (an arccosine near 1 loses half the digits).
func LargestPrincipalAngle(a, b mat.Matrix) float64 {
	var m, proj, resid mat.Dense
	m.Mul(a.T(), b)
	proj.Mul(a, &m)
	resid.Sub(b, &proj)
	var rr mat.SymDense
	rr.SymOuterK(1, resid.T())
	var eig mat.EigenSym
	if !eig.Factorize(&rr, false) {
		return math.NaN()
	}
	vals := eig.Values(nil)
	sin := math.Sqrt(math.Max(vals[len(vals)-1], 0))
	var svd mat.SVD
	if !svd.Factorize(&m, mat.SVDNone) {
		return math.NaN()
	}
	s := svd.Values(nil)
	cos := s[len(s)-1]
	return math.Atan2(math.Min(sin, 1), math.Min(cos, 1)) * 180 / math.Pi
}

// bootstrapDraw returns how often each of n rows is drawn in bootstrap
// resample index: Bootstrap draws its resamples here, and InfluenceLimits
// draws them again to know which resamples contain a sample.
func bootstrapDraw(seed uint64, index, n int) []int32 {
	return drawCounts(taskRNG(seed, streamBootstrap, index), n)
}

// InfluenceLimits returns, per sample, the yardstick of the influence
// check: the 95th percentile of the bootstrap subspace angles over the
// resamples that drew that sample. NaN everywhere when the bootstrap did
// not run.
//
// Why only those resamples: a resample leaves out any given sample with
// probability (1 − 1/n)ⁿ ≈ 37 %. If one sample alone makes a component,
// over a third of all resamples lose that component, and the 95th
// percentile of all angles is as large as that sample's own leave-one-out
// angle: the yardstick would hide the very sample it should catch. Among
// the resamples that contain the sample, resampling moves the model only
// as much as the other samples make it move.
//
// Only samples whose angle exceeds the median of all angles need their own
// percentile: the 95th percentile of a subset of about 63 % of the angles
// is at least the 60th percentile of all of them (its rank among them is at
// least 0.95 · 0.63 B), so a sample below the median passes either way; it
// is given the 95th percentile of all angles. The resamples are drawn
// again from their random streams only for such samples.
func InfluenceLimits(inf Influence, st Stability, seed uint64) []float64 {
	n := len(inf.Angle)
	limits := make([]float64, n)
	all := finiteSorted(st.SubspaceAngles)
	if len(all) == 0 {
		for i := range limits {
			limits[i] = math.NaN()
		}
		return limits
	}
	p95, median := percentile(all, 95), percentile(all, 50)
	if st.Scheme == SchemeBLB {
		// Little bootstraps draw from subsets, not from every sample, and
		// their angles are to the subset's own estimate: every sample gets
		// the 95th percentile of all of them.
		for i := range limits {
			limits[i] = p95
		}
		return limits
	}
	var cand []int
	at := map[int]int{}
	for i, a := range inf.Angle {
		limits[i] = p95
		if !(a <= median) { // NaN too: it cannot be judged without its own limit
			at[i] = len(cand)
			cand = append(cand, i)
		}
	}
	if len(cand) == 0 {
		return limits
	}
	drawn := make([][]float64, len(cand))
	for r, angle := range st.SubspaceAngles {
		if math.IsNaN(angle) {
			continue
		}
		c := bootstrapDraw(seed, r, n)
		for _, i := range cand {
			if c[i] > 0 {
				drawn[at[i]] = append(drawn[at[i]], angle)
			}
		}
	}
	for x, i := range cand {
		slices.Sort(drawn[x])
		limits[i] = percentile(drawn[x], 95)
		if len(drawn[x]) == 0 {
			limits[i] = math.NaN()
		}
	}
	return limits
}

// finiteSorted returns the values that are not NaN, sorted.
func finiteSorted(v []float64) []float64 {
	out := make([]float64, 0, len(v))
	for _, x := range v {
		if !math.IsNaN(x) {
			out = append(out, x)
		}
	}
	slices.Sort(out)
	return out
}

// InfluenceLimit returns the 95th percentile of all the bootstrap subspace
// angles (degrees): how far resampling the whole table typically turns the
// retained subspace. NaN when the bootstrap did not run.
func InfluenceLimit(st Stability) float64 {
	all := finiteSorted(st.SubspaceAngles)
	if len(all) == 0 {
		return math.NaN()
	}
	return percentile(all, 95)
}
