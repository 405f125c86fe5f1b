package analysis

import (
	"math"
	"math/rand/v2"
	"slices"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// DefaultBootstrap is the default number of bootstrap resamples.
const DefaultBootstrap = 500

// Stability is the bootstrap assessment of a PCA (Efron 1979, Ann. Statist.
// 7:1–26; for PCA, Jackson 1993, Ecology 74:2204–2214; Timmerman, Kiers &
// Smilde 2007, Brit. J. Math. Statist. Psychol. 60:431–462).
//
// Every resample draws n rows with replacement and redoes the whole
// preprocessing (its own means and scales) before its decomposition: the
// bootstrap of the pipeline, not of the scores. Its retained loadings are
// aligned to the reference twice: by a sign flip per component, and by an
// orthogonal Procrustes rotation of the whole retained block (Schönemann
// 1966, Psychometrika 31:1–10), which ignores how variance is shared out
// within the retained subspace.
type Stability struct {
	Resamples int // requested
	Used      int // used: every resample whose decomposition succeeded
	// Degenerate counts resamples skipped because their decomposition
	// failed or a retained eigenvalue was zero; with real data it is 0.
	Degenerate int
	// ConstantResamples counts the used resamples in which some variable
	// took a single value. They are kept: that variable's centred column is
	// identically zero in the resample, so it enters with zero variance
	// whatever its divisor (the reference divisor, see scaleFactor), and
	// its loadings there are zero.
	ConstantResamples int

	Components []ComponentStability // per retained component
	// Congruence and Procrustes hold, per retained component, Tucker's φ of
	// every used resample (in resample order) after sign alignment and after
	// the Procrustes rotation: the distributions behind Components.
	Congruence, Procrustes [][]float64
	// Loadings[j][a] summarises the sign-aligned bootstrap loadings of
	// variable j on component a.
	Loadings [][]LoadingInterval
	// Eigenvalues and Percent hold 95 % percentile intervals for every
	// component's eigenvalue and share of the variance (in percent).
	Eigenvalues []Interval
	Percent     []Interval
	// SubspaceAngles holds, per resample (in resample order; NaN for one
	// not used), the largest principal angle in degrees between the
	// reference retained subspace and the resample's: how far resampling
	// turns the model, the yardstick of the influence check.
	SubspaceAngles []float64
	// EigenvaluesBCa and PercentBCa hold 95 % BCa intervals of the same
	// (BCaInterval, acceleration from the leave-one-out eigenvalues): they
	// correct the percentile intervals for the bias of sample eigenvalues
	// (the largest overestimated, the smallest underestimated), which puts
	// the estimate near one edge of its percentile interval. NaN where
	// undefined, or when the leave-one-out work exceeds InfluenceBudget.
	EigenvaluesBCa []Interval
	PercentBCa     []Interval

	// Scheme is SchemeFull or, for very tall tables, SchemeBLB; then
	// SubsetSize (b), Subsets (s) and PerSubset (r) describe the little
	// bootstraps, and SwitchRows is the n from which the scheme is used.
	Scheme                                     string
	SubsetSize, Subsets, PerSubset, SwitchRows int
}

// ComponentStability summarises Tucker's congruence coefficient between the
// reference loadings of a component and the resamples' loadings.
type ComponentStability struct {
	CongruenceMedian float64 // after sign alignment
	CongruenceP5     float64
	ProcrustesMedian float64 // after Procrustes rotation of the retained block
	ProcrustesP5     float64
}

// LoadingInterval is the bootstrap mean and 95 % percentile interval of one
// loading.
type LoadingInterval struct {
	Mean, Low, High float64
}

// ExcludesZero reports whether the interval lies entirely on one side of 0.
func (l LoadingInterval) ExcludesZero() bool { return l.Low > 0 || l.High < 0 }

// Interval is a 95 % percentile interval.
type Interval struct{ Low, High float64 }

// TuckerCongruence returns φ(x, y) = Σxy / √(Σx² Σy²) (Tucker 1951; Lorenzo-
// Seva & ten Berge 2006, Methodology 2:57–64).
func TuckerCongruence(x, y []float64) float64 {
	d := floats.Dot(x, y)
	nx, ny := floats.Dot(x, x), floats.Dot(y, y)
	if nx == 0 || ny == 0 {
		return 0
	}
	return d / math.Sqrt(nx*ny)
}

// resampleResult is what one resample contributes.
type resampleResult struct {
	ok         bool
	constant   bool      // some variable was constant in the resample
	eigen      []float64 // all m eigenvalues
	total      float64   // total variance of the resample
	phi, procr []float64 // per retained component
	angle      float64   // largest principal angle to the reference subspace, degrees
	loadings   []float64 // p × k aligned loadings (tall path), row-major
	coef       []float64 // n × k coefficients (wide path), see wideLoadings
}

// bootstrapper holds what every resample reads. It never holds a copy of the
// data per resample: a resample is a vector of counts, how often each row was
// drawn.
type bootstrapper struct {
	n, p, m, k int
	total      int // the resamples' total weight: n, or the table's n for a little bootstrap
	scaling    Scaling
	z          *mat.Dense // preprocessed reference data
	zt         []float64  // zᵀ, p × n row-major: each variable contiguous
	zt2        []float64  // (zᵀ)² element-wise, for resample variances (wide path)
	refScale   []float64  // the reference divisors c_j (for Pareto rescaling)
	refSD      []float64  // sd of each reference preprocessed column
	ref        *mat.Dense // p × k reference loadings
	// Wide data without scaling stay in the reference row space: z = T Vᵀ.
	scoresAll *mat.Dense // n × m reference scores of all components
	loadAll   *mat.Dense // p × m reference loadings of all components
	// imp, when not nil, makes every resample redo the iterative
	// imputation (bootstrap_impute.go).
	imp *bootImpute
}

// Bootstrap runs B resamples of the pipeline behind r and summarises the
// stability of its retained components. It is exact: each resample's
// eigenvalues and loadings equal those of preprocessing and decomposing the
// resampled rows directly, to rounding (a test compares them). Two
// reductions make it fast without approximation:
//
//   - Tall data (n ≥ p): a resample's p×p cross-product is Σᵢ wᵢ zᵢzᵢᵀ for
//     the counts wᵢ, from which its own means, scales and correlation (or
//     covariance) follow; no rows are copied.
//   - Wide data (p > n): the resample's nonzero spectrum is that of an n×n
//     matrix. Without scaling, resampled and re-centred rows stay in the row
//     space of the data, z = T Vᵀ, so the work is on the n × m scores alone
//     (Fisher, Caffo, Schwartz & Zipunnikov 2016, J. Amer. Statist. Assoc.
//     111:846–860). A resample's own rescaling is a diagonal in variable
//     space, which leaves that row space, so with scaling the n×n Gram
//     matrix is formed from the rescaled rows (O(n²p), still never p×p).
//
// Resamples draw from their own random streams (seed, index), so the result
// does not depend on threads.
func Bootstrap(r *Result, resamples int, seed uint64, threads int, progress Progress) Stability {
	st := Stability{Resamples: resamples, Scheme: SchemeFull}
	if resamples <= 0 {
		return st
	}
	if n, p := r.Z.Dims(); blbUsed(n, p, resamples) {
		return bagOfLittleBootstraps(r, resamples, seed, threads, progress)
	}
	b := newBootstrapper(r)
	n, p := b.n, b.p
	tall := n >= p || b.imp != nil // imputed resamples keep their loadings as the tall path does

	results := make([]resampleResult, resamples)
	counts := make([][]int32, resamples)
	perWorker := int64(8 * (n + p*p + 4*p))
	if !tall {
		perWorker = int64(8 * (n*p + n*n))
	}
	workers := workersFor(threads, perWorker)
	newWorkspace := func() *bootWorkspace { return &bootWorkspace{} }
	parallelFor(resamples, workers, newWorkspace, func(w *bootWorkspace, i int) {
		c := bootstrapDraw(seed, i, n)
		counts[i] = c
		results[i] = b.resample(w, c)
	}, "bootstrap", progress)

	var used []int
	for i, res := range results {
		if res.ok {
			used = append(used, i)
			if res.constant {
				st.ConstantResamples++
			}
		}
	}
	st.Used, st.Degenerate = len(used), resamples-len(used)
	if st.Used == 0 {
		return st
	}
	st.summarise(b, results, counts, used, tall, workers)
	inf := r.Samples.Influence // exact leave-one-out eigenvalues, or nil
	st.bcaIntervals(r, results, used, inf.Eigenvalues, inf.Total)
	return st
}

// BootstrapLevel is the level of every bootstrap interval.
const BootstrapLevel = 0.95

// bcaIntervals fills EigenvaluesBCa and PercentBCa from the used resamples
// and the leave-one-out eigenvalues jk (nil: no acceleration available, so
// the intervals are left undefined).
func (st *Stability) bcaIntervals(r *Result, results []resampleResult, used []int, jk [][]float64, jkTotal []float64) {
	m := len(r.Decomp.Eigenvalues)
	refTotal := 0.0
	for _, l := range r.Decomp.Eigenvalues {
		refTotal += l
	}
	st.EigenvaluesBCa = make([]Interval, m)
	st.PercentBCa = make([]Interval, m)
	reps := make([]float64, len(used))
	pct := make([]float64, len(used))
	var jack, jackPct []float64
	if jk != nil {
		jack, jackPct = make([]float64, len(jk)), make([]float64, len(jk))
	}
	for a := 0; a < m; a++ {
		if jk == nil {
			st.EigenvaluesBCa[a] = Interval{math.NaN(), math.NaN()}
			st.PercentBCa[a] = Interval{math.NaN(), math.NaN()}
			continue
		}
		for x, i := range used {
			reps[x] = results[i].eigen[a]
			pct[x] = 100 * results[i].eigen[a] / results[i].total
		}
		for i := range jk {
			jack[i] = 0 // without a row, wide data have one eigenvalue fewer
			if a < len(jk[i]) {
				jack[i] = jk[i][a]
			}
			jackPct[i] = 100 * jack[i] / jkTotal[i]
		}
		lo, hi := BCaInterval(r.Decomp.Eigenvalues[a], reps, jack, BootstrapLevel)
		st.EigenvaluesBCa[a] = Interval{lo, hi}
		lo, hi = BCaInterval(100*r.Decomp.Eigenvalues[a]/refTotal, pct, jackPct, BootstrapLevel)
		st.PercentBCa[a] = Interval{lo, hi}
	}
}

func newBootstrapper(r *Result) *bootstrapper {
	n, p := r.Z.Dims()
	b := &bootstrapper{
		n: n, p: p, m: r.Decomp.Components(), k: r.Retained, total: n,
		scaling:  r.Prep.Scaling,
		z:        r.Z,
		refScale: r.Prep.Scales,
		ref:      mat.DenseCopyOf(r.RetainedLoadings()),
	}
	b.imp = newBootImpute(r)
	b.zt = transpose(r.Z)
	b.refSD = make([]float64, p)
	for j := 0; j < p; j++ {
		col := b.zt[j*n : (j+1)*n]
		b.refSD[j] = math.Sqrt(floats.Dot(col, col) / float64(n-1))
	}
	if n < p && b.scaling == ScaleNone {
		b.loadAll = r.Decomp.Loadings
		b.scoresAll = r.Decomp.Scores(r.Z, b.m)
	}
	if n < p && (b.scaling == ScaleUnit || b.scaling == ScalePareto) {
		b.zt2 = make([]float64, len(b.zt))
		for i, v := range b.zt {
			b.zt2[i] = v * v
		}
	}
	return b
}

// resample computes one resample's result from its counts.
func (b *bootstrapper) resample(w *bootWorkspace, counts []int32) resampleResult {
	if b.imp != nil {
		return b.imputedResample(counts)
	}
	if b.n >= b.p {
		return b.tallResample(w, counts)
	}
	return b.wideResample(w, counts)
}

// drawCounts draws n rows with replacement and returns how often each row
// was drawn.
func drawCounts(rng *rand.Rand, n int) []int32 {
	c := make([]int32, n)
	for i := 0; i < n; i++ {
		c[rng.IntN(n)]++
	}
	return c
}

func transpose(z *mat.Dense) []float64 {
	n, p := z.Dims()
	raw := z.RawMatrix()
	out := make([]float64, n*p)
	for i := 0; i < n; i++ {
		row := raw.Data[i*raw.Stride : i*raw.Stride+p]
		for j, v := range row {
			out[j*n+i] = v
		}
	}
	return out
}

type bootWorkspace struct {
	sel           []int32
	weights       []float64
	tmp, means, g []float64
	cross         []float64
	rows          []float64
	gram          []float64
	leadingSolver
}

// leadingSolver finds the leading eigenvectors of symmetric matrices,
// keeping its workspace from call to call.
type leadingSolver struct {
	eig    mat.EigenSym
	values []float64
	vecs   mat.Dense
	top    topEigen
}

// leading sets w.values to all the eigenvalues of the symmetric d×d matrix
// whose upper triangle is a (ascending) and returns the eigenvectors of the
// k largest as columns, largest first: by the shortcut of leadingEigen, or
// by the full decomposition where the shortcut declines.
func (w *leadingSolver) leading(a []float64, d, k int) (*mat.Dense, bool) {
	if w.top.leadingEigen(a, d, k) {
		w.values = w.top.vals
		return &w.top.vecs, true
	}
	sym := mat.NewSymDense(d, a)
	if !w.eig.Factorize(sym, true) {
		return nil, false
	}
	w.values = w.eig.Values(grow(w.values, d))
	w.vecs.Reset() // the size may change from call to call
	w.eig.VectorsTo(&w.vecs)
	lead := mat.NewDense(d, k, nil)
	for c := 0; c < k; c++ {
		for j := 0; j < d; j++ {
			lead.Set(j, c, w.vecs.At(j, d-1-c))
		}
	}
	return lead, true
}

func grow(s []float64, n int) []float64 {
	if cap(s) < n {
		return make([]float64, n)
	}
	return s[:n]
}

// scaleFactor returns g_j, the factor that turns a reference-preprocessed
// column into the resample's own preprocessing, given the resample's
// standard deviation and range of that column in reference units; constant
// is true when the column takes one value in the resample.
//
// With z = (x − μ)/c: unit scaling divides by sd_b(x) = c·sd_b(z), so
// g = 1/sd_b(z); Pareto divides by √(c·sd_b(z)), so g = √(c/sd_b(z)); range
// divides by c·range_b(z), so g = 1/range_b(z); none leaves g = 1.
//
// A constant column has no scale of its own in the resample. Its centred
// values are all zero, so any divisor gives the same matrix: the resample
// keeps the reference divisor c_j for it (g would be 1), and g = 0 is
// returned so that the rounding left by centring (x̄ subtracted from equal
// values) enters as exact zeros. The resample is kept, not skipped: on a
// small table with a variable of few distinct values such resamples are
// common (a third of 500 on a 40-row table), and dropping them would bias
// the stability summary towards the resamples that happen to spread that
// variable.
func (b *bootstrapper) scaleFactor(j int, sd, rng float64) (g float64, constant bool) {
	// Constancy is judged on the range of the drawn values, which is exact,
	// not on the standard deviation, which the cross-product path obtains by
	// cancellation (Σwz² − n·m²) and so carries rounding of about 1e-8·|m|
	// even when every drawn value is equal.
	if b.scaling != ScaleNone && rng <= 1e-10*b.refSD[j] {
		return 0, true
	}
	switch b.scaling {
	case ScaleUnit:
		return 1 / sd, false
	case ScalePareto:
		return math.Sqrt(b.refScale[j] / sd), false
	case ScaleRange:
		return 1 / rng, false
	}
	return 1, false
}

// rangeIfNeeded returns the range of variable j over the rows drawn when
// scaleFactor needs it: always under range scaling, and under the other
// scalings only when sd is small enough that the variable might be
// constant. A constant variable's sd, obtained by cancellation, is about
// √ε·|m| ≈ 1.5e-8·|m| (m its mean), so sd above 1e-6·(refSD + |m|) proves
// it is not constant, and +Inf stands in for the range, which is then
// not used. The range costs a pass over n values per variable, which was a
// quarter of the tall bootstrap.
func (b *bootstrapper) rangeIfNeeded(j int, sd, mean float64, counts []int32) float64 {
	switch {
	case b.scaling == ScaleNone:
		return 0
	case b.scaling != ScaleRange && sd > 1e-6*(b.refSD[j]+math.Abs(mean)):
		return math.Inf(1)
	}
	return b.columnRange(j, counts)
}

// columnRange returns the range of variable j over the rows drawn, in
// reference units.
func (b *bootstrapper) columnRange(j int, counts []int32) float64 {
	col := b.zt[j*b.n : (j+1)*b.n]
	lo, hi := math.Inf(1), math.Inf(-1)
	for i, c := range counts {
		if c == 0 {
			continue
		}
		if v := col[i]; v < lo {
			lo = v
		}
		if v := col[i]; v > hi {
			hi = v
		}
	}
	return hi - lo
}

// resampleScaling fills means[j] and g[j] for the variables j in
// [from, to): the resample's mean in reference units and its scale factor
// (see scaleFactor), from the counts, by matrix–vector products with zᵀ and
// (zᵀ)². weights holds the counts as floats; tmp needs to − from entries.
// It returns true when some variable is constant in the resample (its g is
// then 0, see scaleFactor).
func (b *bootstrapper) resampleScaling(counts []int32, weights []float64, from, to int, means, g, tmp []float64) (constant bool) {
	n, rows := b.n, to-from
	nf := float64(n)
	w := blas64.Vector{N: n, Inc: 1, Data: weights}
	zt := blas64.General{Rows: rows, Cols: n, Stride: n, Data: b.zt[from*n : to*n]}
	blas64.Gemv(blas.NoTrans, 1/nf, zt, w, 0, blas64.Vector{N: rows, Inc: 1, Data: means[from:to]})
	needSD := b.scaling == ScaleUnit || b.scaling == ScalePareto
	if needSD {
		zt2 := blas64.General{Rows: rows, Cols: n, Stride: n, Data: b.zt2[from*n : to*n]}
		blas64.Gemv(blas.NoTrans, 1, zt2, w, 0, blas64.Vector{N: rows, Inc: 1, Data: tmp[:rows]})
	}
	for j := from; j < to; j++ {
		var sd, rng float64
		if needSD {
			m := means[j]
			sd = math.Sqrt(math.Max(tmp[j-from]-nf*m*m, 0) / (nf - 1))
		}
		if b.scaling != ScaleNone {
			rng = b.rangeIfNeeded(j, sd, means[j], counts)
		}
		gj, c := b.scaleFactor(j, sd, rng)
		g[j] = gj
		constant = constant || c
	}
	return constant
}

// tallResample handles n ≥ p through the p×p cross-product of the counts:
// the rows drawn (each once, weighted by √count) are gathered variable by
// variable and their cross-product taken with one symmetric rank-k update.
func (b *bootstrapper) tallResample(w *bootWorkspace, counts []int32) resampleResult {
	n, p := b.n, b.p
	w.sel = w.sel[:0]
	w.weights = w.weights[:0]
	for i, c := range counts {
		if c > 0 {
			w.sel = append(w.sel, int32(i))
			w.weights = append(w.weights, math.Sqrt(float64(c)))
		}
	}
	nu := len(w.sel)
	w.rows = grow(w.rows, p*nu)
	w.means = grow(w.means, p)
	w.g = grow(w.g, p)
	w.cross = grow(w.cross, p*p)
	sqrtW := w.weights
	nf := float64(b.total)
	for j := 0; j < p; j++ {
		col := b.zt[j*n : (j+1)*n]
		row := w.rows[j*nu : (j+1)*nu]
		for r, i := range w.sel {
			row[r] = sqrtW[r] * col[i]
		}
		w.means[j] = floats.Dot(sqrtW, row) / nf
	}
	// S = Σ w_i z_i z_iᵀ − n m mᵀ: the resample's centred cross-product. The
	// reference data are already centred and scaled, so the correction term
	// is small and loses no precision.
	a := blas64.General{Rows: p, Cols: nu, Stride: nu, Data: w.rows}
	gramUpper(blas64.Symmetric{N: p, Stride: p, Uplo: blas.Upper, Data: w.cross}, a)
	for j := 0; j < p; j++ {
		for l := j; l < p; l++ {
			w.cross[j*p+l] -= nf * w.means[j] * w.means[l]
		}
	}
	constant := false
	for j := 0; j < p; j++ {
		sd := math.Sqrt(math.Max(w.cross[j*p+j], 0) / (nf - 1))
		g, c := b.scaleFactor(j, sd, b.rangeIfNeeded(j, sd, w.means[j], counts))
		w.g[j] = g
		constant = constant || c
	}
	total := 0.0
	for j := 0; j < p; j++ {
		for l := j; l < p; l++ {
			w.cross[j*p+l] *= w.g[j] * w.g[l]
		}
		total += w.cross[j*p+j]
	}
	lead, ok := w.leading(w.cross, p, b.k)
	if !ok {
		return resampleResult{}
	}
	res := resampleResult{ok: true, constant: constant, total: total / (nf - 1), eigen: make([]float64, b.m)}
	for a := 0; a < b.m; a++ {
		res.eigen[a] = math.Max(w.values[p-1-a], 0) / (nf - 1)
	}
	v := mat.DenseCopyOf(lead)
	b.align(&res, v, nil)
	res.loadings = v.RawMatrix().Data
	return res
}

// wideResample handles p > n through an n_u × n_u Gram matrix, n_u being
// the number of distinct rows drawn: rows drawn w times enter once, weighted
// by √w, which leaves the nonzero spectrum unchanged.
func (b *bootstrapper) wideResample(w *bootWorkspace, counts []int32) resampleResult {
	n, p, k := b.n, b.p, b.k
	var sel []int
	for i, c := range counts {
		if c > 0 {
			sel = append(sel, i)
		}
	}
	nu := len(sel)
	nf := float64(n)
	w.means = grow(w.means, p)
	w.g = grow(w.g, p)
	w.tmp = grow(w.tmp, p)
	w.weights = grow(w.weights, n)
	for i, c := range counts {
		w.weights[i] = float64(c)
	}
	constant := b.resampleScaling(counts, w.weights, 0, p, w.means, w.g, w.tmp)
	var cols int // width of the rows whose Gram matrix is taken
	if b.scoresAll != nil {
		// Row space: rows of z are rows of T Vᵀ, so work on T (n × m).
		cols = b.m
		w.rows = grow(w.rows, nu*cols)
		tm := make([]float64, cols)
		for i, c := range counts {
			if c > 0 {
				floats.AddScaled(tm, float64(c), b.scoresAll.RawRowView(i))
			}
		}
		floats.Scale(1/nf, tm)
		for r, i := range sel {
			row := w.rows[r*cols : (r+1)*cols]
			sw := math.Sqrt(float64(counts[i]))
			for a, v := range b.scoresAll.RawRowView(i) {
				row[a] = sw * (v - tm[a])
			}
		}
	} else {
		cols = p
		w.rows = grow(w.rows, nu*cols)
		for r, i := range sel {
			row := w.rows[r*p : (r+1)*p]
			sw := math.Sqrt(float64(counts[i]))
			for j, v := range b.z.RawRowView(i) {
				row[j] = sw * (v - w.means[j]) * w.g[j]
			}
		}
	}
	w.gram = grow(w.gram, nu*nu)
	rows := blas64.General{Rows: nu, Cols: cols, Stride: cols, Data: w.rows}
	gramUpper(blas64.Symmetric{N: nu, Stride: nu, Uplo: blas.Upper, Data: w.gram}, rows)
	total := 0.0
	for r := 0; r < nu; r++ {
		total += w.gram[r*nu+r]
	}
	if k > nu {
		return resampleResult{}
	}
	lead, ok := w.leading(w.gram, nu, k)
	if !ok {
		return resampleResult{}
	}
	res := resampleResult{ok: true, constant: constant, total: total / (nf - 1), eigen: make([]float64, b.m)}
	for a := 0; a < b.m && a < nu; a++ {
		res.eigen[a] = math.Max(w.values[nu-1-a], 0) / (nf - 1)
	}
	// coef[i][a] = √w_i u_ia / s_a over the distinct rows: the resample's
	// loading of variable j on component a is then
	// g_j (Σ_i z_ij coef_ia − m_j Σ_i coef_ia), see wideLoadings.
	coef := make([]float64, n*k)
	for a := 0; a < k; a++ {
		ev := w.values[nu-1-a]
		if ev <= 0 {
			return resampleResult{}
		}
		s := math.Sqrt(ev)
		for r, i := range sel {
			coef[i*k+a] = math.Sqrt(float64(counts[i])) * lead.At(r, a) / s
		}
	}
	var v *mat.Dense
	if b.scoresAll != nil {
		// V_b = V (Aᵀ U / s), with A the weighted, centred score rows.
		h := mat.NewDense(cols, k, nil)
		for a := 0; a < k; a++ {
			s := math.Sqrt(w.values[nu-1-a])
			for r := 0; r < nu; r++ {
				u := lead.At(r, a) / s
				for c := 0; c < cols; c++ {
					h.Set(c, a, h.At(c, a)+u*w.rows[r*cols+c])
				}
			}
		}
		v = mat.NewDense(p, k, nil)
		mulNarrow(v.RawMatrix(), b.loadAll.RawMatrix(), h.RawMatrix())
	} else {
		v = b.wideLoadings(w.means, w.g, coef, 0, p)
	}
	b.align(&res, v, coef)
	res.coef = coef
	return res
}

// wideLoadings returns the resample loadings of variables [from, to) from
// the coefficients: V[j][a] = g_j (Σ_i z_ij coef_ia − m_j Σ_i coef_ia).
func (b *bootstrapper) wideLoadings(means, g, coef []float64, from, to int) *mat.Dense {
	n, k := b.n, b.k
	colSum := make([]float64, k)
	for i := 0; i < n; i++ {
		for a := 0; a < k; a++ {
			colSum[a] += coef[i*k+a]
		}
	}
	v := mat.NewDense(to-from, k, nil)
	zt := blas64.General{Rows: to - from, Cols: n, Stride: n, Data: b.zt[from*n : to*n]}
	mulNarrow(v.RawMatrix(), zt, blas64.General{Rows: n, Cols: k, Stride: k, Data: coef})
	raw := v.RawMatrix().Data
	for j := from; j < to; j++ {
		row := raw[(j-from)*k : (j-from+1)*k]
		for a := range row {
			row[a] = g[j] * (row[a] - means[j]*colSum[a])
		}
	}
	return v
}

// align flips the sign of each resample component to agree with the
// reference (flipping coef too), measures Tucker's congruence per
// component, and measures it again after an orthogonal Procrustes rotation
// of the retained block onto the reference.
func (b *bootstrapper) align(res *resampleResult, v *mat.Dense, coef []float64) {
	p, k := b.p, b.k
	res.angle = LargestPrincipalAngle(b.ref, v)
	res.phi = make([]float64, k)
	res.procr = make([]float64, k)
	col := make([]float64, p)
	refCol := make([]float64, p)
	for a := 0; a < k; a++ {
		mat.Col(col, a, v)
		mat.Col(refCol, a, b.ref)
		phi := TuckerCongruence(col, refCol)
		if phi < 0 {
			phi = -phi
			for j := 0; j < p; j++ {
				v.Set(j, a, -v.At(j, a))
			}
			for i := 0; coef != nil && i < b.n; i++ {
				coef[i*k+a] = -coef[i*k+a]
			}
		}
		res.phi[a] = phi
	}
	// Procrustes: R = P Qᵀ from the SVD Vᵀ V_ref = P Σ Qᵀ minimises
	// ‖V R − V_ref‖ over orthogonal R (Schönemann 1966).
	var cross mat.Dense
	cross.Mul(v.T(), b.ref)
	var svd mat.SVD
	if !svd.Factorize(&cross, mat.SVDFull) {
		copy(res.procr, res.phi)
		return
	}
	var pm, qm, rot, rotated mat.Dense
	svd.UTo(&pm)
	svd.VTo(&qm)
	rot.Mul(&pm, qm.T())
	rotated.Mul(v, &rot)
	for a := 0; a < k; a++ {
		mat.Col(col, a, &rotated)
		mat.Col(refCol, a, b.ref)
		res.procr[a] = TuckerCongruence(col, refCol)
	}
}

// summarise turns the resample results into the stability summary.
func (st *Stability) summarise(b *bootstrapper, results []resampleResult, counts [][]int32, used []int, tall bool, workers int) {
	p, k, m := b.p, b.k, b.m
	u := len(used)
	vals := make([]float64, u)
	sortedPercentiles := func(fill func(i int) float64) (lo, hi, median, p5, mean float64) {
		sum := 0.0
		for x, i := range used {
			vals[x] = fill(i)
			sum += vals[x]
		}
		slices.Sort(vals)
		return percentile(vals, 2.5), percentile(vals, 97.5), percentile(vals, 50), percentile(vals, 5), sum / float64(u)
	}
	st.SubspaceAngles = make([]float64, len(results))
	for i, res := range results {
		st.SubspaceAngles[i] = math.NaN()
		if res.ok {
			st.SubspaceAngles[i] = res.angle
		}
	}
	st.Components = make([]ComponentStability, k)
	st.Congruence = make([][]float64, k)
	st.Procrustes = make([][]float64, k)
	for a := 0; a < k; a++ {
		for _, i := range used {
			st.Congruence[a] = append(st.Congruence[a], results[i].phi[a])
			st.Procrustes[a] = append(st.Procrustes[a], results[i].procr[a])
		}
		_, _, med, p5, _ := sortedPercentiles(func(i int) float64 { return results[i].phi[a] })
		st.Components[a].CongruenceMedian, st.Components[a].CongruenceP5 = med, p5
		_, _, med, p5, _ = sortedPercentiles(func(i int) float64 { return results[i].procr[a] })
		st.Components[a].ProcrustesMedian, st.Components[a].ProcrustesP5 = med, p5
	}
	st.Eigenvalues = make([]Interval, m)
	st.Percent = make([]Interval, m)
	for a := 0; a < m; a++ {
		lo, hi, _, _, _ := sortedPercentiles(func(i int) float64 { return results[i].eigen[a] })
		st.Eigenvalues[a] = Interval{lo, hi}
		lo, hi, _, _, _ = sortedPercentiles(func(i int) float64 { return 100 * results[i].eigen[a] / results[i].total })
		st.Percent[a] = Interval{lo, hi}
	}

	st.Loadings = make([][]LoadingInterval, p)
	for j := range st.Loadings {
		st.Loadings[j] = make([]LoadingInterval, k)
	}
	if tall {
		for j := 0; j < p; j++ {
			for a := 0; a < k; a++ {
				lo, hi, _, _, mean := sortedPercentiles(func(i int) float64 { return results[i].loadings[j*k+a] })
				st.Loadings[j][a] = LoadingInterval{Mean: mean, Low: lo, High: hi}
			}
		}
		return
	}
	// Wide data: the p × k loadings of every resample are not kept; they
	// are rebuilt in blocks of variables from the counts and the n × k
	// coefficients, so memory stays at a block × k × B.
	const block = 256
	blocks := (p + block - 1) / block
	parallelFor(blocks, workers, func() []float64 { return make([]float64, 0) }, func(_ []float64, bi int) {
		from, to := bi*block, min(p, (bi+1)*block)
		width := to - from
		samples := make([]float64, width*k*u) // [j][a][resample]
		means := make([]float64, b.p)
		g := make([]float64, b.p)
		tmp := make([]float64, width)
		weights := make([]float64, b.n)
		for x, i := range used {
			for r, c := range counts[i] {
				weights[r] = float64(c)
			}
			b.resampleScaling(counts[i], weights, from, to, means, g, tmp)
			v := b.wideLoadings(means, g, results[i].coef, from, to)
			for j := 0; j < width; j++ {
				for a := 0; a < k; a++ {
					samples[(j*k+a)*u+x] = v.At(j, a)
				}
			}
		}
		for j := 0; j < width; j++ {
			for a := 0; a < k; a++ {
				s := samples[(j*k+a)*u : (j*k+a+1)*u]
				sum := 0.0
				for _, v := range s {
					sum += v
				}
				slices.Sort(s)
				st.Loadings[from+j][a] = LoadingInterval{Mean: sum / float64(u), Low: percentile(s, 2.5), High: percentile(s, 97.5)}
			}
		}
	}, "", nil)
}
